"""The batch: one outcome per record, in order, with any number of processes."""

from __future__ import annotations

import io
import os
import time
from collections import Counter

import pytest

from guard.batch import (
    CRASHED,
    NO_WORKERS,
    TIMED_OUT,
    Checker,
    Job,
    Outcome,
    Summary,
    check_records,
)
from guard.io.read import ErrorRecord, InputRecord, Limits, read_records
from guard.records import Report, Verdict

LINES = [
    b'{"id": "1", "source": "Send the JSON file", "proposal": "Send the Jason file"}',
    b'{"id": "2", "source": "teh anchor", "proposal": "the anchor"}',
    b"not json",
    b'{"id": "4", "source": "CRASH", "proposal": "crash"}',
    b'{"id": "5", "source": "RAISE", "proposal": "raise"}',
    b'{"id": "6", "source": "bilge pump", "proposal": "bilge pumps"}',
]


def records(lines: list[bytes] = LINES) -> list[InputRecord | ErrorRecord]:
    return list(read_records(["-"], stdin=io.BytesIO(b"\n".join(lines) + b"\n")))


def plain_report(job: Job) -> Report:
    """A report that accepts every pair as is: the pool is under test here, not the engine."""
    return Report(
        source=job.source,
        proposal=job.proposal,
        lang=job.lang or "en",
        verdict=Verdict.ACCEPT,
        rewrites=(),
        pair_findings=(),
        guarded=job.proposal,
        guarded_strict=job.proposal,
        ruleset="none",
    )


def crashing_factory(refs: tuple[str, ...]) -> Checker:
    """A checker whose process dies on 'CRASH' (as a crash in native code would) and that
    raises on 'RAISE'. Module-level, so that worker processes can build it."""

    def check(job: Job) -> Report:
        if job.source == "HANG":
            time.sleep(3600)
        if job.source == "CRASH":
            os._exit(3)
        if job.source == "RAISE":
            raise ValueError("cannot judge this")
        return plain_report(job)

    return check


def summary_of(outcomes: list[Outcome]) -> Summary:
    s = Summary()
    for o in outcomes:
        s.add(o)
        s.written += 1
    return s


def test_one_job_checks_in_order_and_keeps_error_records() -> None:
    outcomes = list(
        check_records(records(LINES[:3] + LINES[5:]), ["base"], jobs=1, lang_default="en")
    )
    assert [o.record.line for o in outcomes] == [1, 2, 3, 4]
    assert [o.report.verdict.value if o.report else o.error for o in outcomes[:3]] == [
        "veto",  # JSON is an all-capitals token (letter-shape)
        "accept",
        "not valid JSON: Expecting value at column 1",
    ]
    assert outcomes[3].report is not None and outcomes[3].error is None
    s = summary_of(outcomes)
    assert s.reconciles and (s.read, s.checked, s.errors) == (4, 3, 1)


def test_an_engine_error_is_that_record_s_error() -> None:
    outcomes = list(
        check_records(records([LINES[1], LINES[4], LINES[1]]), [], checker_factory=crashing_factory)
    )
    assert [o.error for o in outcomes] == [
        None,
        "the engine failed: ValueError: cannot judge this",
        None,
    ]


def test_the_token_limit_makes_an_error_record() -> None:
    lines = [b'{"source": "one two three four", "proposal": "one two three"}']
    [outcome] = check_records(
        records(lines), [], limits=Limits(max_tokens=3), checker_factory=crashing_factory
    )
    assert outcome.error == "the source has more than 3 tokens"


def test_a_dead_worker_is_that_record_s_error_and_the_rest_go_on() -> None:
    many = LINES * 3  # several chunks, with a crash in each
    outcomes = list(
        check_records(
            records(many),
            [],
            jobs=2,
            checker_factory=crashing_factory,
            chunk_size=2,
            mp_context="fork",  # the test's factory is importable in a forked child
        )
    )
    assert [o.record.line for o in outcomes] == list(range(1, len(many) + 1))
    expected = []
    for line in LINES:
        if line.startswith(b'{"id": "4"'):
            expected.append(CRASHED)
        elif line.startswith(b'{"id": "5"'):
            expected.append("the engine failed: ValueError: cannot judge this")
        elif line == b"not json":
            expected.append("not valid JSON: Expecting value at column 1")
        else:
            expected.append(None)
    assert [o.error for o in outcomes] == expected * 3
    assert summary_of(outcomes).reconciles


@pytest.mark.parametrize("jobs", [2, 3])
def test_several_jobs_give_the_same_outcomes_as_one(jobs: int) -> None:
    lines = [LINES[0], LINES[1], LINES[2], LINES[5]] * 5
    one = list(check_records(records(lines), ["base"], jobs=1))
    many = list(check_records(records(lines), ["base"], jobs=jobs, chunk_size=3))
    assert many == one


def test_digests_count_and_guard_as_the_reports_do() -> None:
    # what guard filter asks for: the same guarded texts and the same tally as from the
    # whole reports (the reports are the reference), in one process and from workers
    lines = [LINES[0], LINES[1], LINES[2], LINES[5]] * 3
    full = list(check_records(records(lines), ["base"], jobs=1))
    assert any(o.report is not None and o.report.findings for o in full)
    for jobs in (1, 2):
        digested = list(check_records(records(lines), ["base"], jobs=jobs, digests=True))
        assert [o.record for o in digested] == [o.record for o in full]
        assert [o.error for o in digested] == [o.error for o in full]
        for d, f in zip(digested, full, strict=True):
            assert d.report is None and (d.digest is None) == (f.report is None)
            if d.digest is not None and f.report is not None:
                for undo in (False, True):
                    got = d.digest.guarded_text(undo_flagged=undo)
                    assert got == f.report.guarded_text(undo_flagged=undo)
        by_digest, by_report = Summary(), Summary()
        for o in digested:
            by_digest.add(o)
        for o in full:
            by_report.add(o)
        assert by_digest == by_report
        reports = [o.report for o in full if o.report is not None]
        findings = [f for r in reports for f in r.findings]
        assert by_digest.rules == Counter((f.rule, f.action.value) for f in findings)
        assert by_digest.rewrite_verdicts == Counter(
            rv.verdict.value for r in reports for rv in r.rewrites
        )
        assert by_digest.verdicts == Counter(r.verdict.value for r in reports)


def failing_factory(refs: tuple[str, ...]) -> Checker:
    """A checker that cannot be built (say, the worker cannot load the ruleset)."""
    raise OSError("cannot load")


def test_workers_that_cannot_start_give_error_outcomes_not_an_endless_restart() -> None:
    lines = [LINES[1]] * 10
    outcomes = list(
        check_records(
            records(lines),
            [],
            jobs=2,
            checker_factory=failing_factory,
            chunk_size=2,
            mp_context="fork",
        )
    )
    assert len(outcomes) == 10
    assert {o.error for o in outcomes} <= {CRASHED, NO_WORKERS}
    assert outcomes[-1].error == NO_WORKERS


def test_a_worker_stuck_on_a_record_is_stopped_and_the_record_is_an_error() -> None:
    hang = b'{"id": "h", "source": "HANG", "proposal": "hang"}'
    lines = [LINES[1], hang, LINES[1], LINES[1], hang, LINES[1]]
    outcomes = list(
        check_records(
            records(lines),
            [],
            jobs=2,
            checker_factory=crashing_factory,
            chunk_size=2,
            mp_context="fork",
            record_timeout=2,  # a limit that ends the wait, not a measurement
        )
    )
    stopped = f"{TIMED_OUT} (2 s)"
    assert [o.error for o in outcomes] == [None, stopped, None, None, stopped, None]
