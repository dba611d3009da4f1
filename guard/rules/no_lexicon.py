"""no-lexicon (pair level, note only): wordfreq has no word list for the pair's language.

The frequency rules (real-word, rarer-target, unknown-target) then stay silent for the
pair; this note says so, so that a report never looks more certain than it is.

Accepts (no note): a pair in "en". Notes: a pair in "xx-unknown" with a rewrite.
"""

from __future__ import annotations

from guard.records import Action, Finding, Rewrite, Tier
from guard.rules.base import PairContext, Rule, Scope, finding
from guard.ruleset.model import RuleSettings

NAME = "no-lexicon"


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is None
    if ctx.lexicon is None and ctx.rewrites:
        return finding(
            NAME,
            Tier.EVIDENCE,
            settings,
            "no word frequencies for language '{lang}': frequency rules are off for this pair",
            rewrite=None,
            lang=ctx.lang,
        )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.PAIR,
    tier=Tier.EVIDENCE,
    default_action=Action.NOTE,
    check=check,
    doc=__doc__ or "",
)
