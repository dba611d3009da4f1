"""`guard check` end to end: nothing lost, exit codes, formats, parallel runs, Ctrl-C."""

from __future__ import annotations

import hashlib
import io
import json
from pathlib import Path

import jsonschema
import pytest
from click.testing import CliRunner

from guard.cli.check import command
from guard.cli.common import default_rules, wants_colour

from .conftest import ACCEPT, FLAG, VETO


def jsonl(*records: dict[str, object]) -> str:
    return "".join(json.dumps(r) + "\n" for r in records)


def run(args: list[str], stdin: object = None) -> tuple[int, str, str]:
    result = CliRunner().invoke(command, args, input=stdin)  # type: ignore[arg-type]
    if result.exception and not isinstance(result.exception, SystemExit):
        raise result.exception
    return result.exit_code, result.stdout, result.stderr


def test_a_batch_of_good_and_bad_lines_gives_one_output_line_each(
    tmp_path: Path, ruleset: str
) -> None:
    lines = [
        json.dumps({"id": "a", **ACCEPT}).encode(),
        b'{"source": "caf\xe9", "proposal": "cafe"}',
        b'{"source": "\\ud800", "proposal": "x"}',
        b'{"source": "a\\u0000b", "proposal": "ab"}',
        b'{"source": "' + b"x" * (2 << 20) + b'", "proposal": "y"}',
        b'{"source": "a", "proposal": "b", "deep": ' + b"[" * 40 + b"]" * 40 + b"}",
        b'["source", "proposal"]',
        b'{"source": "a"}',
        b'{"source": "a", "proposal": 7}',
        b"",
        b"\x89PNG\r\x1a\x00\x00\x00\rIHDR",
        json.dumps({"id": "v", **VETO}).encode(),
    ]
    batch = tmp_path / "batch.jsonl"
    batch.write_bytes(b"\n".join(lines) + b"\n")
    table = tmp_path / "more.csv"
    table.write_text(f"source,proposal\n{FLAG['source']},{FLAG['proposal']}\none,two,three\n")
    empty = tmp_path / "empty.jsonl"
    empty.write_bytes(b"")
    code, out, err = run(
        [str(batch), str(table), str(empty), "--rules", ruleset, "--format", "jsonl"]
    )
    records = [json.loads(line) for line in out.splitlines()]
    assert len(records) == 15
    got = [
        (Path(r["error"]["file"]).name, r["error"]["line"], r["error"]["reason"])
        for r in records
        if "error" in r
    ]
    assert got == [
        ("batch.jsonl", 2, "invalid UTF-8 at byte 16 of the line"),
        ("batch.jsonl", 3, "lone surrogate U+D800 in field 'source'"),
        ("batch.jsonl", 4, "control character U+0000 in field 'source'"),
        ("batch.jsonl", 5, f"record longer than the limit of 1048576 bytes ({len(lines[4])})"),
        ("batch.jsonl", 6, "JSON nested deeper than 32 levels"),
        ("batch.jsonl", 7, "not a JSON object (got an array)"),
        ("batch.jsonl", 8, "missing field 'proposal'"),
        ("batch.jsonl", 9, "field 'proposal' is not a string (got a number)"),
        ("batch.jsonl", 10, "blank line"),
        ("batch.jsonl", 11, "invalid UTF-8 at byte 1 of the line"),
        ("more.csv", 3, "row has 3 cell(s), the header has 2"),
        ("empty.jsonl", None, "empty file"),
    ]
    verdicts = [(r.get("id"), r["verdict"]) for r in records if "verdict" in r]
    assert verdicts == [("a", "accept"), ("v", "veto"), (None, "flag")]
    assert err == (
        "guard check: read 15, written 15, checked 3, errors 12; pairs: accept 1, flag 1, veto 1\n"
    )
    assert code == 1


@pytest.mark.parametrize(
    ("pairs", "fail_on", "code"),
    [
        ([ACCEPT], "veto", 0),
        ([ACCEPT, FLAG], "veto", 0),
        ([ACCEPT, FLAG], "flag", 1),
        ([ACCEPT, VETO], "veto", 1),
        ([ACCEPT, VETO], "never", 0),
        ([ACCEPT], "flag", 0),
    ],
    ids=["accept", "flag-under-veto", "flag-at-flag", "veto", "never", "accept-at-flag"],
)
def test_exit_code_follows_fail_on(
    ruleset: str, pairs: list[dict[str, str]], fail_on: str, code: int
) -> None:
    got, _, _ = run(["--rules", ruleset, "--fail-on", fail_on, "--format", "jsonl"], jsonl(*pairs))
    assert got == code


def test_an_unreadable_record_fails_the_gate_unless_never(ruleset: str) -> None:
    assert run(["--rules", ruleset, "--format", "jsonl"], jsonl(ACCEPT) + "[]\n")[0] == 1
    args = ["--rules", ruleset, "--format", "jsonl", "--fail-on", "never"]
    assert run(args, jsonl(ACCEPT) + "[]\n")[0] == 0


