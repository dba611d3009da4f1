"""One input holding good records and every kind of bad one, end to end through the CLI.

tests/cli checks `guard check` on a mixed JSONL batch and `guard filter` on single bad
lines, and tests/io the readers one case at a time. Here the same hostile mix goes through
both commands, as JSONL, gzip-compressed JSONL, CSV and TSV, and the output is held line
by line against the input: exactly one output record per input record, in order, every
error naming its file, its line and a reason, and a tally where
read = written = checked + errors. Last, a real SIGINT in the middle of a long run leaves
the previous report untouched (or, had the run finished first, a complete new one).
"""

from __future__ import annotations

import csv
import gzip
import io
import json
import os
import re
import signal
import subprocess
import sys
import time
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import pytest
from click.testing import CliRunner

from guard.cli.check import command as check_command
from guard.cli.filter import command as filter_command


@dataclass(frozen=True, slots=True)
class Line:
    """One input line and what must come out for it: a record with ``id`` (good), or an
    error whose reason contains ``reason``."""

    data: bytes
    id: str | None = None
    reason: str | None = None


def good(rid: str, source: str, proposal: str) -> Line:
    record = {"id": rid, "source": source, "proposal": proposal}
    return Line(json.dumps(record, ensure_ascii=False).encode(), id=rid)


def bad(data: bytes, reason: str) -> Line:
    return Line(data, reason=reason)


BIG = 3 << 20  # three megabytes, over the default 1 MiB record limit

JSONL_MIX: list[Line] = [
    good("g1", "teh anchor chain", "the anchor chain"),
    bad(b'{"source": "caf\xe9", "proposal": "cafe"}', "invalid UTF-8"),
    bad(b'{"source": "\\udc80 x", "proposal": "x"}', "lone surrogate"),
    bad(b'{"source": "a\\u0000b", "proposal": "ab"}', "control character U+0000"),
    bad(b'{"source": "a\\u001bb", "proposal": "ab"}', "control character U+001B"),
    bad(b'{"source": "a\x01b", "proposal": "ab"}', "not valid JSON"),
    good("g2", "Bitte die Rechnug senden", "Bitte die Rechnung senden"),
    bad(b'{"source": "' + b"x" * BIG + b'", "proposal": "y"}', "longer than the limit"),
    bad(b'{"source": "a", "proposal": "b", "n": ' + b"[" * 40 + b"]" * 40 + b"}", "nested"),
    bad(
        b'{"source": "a", "proposal": "b", "n": ' + b"[" * 200_000 + b"]" * 200_000 + b"}",
        "JSON nested too deeply",  # 200,000 levels: past the parser's own recursion limit
    ),
    bad(
        b'{"source": "' + b"a " * 300_000 + b'", "proposal": "a"}',
        "the source has more than 10000 tokens",  # 600 kB: under the byte limit
    ),
    bad(b"[1, 2, 3]", "not a JSON object (got an array)"),
    bad(b'"source"', "not a JSON object (got a string)"),
    bad(b"42", "not a JSON object (got a number)"),
    bad(b"null", "not a JSON object (got null)"),
    bad(b'{"source": "a"}', "missing field 'proposal'"),
    bad(b'{"proposal": "a"}', "missing field 'source'"),
    bad(b'{"source": 7, "proposal": "a"}', "field 'source' is not a string"),
    bad(b'{"source": "a", "proposal": null}', "field 'proposal' is not a string"),
    bad(b'{"source": "a", "proposal": "b", "id": [1]}', "field 'id'"),
    bad(b'{"source": "a", "proposal": "b", "score": "high"}', "field 'score'"),
    bad(b'{"source": "a", "proposal": "b", "source": "c"}', "duplicate field 'source'"),
    bad(b"", "blank line"),
    bad(b" \t ", "blank line"),
    bad(b"\x89PNG\r\x1a\x00\x00\x00\rIHDR\xff\xfe", "invalid UTF-8"),
    bad(bytes(range(256))[:10], "not valid JSON"),  # NUL and controls, valid UTF-8
    good("g3", "\u05e9\u05dc\u05d5\u05dd \u05e2\u05d5\u05dc\u05dd", "\u05e9\u05dc\u05d5\u05dd"),
    good("g4", "family \U0001f468\u200d\U0001f469\u200d\U0001f467 note", "family note"),
    good("g5", "line\u2028separator kept", "line\u2028separator kpt"),
    good("g6", "teh last one", "the last one"),
]


