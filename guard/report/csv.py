"""CSV for spreadsheets: one row per rewrite, one per pair without rewrites, one per error.

Every cell that a spreadsheet would take for a formula is defused: a cell that starts with
``=``, ``+``, ``-``, ``@``, TAB, CR or NUL gets a leading single quote. This follows the
OWASP guidance on CSV injection (owasp.org/www-community/attacks/CSV_Injection, whose list
of characters = + - @ TAB CR is from memory) and OWASP ASVS requirement 1.2.10, which lists
'=', '+', '-', '@', TAB and NUL and says they "must be escaped with a single quote if they
appear as the first character in a field value". The quote changes what a program reading
the file back sees; this report is meant for people, and ``filter`` output (meant for
programs) is not defused.
"""

from __future__ import annotations

import csv

from guard.batch import Outcome
from guard.io.read import InputRecord
from guard.report.base import Reporter

COLUMNS = (
    "file",
    "line",
    "id",
    "lang",
    "pair_verdict",
    "rewrite",
    "start",
    "end",
    "old",
    "new",
    "kind",
    "refinement",
    "verdict",
    "rules",
    "messages",
    "guarded",
    "error",
)

_FORMULA_START = ("=", "+", "-", "@", "\t", "\r", "\x00")


def defuse(cell: str) -> str:
    """``cell`` made safe to open in a spreadsheet (see the module docstring).

    >>> defuse("=HYPERLINK(1)"), defuse("-4 mm"), defuse("pump")
    ("'=HYPERLINK(1)", "'-4 mm", 'pump')
    """
    return "'" + cell if cell.startswith(_FORMULA_START) else cell


class CsvReporter(Reporter):
    name = "csv"
    description = "a spreadsheet: one row per rewrite, formula cells defused"

    def start(self) -> None:
        self._writer = csv.writer(self.stream, lineterminator="\r\n")
        self._writer.writerow(COLUMNS)

    def _row(self, values: dict[str, object]) -> None:
        cells = ["" if values.get(c) is None else str(values[c]) for c in COLUMNS]
        self._writer.writerow([defuse(c) for c in cells])

    def record(self, outcome: Outcome) -> None:
        rec = outcome.record
        base: dict[str, object] = {"file": rec.file, "line": rec.line}
        if isinstance(rec, InputRecord):
            base.update(id=rec.id, lang=rec.lang)
        report = outcome.report
        if report is None:
            self._row({**base, "error": outcome.error})
            return
        base.update(lang=report.lang, pair_verdict=report.verdict.value, guarded=report.guarded)
        if report.pair_findings:
            base["rules"] = " ".join(dict.fromkeys(f.rule for f in report.pair_findings))
            base["messages"] = " | ".join(f.message for f in report.pair_findings)
        if not report.rewrites:
            self._row(base)
            return
        for rv in report.rewrites:
            rw = rv.rewrite
            findings = rv.findings
            self._row(
                {
                    **base,
                    "rewrite": rw.index + 1,
                    "start": rw.start,
                    "end": rw.end,
                    "old": rw.old,
                    "new": rw.new,
                    "kind": rw.kind.value,
                    "refinement": None if rw.refinement is None else rw.refinement.value,
                    "verdict": rv.verdict.value,
                    "rules": " ".join(dict.fromkeys(f.rule for f in findings)),
                    "messages": " | ".join(f.message for f in findings),
                }
            )
