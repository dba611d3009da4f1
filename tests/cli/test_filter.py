"""`guard filter`: every record through, with its guarded text added, in its own format."""

from __future__ import annotations

import csv
import io
import json
import os
import selectors
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest
from click.testing import CliRunner
from hypothesis import given, settings
from hypothesis import strategies as st

from guard.cli.filter import command

from .conftest import ACCEPT, FLAG, VETO


def run(args: list[str], stdin: str | bytes = "") -> tuple[int, str, str]:
    result = CliRunner().invoke(command, args, input=stdin)
    if result.exception and not isinstance(result.exception, SystemExit):
        raise result.exception
    return result.exit_code, result.stdout, result.stderr


def jsonl(*records: dict[str, object]) -> str:
    return "".join(json.dumps(r) + "\n" for r in records)


def test_jsonl_from_stdin_keeps_every_field_and_adds_guarded(ruleset: str) -> None:
    records = [
        {"id": "1", "extra": {"k": [1]}, **ACCEPT},
        {"id": "2", **FLAG, "score": 0.9},
        {"id": "3", **VETO, "lang": "en"},
    ]
    code, out, err = run(["--rules", ruleset], jsonl(*records))
    got = [json.loads(line) for line in out.splitlines()]
    assert got == [
        {**records[0], "guarded": "the anchor"},
        {**records[1], "guarded": "pintle and gudgeons set"},  # flagged: kept by default
        {**records[2], "guarded": "check the valve"},  # vetoed: undone
    ]
    assert [list(g) for g in got] == [[*r, "guarded"] for r in records]  # order kept
    assert (
        err
        == "guard filter: read 3, written 3, checked 3, errors 0; pairs: accept 1, flag 1, veto 1\n"
    )
    assert code == 0


def test_undo_flagged(ruleset: str) -> None:
    _, out, _ = run(["--rules", ruleset, "--undo-flagged"], jsonl(FLAG))
    assert json.loads(out)["guarded"] == FLAG["source"]


def test_bad_lines_stay_in_place_as_error_records(ruleset: str) -> None:
    data = jsonl(ACCEPT).encode() + b"\xff\n" + jsonl(VETO).encode()
    code, out, err = run(["--rules", ruleset], data)
    assert [json.loads(line) for line in out.splitlines()][1] == {
        "error": {
            "file": "<stdin>",
            "line": 2,
            "reason": "invalid UTF-8 at byte 1 of the line",
            "raw": "\ufffd",
        }
    }
    assert len(out.splitlines()) == 3
    assert err == (
        "guard filter: <stdin>:2: error: invalid UTF-8 at byte 1 of the line\n"
        "guard filter: read 3, written 3, checked 2, errors 1; pairs: accept 1, flag 0, veto 1\n"
    )
    assert code == 1


def test_other_field_names(ruleset: str) -> None:
    record = {"key": "k", "text": VETO["source"], "suggestion": VETO["proposal"]}
    args = ["--rules", ruleset, "--field", "source=text", "--field", "proposal=suggestion"]
    _, out, _ = run(args, jsonl(record))
    assert json.loads(out) == {**record, "guarded": "check the valve"}


def test_plain_tab_separated_lines_give_plain_guarded_lines(tmp_path: Path, ruleset: str) -> None:
    pairs = tmp_path / "pairs.txt"
    lines = [f"{p['source']}\t{p['proposal']}" for p in (ACCEPT, FLAG, VETO)]
    pairs.write_bytes(("\n".join(lines[:2]) + "\nno tab\n" + lines[2] + "\n").encode())
    code, out, err = run([str(pairs), "--rules", ruleset])
    assert out == "the anchor\npintle and gudgeons set\n\ncheck the valve\n"
    assert err == (
        f"guard filter: {pairs}:3: error: expected source<TAB>proposal, got 1 cell(s)\n"
        "guard filter: read 4, written 4, checked 3, errors 1; pairs: accept 1, flag 1, veto 1\n"
    )
    assert code == 1


@pytest.mark.parametrize("fmt", ["csv", "tsv"])
def test_tables_gain_guarded_and_error_columns(tmp_path: Path, ruleset: str, fmt: str) -> None:
    sep = "," if fmt == "csv" else "\t"
    table = tmp_path / f"pairs.{fmt}"
    rows = [
        ["id", "source", "proposal"],
        ["1", *ACCEPT.values()],
        ["2", "only"],
        ["3", *VETO.values()],
    ]
    table.write_text("".join(sep.join(r) + "\n" for r in rows))
    code, out, _ = run([str(table), "--rules", ruleset])
    got = list(csv.reader(io.StringIO(out), delimiter=sep))
    assert got == [
        ["id", "source", "proposal", "guarded", "error"],
        ["1", "teh anchor", "the anchor", "the anchor", ""],
        ["", "", "", "", f"{table}:3: row has 2 cell(s), the header has 3"],
        ["3", "check the valve", "check the value", "check the valve", ""],
    ]
    assert code == 1