def _jsonl_bytes(lines: Sequence[Line], *, crlf: bool = False) -> bytes:
    end = b"\r\n" if crlf else b"\n"
    return b"".join(line.data + end for line in lines)


def _run(command: object, args: list[str]) -> tuple[int, str, str]:
    result = CliRunner().invoke(command, args)  # type: ignore[arg-type]
    if result.exception and not isinstance(result.exception, SystemExit):
        raise result.exception
    return result.exit_code, result.stdout, result.stderr


_TALLY = re.compile(r"read (\d+), written (\d+), checked (\d+), errors (\d+);")


def _tally(stderr: str) -> tuple[int, int, int, int]:
    found = _TALLY.findall(stderr.splitlines()[-1])
    assert len(found) == 1, stderr[-500:]
    read, written, checked, errors = map(int, found[0])
    return read, written, checked, errors


def _assert_jsonl_answers(out: str, lines: Sequence[Line], file: str, done: str) -> None:
    """Output line i answers input line i. ``done`` is the key a checked record gains."""
    records = [json.loads(text) for text in out.split("\n")[:-1]]
    assert out.endswith("\n") and len(records) == len(lines)
    for number, (line, record) in enumerate(zip(lines, records, strict=True), 1):
        if line.id is not None:
            assert record.get("id") == line.id and done in record, (number, record)
            assert "error" not in record
        else:
            error = record["error"]
            assert (error["file"], error["line"]) == (file, number), (number, error)
            assert line.reason is not None and line.reason in error["reason"], (number, error)


def _assert_reconciles(stderr: str, lines: Sequence[Line]) -> None:
    read, written, checked, errors = _tally(stderr)
    assert read == written == checked + errors == len(lines)
    assert errors == sum(1 for line in lines if line.id is None)


@pytest.fixture(scope="module")
def jsonl_mix(tmp_path_factory: pytest.TempPathFactory) -> Path:
    path = tmp_path_factory.mktemp("mix") / "mix.jsonl"
    path.write_bytes(_jsonl_bytes(JSONL_MIX))
    return path


def _as_given(path: Path, tmp_path: Path, compressed: bool) -> Path:
    if not compressed:
        return path
    packed = tmp_path / (path.name + ".gz")
    packed.write_bytes(gzip.compress(path.read_bytes()))
    return packed


@pytest.mark.parametrize("compressed", [False, True], ids=["plain", "gzip"])
def test_check_answers_every_jsonl_line_in_order(
    jsonl_mix: Path, tmp_path: Path, compressed: bool
) -> None:
    path = _as_given(jsonl_mix, tmp_path, compressed)
    code, out, err = _run(check_command, [str(path), "--rules", "base", "--format", "jsonl"])
    _assert_jsonl_answers(out, JSONL_MIX, str(path), "verdict")
    _assert_reconciles(err, JSONL_MIX)
    assert code == 1  # unreadable records fail the gate


@pytest.mark.parametrize("compressed", [False, True], ids=["plain", "gzip"])
def test_filter_answers_every_jsonl_line_in_order(
    jsonl_mix: Path, tmp_path: Path, compressed: bool
) -> None:
    path = _as_given(jsonl_mix, tmp_path, compressed)
    code, out, err = _run(filter_command, [str(path), "--rules", "base"])
    _assert_jsonl_answers(out, JSONL_MIX, str(path), "guarded")
    _assert_reconciles(err, JSONL_MIX)
    # every error is also told on stderr with its place, one line each
    told = [line for line in err.splitlines() if line.startswith(f"guard filter: {path}:")]
    assert len(told) == sum(1 for line in JSONL_MIX if line.id is None)
    assert code == 1


