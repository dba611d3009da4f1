"""Write a report so that it is either the previous file or a complete new one, never half.

A report is written to a temporary file in the target's own folder (so the final rename
stays on one file system), flushed and fsynced, then renamed over the target with
``os.replace``, which POSIX makes atomic. If anything goes wrong before that, including
Ctrl-C, the temporary file is removed and the target is left as it was. Without a target
path the stream is standard output, written as it goes.

This module never decides what is written, only how it lands.
"""

from __future__ import annotations

import contextlib
import os
import sys
import tempfile
from collections.abc import Iterator
from typing import TextIO


@contextlib.contextmanager
def atomic_output(path: str | None, *, stdout: TextIO | None = None) -> Iterator[TextIO]:
    """A text stream for the report: ``path`` written atomically, or ``stdout`` (default
    ``sys.stdout``) when ``path`` is None or ``-``.

    >>> import pathlib, tempfile
    >>> target = pathlib.Path(tempfile.mkdtemp()) / "report.txt"
    >>> with atomic_output(str(target)) as out:
    ...     _ = out.write("complete\\n")
    >>> target.read_text()
    'complete\\n'
    """
    if path is None or path == "-":
        yield stdout if stdout is not None else sys.stdout
        return
    folder = os.path.dirname(os.path.abspath(path))
    fd, tmp = tempfile.mkstemp(prefix=f".{os.path.basename(path)}.", suffix=".tmp", dir=folder)
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="") as stream:
            yield stream
            stream.flush()
            os.fsync(stream.fileno())
        _set_mode(tmp, path)
        os.replace(tmp, path)
    except BaseException:
        with contextlib.suppress(FileNotFoundError):
            os.unlink(tmp)
        raise
    _sync_folder(folder)


def _set_mode(tmp: str, path: str) -> None:
    """Give the new file the old one's permissions, or the usual ones for a new file.

    mkstemp creates files readable by the owner only; a report replacing a shared one
    should not silently become private.
    """
    try:
        mode = os.stat(path).st_mode & 0o7777
    except FileNotFoundError:
        umask = os.umask(0)
        os.umask(umask)
        mode = 0o666 & ~umask
    os.chmod(tmp, mode)


def _sync_folder(folder: str) -> None:
    """Make the rename itself durable (POSIX: fsync the directory). Best effort."""
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)