class _Untouchable(io.BytesIO):
    """Standard input that fails the test when a record is read from it."""

    def __init__(self) -> None:
        super().__init__(b'{"source": "a", "proposal": "b"}\n')

    def read(self, size: int | None = -1) -> bytes:
        if size == 0:  # click probes the stream with read(0)
            return b""
        raise AssertionError("input read before the ruleset was loaded")

    def readline(self, size: int | None = -1) -> bytes:
        raise AssertionError("input read before the ruleset was loaded")


def test_a_bad_ruleset_exits_2_before_any_record_is_read(tmp_path: Path) -> None:
    bad = tmp_path / "ruleset.toml"
    bad.write_text('[ruleset]\nname = "x"\nextends = ["base"]\n[[terms]]\nfile = "gone.txt"\n')
    code, out, err = run(["--rules", str(bad)], _Untouchable())
    assert (code, out) == (2, "")
    assert str(bad) in err and "gone.txt" in err


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (["notes.md"], "unknown extension '.md'; use --input-format"),
        (["-", "--field", "text"], "expected ROLE=NAME"),
        (["-", "--field", "colour=x"], "expected ROLE=NAME"),
        (["-", "--format", "xml"], "'xml' is not one of"),
        (["-", "--jobs", "0"], "0 is not in the range x>=1"),
        (["missing.jsonl"], "'missing.jsonl' does not exist"),
    ],
    ids=["extension", "field-form", "field-role", "format", "jobs", "missing-file"],
)
def test_usage_errors_exit_2(tmp_path: Path, args: list[str], message: str) -> None:
    if args[0] == "notes.md":
        (tmp_path / "notes.md").write_text("x")
        args = [str(tmp_path / "notes.md")]
    code, out, err = run(args, "")
    assert (code, out) == (2, "")
    assert message in err


def test_text_report_on_stdout(ruleset: str) -> None:
    code, out, err = run(["--rules", ruleset], jsonl({"id": "v", **VETO}, ACCEPT))
    assert out.startswith("v (<stdin>:1): veto\n  1. veto   check the [valve → value]\n")
    assert "       blocked-pair (veto): 'valve => value' is a blocked pair" in out
    assert "<stdin>:2: accept\n  1. accept [teh → the] anchor\n  guarded: the anchor\n" in out
    assert "\x1b[" not in out  # not a terminal
    assert (
        out.endswith("\n")
        and "\nSummary\n  records: read 2, written 2, checked 2, errors 0\n" in out
    )
    assert (
        err
        == "guard check: read 2, written 2, checked 2, errors 0; pairs: accept 1, flag 0, veto 1\n"
    )
    assert code == 1


def schema() -> dict[str, object]:
    # OASIS SARIF 2.1.0 schema (errata 01); provenance and hash check in tests/report
    raw = (Path(__file__).resolve().parent.parent / "data" / "sarif-schema-2.1.0.json").read_bytes()
    assert hashlib.sha256(raw).hexdigest() == (
        "c3b4bb2d6093897483348925aaa73af03b3e3f4bd4ca38cef26dcb4212a2682e"
    )
    loaded: dict[str, object] = json.loads(raw)
    return loaded


def test_sarif_from_the_engine_validates(tmp_path: Path, ruleset: str) -> None:
    batch = tmp_path / "pairs.jsonl"
    batch.write_text(jsonl(ACCEPT, FLAG, VETO) + "oops\n")
    out_file = tmp_path / "out.sarif"
    code, out, _ = run([str(batch), "--rules", ruleset, "--format", "sarif", "-o", str(out_file)])
    assert (code, out) == (1, "")
    log = json.loads(out_file.read_text())
    # OASIS SARIF 2.1.0: validate against the standard's schema (JSON Schema draft 4)
    jsonschema.Draft4Validator(schema()).validate(log)
    run_ = log["runs"][0]
    assert [(r["ruleId"], r["level"]) for r in run_["results"]] == [
        ("protected-term", "warning"),
        ("blocked-pair", "error"),
    ]
    rules = {r["id"]: r for r in run_["tool"]["driver"]["rules"]}
    assert rules["blocked-pair"]["help"]["text"]  # the rule's own doc, from the registry
    veto = run_["results"][1]["locations"][0]["physicalLocation"]
    # "check the valve": "valve" is characters 10..15, so 1-based columns 11 to 16 (exclusive)
    assert veto["region"] == {"startLine": 3, "startColumn": 11, "endColumn": 16}
    assert veto["artifactLocation"]["uri"] == "file://" + str(batch)


def test_html_report_escapes_record_text(tmp_path: Path, ruleset: str) -> None:
    hostile = {
        "id": "<b>id</b>",
        "source": "<script>alert(1)</script> check the valve \"'><img src=x onerror=alert(2)>",
        "proposal": "<script>alert(1)</script> check the value \"'><img src=x onerror=alert(2)>",
    }
    out_file = tmp_path / "r.html"
    code, _, _ = run(["--rules", ruleset, "--format", "html", "-o", str(out_file)], jsonl(hostile))
    page = out_file.read_text()
    assert code == 1
    assert page.count("<script") == 1
    assert "<img" not in page and "<b>id" not in page and "&lt;b&gt;id&lt;/b&gt;" in page
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in page
    assert "&quot;&#x27;&gt;&lt;img src=x onerror=alert(2)&gt;" in page