def test_inputs_of_two_formats_are_a_usage_error(tmp_path: Path, ruleset: str) -> None:
    (tmp_path / "a.jsonl").write_text(jsonl(ACCEPT))
    (tmp_path / "b.csv").write_text("source,proposal\na,b\n")
    code, out, err = run([str(tmp_path / "a.jsonl"), str(tmp_path / "b.csv"), "--rules", ruleset])
    assert (code, out) == (2, "")
    assert "filter writes the format it reads, and the inputs mix csv, jsonl" in err


def _waiting_for_input(pid: int) -> None:
    """Wait until the process sleeps in a read of its input pipe (Linux /proc), so that a
    signal sent next finds it between records. A wait, not a timing assertion."""
    wchan = Path(f"/proc/{pid}/wchan")
    for _ in range(400):
        try:
            # the kernel's function: pipe_read, anon_pipe_read since Linux 6.14 (from memory)
            if wchan.read_text().endswith("pipe_read"):
                return
        except OSError:
            return
        time.sleep(0.05)


def test_ctrl_c_while_streaming_exits_130_after_saying_what_was_done(ruleset: str) -> None:
    """A real SIGINT to a real process reading a pipe, as a person at a terminal sends it."""
    script = "import sys; from guard.cli.main import main; sys.exit(main(sys.argv[1:]))"
    with subprocess.Popen(
        [sys.executable, "-c", script, "filter", "--rules", ruleset],
        stdin=subprocess.PIPE,
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        env={**os.environ, "NO_COLOR": "1"},
    ) as proc:
        assert proc.stdin is not None and proc.stdout is not None
        try:
            proc.stdin.write(jsonl(ACCEPT).encode())
            proc.stdin.flush()
            with selectors.DefaultSelector() as sel:  # a guard against hanging
                sel.register(proc.stdout, selectors.EVENT_READ)
                assert sel.select(timeout=120), "filter wrote nothing"
            first = proc.stdout.readline()
            _waiting_for_input(proc.pid)
            proc.send_signal(signal.SIGINT)
            # stdin stays open until it exits: closing it (communicate) could race the
            # signal with an end of input, and a finished run says nothing of an interrupt
            proc.wait(timeout=120)
            out, err = proc.communicate(timeout=120)
        finally:
            proc.kill()
    assert json.loads(first)["guarded"] == "the anchor"
    assert out == b""
    assert err.decode() == (
        "guard filter: interrupted; read 1, written 1, checked 1, errors 0; "
        "pairs: accept 1, flag 0, veto 0\n"
    )
    assert proc.returncode == 130


@settings(max_examples=60, deadline=None)
@given(
    st.lists(
        st.one_of(
            st.binary(max_size=40),
            st.builds(
                lambda s, p: json.dumps({"source": s, "proposal": p}, ensure_ascii=False).encode(
                    "utf-8", "surrogatepass"
                ),
                st.text(max_size=20),
                st.text(max_size=20),
            ),
        ),
        min_size=1,
        max_size=8,
    )
)
def test_any_input_gives_one_output_line_per_input_line(parts: list[bytes]) -> None:
    data = b"\n".join(parts) + b"\n"  # a part with line breaks of its own makes more lines
    code, out, err = run(["--rules", "base"], data)
    lines = data.count(b"\n")
    assert out.count("\n") == lines and out.endswith("\n")
    for line in out.split("\n")[:-1]:
        record = json.loads(line)
        assert ("guarded" in record) != ("error" in record)
    assert code in (0, 1)
    assert f"guard filter: read {lines}, written {lines}, " in err


def test_a_reader_that_stops_early_ends_the_run_quietly(tmp_path: Path, ruleset: str) -> None:
    """`guard filter big.jsonl | head -1`: the closed pipe stops the run without a traceback."""
    batch = tmp_path / "big.jsonl"
    batch.write_text(jsonl(ACCEPT) * 3000)
    script = "import sys; from guard.cli.main import main; sys.exit(main(sys.argv[1:]))"
    with subprocess.Popen(
        [sys.executable, "-c", script, "filter", str(batch), "--rules", ruleset],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
    ) as proc:
        assert proc.stdout is not None and proc.stderr is not None
        try:
            first = proc.stdout.readline()
            proc.stdout.close()
            err = proc.stderr.read().decode()
            proc.wait(timeout=120)
        finally:
            proc.kill()
    assert json.loads(first)["guarded"] == "the anchor"
    assert err == ""
    assert proc.returncode == 1
