"""`guard rules lint`: every error and warning class, all in one run, at the right file and line.

The fixtures under fixtures/ hold one case of each class on a known line; each table row
below names the line and why it is wrong, with the outside source that makes it wrong.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from click.testing import CliRunner

from guard.cli.rules import command
from guard.errors import Problem
from guard.vocab.lint import collect, find_rulesets, format_result, lint

FIXTURES = Path(__file__).parent / "fixtures"
BROKEN = FIXTURES / "broken"
WARNINGS = FIXTURES / "warnings"

# (file, line, severity, a word the message must contain); one row per class.
ERRORS = [
    pytest.param(
        # TOML 1.0.0 spec, "Keys": a key/value pair must have a value on the same line.
        BROKEN / "syntax.toml",
        4,
        "error",
        "toml",
        id="toml-syntax",
    ),
    pytest.param(BROKEN / "ruleset.toml", 6, "error", "colour", id="unknown-key"),
    pytest.param(BROKEN / "ruleset.toml", 9, "error", "missing.txt", id="missing-term-file"),
    pytest.param(
        # RFC 3629 section 3: 0xEB opens a three-byte sequence and must be followed by two
        # continuation bytes (0x80-0xBF); here a newline follows, so the line is not UTF-8.
        BROKEN / "terms" / "latin1.txt",
        2,
        "error",
        "utf-8",
        id="not-utf8",
    ),
    pytest.param(
        # An unclosed character class is a syntax error in every regex dialect
        # (common practice, no source).
        BROKEN / "ruleset.toml",
        18,
        "error",
        "regex",
        id="invalid-regex",
    ),
    pytest.param(
        # ^(a+)+$ is the textbook catastrophic-backtracking pattern: OWASP, "Regular
        # expression Denial of Service - ReDoS", list of evil regexes.
        BROKEN / "ruleset.toml",
        23,
        "error",
        "catastrophic",
        id="catastrophic-pattern",
    ),
    pytest.param(BROKEN / "ruleset.toml", 27, "error", "integer", id="wrong-type"),
    pytest.param(BROKEN / "loop" / "second.toml", 3, "error", "cycle", id="extends-cycle"),
]

WARNS = [
    pytest.param(WARNINGS / "terms" / "codes.txt", 4, "warning", "TV-220", id="duplicate-in-list"),
    pytest.param(
        WARNINGS / "terms" / "names.txt", 2, "warning", "TV-340", id="duplicate-across-lists"
    ),
    pytest.param(
        # Full case folding maps TOLLMERE and Tollmere to one key (Unicode CaseFolding.txt,
        # status C for A-Z): a folded list already matches the exact entry.
        WARNINGS / "terms" / "brands.txt",
        2,
        "warning",
        "case policies",
        id="duplicate-across-case-policies",
    ),
    pytest.param(
        # "the" is the most frequent word of English text (Kučera & Francis 1967, the Brown
        # corpus frequency list, rank 1).
        WARNINGS / "terms" / "codes.txt",
        5,
        "warning",
        "the",
        id="common-word",
    ),
    pytest.param(
        # U+200B ZERO WIDTH SPACE has General_Category Cf (Unicode, UnicodeData.txt).
        WARNINGS / "terms" / "codes.txt",
        6,
        "warning",
        "U+200B",
        id="invisible-character",
    ),
    pytest.param(
        # U+0430 CYRILLIC SMALL LETTER A has Script=Cyrillic (Unicode, Scripts.txt); with
        # Latin letters beside it the term is mixed-script in the sense of UTS #39 section 5.1.
        WARNINGS / "terms" / "codes.txt",
        7,
        "warning",
        "scripts",
        id="mixed-script",
    ),
    pytest.param(
        WARNINGS / "pairs" / "allowed.txt", 3, "warning", "Quillon", id="allowed-source-protected"
    ),
    pytest.param(
        WARNINGS / "pairs" / "allowed.txt", 4, "warning", "blocked", id="allowed-and-blocked"
    ),
    pytest.param(
        # \d* matches the empty string: zero repetitions of any quantifier marked * are a
        # match (POSIX.1-2017, XBD 9.4.6 "EREs Matching Multiple Characters").
        WARNINGS / "ruleset.toml",
        18,
        "warning",
        "empty",
        id="pattern-matches-empty",
    ),
]


def _run(*args: str) -> tuple[int, list[str]]:
    result = CliRunner().invoke(command, ["lint", *args])
    assert result.exception is None or isinstance(result.exception, SystemExit), result.output
    return result.exit_code, result.output.splitlines()


@pytest.fixture(scope="module")
def one_run() -> tuple[int, list[str]]:
    """Lint both fixture rulesets in a single invocation: the broken one holds every error
    class (a ruleset with errors is not compiled, so its lint warnings are not computed);
    the other every warning class."""
    return _run(str(BROKEN / "ruleset.toml"), str(WARNINGS / "ruleset.toml"))


def _hits(lines: list[str], file: Path, line: int, severity: str, word: str) -> list[str]:
    pattern = re.compile(rf"^{re.escape(str(file))}:{line}( \[.+?\])?: {severity}: ")
    return [x for x in lines if pattern.match(x) and word.lower() in x.lower()]


@pytest.mark.parametrize(("file", "line", "severity", "word"), ERRORS + WARNS)
def test_every_class_is_reported_in_one_run_at_its_line(
    one_run: tuple[int, list[str]], file: Path, line: int, severity: str, word: str
) -> None:
    _, lines = one_run
    assert _hits(lines, file, line, severity, word), "\n".join(lines)


def test_errors_exit_2_and_the_summary_counts(one_run: tuple[int, list[str]]) -> None:
    code, lines = one_run
    assert code == 2
    problems = lines[:-1]
    errors = sum(": error: " in x for x in problems)
    warnings = sum(": warning: " in x for x in problems)
    files = len({x.split(":", 1)[0] for x in problems})
    assert errors >= len(ERRORS)
    assert warnings >= len(WARNS)
    assert (
        lines[-1] == f"{errors} errors, {warnings} warnings in {files} files (2 rulesets checked)"
    )


def test_problems_are_sorted_by_file_then_line(one_run: tuple[int, list[str]]) -> None:
    _, lines = one_run
    keys = []
    for x in lines[:-1]:
        m = re.match(r"^(.*?)(?::(\d+))?(?: \[.+?\])?: (?:error|warning): ", x)
        assert m, x
        keys.append((m.group(1), int(m.group(2) or -1)))
    assert keys == sorted(keys)


def test_warnings_alone_exit_0_and_1_under_strict() -> None:
    code, lines = _run(str(WARNINGS / "ruleset.toml"))
    assert code == 0
    assert not any(": error: " in x for x in lines)
    strict_code, strict_lines = _run("--strict", str(WARNINGS / "ruleset.toml"))
    assert strict_code == 1
    assert strict_lines == lines


def test_a_clean_ruleset_exits_0() -> None:
    code, lines = _run("--strict", str(FIXTURES / "good" / "ruleset.toml"))
    assert (code, lines) == (0, ["0 errors, 0 warnings in 0 files (1 ruleset checked)"])


def test_collect_drops_problems_two_rulesets_share_and_orders_them() -> None:
    shared = Problem(file="terms/a.txt", line=3, message="dup", severity="warning")
    first = Problem(file="r.toml", line=None, message="missing", key="terms[0].file")
    later = Problem(file="r.toml", line=12, message="bad", key="rules.x")
    result = collect([later, shared, first, shared], ["one.toml", "two.toml"])
    assert result.problems == (first, later, shared)
    assert format_result(result) == [
        "r.toml [terms[0].file]: error: missing",
        "r.toml:12 [rules.x]: error: bad",
        "terms/a.txt:3: warning: dup",
        "2 errors, 1 warning in 2 files (2 rulesets checked)",
    ]


def test_find_rulesets_skips_environments(tmp_path: Path) -> None:
    for folder in ("a", "b/c", ".venv/lib", ".git/x"):
        (tmp_path / folder).mkdir(parents=True)
        (tmp_path / folder / "ruleset.toml").write_text("", encoding="utf-8")
    (tmp_path / "guard-rules.toml").write_text("", encoding="utf-8")
    (tmp_path / "a" / "other.toml").write_text("", encoding="utf-8")
    assert find_rulesets(tmp_path) == [
        tmp_path / "a" / "ruleset.toml",
        tmp_path / "b" / "c" / "ruleset.toml",
        tmp_path / "guard-rules.toml",
    ]


def test_lint_library_reads_each_ruleset_in_full() -> None:
    result = lint([WARNINGS / "ruleset.toml"])
    assert result.errors == 0
    assert result.warnings >= len(WARNS)
