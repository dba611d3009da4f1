"""Lint rulesets: every problem of every ruleset named, in one run, ordered by file and line.

The loader (guard.ruleset.load_problems) finds what is wrong with one ruleset; this module
adds the one check the loader leaves out (a term listed under two case policies), gathers
the problems of many rulesets, drops the ones two rulesets share (a term list both
read), orders them by file and line so that a reviewer reads a file top to bottom, counts
them and renders them as lines. It never prints and never exits: the CLI does that.
"""

from __future__ import annotations

import contextlib
import os
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, replace
from pathlib import Path

from guard.errors import Problem, RulesetError
from guard.ruleset import load_problems, load_ruleset
from guard.ruleset.model import CompiledRuleset, TermEntry
from guard.text.normalize import normalize_key

ERROR = "error"
WARNING = "warning"

# Folders never searched for rulesets when none is named: tool caches and environments.
_SKIP_DIRS = frozenset({".git", ".hg", ".svn", ".venv", "venv", "node_modules", "__pycache__"})


@dataclass(frozen=True, slots=True, kw_only=True)
class LintResult:
    """The problems of some rulesets, deduplicated and ordered by file, line, key."""

    rulesets: tuple[str, ...]
    problems: tuple[Problem, ...]

    @property
    def errors(self) -> int:
        return sum(1 for p in self.problems if p.severity == ERROR)

    @property
    def warnings(self) -> int:
        return sum(1 for p in self.problems if p.severity != ERROR)

    @property
    def files(self) -> int:
        """How many distinct files hold at least one problem."""
        return len({p.file for p in self.problems})

    def summary(self) -> str:
        """One closing line, e.g. ``2 errors, 1 warning in 2 files (1 ruleset checked)``.

        >>> LintResult(rulesets=("a.toml",), problems=()).summary()
        '0 errors, 0 warnings in 0 files (1 ruleset checked)'
        """
        return (
            f"{plural(self.errors, 'error')}, {plural(self.warnings, 'warning')} "
            f"in {plural(self.files, 'file')} ({plural(len(self.rulesets), 'ruleset')} checked)"
        )


def plural(n: int, noun: str) -> str:
    """``1 file``, ``2 files``.

    >>> plural(1, "file"), plural(0, "error")
    ('1 file', '0 errors')
    """
    return f"{n} {noun}" if n == 1 else f"{n} {noun}s"


def _order(problem: Problem) -> tuple[str, int, int, str, str]:
    # Problems without a line (a whole file missing, a key without a TOML position)
    # come first in their file; errors before warnings on the same line.
    return (
        problem.file,
        -1 if problem.line is None else problem.line,
        0 if problem.severity == ERROR else 1,
        problem.key or "",
        problem.message,
    )


def collect(
    problems: Iterable[Problem], rulesets: Sequence[str], *, relative_to: Path | None = None
) -> LintResult:
    """Deduplicate and order problems (the same term list may be read by two rulesets).

    Files below ``relative_to`` are named relative to it.
    """
    unique = dict.fromkeys(_shorten(p, relative_to) for p in problems)
    return LintResult(rulesets=tuple(rulesets), problems=tuple(sorted(unique, key=_order)))


def shorten_path(file: str, base: Path | None) -> str:
    """``file`` relative to ``base`` when it lies below it, else unchanged.

    >>> shorten_path("/srv/rules/terms/a.txt", Path("/srv/rules")), shorten_path("/x", None)
    ('terms/a.txt', '/x')
    """
    if base is None:
        return file
    try:
        return Path(file).resolve().relative_to(base.resolve()).as_posix()
    except (ValueError, RuntimeError, OSError):  # RuntimeError: a symlink loop (3.11)
        return file


def _shorten(problem: Problem, base: Path | None) -> Problem:
    return replace(problem, file=shorten_path(problem.file, base))


def lint(paths: Sequence[str | Path], *, relative_to: Path | None = None) -> LintResult:
    """Every error and warning of the rulesets at ``paths``, each ruleset read in full.

    A ruleset with errors does not stop the others: all are read, all are reported. Files
    below ``relative_to`` (the current folder, for the CLI) are named relative to it.
    """
    found: list[Problem] = []
    for path in paths:
        problems = load_problems(Path(path))
        found.extend(problems)
        if not any(p.severity == ERROR for p in problems):
            # A ruleset without errors loads; should it not, load_problems said why.
            with contextlib.suppress(RulesetError):
                found.extend(case_policy_duplicates(load_ruleset(Path(path))))
    return collect(found, [str(p) for p in paths], relative_to=relative_to)


def case_policy_duplicates(ruleset: CompiledRuleset) -> list[Problem]:
    """Terms listed both case-exact and case-folded: the folded entry already covers both.

    The loader finds duplicates within one case policy; this adds the ones across them
    (``Tollmere`` in an exact list, ``TOLLMERE`` in a folded one), each reported at the
    entry listed later and naming the first.
    """
    first: dict[str, TermEntry] = {}
    found: list[Problem] = []
    for entry in ruleset.terms:
        folded = normalize_key(entry.term, fold=True)
        seen = first.setdefault(folded, entry)
        if seen is entry or seen.case is entry.case:
            continue  # same policy: the loader reports it
        found.append(
            Problem(
                file=entry.origin.file,
                line=entry.origin.line,
                severity=WARNING,
                message=(
                    f"duplicate term '{entry.term}' across case policies: '{seen.term}' is "
                    f"listed with case {seen.case.value} at {seen.origin}; the case-folded "
                    "entry matches both"
                ),
            )
        )
    return found


def format_problem(problem: Problem) -> str:
    """``file:line [key]: error|warning: message``; line and key only where they exist.

    >>> format_problem(Problem(file="r.toml", line=3, key="rules.x", message="unknown rule"))
    'r.toml:3 [rules.x]: error: unknown rule'
    """
    return str(problem)


def format_result(result: LintResult) -> list[str]:
    """The lines `guard rules lint` prints: one per problem, then the summary."""
    return [*(format_problem(p) for p in result.problems), result.summary()]


RULESET_NAMES = ("ruleset.toml", "guard-rules.toml")
"""File names `rules lint` and `rules test` look for when given no path: the name of a
ruleset in its folder, and the per-project file `guard check` reads by default."""


def find_rulesets(root: Path) -> list[Path]:
    """Every ruleset file below ``root`` (see RULESET_NAMES), skipping VCS folders and
    environments.

    Used when `guard rules lint` or `guard rules test` get no path (as in a pre-commit
    hook that runs once per commit): conventional file names find every ruleset.
    """
    found: list[Path] = []
    for folder, dirs, files in os.walk(root):
        dirs[:] = sorted(d for d in dirs if d not in _SKIP_DIRS)
        found.extend(Path(folder) / name for name in RULESET_NAMES if name in files)
    return sorted(found)
