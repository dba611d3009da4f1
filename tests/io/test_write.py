"""Atomic output: the target is the old file or a complete new one, never half a report."""

from __future__ import annotations

import io
import os
from pathlib import Path

import pytest

from guard.io.write import atomic_output


def leftovers(folder: Path) -> list[str]:
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(".tmp"))


def test_success_replaces_the_file(tmp_path: Path) -> None:
    target = tmp_path / "report.txt"
    target.write_text("old\n")
    with atomic_output(str(target)) as out:
        out.write("new\n")
        assert target.read_text() == "old\n"  # nothing shows until the rename
    assert target.read_text() == "new\n"
    assert leftovers(tmp_path) == []


@pytest.mark.parametrize(
    "error", [RuntimeError("boom"), KeyboardInterrupt()], ids=["error", "ctrl-c"]
)
def test_failure_leaves_the_old_file_and_no_temporary(tmp_path: Path, error: BaseException) -> None:
    target = tmp_path / "report.txt"
    target.write_text("old\n")
    with pytest.raises(type(error)), atomic_output(str(target)) as out:
        out.write("half a rep")
        raise error
    assert target.read_text() == "old\n"
    assert leftovers(tmp_path) == []


def test_failure_without_an_old_file_leaves_nothing(tmp_path: Path) -> None:
    target = tmp_path / "report.txt"
    with pytest.raises(RuntimeError), atomic_output(str(target)) as out:
        out.write("x")
        raise RuntimeError
    assert list(tmp_path.iterdir()) == []


def test_permissions_of_the_old_file_are_kept(tmp_path: Path) -> None:
    target = tmp_path / "report.txt"
    target.write_text("old\n")
    os.chmod(target, 0o640)
    with atomic_output(str(target)) as out:
        out.write("new\n")
    assert target.stat().st_mode & 0o777 == 0o640


def test_a_new_file_gets_the_usual_permissions(tmp_path: Path) -> None:
    umask = os.umask(0o022)
    try:
        with atomic_output(str(tmp_path / "r.txt")) as out:
            out.write("x")
    finally:
        os.umask(umask)
    assert (tmp_path / "r.txt").stat().st_mode & 0o777 == 0o644


def test_stdout_is_utf8_whatever_its_encoding() -> None:
    raw = io.BytesIO()
    stdout = io.TextIOWrapper(raw, encoding="ascii")
    with atomic_output(None, stdout=stdout) as out:
        out.write("Öl\u2028\n")
    assert raw.getvalue() == "Öl\u2028\n".encode()
