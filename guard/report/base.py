"""What every reporter is, and the few helpers they share.

A reporter turns outcomes (records with their reports or errors) into one output format on
a text stream: ``start()`` once, ``record(outcome)`` for each outcome in input order,
``finish(summary)`` once. Reporters know nothing of rules: they render the findings and
verdicts they are given, and take any description of a rule from ``ReportOptions.rule_docs``,
which the caller fills in. A reporter never prints elsewhere and never exits.
"""

from __future__ import annotations

import abc
import unicodedata
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import ClassVar, TextIO

from guard.batch import Outcome, Summary
from guard.io.read import ErrorRecord, InputRecord
from guard.records import EvidenceValue, Finding, Origin, RewriteVerdict


@dataclass(frozen=True, slots=True, kw_only=True)
class ReportOptions:
    """What a caller may tell a reporter beyond the outcomes.

    ``color``: use ANSI colour (the caller decides: a terminal, and NO_COLOR unset).
    ``rule_docs``: a description per rule name, for formats that carry rule metadata.
    ``top_terms``: how many of the most-hit protected terms a summary lists.
    """

    color: bool = False
    rule_docs: Mapping[str, str] = field(default_factory=dict)
    tool_version: str = ""
    title: str = "guard report"
    top_terms: int = 10


class Reporter(abc.ABC):
    """Base of every output format. Subclasses set ``name`` and ``description``."""

    name: ClassVar[str]
    description: ClassVar[str]

    def __init__(self, stream: TextIO, options: ReportOptions | None = None) -> None:
        self.stream = stream
        self.options = options or ReportOptions()

    def start(self) -> None:  # noqa: B027 - most formats have no preamble
        """Write whatever comes before the first record."""

    @abc.abstractmethod
    def record(self, outcome: Outcome) -> None:
        """Write (or keep, for formats that need the whole run) one outcome."""

    def finish(self, summary: Summary) -> None:  # noqa: B027 - most formats have no tail
        """Write whatever comes after the last record."""


def label(outcome: Outcome) -> str:
    """How a person finds the record again: its id and where it was read.

    >>> rec = ErrorRecord(file="a.jsonl", line=4, reason="blank line")
    >>> label(Outcome(record=rec, error="blank line"))
    'a.jsonl:4'
    """
    rec = outcome.record
    if isinstance(rec, InputRecord) and rec.id is not None:
        return f"{rec.id} ({rec.where})"
    return rec.where


_SHOW_AS_CODE = frozenset({"Cc", "Cf", "Cs", "Co", "Cn", "Zl", "Zp"})


def visible(text: str) -> str:
    """``text`` with invisible and control characters written out as ``<U+XXXX>``.

    A person must see a bidi control or a zero-width space that a rewrite brings in, and a
    terminal must never receive an escape sequence from record text.

    >>> visible("pay\\u202eusd\\u200b ok\\t")
    'pay<U+202E>usd<U+200B> ok<U+0009>'
    """
    out: list[str] = []
    for ch in text:
        if unicodedata.category(ch) in _SHOW_AS_CODE:
            out.append(f"<U+{ord(ch):04X}>")
        else:
            out.append(ch)
    return "".join(out)


def origin_json(origin: Origin | None) -> dict[str, object] | None:
    if origin is None:
        return None
    return {"file": origin.file, "line": origin.line, "key": origin.key}


def evidence_json(evidence: Mapping[str, EvidenceValue]) -> dict[str, object]:
    def conv(v: EvidenceValue) -> object:
        return [conv(x) for x in v] if isinstance(v, tuple) else v

    return {k: conv(v) for k, v in evidence.items()}


def finding_json(f: Finding) -> dict[str, object]:
    return {
        "rule": f.rule,
        "action": f.action.value,
        "message": f.message,
        "evidence": evidence_json(f.evidence),
        "origin": origin_json(f.origin),
    }


def rewrite_json(rv: RewriteVerdict) -> dict[str, object]:
    rw = rv.rewrite
    return {
        "start": rw.start,
        "end": rw.end,
        "old": rw.old,
        "new": rw.new,
        "kind": rw.kind.value,
        "refinement": None if rw.refinement is None else rw.refinement.value,
        "verdict": rv.verdict.value,
        "findings": [finding_json(f) for f in rv.findings],
    }


def error_json(outcome: Outcome) -> dict[str, object]:
    rec = outcome.record
    out: dict[str, object] = {"file": rec.file, "line": rec.line, "reason": outcome.error}
    if isinstance(rec, ErrorRecord) and rec.raw is not None:
        out["raw"] = rec.raw
    return out


def context(text: str, start: int, end: int, width: int = 40) -> tuple[str, str, str]:
    """(before, span, after) around ``text[start:end]``, each side cut to ``width`` chars.

    >>> context("the bilge pump XR-220 fits", 15, 21, width=6)
    ('… pump ', 'XR-220', ' fits')
    """
    before = text[max(0, start - width) : start]
    after = text[end : end + width]
    if start - width > 0:
        before = "…" + before
    if end + width < len(text):
        after = after + "…"
    return before, text[start:end], after


def first_sentence(doc: str) -> str:
    """The first line of a rule's doc, for a one-line description.

    >>> first_sentence("Vetoes hidden characters.\\n\\nMore words.")
    'Vetoes hidden characters.'
    """
    for line in doc.strip().splitlines():
        if line.strip():
            return line.strip()
    return ""
