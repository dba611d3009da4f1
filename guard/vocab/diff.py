"""What a change to a ruleset does to a batch: the verdicts that move between two versions.

Both versions check the same pairs; every rewrite whose verdict differs is listed with the
rules that decided it before and after, and the moves are counted (veto -> accept and so
on). A rewrite that goes from veto to accept is the change a reviewer must see before it
ships, so it is counted apart and makes the CLI fail.

A version is a path, a bundled ruleset's name, or ``REV:PATH``: the ruleset at PATH as it
was at git revision REV. Its folder at REV is exported into a temporary folder: the loader
keeps term lists and relative ``extends`` inside a ruleset's folder, so the folder is the
whole ruleset. git runs without a shell, in the repository that holds PATH. Bundled names
in ``extends`` resolve to the installed rulesets, not to their state at REV. Nothing here
prints or exits.
"""

from __future__ import annotations

import io
import json
import os
import subprocess
import tarfile
from collections import Counter
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass
from pathlib import Path, PurePosixPath
from typing import Protocol

from guard.errors import GuardError
from guard.io.read import ErrorRecord, InputRecord, Record
from guard.records import Report, RewriteVerdict, Verdict
from guard.ruleset.bundled import RULESET_FILE
from guard.vocab.lint import plural
from guard.vocab.selftest import deciding_findings


class RevisionError(GuardError):
    """A ``REV:PATH`` version could not be read from git."""


@dataclass(frozen=True, slots=True, kw_only=True)
class GitRef:
    """A ruleset file as it was at a git revision."""

    rev: str
    path: str


def parse_ref(ref: str) -> str | GitRef:
    """A path or name as it is, or a ``REV:PATH`` split in two.

    A string that names an existing file is always a path, even with a colon in it.

    >>> parse_ref("HEAD~1:rulesets/parts/ruleset.toml")
    GitRef(rev='HEAD~1', path='rulesets/parts/ruleset.toml')
    >>> parse_ref("base")
    'base'
    """
    if os.path.exists(ref) or ":" not in ref:
        return ref
    rev, _, path = ref.partition(":")
    if not rev or not path:
        return ref
    return GitRef(rev=rev, path=path)


def _git(repo: Path, *args: str) -> bytes:
    try:
        done = subprocess.run(
            ["git", *args], cwd=repo, capture_output=True, check=False, shell=False
        )
    except OSError as e:
        raise RevisionError(f"cannot run git: {e}") from e
    if done.returncode != 0:
        err = done.stderr.decode("utf-8", "replace").strip()
        raise RevisionError(f"git {' '.join(args)} (in {repo}): {err}")
    return done.stdout


def _repo_of(path: Path) -> tuple[Path, PurePosixPath]:
    """The repository holding ``path`` (which may no longer exist) and the path inside it."""
    absolute = Path(os.path.abspath(path))
    existing = absolute.parent
    while not existing.exists() and existing != existing.parent:
        existing = existing.parent
    try:
        top = _git(existing, "rev-parse", "--show-toplevel").decode("utf-8").strip()
    except RevisionError as e:
        raise RevisionError(f"{path}: not inside a git repository ({e})") from e
    root = Path(top)
    real = Path(os.path.realpath(existing)) / absolute.relative_to(existing)
    try:
        inside = real.relative_to(Path(os.path.realpath(root)))
    except ValueError as e:
        raise RevisionError(f"{path}: outside the repository {root}") from e
    return root, PurePosixPath(inside.as_posix())


def _kind(root: Path, rev: str, path: PurePosixPath) -> str | None:
    """``blob``, ``tree``, or None when ``path`` does not exist at ``rev``."""
    try:
        return _git(root, "cat-file", "-t", f"{rev}:{path.as_posix()}").decode().strip()
    except RevisionError:
        return None


def _export(root: Path, rev: str, folder: PurePosixPath, dest: Path) -> None:
    """Copy ``folder`` as it was at ``rev`` into ``dest``, keeping the repository layout."""
    spec = "." if folder == PurePosixPath() else folder.as_posix()
    data = _git(root, "archive", "--format=tar", rev, "--", spec)
    with tarfile.open(fileobj=io.BytesIO(data)) as tar:
        tar.extractall(dest, filter="data")


def materialize(ref: str, workdir: Path) -> str:
    """Something the loader accepts for ``ref``: the ref itself, or an exported copy's path.

    ``workdir`` must be an empty folder that outlives the loading (a temporary directory).
    """
    parsed = parse_ref(ref)
    if isinstance(parsed, str):
        return parsed
    root, inside = _repo_of(Path(parsed.path))
    try:
        _git(root, "rev-parse", "--verify", "--quiet", f"{parsed.rev}^{{commit}}")
    except RevisionError as e:
        raise RevisionError(f"{ref}: no revision {parsed.rev!r} in {root}") from e
    kind = _kind(root, parsed.rev, inside)
    if kind == "tree":
        inside = inside / RULESET_FILE
        kind = _kind(root, parsed.rev, inside)
    if kind != "blob":
        raise RevisionError(f"{ref}: no file {inside.as_posix()} at revision {parsed.rev}")
    _export(root, parsed.rev, inside.parent, workdir)
    return str(workdir / inside)


# --- the batch -------------------------------------------------------------------------


PairChecker = Callable[[InputRecord], Report]


@dataclass(frozen=True, slots=True, kw_only=True)
class Change:
    """A rewrite whose verdict differs between the versions (``None``: absent in one)."""

    record: InputRecord
    old: str
    new: str
    before: Verdict | None
    after: Verdict | None
    rules_before: tuple[str, ...]
    rules_after: tuple[str, ...]


