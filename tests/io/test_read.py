"""The record reader: one output per input record, whatever the bytes."""

from __future__ import annotations

import gzip
import io
import json
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from guard.io.read import (
    ErrorRecord,
    FieldNames,
    InputFormatError,
    InputRecord,
    Limits,
    Record,
    detect_format,
    read_records,
)

GOOD = b'{"source": "teh pump", "proposal": "the pump"}'


def read(data: bytes, fmt: str = "jsonl", **kw: object) -> list[Record]:
    return list(read_records(["-"], input_format=fmt, stdin=io.BytesIO(data), **kw))  # type: ignore[arg-type]


def reasons(records: list[Record]) -> list[str | None]:
    return [r.reason if isinstance(r, ErrorRecord) else None for r in records]


@pytest.mark.parametrize(
    ("line", "reason"),
    [
        (b"\xff\xfe garbage", "invalid UTF-8 at byte 1 of the line"),
        (b'{"source": "caf\xc3", "proposal": "x"}', "invalid UTF-8 at byte 16 of the line"),
        (b'{"source": "\\ud800", "proposal": "x"}', "lone surrogate U+D800 in field 'source'"),
        (b'{"source": "a", "proposal": "\\udfff b"}', "lone surrogate U+DFFF in field 'proposal'"),
        (b'{"source": "a\\u0000b", "proposal": "x"}', "control character U+0000 in field 'source'"),
        (
            b'{"source": "a", "proposal": "b", "n": {"x": "\\u001b[31m"}}',
            "control character U+001B in field 'n.x'",
        ),
        (
            b'{"source": "a\x00b", "proposal": "x"}',
            "not valid JSON: Invalid control character at column 14",
        ),
        (b"[1, 2]", "not a JSON object (got an array)"),
        (b'"just text"', "not a JSON object (got a string)"),
        (b"42", "not a JSON object (got a number)"),
        (b"null", "not a JSON object (got null)"),
        (b'{"source": "a"}', "missing field 'proposal'"),
        (b'{"source": 1, "proposal": "b"}', "field 'source' is not a string (got a number)"),
        (b'{"source": "a", "proposal": ["b"]}', "field 'proposal' is not a string (got an array)"),
        (b'{"source": "a", "source": "b", "proposal": "c"}', "duplicate field 'source'"),
        (
            b'{"source": "a", "proposal": "b", "lang": "en_GB!"}',
            "field 'lang' is not a language tag: 'en_GB!'",
        ),
        (
            b'{"source": "a", "proposal": "b", "score": "high"}',
            "field 'score' is not a number: 'high'",
        ),
        (b'{"source": "a", "proposal": "b", "score": true}', "field 'score' is not a number"),
        (
            b'{"source": "a", "proposal": "b", "candidates": [1]}',
            "field 'candidates' is not an array of strings",
        ),
        (b'{"source": "a", "proposal": "b", "id": 1.5}', "field 'id' is not a string or integer"),
        (b"", "blank line"),
        (b"   \t", "blank line"),
        (
            b'{"source": "a", "proposal": "b", "x": ' + b"[" * 40 + b"]" * 40 + b"}",
            "JSON nested deeper than 32 levels",
        ),
        (b"[" * 200_000, "JSON nested too deeply"),
        (b"\x89PNG\r\x1a\x00", "invalid UTF-8 at byte 1 of the line"),
        (b"\x00\x01\x02PNG\x1a", "not valid JSON: Expecting value at column 1"),
    ],
    ids=[
        "invalid-utf8",
        "truncated-utf8",
        "lone-high-surrogate",
        "lone-low-surrogate",
        "nul-in-field",
        "escape-in-nested-field",
        "raw-nul-in-json",
        "array",
        "string",
        "number",
        "null",
        "missing-field",
        "non-string-source",
        "non-string-proposal",
        "duplicate-field",
        "bad-lang",
        "bad-score",
        "boolean-score",
        "bad-candidates",
        "float-id",
        "blank",
        "whitespace",
        "nested",
        "deeply-nested",
        "binary",
        "control-bytes",
    ],
)
def test_bad_jsonl_line_is_one_error_record_and_the_next_line_is_read(
    line: bytes, reason: str
) -> None:
    records = read(GOOD + b"\n" + line + b"\n" + GOOD + b"\n")
    assert reasons(records) == [None, reason, None]
    bad = records[1]
    assert isinstance(bad, ErrorRecord) and (bad.file, bad.line) == ("<stdin>", 2)


def test_a_good_record_keeps_every_field_in_order() -> None:
    line = b'{"z": 1, "id": 7, "source": "teh", "lang": "en-GB", "proposal": "the", "score": 0.5,'
    line += b' "candidates": ["the", "tea"], "gold": "the", "extra": {"k": [1, 2]}}'
    [rec] = read(line)
    assert isinstance(rec, InputRecord)
    assert list(rec.fields) == [
        "z",
        "id",
        "source",
        "lang",
        "proposal",
        "score",
        "candidates",
        "gold",
        "extra",
    ]
    assert (rec.id, rec.lang, rec.score, rec.gold, rec.candidates) == (
        "7",
        "en-GB",
        0.5,
        "the",
        ("the", "tea"),
    )


