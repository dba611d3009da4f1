"""low-confidence (pair level): the speller's own score is under the ruleset's threshold.

Records may carry the speller's confidence in ``score``. Pairs without a score are not
judged. The default threshold of 0.0 lets every score through; a ruleset sets its own from
its speller's calibration.

Accepts: score 0.93 with min-score 0.5. Flags: score 0.21 with min-score 0.5.
"""

from __future__ import annotations

from guard.records import Action, Finding, Rewrite, Tier
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.ruleset.model import RuleSettings

NAME = "low-confidence"


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is None
    min_score = settings.options["min-score"]
    assert isinstance(min_score, float)
    if ctx.score is not None and ctx.rewrites and ctx.score < min_score:
        return finding(
            NAME,
            Tier.EVIDENCE,
            settings,
            "the speller's score {score} is under {min_score}",
            rewrite=None,
            score=ctx.score,
            min_score=min_score,
        )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.PAIR,
    tier=Tier.EVIDENCE,
    default_action=Action.FLAG,
    options={
        "min-score": OptionSpec(default=0.0, type=float, doc="scores under this are held"),
    },
    check=check,
    doc=__doc__ or "",
)