@dataclass(frozen=True, slots=True, kw_only=True)
class DiffResult:
    pairs: int
    rewrites: int
    transitions: Mapping[tuple[str, str], int]  # (before, after) -> rewrites; "-" = absent
    changes: tuple[Change, ...]
    errors: tuple[ErrorRecord, ...]

    @property
    def loosened(self) -> int:
        """Rewrites that went from veto to accept: the count CI fails on."""
        return self.transitions.get((Verdict.VETO.value, Verdict.ACCEPT.value), 0)

    @property
    def pairs_changed(self) -> int:
        return len({(c.record.file, c.record.line) for c in self.changes})


def _key(rv: RewriteVerdict) -> tuple[int, int, str]:
    return (rv.rewrite.start, rv.rewrite.end, rv.rewrite.new)


def _rules(rv: RewriteVerdict | None) -> tuple[str, ...]:
    if rv is None:
        return ()
    return tuple(dict.fromkeys(f.rule for f in deciding_findings(rv)))


def diff_batch(records: Iterable[Record], old: PairChecker, new: PairChecker) -> DiffResult:
    """Check every pair under both versions and collect the rewrites whose verdict moved.

    Rewrites are matched by their source span and new text, so that a version that aligns
    differently still compares like with like; an unmatched rewrite moves from or to "-".
    """
    transitions: Counter[tuple[str, str]] = Counter()
    changes: list[Change] = []
    errors: list[ErrorRecord] = []
    count = rewrites = 0
    for item in records:
        if isinstance(item, ErrorRecord):
            errors.append(item)
            continue
        count += 1
        try:
            before, after = old(item), new(item)
        except GuardError as e:
            errors.append(ErrorRecord(file=item.file, line=item.line, reason=f"check failed: {e}"))
            continue
        old_by = {_key(rv): rv for rv in before.rewrites}
        new_by = {_key(rv): rv for rv in after.rewrites}
        for key in dict.fromkeys([*old_by, *new_by]):
            a, b = old_by.get(key), new_by.get(key)
            rewrites += 1
            va = a.verdict if a is not None else None
            vb = b.verdict if b is not None else None
            transitions[(va.value if va else "-", vb.value if vb else "-")] += 1
            if va != vb:
                rw = (a or b).rewrite  # type: ignore[union-attr]
                changes.append(
                    Change(
                        record=item,
                        old=rw.old,
                        new=rw.new,
                        before=va,
                        after=vb,
                        rules_before=_rules(a),
                        rules_after=_rules(b),
                    )
                )
    return DiffResult(
        pairs=count,
        rewrites=rewrites,
        transitions=dict(transitions),
        changes=tuple(changes),
        errors=tuple(errors),
    )


def _label(record: InputRecord) -> str:
    return record.where if record.id is None else f"{record.where} (id {record.id})"


def _v(verdict: Verdict | None) -> str:
    return "-" if verdict is None else verdict.value


def format_diff(result: DiffResult, *, old_name: str, new_name: str) -> list[str]:
    """The summary of verdict moves, then each changed rewrite, then unreadable records."""
    lines = [
        f"{old_name} -> {new_name}: {plural(result.pairs, 'pair')}, "
        f"{plural(result.rewrites, 'rewrite')}, {len(result.changes)} changed in "
        f"{plural(result.pairs_changed, 'pair')}",
    ]
    moved = sorted(
        ((k, n) for k, n in result.transitions.items() if k[0] != k[1]),
        key=lambda kn: (-kn[1], kn[0]),
    )
    unchanged = sum(n for k, n in result.transitions.items() if k[0] == k[1])
    for (a, b), n in moved:
        lines.append(f"  {a} -> {b}: {n}")
    lines.append(f"  unchanged: {unchanged}")
    if result.changes:
        lines.append("changed rewrites:")
    for c in result.changes:
        why_a = ", ".join(c.rules_before) or "no objection"
        why_b = ", ".join(c.rules_after) or "no objection"
        if c.before is None or c.after is None:
            why_a = why_b = "aligned differently"
        lines.append(
            f"  {_label(c.record)}: {c.old!r} -> {c.new!r}: {_v(c.before)} -> {_v(c.after)}"
            f"  (before: {why_a}; after: {why_b})"
        )
    for e in result.errors:
        lines.append(f"{e.where}: error: {e.reason}")
    if result.loosened:
        lines.append(f"{plural(result.loosened, 'rewrite')} went from veto to accept")
    return lines


def diff_as_json(result: DiffResult, *, old_name: str, new_name: str) -> str:
    """The same content as format_diff, as one JSON object for scripts and CI annotations."""
    data = {
        "old": old_name,
        "new": new_name,
        "pairs": result.pairs,
        "rewrites": result.rewrites,
        "veto_to_accept": result.loosened,
        "transitions": [
            {"before": a, "after": b, "rewrites": n}
            for (a, b), n in sorted(result.transitions.items())
        ],
        "changes": [
            {
                "file": c.record.file,
                "line": c.record.line,
                "id": c.record.id,
                "old": c.old,
                "new": c.new,
                "before": _v(c.before),
                "after": _v(c.after),
                "rules_before": list(c.rules_before),
                "rules_after": list(c.rules_after),
            }
            for c in result.changes
        ],
        "errors": [{"file": e.file, "line": e.line, "reason": e.reason} for e in result.errors],
    }
    return json.dumps(data, ensure_ascii=False, indent=2)


def format_text(result: DiffResult, *, old_name: str, new_name: str) -> str:
    return "\n".join(format_diff(result, old_name=old_name, new_name=new_name))


class Renderer(Protocol):
    def __call__(self, result: DiffResult, *, old_name: str, new_name: str) -> str: ...


RENDERERS: Mapping[str, Renderer] = {"text": format_text, "json": diff_as_json}
"""Output formats of `guard rules diff`, by name."""
