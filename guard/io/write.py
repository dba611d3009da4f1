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
import io
import os
import sys
import tempfile
from collections.abc import Iterator
from typing import IO, TextIO, cast


@contextlib.contextmanager
def atomic_output(
    path: str | None, *, stdout: TextIO | None = None, line_buffering: bool = False
) -> Iterator[TextIO]:
    """A text stream for the report: ``path`` written atomically, or ``stdout`` (default
    ``sys.stdout``) when ``path`` is None or ``-``.

    Output is always UTF-8 with ``\n`` line ends, whatever the locale says: reports are
    data. ``line_buffering`` flushes standard output after every line, for streaming.

    >>> import pathlib, tempfile
    >>> target = pathlib.Path(tempfile.mkdtemp()) / "report.txt"
    >>> with atomic_output(str(target)) as out:
    ...     _ = out.write("complete\\n")
    >>> target.read_text()
    'complete\\n'
    """
    if path is None or path == "-":
        with _utf8(stdout if stdout is not None else sys.stdout, line_buffering) as out:
            yield out
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


class _Utf8Text(io.TextIOBase):
    """Text written as UTF-8 to a byte stream that this object never closes.

    Unlike a TextIOWrapper over ``sys.stdout.buffer``, dropping it can never close standard
    output, even when a flush failed on a closed pipe.
    """

    def __init__(self, buffer: IO[bytes], line_buffering: bool) -> None:
        super().__init__()
        self._buffer = buffer
        self._line_buffering = line_buffering

    def writable(self) -> bool:
        return True

    def write(self, s: str) -> int:
        self._buffer.write(s.encode("utf-8"))
        if self._line_buffering and "\n" in s:
            self._buffer.flush()
        return len(s)

    def flush(self) -> None:
        if not self.closed:
            self._buffer.flush()

    def isatty(self) -> bool:
        return self._buffer.isatty()


@contextlib.contextmanager
def _utf8(stream: TextIO, line_buffering: bool) -> Iterator[TextIO]:
    """``stream``'s bytes as UTF-8 text; ``stream`` itself when it has no byte buffer."""
    buffer = getattr(stream, "buffer", None)
    if buffer is None:
        yield stream
        return
    stream.flush()
    out = _Utf8Text(buffer, line_buffering)
    try:
        yield cast(TextIO, out)
    except BaseException:
        with contextlib.suppress(OSError, ValueError):
            out.flush()
        raise
    out.flush()


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
