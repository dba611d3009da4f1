"""Decision layer: turns the findings of the rules into verdicts.

Rules only say what they saw; this is the one place that applies precedence:
- hard findings (hidden-character, script-change, blocked-pair) always count;
- an allowed pair (a known-good old => new) sets aside domain and evidence findings,
  which are kept in ``overridden`` so an explanation can say so;
- notes never change a verdict;
- pair-level findings count for every rewrite of the pair;
- a rewrite's verdict is the worst action that still counts; a pair's, its worst rewrite's.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

from guard.records import Action, Finding, Rewrite, RewriteVerdict, Tier, Verdict
from guard.rules.blocked_pair import find_pair
from guard.ruleset.model import CompiledRuleset


def decide(
    rewrites: Sequence[Rewrite],
    findings: Mapping[int, Sequence[Finding]],
    pair_findings: Sequence[Finding],
    ruleset: CompiledRuleset,
) -> tuple[RewriteVerdict, ...]:
    """One verdict per rewrite, in order."""
    out: list[RewriteVerdict] = []
    pair = tuple(pair_findings)
    for rw in rewrites:
        own = tuple(findings.get(rw.index, ()))
        if pair:
            own += pair
        allowed = find_pair(ruleset.allowed, rw) if ruleset.allowed else None
        if allowed is not None:
            kept = tuple(f for f in own if f.tier is Tier.HARD)
            overridden = tuple(f for f in own if f.tier is not Tier.HARD)
        else:
            kept, overridden = own, ()
        # most rewrites draw no finding: accepted without looking further
        verdict = Verdict.worst([_VERDICT_OF[f.action] for f in kept]) if kept else Verdict.ACCEPT
        out.append(
            RewriteVerdict(
                rewrite=rw,
                verdict=verdict,
                findings=kept,
                overridden=overridden,
                allowed_by=allowed.origin if allowed is not None else None,
            )
        )
    return tuple(out)


_VERDICT_OF = {action: Verdict.of(action) for action in Action}  # a note counts as accept


def pair_verdict(verdicts: Sequence[RewriteVerdict]) -> Verdict:
    """The worst verdict of a pair's rewrites (accept when there are none)."""
    if len(verdicts) == 1:  # the usual pair: one rewrite
        return verdicts[0].verdict
    return Verdict.worst(v.verdict for v in verdicts)
