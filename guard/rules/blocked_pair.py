"""blocked-pair: the ruleset lists this exact old => new as dangerous.

Accepts: any rewrite not in the ruleset's blocked list.
Vetoes: with "hydroxyzine => hydralazine" blocked, the rewrite hydroxyzine -> hydralazine.
Matching folds case, on the whole rewrite and on each changed word.
"""

from __future__ import annotations

from collections.abc import Mapping

from guard.records import Action, Finding, Rewrite, Tier
from guard.rules.base import PairContext, Rule, Scope, finding
from guard.rules.words import content_tokens
from guard.ruleset.model import PairEntry, RuleSettings
from guard.text.normalize import NormalizedText, normalize_key

NAME = "blocked-pair"


def pair_keys(rw: Rewrite) -> list[tuple[NormalizedText, NormalizedText]]:
    """Folded (old, new) keys of the whole rewrite and of its word-for-word changes."""
    keys = [(normalize_key(rw.old.strip(), fold=True), normalize_key(rw.new.strip(), fold=True))]
    old = content_tokens(rw.old_tokens)
    new = content_tokens(rw.new_tokens)
    if len(old) == len(new) > 1:
        for a, b in zip(old, new, strict=True):
            if a.text != b.text:
                keys.append((normalize_key(a.text, fold=True), normalize_key(b.text, fold=True)))
    return keys


def find_pair(table: Mapping[tuple[str, str], PairEntry], rw: Rewrite) -> PairEntry | None:
    """The first entry of a pair table (blocked or allowed) that matches the rewrite."""
    for key in pair_keys(rw):
        hit = table.get(key)
        if hit is not None:
            return hit
    return None


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    if not ctx.ruleset.blocked:
        return None
    hit = find_pair(ctx.ruleset.blocked, rw)
    if hit is not None:
        return finding(
            NAME,
            Tier.HARD,
            settings,
            "'{old} => {new}' is a blocked pair",
            rewrite=rw.index,
            origin=hit.origin,
            old=hit.old,
            new=hit.new,
        )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    local=True,
    tier=Tier.HARD,
    default_action=Action.VETO,
    check=check,
    doc=__doc__ or "",
)
