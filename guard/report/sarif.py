"""SARIF 2.1.0 (OASIS) for code-scanning dashboards: one result per flagged or vetoed rewrite.

- ``ruleId`` is the name of the rule behind the verdict (the first finding whose action is
  the rewrite's verdict); the other findings are in the result's message and properties.
  Findings about a whole pair (rewrite-density, low-confidence) are results of their own,
  located at the record's line only.
- ``level``: veto is ``error``, flag is ``warning``.
- Location: ``artifactLocation.uri`` is the input file; ``region.startLine`` is the line of
  the record; ``startColumn``/``endColumn`` are 1-based and count characters (Unicode code
  points) of the *source field's text*, not of the input line, which is why the run says
  ``columnKind: unicodeCodePoints``. As SARIF defines it, ``endColumn`` is the column just
  after the region, so an insertion has ``startColumn == endColumn``.
- Rule metadata (``tool.driver.rules``) comes from ``ReportOptions.rule_docs``.
- Records that could not be read or checked are ``toolExecutionNotifications`` of the
  invocation, at level ``error``.

Results are written as they come, so memory does not grow with the batch; the rule table
follows them (JSON does not order an object's members).
"""

from __future__ import annotations

import json
from pathlib import PurePath
from urllib.parse import quote

from guard.batch import Outcome, Summary
from guard.io.read import STDIN_NAME, InputRecord
from guard.records import Finding, Verdict
from guard.report.base import Reporter, error_json, evidence_json, first_sentence

SCHEMA_URI = (
    "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json"
)
_LEVEL = {Verdict.VETO: "error", Verdict.FLAG: "warning"}


def artifact_uri(file: str) -> str:
    """A URI reference for an input file name.

    >>> artifact_uri("batches/week 12.jsonl"), artifact_uri("/srv/q.csv"), artifact_uri("<stdin>")
    ('batches/week%2012.jsonl', 'file:///srv/q.csv', 'stdin')
    """
    if file == STDIN_NAME:
        return "stdin"
    path = PurePath(file)
    if path.is_absolute():
        return "file://" + quote(path.as_posix())
    return quote(path.as_posix())


class SarifReporter(Reporter):
    name = "sarif"
    description = "SARIF 2.1.0: one result per flagged or vetoed rewrite"

    def start(self) -> None:
        self._rules: dict[str, int] = {}
        self._notes: list[dict[str, object]] = []
        self._first = True
        head = {"$schema": SCHEMA_URI, "version": "2.1.0"}
        self.stream.write(json.dumps(head, ensure_ascii=False)[:-1])
        self.stream.write(', "runs": [{"columnKind": "unicodeCodePoints", "results": [')

    def _rule_index(self, rule: str) -> int:
        return self._rules.setdefault(rule, len(self._rules))

    def _emit(self, result: dict[str, object]) -> None:
        self.stream.write(("\n" if self._first else ",\n") + json.dumps(result, ensure_ascii=False))
        self._first = False

    def record(self, outcome: Outcome) -> None:
        rec = outcome.record
        report = outcome.report
        uri = artifact_uri(rec.file)
        if report is None:
            region = {} if rec.line is None else {"region": {"startLine": rec.line}}
            err = error_json(outcome)
            self._notes.append(
                {
                    "level": "error",
                    "message": {"text": f"record not checked: {outcome.error}"},
                    "locations": [
                        {"physicalLocation": {"artifactLocation": {"uri": uri}, **region}}
                    ],
                    "properties": err,
                }
            )
            return
        assert isinstance(rec, InputRecord)
        record_props: dict[str, object] = {"line": rec.line}
        if rec.id is not None:
            record_props["recordId"] = rec.id
        for rv in report.rewrites:
            if rv.verdict is Verdict.ACCEPT:
                continue
            rw = rv.rewrite
            lead = _lead(rv.findings, rv.verdict)
            messages = "; ".join(f"{f.rule}: {f.message}" for f in rv.findings)
            text = f"{rw.old!r} -> {rw.new!r} ({rv.verdict.value})"
            self._emit(
                {
                    "ruleId": lead,
                    "ruleIndex": self._rule_index(lead),
                    "level": _LEVEL[rv.verdict],
                    "message": {"text": f"{text}: {messages}" if messages else text},
                    "locations": [
                        {
                            "physicalLocation": {
                                "artifactLocation": {"uri": uri},
                                "region": {
                                    "startLine": rec.line,
                                    "startColumn": rw.start + 1,
                                    "endColumn": rw.end + 1,
                                },
                            }
                        }
                    ],
                    "properties": {
                        **record_props,
                        "verdict": rv.verdict.value,
                        "old": rw.old,
                        "new": rw.new,
                        "kind": rw.kind.value,
                        "rules": list(dict.fromkeys(f.rule for f in rv.findings)),
                        "evidence": [evidence_json(f.evidence) for f in rv.findings],
                    },
                }
            )
        for f in report.pair_findings:
            verdict = Verdict.of(f.action)
            self._emit(
                {
                    "ruleId": f.rule,
                    "ruleIndex": self._rule_index(f.rule),
                    "level": _LEVEL[verdict],
                    "message": {"text": f"whole pair: {f.message}"},
                    "locations": [
                        {
                            "physicalLocation": {
                                "artifactLocation": {"uri": uri},
                                "region": {"startLine": rec.line},
                            }
                        }
                    ],
                    "properties": {
                        **record_props,
                        "verdict": verdict.value,
                        "evidence": evidence_json(f.evidence),
                    },
                }
            )

    def finish(self, summary: Summary) -> None:
        docs = self.options.rule_docs
        rules = []
        for rule in self._rules:  # insertion order == ruleIndex
            doc = docs.get(rule, "")
            entry: dict[str, object] = {"id": rule, "name": rule}
            if doc:
                entry["shortDescription"] = {"text": first_sentence(doc)}
                entry["fullDescription"] = {"text": doc.strip()}
                entry["help"] = {"text": doc.strip()}
            rules.append(entry)
        driver: dict[str, object] = {"name": "guard", "rules": rules}
        if self.options.tool_version:
            driver["version"] = self.options.tool_version
        invocation = {"executionSuccessful": True, "toolExecutionNotifications": self._notes}
        tail = {
            "tool": {"driver": driver},
            "invocations": [invocation],
            "properties": {
                "read": summary.read,
                "written": summary.written,
                "checked": summary.checked,
                "errors": summary.errors,
                "verdicts": dict(sorted(summary.verdicts.items())),
            },
        }
        self.stream.write("\n], " + json.dumps(tail, ensure_ascii=False)[1:] + "]}\n")


def _lead(findings: tuple[Finding, ...], verdict: Verdict) -> str:
    for f in findings:
        if Verdict.of(f.action) is verdict:
            return f.rule
    return findings[0].rule if findings else "guard"