def test_a_line_over_the_limit_is_skipped_in_chunks_not_loaded() -> None:
    big = b'{"source": "' + b"x" * (2 << 20) + b'", "proposal": "y"}'
    records = read(GOOD + b"\n" + big + b"\n" + GOOD)
    assert reasons(records) == [
        None,
        f"record longer than the limit of {1 << 20} bytes ({len(big)})",
        None,
    ]
    bad = records[1]
    assert isinstance(bad, ErrorRecord) and bad.raw is not None and len(bad.raw) == 200


def test_limit_is_a_setting() -> None:
    records = read(GOOD + b"\n", limits=Limits(max_record_bytes=10))
    assert reasons(records) == [f"record longer than the limit of 10 bytes ({len(GOOD)})"]


def test_crlf_and_a_byte_order_mark_are_read_as_plain_lines() -> None:
    records = read(b"\xef\xbb\xbf" + GOOD + b"\r\n" + GOOD + b"\r\n")
    assert reasons(records) == [None, None]


def test_empty_input_is_one_error_record() -> None:
    assert [(r.line, r.reason) for r in read(b"")] == [(None, "empty file")]  # type: ignore[union-attr]


def test_field_names_are_configurable() -> None:
    names = FieldNames(source="text", proposal="suggestion", id="key", lang="language")
    [rec] = read(
        b'{"key": "k1", "text": "teh", "suggestion": "the", "language": "de"}', field_names=names
    )
    assert isinstance(rec, InputRecord)
    assert (rec.source, rec.proposal, rec.id, rec.lang) == ("teh", "the", "k1", "de")


# ------------------------------------------------------------------------------ CSV / TSV


def test_csv_with_header_quoted_cells_spanning_lines_and_ragged_rows() -> None:
    data = (
        b"id,source,proposal\r\n"
        b'1,"two\nlines","two lines"\r\n'
        b"2,only two\r\n"
        b'3,"a ""quoted"" word",b\r\n'
        b"4,a,b,c\r\n"
        b"\r\n"
        b'5,"never closed\n'
    )
    records = read(data, "csv")
    assert [(r.line, reasons([r])[0]) for r in records] == [
        (2, None),
        (4, "row has 2 cell(s), the header has 3"),
        (5, None),
        (6, "row has 4 cell(s), the header has 3"),
        (7, "blank line"),
        (8, "unterminated quoted cell at the end of the file"),
    ]
    first, third = records[0], records[2]
    assert isinstance(first, InputRecord) and first.source == "two\nlines"
    assert isinstance(third, InputRecord) and third.source == 'a "quoted" word'


def test_csv_quote_inside_an_unquoted_cell_is_a_plain_character() -> None:
    records = read(b'source,proposal\n5" pipe,5" pipes\nx,y\n', "csv")
    assert [r.source for r in records if isinstance(r, InputRecord)] == ['5" pipe', "x"]


def test_csv_header_without_the_source_field_makes_every_row_an_error() -> None:
    records = read(b"text,proposal\na,b\nc,d\n", "csv")
    assert (
        reasons(records)
        == [
            "the header has no field 'source' (it has 'text', 'proposal')",
        ]
        * 2
    )


def test_csv_invalid_utf8_inside_a_multiline_record_costs_that_record_only() -> None:
    records = read(b'source,proposal\n"a\n\xff",b\nc,d\n', "csv")
    assert [(r.line, reasons([r])[0]) for r in records] == [
        (2, "record broken at its line 3: invalid UTF-8 at byte 1 of the line"),
        (4, None),
    ]


@pytest.mark.parametrize("data", [b"", b"\n"], ids=["no-bytes", "blank-header"])
def test_csv_without_a_usable_header(data: bytes) -> None:
    records = read(data, "csv")
    assert len(records) == 1 and isinstance(records[0], ErrorRecord)


def test_tsv_has_no_quoting() -> None:
    [rec] = read(b'source\tproposal\n"teh"\t"the"\n', "tsv")
    assert isinstance(rec, InputRecord) and rec.source == '"teh"'


def test_csv_candidates_are_a_json_array() -> None:
    [rec] = read(b'source,proposal,candidates\nteh,the,"[""the"",""tea""]"\n', "csv")
    assert isinstance(rec, InputRecord) and rec.candidates == ("the", "tea")


