"""Outcomes built by hand, so that reporter tests do not depend on the engine's judgement.

The texts are invented demo data (a fictional marine-parts catalogue); they are inputs,
not check values: the checks compare each format with the records given here.
"""

from __future__ import annotations

import pytest

from guard.batch import Outcome, Summary
from guard.io.read import ErrorRecord, InputRecord
from guard.records import (
    Action,
    Finding,
    Origin,
    Report,
    Rewrite,
    RewriteKind,
    RewriteVerdict,
    Tier,
    Verdict,
)

HOSTILE = "<script>alert(1)</script>"
QUOTES = "\"'><img src=x onerror=alert(2)>"


def rewrite(source: str, old: str, new: str, index: int = 0, at: int | None = None) -> Rewrite:
    start = source.index(old) if at is None else at
    return Rewrite(
        index=index,
        start=start,
        end=start + len(old),
        old=old,
        new=new,
        new_start=start,
        new_end=start + len(new),
        kind=RewriteKind.REPLACE,
        refinement=None,
        old_tokens=(),
        new_tokens=(),
    )


def finding(rule: str, action: Action, term: str | None = None, index: int = 0) -> Finding:
    evidence: dict[str, str | int] = {"distance": 2}
    if term is not None:
        evidence["term"] = term
    return Finding(
        rule=rule,
        tier=Tier.DOMAIN,
        action=action,
        template="{distance} edits" if term is None else "touches the protected term {term}",
        evidence=evidence,
        rewrite=index,
        origin=Origin(file="rules/parts.txt", line=4),
    )


def make_report(
    source: str, proposal: str, rvs: tuple[RewriteVerdict, ...], guarded: str, lang: str = "en"
) -> Report:
    return Report(
        source=source,
        proposal=proposal,
        lang=lang,
        verdict=Verdict.worst(rv.verdict for rv in rvs),
        rewrites=rvs,
        pair_findings=(),
        guarded=guarded,
        guarded_strict=guarded,
        ruleset="demo",
    )


def record(
    line: int, source: str, proposal: str, rid: str | None = None, **extra: object
) -> InputRecord:
    fields: dict[str, object] = {"id": rid, **extra, "source": source, "proposal": proposal}
    if rid is None:
        del fields["id"]
    return InputRecord(
        file="batch.jsonl", line=line, fields=fields, source=source, proposal=proposal, id=rid
    )


def build_outcomes() -> list[Outcome]:
    s1, p1 = "bilge pump XR-220 fits", "bilge pump XR-2200 fits"
    rv1 = RewriteVerdict(
        rewrite=rewrite(s1, "XR-220", "XR-2200"),
        verdict=Verdict.VETO,
        findings=(finding("protected-term", Action.VETO, term="XR-220"),),
    )
    s2, p2 = "teh anchor winch", "the anchor winch"
    rv2 = RewriteVerdict(rewrite=rewrite(s2, "teh", "the"), verdict=Verdict.ACCEPT, findings=())
    s3 = f"{HOSTILE} helm {QUOTES} cabel"
    p3 = f"{HOSTILE} helm {QUOTES} =cable"
    rv3 = RewriteVerdict(
        rewrite=rewrite(s3, "cabel", "=cable"),
        verdict=Verdict.FLAG,
        findings=(finding("edit-budget", Action.FLAG),),
    )
    s4, p4 = "=SUM(A1) sea cock", "=SUM(A1) seacock"
    rv4 = RewriteVerdict(
        rewrite=rewrite(s4, "sea cock", "seacock"), verdict=Verdict.ACCEPT, findings=()
    )
    return [
        Outcome(
            record=record(1, s1, p1, "q-1", note="kept"),
            report=make_report(s1, p1, (rv1,), s1),
        ),
        Outcome(record=record(2, s2, p2), report=make_report(s2, p2, (rv2,), p2, lang="de")),
        Outcome(
            record=ErrorRecord(file="batch.jsonl", line=3, reason="blank line", raw=""),
            error="blank line",
        ),
        Outcome(record=record(4, s3, p3, "q-4"), report=make_report(s3, p3, (rv3,), p3)),
        Outcome(record=record(5, s4, s4, "=q5"), report=make_report(s4, s4, (), s4)),
        Outcome(record=record(6, s4, p4, "-q6"), report=make_report(s4, p4, (rv4,), p4)),
    ]


@pytest.fixture
def outcomes() -> list[Outcome]:
    return build_outcomes()


def summarize(outcomes: list[Outcome]) -> Summary:
    s = Summary()
    for o in outcomes:
        s.add(o)
        s.written += 1
    return s