def test_crlf_line_ends_change_nothing(tmp_path: Path) -> None:
    path = tmp_path / "crlf.jsonl"
    lines = [line for line in JSONL_MIX if b"\r" not in line.data and line.data.strip()]
    path.write_bytes(_jsonl_bytes(lines, crlf=True))
    _, out, err = _run(filter_command, [str(path), "--rules", "base"])
    _assert_jsonl_answers(out, lines, str(path), "guarded")
    _assert_reconciles(err, lines)


def test_a_broken_gzip_stream_costs_the_rest_of_that_file_only(tmp_path: Path) -> None:
    """A truncated .gz: the records before the break, one error where it broke, and the
    next file is read as usual."""
    record = json.dumps({"source": "teh pump", "proposal": "the pump"}).encode() + b"\n"
    whole = gzip.compress(record * 5000)
    broken = tmp_path / "broken.jsonl.gz"
    broken.write_bytes(whole[: len(whole) // 2])
    after = tmp_path / "after.jsonl"
    after.write_bytes(record)
    code, out, err = _run(filter_command, [str(broken), str(after), "--rules", "base"])
    records = [json.loads(text) for text in out.splitlines()]
    *before, failure, last = records
    assert before and all(r == {**json.loads(record), "guarded": "the pump"} for r in before)
    assert failure["error"]["file"] == str(broken)
    assert failure["error"]["line"] == len(before) + 1
    assert "cannot read the file here" in failure["error"]["reason"]
    assert last["guarded"] == "the pump"
    read, written, checked, errors = _tally(err)
    assert (read, written, checked, errors) == (len(records), len(records), len(records) - 1, 1)
    assert code == 1


# ---------------------------------------------------------------- CSV and TSV


def _table_mix(sep: str) -> tuple[bytes, list[tuple[int, str | None, str | None]]]:
    """A table with a header and bad rows; the expected (line, id, reason) per record."""
    s = sep.encode()
    rows: list[tuple[bytes, str | None, str | None]] = [
        (s.join([b"1", b"teh anchor", b"the anchor"]), "1", None),
        (s.join([b"2", b"only two"]), None, "row has 2 cell(s), the header has 3"),
        (s.join([b"3", b"caf\xe9", b"cafe"]), None, "invalid UTF-8"),
        (s.join([b"4", b"a\x00b", b"ab"]), None, "control character U+0000"),
        (s.join([b"5", b"a\x1b[31mb", b"ab"]), None, "control character U+001B"),
        (b"", None, "blank line"),
        (s.join([b"7", b"x" * BIG, b"y"]), None, "longer than the limit"),
        (b"\x89PNG\x00\x00\xff", None, "invalid UTF-8"),
        (s.join([b"9", b"one", b"two", b"three"]), None, "row has 4 cell(s), the header has 3"),
        (s.join([b"10", b"teh pump", b"the pump"]), "10", None),
    ]
    data = s.join([b"id", b"source", b"proposal"]) + b"\n"
    data += b"".join(row + b"\n" for row, _, _ in rows)
    expected = [(n, rid, reason) for n, (_, rid, reason) in enumerate(rows, 2)]
    return data, expected


@pytest.mark.parametrize("fmt", ["csv", "tsv"])
@pytest.mark.parametrize("compressed", [False, True], ids=["plain", "gzip"])
def test_tables_answer_every_row_through_check_and_filter(
    tmp_path: Path, fmt: str, compressed: bool
) -> None:
    sep = "," if fmt == "csv" else "\t"
    data, expected = _table_mix(sep)
    path = tmp_path / (f"mix.{fmt}.gz" if compressed else f"mix.{fmt}")
    path.write_bytes(gzip.compress(data) if compressed else data)
    errors = sum(1 for _, rid, _ in expected if rid is None)

    code, out, err = _run(check_command, [str(path), "--rules", "base", "--format", "jsonl"])
    records = [json.loads(text) for text in out.splitlines()]
    assert len(records) == len(expected)
    for (line, rid, reason), record in zip(expected, records, strict=True):
        if rid is not None:
            assert record["id"] == rid and "verdict" in record
        else:
            assert (record["error"]["file"], record["error"]["line"]) == (str(path), line)
            assert reason is not None and reason in record["error"]["reason"], record
    assert _tally(err) == (len(expected), len(expected), len(expected) - errors, errors)
    assert code == 1

    code, out, err = _run(filter_command, [str(path), "--rules", "base"])
    rows = list(csv.reader(io.StringIO(out), delimiter=sep))
    assert rows[0] == ["id", "source", "proposal", "guarded", "error"]
    assert len(rows) == 1 + len(expected)
    for (line, rid, reason), row in zip(expected, rows[1:], strict=True):
        if rid is not None:
            assert row[0] == rid and row[3] and row[4] == ""
        else:
            assert row[4].startswith(f"{path}:{line}: ") and reason is not None and reason in row[4]
    assert _tally(err) == (len(expected), len(expected), len(expected) - errors, errors)
    assert code == 1


def test_csv_unterminated_quote_at_the_end_is_one_error(tmp_path: Path) -> None:
    path = tmp_path / "open.csv"
    path.write_bytes(b'id,source,proposal\n1,teh pump,the pump\n2,"never closed,x\n3,a,b\n')
    code, out, err = _run(check_command, [str(path), "--rules", "base", "--format", "jsonl"])
    records = [json.loads(text) for text in out.splitlines()]
    assert [r.get("id") for r in records] == ["1", None]
    assert records[1]["error"]["line"] == 3
    assert "unterminated quoted cell" in records[1]["error"]["reason"]
    assert _tally(err) == (2, 2, 1, 1)
    assert code == 1


# ---------------------------------------------------------------- interrupted runs


def _guard(*args: str) -> list[str]:
    script = "import sys; from guard.cli.main import main; sys.exit(main(sys.argv[1:]))"
    return [sys.executable, "-c", script, *args]


def _wait_for_temporary(folder: Path, proc: subprocess.Popen[bytes]) -> Path | None:
    """The report's temporary file once it holds some bytes (the run is under way), or
    None when the process ended first. A wait with a generous cap, not a timing check."""
    for _ in range(2400):
        if proc.poll() is not None:
            return None
        for tmp in folder.glob(".report.jsonl.*.tmp"):
            try:
                if tmp.stat().st_size > 0:
                    return tmp
            except FileNotFoundError:
                continue
        time.sleep(0.05)
    return None


@pytest.mark.parametrize("jobs", [1, 2])
def test_sigint_mid_run_leaves_the_old_report_or_a_complete_new_one(
    tmp_path: Path, jobs: int
) -> None:
    n = 4000
    batch = tmp_path / "big.jsonl"
    record = {"source": "teh anchor chain and the bilge pmup", "proposal": "the anchor chain"}
    batch.write_text("".join(json.dumps({"id": i, **record}) + "\n" for i in range(n)))
    out = tmp_path / "out"
    out.mkdir()
    report = out / "report.jsonl"
    report.write_text("the previous report\n")
    args = _guard(
        "check", str(batch), "--rules", "base", "--format", "jsonl", "-o", str(report),
        "--jobs", str(jobs),
    )  # fmt: skip
    with subprocess.Popen(
        args,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        env={**os.environ, "NO_COLOR": "1"},
        start_new_session=True,  # a Ctrl-C at a terminal reaches the whole process group
    ) as proc:
        try:
            started = _wait_for_temporary(out, proc)
            if started is not None:
                os.killpg(proc.pid, signal.SIGINT)
            stdout, stderr = proc.communicate(timeout=300)
        finally:
            if proc.poll() is None:
                os.killpg(proc.pid, signal.SIGKILL)
    text = stderr.decode()
    assert stdout == b""
    assert [p.name for p in out.iterdir()] == ["report.jsonl"]  # no temporary left behind
    if proc.returncode == 130:
        assert report.read_text() == "the previous report\n"
        m = re.fullmatch(
            r"guard check: interrupted; read (\d+), written (\d+), checked (\d+), errors 0; "
            r"pairs: .*; " + re.escape(str(report)) + r" was left as it was\n",
            text,
        )
        assert m is not None, text
        read, written, checked = map(int, m.groups())
        # the signal may land between counting a record and writing it out
        assert 0 < read == checked < n and written in (read - 1, read)
    else:  # the run finished before the signal landed: the new report is whole
        assert proc.returncode in (0, 1), text
        lines = report.read_text().splitlines()
        assert [json.loads(line)["id"] for line in lines] == list(range(n))
        assert started is None or "interrupted" not in text


@pytest.mark.parametrize("fmt", ["csv", "tsv"])
def test_a_header_that_cannot_be_read_is_still_the_header(tmp_path: Path, fmt: str) -> None:
    """A spreadsheet export in Latin-1: the header line is not UTF-8. The next line is a
    data row, not the header, and every row says why it cannot be read, in line order
    (found by fuzz/fuzz_reader.py: the next row used to become the header, and a header
    problem was told after the rows below it)."""
    sep = b"," if fmt == "csv" else b"\t"
    path = tmp_path / f"latin1.{fmt}"
    path.write_bytes(
        sep.join([b"id", b"source", b"proposal", b"gr\xf6\xdfe"]) + b"\n"
        + sep.join([b"1", b"teh pump", b"the pump", b"2"]) + b"\n"
        + b"\xff\n"
        + sep.join([b"3", b"teh anchor", b"the anchor", b"1"]) + b"\n"
    )  # fmt: skip
    code, out, err = _run(check_command, [str(path), "--rules", "base", "--format", "jsonl"])
    errors = [json.loads(text)["error"] for text in out.splitlines()]
    assert [(e["line"], e["reason"].split(":")[0]) for e in errors] == [
        (2, "the header cannot be read"),
        (3, "invalid UTF-8 at byte 1 of the line"),
        (4, "the header cannot be read"),
    ]
    assert _tally(err) == (3, 3, 0, 3)
    assert code == 1

    empty = tmp_path / f"header-only.{fmt}"
    empty.write_bytes(b"gr\xf6\xdfe" + sep + b"x\n")
    _, out, err = _run(check_command, [str(empty), "--rules", "base", "--format", "jsonl"])
    (only,) = [json.loads(text)["error"] for text in out.splitlines()]
    assert only["line"] == 1 and only["reason"].startswith("the header cannot be read")
    assert _tally(err) == (1, 1, 0, 1)


def test_the_limits_are_settings(tmp_path: Path) -> None:
    """--max-record-bytes and --max-tokens: a record over either is an error record."""
    lines = [
        good("short", "teh pump", "the pump"),
        bad(json.dumps({"source": "x" * 200, "proposal": "y"}).encode(), "longer than the limit"),
        bad(
            json.dumps({"source": "one", "proposal": "one two three four"}).encode(),
            "the proposal has more than 3 tokens",
        ),
        good("three", "teh bilge pump", "the bilge pump"),
    ]
    path = tmp_path / "limits.jsonl"
    path.write_bytes(_jsonl_bytes(lines))
    limits = ["--max-record-bytes", "100", "--max-tokens", "3"]
    for command, done in ((check_command, "verdict"), (filter_command, "guarded")):
        args = [str(path), "--rules", "base", *limits]
        code, out, err = _run(command, [*args, "--format", "jsonl"] if done == "verdict" else args)
        _assert_jsonl_answers(out, lines, str(path), done)
        _assert_reconciles(err, lines)
        assert code == 1