def test_output_is_the_same_with_several_jobs(tmp_path: Path, ruleset: str) -> None:
    batch = tmp_path / "pairs.jsonl"
    batch.write_text((jsonl(ACCEPT, FLAG, VETO) + "[1]\n") * 12)
    for fmt in ("jsonl", "text", "csv", "sarif", "html"):
        outputs = []
        for jobs in ("1", "2"):
            target = tmp_path / f"out-{jobs}.{fmt}"
            args = [str(batch), "--rules", ruleset, "--format", fmt, "--jobs", jobs]
            run([*args, "-o", str(target)])
            outputs.append(target.read_bytes())
        assert outputs[0] == outputs[1], fmt
        assert len(outputs[0]) > 100


def test_interrupted_run_leaves_the_old_report_and_exits_130(tmp_path: Path, ruleset: str) -> None:
    class CtrlC(io.BytesIO):
        """Standard input on which the user presses Ctrl-C after two records."""

        def __init__(self) -> None:
            super().__init__(jsonl(ACCEPT, VETO, ACCEPT).encode())
            self.lines = 0

        def readline(self, size: int | None = -1) -> bytes:
            self.lines += 1
            if self.lines == 3:
                raise KeyboardInterrupt
            return super().readline(size)

    target = tmp_path / "report.txt"
    target.write_text("the previous report\n")
    code, out, err = run(["--rules", ruleset, "-o", str(target)], CtrlC())
    assert (code, out) == (130, "")
    assert err == (
        "guard check: interrupted; read 2, written 2, checked 2, errors 0; "
        f"pairs: accept 1, flag 0, veto 1; {target} was left as it was\n"
    )
    assert target.read_text() == "the previous report\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["report.txt", "rules"]


def test_default_ruleset_is_the_folder_s_file_else_base(tmp_path: Path) -> None:
    assert default_rules(tmp_path) == ("base",)
    (tmp_path / "guard-rules.toml").write_text("")
    assert default_rules(tmp_path) == (str(tmp_path / "guard-rules.toml"),)


class _Tty(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_colour_only_on_a_terminal_without_no_color(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.delenv("NO_COLOR", raising=False)
    assert wants_colour(_Tty()) and not wants_colour(io.StringIO())
    # no-color.org: "when present and not an empty string" colour is off
    monkeypatch.setenv("NO_COLOR", "1")
    assert not wants_colour(_Tty())
    monkeypatch.setenv("NO_COLOR", "")
    assert wants_colour(_Tty())


def test_progress_only_on_a_terminal_and_not_over_the_report() -> None:
    from guard.batch import Summary
    from guard.cli.common import Progress

    summary = Summary(read=3, errors=1)
    summary.verdicts.update({"veto": 2})
    tty = _Tty()
    bar = Progress(tty, every=0)
    bar.update(summary)
    bar.close()
    assert tty.getvalue() == "\r3 records: 2 veto, 0 flag, 1 errors \r\x1b[K"
    for stream, on_terminal in ((io.StringIO(), False), (_Tty(), True)):
        quiet = Progress(stream, every=0, report_on_terminal=on_terminal)
        quiet.update(summary)
        quiet.close()
        assert stream.getvalue() == ""


def test_settings_over_the_ruleset(ruleset: str) -> None:
    args = ["--rules", ruleset, "--format", "jsonl"]
    _, out, _ = run(args, jsonl(FLAG))
    assert json.loads(out)["verdict"] == "flag"
    _, out, _ = run([*args, "--set", "rules.protected-term.action=veto"], jsonl(FLAG))
    assert json.loads(out)["verdict"] == "veto"
    code, out, err = run([*args, "--set", "rules.no-such-rule.action=off"], jsonl(FLAG))
    assert (code, out) == (2, "")
    assert "unknown rule 'no-such-rule'" in err
    code, _, err = run([*args, "--set", "novalue"], jsonl(FLAG))
    assert code == 2 and "'novalue': expected KEY=VALUE" in err


def test_settings_reach_every_worker(tmp_path: Path, ruleset: str) -> None:
    batch = tmp_path / "pairs.jsonl"
    batch.write_text(jsonl(FLAG) * 4)
    args = [str(batch), "--rules", ruleset, "--format", "jsonl", "--jobs", "2"]
    _, out, _ = run([*args, "--set", "rules.protected-term.action=veto"])
    assert [json.loads(line)["verdict"] for line in out.splitlines()] == ["veto"] * 4


@pytest.mark.parametrize("where", ["missing-folder", "a-folder"])
def test_an_output_that_cannot_be_written_is_a_usage_error(
    tmp_path: Path, ruleset: str, where: str
) -> None:
    if where == "missing-folder":
        target, why = tmp_path / "no" / "r.txt", f"no folder {tmp_path / 'no'}"
    else:
        target, why = tmp_path, f"{tmp_path} is a folder"
    code, out, err = run(["--rules", ruleset, "-o", str(target)], jsonl(ACCEPT))
    assert (code, out) == (2, "")
    assert err.endswith(f"\nError: Invalid value for --output: {why}\n")
