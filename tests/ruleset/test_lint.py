"""Lint warnings: rulesets that load but are probably wrong. Each names file and line."""

from __future__ import annotations

from collections.abc import Callable, Mapping
from pathlib import Path

import wordfreq

from guard.errors import Problem
from guard.rules.base import Rule
from guard.ruleset.load import resolve

Write = Callable[[dict[str, str | bytes]], Path]

TOML = """\
[ruleset]
name = "lint-me"
extends = []
languages = ["en"]

[[terms]]
file = "a.txt"
case = "fold"

[[terms]]
file = "b.txt"
kind = "name"

[[patterns]]
name = "maybe-digits"
regex = '\\d*'

[pairs]
blocked = "blocked.txt"
allowed = "allowed.txt"
"""

FILES: dict[str, str | bytes] = {
    "r/ruleset.toml": TOML,
    # a.txt: 1 Quillmate, 2 comment, 3 duplicate (fold), 4 zero-width joiner, 5 Cyrillic а, 6 common
    "r/a.txt": "Quillmate\n# comment\nQUILLMATE  # same key when folded\n"
    "Brack\u200denfold\nKettlewiсk\nwater\n",
    # b.txt: an exact-case term that is also in a.txt, folded: a different key space
    "r/b.txt": "Harrowgate\nQuillmate\nHarrowgate\n",
    "r/blocked.txt": "hydroxyzyne => hydralazyne\n",
    "r/allowed.txt": "hydroxyzyne => hydralazyne\nquillmate => quilmate\n",
}


def _warnings(write: Write, registry: Mapping[str, Rule]) -> tuple[Path, list[Problem]]:
    root = write(FILES) / "r"
    resolved, errors, warnings = resolve([root], registry=registry, lint=True)
    assert errors == []
    assert resolved is not None and list(resolved.warnings) == warnings
    assert all(w.severity == "warning" for w in warnings)
    return root, warnings


def test_every_lint_warning_with_its_file_and_line(
    write: Write, registry: Mapping[str, Rule]
) -> None:
    root, warnings = _warnings(write, registry)
    got = {(Path(w.file).name, w.line, w.message.split(":")[0].split(" (")[0]) for w in warnings}
    assert got == {
        ("a.txt", 3, "duplicate term 'QUILLMATE'"),
        ("a.txt", 4, "term 'Brack\u200denfold' holds invisible characters"),
        ("a.txt", 5, "term 'Kettlewiсk' mixes scripts"),
        ("a.txt", 6, "protected term 'water' is a very common word in en"),
        ("b.txt", 3, "duplicate term 'Harrowgate'"),
        ("ruleset.toml", 16, "pattern 'maybe-digits' matches the empty string"),
        ("allowed.txt", 1, "pair 'hydroxyzyne => hydralazyne' is both allowed and blocked"),
        ("allowed.txt", 2, "allowed pair rewrites protected term 'Quillmate'"),
    }
    by_line = {(Path(w.file).name, w.line): w.message for w in warnings}
    # a duplicate names where the first listing is
    assert f"first at {root / 'a.txt'}:1" in by_line[("a.txt", 3)]
    assert "U+200D ZERO WIDTH JOINER" in by_line[("a.txt", 4)]
    # the Zipf value in the message is wordfreq's own, to two decimals
    assert f"Zipf {wordfreq.zipf_frequency('water', 'en'):.2f}" in by_line[("a.txt", 6)]
    assert f"blocked at {root / 'blocked.txt'}:1" in by_line[("allowed.txt", 1)]


def test_without_lint_no_warnings_are_computed(write: Write, registry: Mapping[str, Rule]) -> None:
    root = write(FILES) / "r"
    resolved, errors, warnings = resolve([root], registry=registry)
    assert resolved is not None and errors == [] and warnings == []
