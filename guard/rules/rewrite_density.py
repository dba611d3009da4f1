"""rewrite-density (pair level): too many rewrites, or too large a share of the text.

A neural speller that paraphrases, or a hostile one that replaces the whole text, rewrites
most words at once. Only texts of at least ``min-words`` words are measured, so that a
one-word query with one fix is not "100 % rewritten". The finding applies to every rewrite
of the pair.

Accepts: "the bilge pmup is noisy today" -> "the bilge pump is noisy today".
Vetoes: "the bilge pump is noisy today" -> "a quiet pump was fitted yesterday".
"""

from __future__ import annotations

from guard.records import Action, Finding, Rewrite, Tier
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.rules.words import content_tokens
from guard.ruleset.model import RuleSettings

NAME = "rewrite-density"


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is None
    if not ctx.rewrites:
        return None
    words = ctx.source_words
    min_words = settings.option("min-words", ctx.lang)
    max_share = settings.option("max-share", ctx.lang)
    max_rewrites = settings.option("max-rewrites", ctx.lang)
    assert (
        isinstance(min_words, int)
        and isinstance(max_share, float)
        and isinstance(max_rewrites, int)
    )
    changed = sum(len(content_tokens(r.old_tokens)) or 1 for r in ctx.rewrites)
    share = changed / max(words, 1)
    if words >= min_words and share > max_share:
        return finding(
            NAME,
            Tier.EVIDENCE,
            settings,
            "the proposal rewrites {changed} of {words} words ({share_pct}%)",
            rewrite=None,
            changed=changed,
            words=words,
            share_pct=round(100 * share),
            max_share=max_share,
        )
    elif max_rewrites and len(ctx.rewrites) > max_rewrites:
        return finding(
            NAME,
            Tier.EVIDENCE,
            settings,
            "the proposal makes {count} rewrites; at most {max_rewrites} are expected",
            rewrite=None,
            count=len(ctx.rewrites),
            max_rewrites=max_rewrites,
        )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.PAIR,
    tier=Tier.EVIDENCE,
    default_action=Action.VETO,
    options={
        "max-share": OptionSpec(
            default=0.6, type=float, doc="largest share of words rewritten", per_lang=True
        ),
        "min-words": OptionSpec(
            default=5, type=int, doc="shorter texts are not measured", per_lang=True
        ),
        "max-rewrites": OptionSpec(
            default=12, type=int, doc="most rewrites in one pair (0: no limit)"
        ),
    },
    check=check,
    doc=__doc__ or "",
)
