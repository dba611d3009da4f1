"""JSON lines out: every input record once, all its fields kept, the judgement added.

A checked record gets ``verdict``, ``guarded``, ``rewrites`` (each with its span, old and
new text, kind, verdict and findings) and ``findings`` (those about the whole pair); these
names replace input fields of the same name. A record that could not be read or checked
becomes ``{"error": {"file", "line", "reason"}}`` (with the fields it had, when it had
any), so the output has exactly one line per input record.
"""

from __future__ import annotations

import json

from guard.batch import Outcome
from guard.io.read import InputRecord
from guard.report.base import Reporter, error_json, finding_json, rewrite_json


def outcome_json(outcome: Outcome) -> dict[str, object]:
    """The output object of one outcome (also used by ``filter``'s JSONL output)."""
    rec = outcome.record
    out: dict[str, object] = dict(rec.fields) if isinstance(rec, InputRecord) else {}
    report = outcome.report
    if report is None:
        out["error"] = error_json(outcome)
        return out
    out["verdict"] = report.verdict.value
    out["guarded"] = report.guarded
    out["rewrites"] = [rewrite_json(rv) for rv in report.rewrites]
    out["findings"] = [finding_json(f) for f in report.pair_findings]
    return out


# json.dumps with options builds an encoder on every call; one line per record adds up.
_ENCODER = json.JSONEncoder(ensure_ascii=False, separators=(",", ":"))


def dumps(obj: object) -> str:
    """One JSON line: UTF-8 text kept as is, keys in the order given.

    U+2028 and U+2029 are escaped: they are valid in JSON, but tools that split text
    into lines by Unicode rules (Python's ``str.splitlines``) would break the record.

    >>> dumps({"t": "a\\u2028b"})
    '{"t":"a\\\\u2028b"}'
    """
    text = _ENCODER.encode(obj)
    return text.replace("\u2028", "\\u2028").replace("\u2029", "\\u2029")


class JsonlReporter(Reporter):
    name = "jsonl"
    description = "one JSON object per input record, with every input field kept"

    def record(self, outcome: Outcome) -> None:
        self.stream.write(dumps(outcome_json(outcome)) + "\n")
