"""The text report, for a person at a terminal: each pair, its rewrites, then a summary.

Colour is used only when the caller says so (``ReportOptions.color``: the stream is a
terminal and NO_COLOR is unset); without it the changed span is still marked with
brackets, so the report reads the same in a log file.
"""

from __future__ import annotations

from collections import Counter

from guard.batch import Outcome, Summary
from guard.records import Verdict
from guard.report.base import Reporter, context, label, visible

_COLOURS = {Verdict.ACCEPT: "32", Verdict.FLAG: "33", Verdict.VETO: "31"}  # green/yellow/red


class TextReporter(Reporter):
    name = "text"
    description = "for people: each pair with its rewrites, then a summary"

    def _paint(self, text: str, verdict: Verdict | None, *, bold: bool = False) -> str:
        if not self.options.color:
            return text
        codes = [] if verdict is None else [_COLOURS[verdict]]
        if bold:
            codes.append("1")
        return f"\x1b[{';'.join(codes)}m{text}\x1b[0m" if codes else text

    def record(self, outcome: Outcome) -> None:
        w = self.stream.write
        report = outcome.report
        if report is None:
            error = visible(outcome.error or "")
            w(f"{visible(label(outcome))}: {self._paint('error', Verdict.VETO)}: {error}\n")
            return
        verdict = self._paint(report.verdict.value, report.verdict, bold=True)
        if not report.rewrites and not report.pair_findings:
            w(f"{visible(label(outcome))}: {verdict}, no change\n")
            return
        w(f"{visible(label(outcome))}: {verdict}\n")
        for rv in report.rewrites:
            rw = rv.rewrite
            before, old, after = context(report.source, rw.start, rw.end)
            span = f"[{visible(old)} → {visible(rw.new)}]"
            w(
                f"  {rw.index + 1}. {self._paint(rv.verdict.value.ljust(6), rv.verdict)} "
                f"{visible(before)}{self._paint(span, rv.verdict, bold=True)}{visible(after)}\n"
            )
            for f in rv.findings:
                where = f" ({f.origin.shown()})" if f.origin is not None else ""
                w(f"       {f.rule} ({f.action.value}): {visible(f.message)}{where}\n")
            for f in rv.overridden:
                allowed = f" by the allowed pair at {rv.allowed_by}" if rv.allowed_by else ""
                w(f"       {f.rule}: set aside{allowed}: {visible(f.message)}\n")
        for f in report.pair_findings:
            where = f" ({f.origin.shown()})" if f.origin is not None else ""
            w(f"  whole pair: {f.rule} ({f.action.value}): {visible(f.message)}{where}\n")
        if report.guarded != report.source:
            w(f"  guarded: {visible(report.guarded)}\n")

    def finish(self, summary: Summary) -> None:
        w = self.stream.write
        w("\nSummary\n")
        w(
            f"  records: read {summary.read}, written {summary.written}, "
            f"checked {summary.checked}, errors {summary.errors}\n"
        )
        w("  pairs:    " + _tally(summary.verdicts) + "\n")
        w("  rewrites: " + _tally(summary.rewrite_verdicts) + "\n")
        if summary.rules:
            w("  findings by rule:\n")
            rules = sorted({r for r, _ in summary.rules})
            width = max(len(r) for r in rules)
            for rule in rules:
                parts = [
                    f"{a} {summary.rules[(rule, a)]}"
                    for a in ("veto", "flag")
                    if summary.rules[(rule, a)]
                ]
                w(f"    {rule.ljust(width)}  {', '.join(parts)}\n")
        if summary.terms:
            top = summary.terms.most_common(self.options.top_terms)
            w("  most-hit protected terms: ")
            w(", ".join(f"{visible(t)} ({n})" for t, n in top) + "\n")


def _tally(counts: Counter[str]) -> str:
    return ", ".join(f"{v.value} {counts[v.value]}" for v in Verdict)
