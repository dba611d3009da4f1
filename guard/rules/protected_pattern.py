"""protected-pattern: the rewrite touches a span matched by one of the ruleset's patterns.

Patterns (part numbers, versions, lot numbers, gene or chemical notation) run with a time
limit. A pattern that runs out of time on a pair cannot vouch for the text, so every
rewrite of that pair is flagged, never silently accepted.

Accepts: with pattern \\bHM-\\d{4}\\b, "HM-2207 bilge pmup" -> "HM-2207 bilge pump".
Vetoes: with the same pattern, "HM-2207" -> "HM-2270".
"""

from __future__ import annotations

from guard.records import Action, Finding, Rewrite, Tier
from guard.rules.base import PairContext, Rule, Scope, finding
from guard.ruleset.model import RuleSettings

NAME = "protected-pattern"


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    for hit in ctx.pattern_hits:
        touches = not (hit.end <= rw.start or hit.start >= rw.end) or (
            rw.start == rw.end and hit.start < rw.start < hit.end
        )
        if touches:
            return finding(
                NAME,
                Tier.DOMAIN,
                settings,
                "the rewrite changes '{found}', matched by protected pattern '{pattern}'",
                rewrite=rw.index,
                origin=hit.entry.origin,
                pattern=hit.entry.name,
                kind=hit.entry.kind,
                found=ctx.source[hit.start : hit.end],
            )
    for timeout in ctx.pattern_timeouts:
        return finding(
            NAME,
            Tier.DOMAIN,
            settings,
            "protected pattern '{pattern}' ran out of time on this text; the rewrite is held",
            rewrite=rw.index,
            origin=timeout.entry.origin,
            action=Action.FLAG,
            pattern=timeout.entry.name,
            timed_out=True,
        )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    tier=Tier.DOMAIN,
    default_action=Action.VETO,
    check=check,
    doc=__doc__ or "",
)
