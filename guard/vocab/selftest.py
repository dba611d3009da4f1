"""Run the examples a ruleset carries, as unit tests run against code.

Each ``[[examples]]`` entry is a pair and the verdicts it must get: the pair's verdict and,
optionally, the verdict of each rewrite in order. An example passes when the real engine
(guard.api.Guard) gives exactly those verdicts. A failure is shown with what was expected,
what came out, the findings that decided each rewrite and a unified diff of the two verdict
lists, so that the author sees at once which rule to tune. Nothing here prints or exits.
"""

from __future__ import annotations

import difflib
from collections.abc import Callable, Sequence
from dataclasses import dataclass, replace
from pathlib import Path

from guard.errors import GuardError
from guard.records import Finding, Origin, Report, RewriteVerdict, Verdict
from guard.ruleset.model import CompiledRuleset, Example
from guard.vocab.lint import plural, shorten_path

Checker = Callable[[Example], Report]
"""Checks one example's pair; the default runs guard.api.Guard over the ruleset."""


@dataclass(frozen=True, slots=True, kw_only=True)
class Outcome:
    """One example and what the engine made of it (``error`` when the check itself failed)."""

    example: Example
    report: Report | None
    error: str | None = None

    @property
    def actual_pair(self) -> str:
        return "error" if self.report is None else self.report.verdict.value

    @property
    def actual_rewrites(self) -> tuple[str, ...]:
        return () if self.report is None else tuple(rv.verdict.value for rv in self.report.rewrites)

    @property
    def passed(self) -> bool:
        if self.report is None or self.actual_pair != self.example.expect:
            return False
        expected = self.example.rewrites
        return expected is None or tuple(expected) == self.actual_rewrites


def engine_checker(ruleset: CompiledRuleset) -> Checker:
    """A checker running the real engine over ``ruleset`` (one Guard for all examples)."""
    from guard.api import Guard  # the engine is only needed when examples run

    guard = Guard(ruleset)

    def check(example: Example) -> Report:
        return guard.check(example.source, example.proposal, lang=example.lang)

    return check


def run_examples(ruleset: CompiledRuleset, checker: Checker | None = None) -> tuple[Outcome, ...]:
    """Check every example of ``ruleset``, in the order the ruleset lists them.

    A check that raises a guard error fails its example with the error's text; the other
    examples still run.
    """
    check = checker if checker is not None else engine_checker(ruleset)
    outcomes: list[Outcome] = []
    for example in ruleset.examples:
        try:
            outcomes.append(Outcome(example=example, report=check(example)))
        except GuardError as e:
            outcomes.append(Outcome(example=example, report=None, error=str(e)))
    return tuple(outcomes)


def deciding_findings(rv: RewriteVerdict) -> tuple[Finding, ...]:
    """The findings whose action is the rewrite's verdict; for an accept, those set aside."""
    if rv.verdict is Verdict.ACCEPT:
        return rv.overridden
    return tuple(f for f in rv.findings if f.action.value == rv.verdict.value)


def _origin(origin: Origin, base: Path | None) -> str:
    return str(replace(origin, file=shorten_path(origin.file, base)))


def _label(outcome: Outcome, base: Path | None) -> str:
    ex = outcome.example
    return f"{_origin(ex.origin, base)}  {ex.source!r} -> {ex.proposal!r}"


def _verdict_lines(pair: str, rewrites: Sequence[str] | None, names: Sequence[str]) -> list[str]:
    lines = [f"pair: {pair}"]
    if rewrites is not None:
        for i, verdict in enumerate(rewrites):
            name = names[i] if i < len(names) else "(no such rewrite)"
            lines.append(f"rewrite {i + 1} {name}: {verdict}")
    return lines


def verdict_diff(outcome: Outcome) -> list[str]:
    """A unified diff of expected against actual verdicts, one line per pair and rewrite.

    Rewrites are named by their text in the actual report, so the diff shows only verdicts
    that differ. Per-rewrite lines appear only when the example lists rewrite verdicts.
    """
    report = outcome.report
    names = (
        []
        if report is None
        else [f"{rv.rewrite.old!r}->{rv.rewrite.new!r}" for rv in report.rewrites]
    )
    expected_rw = outcome.example.rewrites
    expected = _verdict_lines(outcome.example.expect, expected_rw, names)
    actual_rw = None if expected_rw is None else outcome.actual_rewrites
    actual = _verdict_lines(outcome.actual_pair, actual_rw, names)
    return list(difflib.unified_diff(expected, actual, "expected", "actual", n=1, lineterm=""))


def format_outcome(outcome: Outcome, *, relative_to: Path | None = None) -> list[str]:
    """``PASS``/``FAIL`` and the example; for a failure, everything needed to see why.

    Files below ``relative_to`` are named relative to it.
    """
    if outcome.passed:
        return [f"PASS  {_label(outcome, relative_to)}"]
    lines = [f"FAIL  {_label(outcome, relative_to)}"]
    ex = outcome.example
    if outcome.error is not None:
        lines.append(f"      check failed: {outcome.error}")
        return lines
    if outcome.actual_pair == ex.expect:
        lines.append(f"      pair verdict: {ex.expect}, as expected")
    else:
        lines.append(f"      pair verdict: expected {ex.expect}, got {outcome.actual_pair}")
    report = outcome.report
    assert report is not None
    if ex.rewrites is not None and len(ex.rewrites) != len(report.rewrites):
        want, got = plural(len(ex.rewrites), "rewrite"), len(report.rewrites)
        lines.append(f"      rewrites: expected {want}, got {got}")
    if not report.rewrites:
        lines.append("      no rewrites: source and proposal align without a change")
    for i, rv in enumerate(report.rewrites):
        want = ""
        if ex.rewrites is not None:
            want = f" (expected {ex.rewrites[i]})" if i < len(ex.rewrites) else " (not expected)"
        change = f"{rv.rewrite.old!r} -> {rv.rewrite.new!r}"
        lines.append(f"      rewrite {i + 1} {change}: {rv.verdict.value}{want}")
        decided = deciding_findings(rv)
        for f in decided:
            origin = f" [{_origin(f.origin, relative_to)}]" if f.origin is not None else ""
            verb = "set aside" if rv.verdict is Verdict.ACCEPT else f.action.value
            lines.append(f"        {f.rule} ({verb}): {f.message}{origin}")
        if rv.allowed_by is not None:
            lines.append(f"        allowed by {_origin(rv.allowed_by, relative_to)}")
    for f in report.pair_findings:
        lines.append(f"      pair finding {f.rule} ({f.action.value}): {f.message}")
    lines.extend(f"      {d}" for d in verdict_diff(outcome))
    return lines


def summary(outcomes: Sequence[Outcome]) -> str:
    """``N passed, M failed``.

    >>> summary(())
    '0 passed, 0 failed'
    """
    passed = sum(1 for o in outcomes if o.passed)
    return f"{passed} passed, {len(outcomes) - passed} failed"