def test_plain_pairs() -> None:
    records = read(b"teh pump\tthe pump\nno tab here\na\tb\tc\n\x1b[2J\tx\n", "pairs")
    assert reasons(records) == [
        None,
        "expected source<TAB>proposal, got 1 cell(s)",
        "expected source<TAB>proposal, got 3 cell(s)",
        "control character U+001B in the line",
    ]
    first = records[0]
    assert isinstance(first, InputRecord) and first.fields == {
        "source": "teh pump",
        "proposal": "the pump",
    }


# ------------------------------------------------------------------------------ files


def test_files_by_extension_gzip_and_a_missing_file(tmp_path: Path) -> None:
    (tmp_path / "a.jsonl").write_bytes(GOOD + b"\n")
    with gzip.open(tmp_path / "b.csv.gz", "wb") as f:
        f.write(b"source,proposal\nteh,the\n")
    (tmp_path / "c.txt").write_bytes(b"teh\tthe\n")
    (tmp_path / "d.jsonl.gz").write_bytes(gzip.compress(GOOD + b"\n")[:-12] + b"broken......")
    paths = [str(tmp_path / n) for n in ("a.jsonl", "b.csv.gz", "c.txt", "d.jsonl.gz")]
    paths.append(str(tmp_path / "gone.jsonl"))
    records = list(read_records(paths))
    assert [(Path(r.file).name, r.line) for r in records] == [
        ("a.jsonl", 1),
        ("b.csv.gz", 2),
        ("c.txt", 1),
        ("d.jsonl.gz", 1),
        ("gone.jsonl", None),
    ]
    d, gone = records[3], records[4]
    assert isinstance(d, ErrorRecord) and d.reason.startswith("cannot read the file here:")
    assert isinstance(gone, ErrorRecord) and gone.reason == "cannot open: No such file or directory"


def test_gzip_on_stdin_is_recognised_by_its_magic_bytes() -> None:
    # RFC 1952 section 2.3.1: a gzip member starts with ID1 = 31 (0x1f), ID2 = 139 (0x8b)
    data = gzip.compress(GOOD + b"\n" + GOOD + b"\n")
    assert data[:2] == bytes([31, 139])
    stdin = io.BufferedReader(io.BytesIO(data))  # like sys.stdin.buffer, it can peek
    records = list(read_records(["-"], stdin=stdin))
    assert reasons(records) == [None, None]


@pytest.mark.parametrize(
    ("name", "fmt"),
    [
        ("x.jsonl", "jsonl"),
        ("x.JSON", "jsonl"),
        ("x.ndjson", "jsonl"),
        ("x.csv", "csv"),
        ("x.tsv.gz", "tsv"),
        ("x.txt", "pairs"),
        ("-", "jsonl"),
    ],
)
def test_detect_format(name: str, fmt: str) -> None:
    assert detect_format(name) == fmt


def test_unknown_format_fails_before_reading() -> None:
    with pytest.raises(InputFormatError, match=r"q\.xml: unknown extension '\.xml'"):
        read_records(["-", "q.xml"])
    with pytest.raises(InputFormatError, match="unknown input format 'xml'"):
        detect_format("q.jsonl", "xml")


# ------------------------------------------------------------------------------ properties


def _lines(data: bytes) -> int:
    """Physical lines as the reader counts them: split on \\n, a final \\n ends the last."""
    if not data:
        return 1  # the "empty file" record
    return data.count(b"\n") + (0 if data.endswith(b"\n") else 1)


@settings(max_examples=300, deadline=None)
@given(st.lists(st.one_of(st.binary(max_size=60), st.just(GOOD)), max_size=12))
def test_any_bytes_give_one_record_per_line_jsonl(parts: list[bytes]) -> None:
    data = b"\n".join(parts)
    records = read(data, limits=Limits(max_record_bytes=40))
    assert len(records) == _lines(data)
    if data:
        assert [r.line for r in records] == list(range(1, len(records) + 1))


@settings(max_examples=200, deadline=None)
@given(st.binary(max_size=300))
def test_any_bytes_give_one_record_per_line_pairs(data: bytes) -> None:
    assert len(read(data, "pairs")) == _lines(data)


@settings(max_examples=200, deadline=None)
@given(st.text(max_size=40), st.text(max_size=40))
def test_any_unicode_pair_round_trips_or_is_refused_with_a_reason(
    source: str, proposal: str
) -> None:
    data = json.dumps({"source": source, "proposal": proposal}).encode()
    [rec] = read(data)
    if isinstance(rec, InputRecord):
        assert (rec.source, rec.proposal) == (source, proposal)
    else:
        assert rec.reason.startswith(("lone surrogate", "control character"))


@settings(max_examples=200, deadline=None)
@given(st.binary(max_size=300))
def test_any_bytes_as_csv_give_records_in_line_order(data: bytes) -> None:
    records = read(b"source,proposal\n" + data, "csv")
    lines = [r.line for r in records]
    assert all(isinstance(n, int) for n in lines)
    assert lines == sorted(set(lines))  # type: ignore[type-var]
