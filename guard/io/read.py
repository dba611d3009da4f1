"""Read pair records from JSONL, CSV/TSV with a header, or plain tab-separated pairs.

Nothing is lost: every input record gives exactly one output, an ``InputRecord`` when it
could be read or an ``ErrorRecord`` naming the file, the line and the reason when it could
not. A record is one physical line (split on ``\\n``; a ``\\r`` before it is dropped),
except in CSV, where a quoted cell may span lines and the record is numbered by its first
line. Choices this module makes, so that ``read == written`` always reconciles:

- A blank line in JSONL or plain pairs is an error record ("blank line"), not a silent
  skip: in a batch it is usually a record that went missing, and reporting it keeps the
  output line count equal to ``wc -l`` of the input. Blank lines in CSV/TSV are also
  error records, for the same reason.
- An empty file (no bytes, or a CSV/TSV with no header) gives one error record with no
  line ("empty file"), so that a gate fed an empty batch by mistake says so.
- A file that cannot be opened, or a gzip stream that breaks, gives one error record for
  the file (or for the line where it broke) and reading goes on with the next file.
- Input is read as bytes and decoded line by line, so invalid UTF-8 costs one record, not
  the file; a line longer than ``Limits.max_record_bytes`` is skipped in chunks without
  being held in memory, and becomes an error record.

This module never prints and never raises for bad data; it raises ``InputFormatError``
only for a format it cannot tell, before reading anything.
"""

from __future__ import annotations

import csv
import gzip
import json
import os
import re
import sys
import zlib
from collections.abc import Callable, Iterator, Mapping, Sequence
from dataclasses import dataclass, field
from typing import IO, Final

from guard.errors import GuardError
from guard.records import quick_init

FORMATS: Final = ("jsonl", "csv", "tsv", "pairs")
"""Input formats: JSON lines, CSV or TSV with a header, plain ``source<TAB>proposal`` lines."""

_EXTENSIONS: Final = {
    ".jsonl": "jsonl",
    ".ndjson": "jsonl",
    ".json": "jsonl",
    ".csv": "csv",
    ".tsv": "tsv",
    ".txt": "pairs",
}

STDIN: Final = "-"
STDIN_NAME: Final = "<stdin>"
_GZIP_MAGIC: Final = b"\x1f\x8b"
_RAW_KEEP: Final = 200  # characters of a bad line kept in its error record
_CHUNK: Final = 1 << 16
_CONTROL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f]")
_SURROGATE = re.compile(r"[\ud800-\udfff]")
_LANG_TAG = re.compile(r"[A-Za-z]{2,8}(?:-[A-Za-z0-9]{1,8})*")


class InputFormatError(GuardError):
    """The input format cannot be told from a file name and none was given."""


@dataclass(frozen=True, slots=True, kw_only=True)
class FieldNames:
    """Which input fields hold what. Defaults are the names in the record I/O contract."""

    source: str = "source"
    proposal: str = "proposal"
    lang: str = "lang"
    id: str = "id"
    score: str = "score"
    gold: str = "gold"
    candidates: str = "candidates"


@dataclass(frozen=True, slots=True, kw_only=True)
class Limits:
    """Bounds that turn hostile input into error records instead of hangs.

    ``max_record_bytes`` is checked here (bytes of one record, line ending excluded);
    ``max_tokens`` (tokens of source plus proposal) is checked by ``guard.batch`` before
    the engine sees a record; ``max_depth`` bounds JSON nesting.
    """

    max_record_bytes: int = 1 << 20
    max_tokens: int = 10_000
    max_depth: int = 32


@quick_init
@dataclass(frozen=True, slots=True, kw_only=True)
class InputRecord:
    """One pair as read. ``fields`` holds every original field, in input order.

    >>> r = InputRecord(file="a.jsonl", line=1, fields={"source": "teh", "proposal": "the"},
    ...                 source="teh", proposal="the")
    >>> r.where
    'a.jsonl:1'
    """

    file: str
    line: int
    fields: Mapping[str, object] = field(hash=False)
    source: str
    proposal: str
    id: str | None = None
    lang: str | None = None
    score: float | None = None
    gold: str | None = None
    candidates: tuple[str, ...] | None = None

    @property
    def where(self) -> str:
        return f"{self.file}:{self.line}"


@dataclass(frozen=True, slots=True, kw_only=True)
class ErrorRecord:
    """A record that could not be read. ``line`` is None when the fault is the whole file.

    ``raw`` is the start of the line as text (undecodable bytes replaced), for a person to
    recognise it; None when there is no line to show.
    """

    file: str
    line: int | None
    reason: str
    raw: str | None = None

    @property
    def where(self) -> str:
        return self.file if self.line is None else f"{self.file}:{self.line}"


Record = InputRecord | ErrorRecord


def detect_format(path: str, input_format: str | None = None) -> str:
    """The input format of ``path``: ``input_format`` when given, else from the extension.

    A ``.gz`` suffix is looked through; standard input is JSONL unless told otherwise (and
    is decompressed when it starts with the gzip magic bytes).

    >>> detect_format("batch.csv.gz")
    'csv'
    >>> detect_format("-")
    'jsonl'
    >>> detect_format("notes.md")
    Traceback (most recent call last):
    ...
    guard.io.read.InputFormatError: notes.md: unknown extension '.md'; use --input-format
    """
    if input_format is not None:
        if input_format not in FORMATS:
            raise InputFormatError(
                f"unknown input format {input_format!r}; use one of {', '.join(FORMATS)}"
            )
        return input_format
    if path == STDIN:
        return "jsonl"
    name = path[:-3] if path.lower().endswith(".gz") else path
    ext = os.path.splitext(name)[1].lower()
    try:
        return _EXTENSIONS[ext]
    except KeyError:
        raise InputFormatError(f"{path}: unknown extension {ext!r}; use --input-format") from None


def read_records(
    paths: Sequence[str],
    *,
    input_format: str | None = None,
    field_names: FieldNames | None = None,
    limits: Limits | None = None,
    stdin: IO[bytes] | None = None,
) -> Iterator[Record]:
    """Yield one record per input record of every path in turn (``-`` is ``stdin``).

    Formats are checked for every path before the first record is read, so a bad name
    fails fast with ``InputFormatError``.

    >>> import io
    >>> data = io.BytesIO(b'{"source": "teh cat", "proposal": "the cat"}\\n[1]\\n')
    >>> [type(r).__name__ for r in read_records(["-"], stdin=data)]
    ['InputRecord', 'ErrorRecord']
    """
    names = field_names or FieldNames()
    lim = limits or Limits()
    formats = [detect_format(p, input_format) for p in paths]

    def gen() -> Iterator[Record]:
        for path, fmt in zip(paths, formats, strict=True):
            yield from _read_one(path, fmt, names, lim, stdin)

    return gen()


def _read_one(
    path: str, fmt: str, names: FieldNames, lim: Limits, stdin: IO[bytes] | None
) -> Iterator[Record]:
    display = STDIN_NAME if path == STDIN else path
    try:
        stream = _open(path, stdin)
    except OSError as e:
        yield ErrorRecord(file=display, line=None, reason=f"cannot open: {e.strerror or e}")
        return
    try:
        lines = _lines(stream, display, lim.max_record_bytes)
        if fmt == "jsonl":
            yield from _jsonl(lines, display, names, lim)
        elif fmt == "pairs":
            yield from _pairs(lines, display, names)
        else:
            yield from _table(lines, display, names, lim, delimiter="," if fmt == "csv" else "\t")
    finally:
        if path != STDIN:
            stream.close()


def _open(path: str, stdin: IO[bytes] | None) -> IO[bytes]:
    gz = path.lower().endswith(".gz")
    if path != STDIN:
        # closed by the caller
        return gzip.open(path, "rb") if gz else open(path, "rb")  # type: ignore[return-value]
    stream: IO[bytes] = stdin if stdin is not None else sys.stdin.buffer
    peek = getattr(stream, "peek", None)
    if peek is not None and peek(2)[:2] == _GZIP_MAGIC:  # RFC 1952: ID1 = 0x1f, ID2 = 0x8b
        return gzip.GzipFile(fileobj=stream, mode="rb")  # type: ignore[return-value]
    return stream


# A physical line: its number and its bytes, or why it could not be had.
@dataclass(frozen=True, slots=True)
class _Line:
    number: int
    data: bytes | None  # None: see ``error``
    error: str | None = None
    raw: str | None = None


def _lines(stream: IO[bytes], display: str, max_bytes: int) -> Iterator[_Line]:
    """Physical lines without their line ending, never holding more than ``max_bytes``."""
    number = 0
    seen_any = False
    while True:
        try:
            chunk = stream.readline(max_bytes + 2)  # + room for "\r\n"
        except (OSError, EOFError, zlib.error) as e:
            yield _Line(number + 1, None, f"cannot read the file here: {e}")
            return
        if not chunk:
            if not seen_any:
                yield _Line(0, None, "empty file")
            return
        seen_any = True
        number += 1
        if chunk.endswith(b"\n"):
            data = chunk[:-1]
        else:
            data = chunk
            if len(chunk) >= max_bytes + 2:
                head = _raw(chunk[:_RAW_KEEP])
                size = len(chunk)
                broken = None
                while True:  # skip the rest of the line in chunks
                    try:
                        more = stream.readline(_CHUNK)
                    except (OSError, EOFError, zlib.error) as e:
                        broken = str(e)
                        break
                    size += len(more)
                    if more.endswith(b"\n"):
                        size -= 2 if more.endswith(b"\r\n") else 1  # the line ending
                        break
                    if not more:
                        break
                yield _Line(
                    number,
                    None,
                    f"record longer than the limit of {max_bytes} bytes ({size})",
                    head,
                )
                if broken is not None:
                    yield _Line(number + 1, None, f"cannot read the file here: {broken}")
                    return
                continue
        if data.endswith(b"\r"):
            data = data[:-1]
        if number == 1 and data.startswith(b"\xef\xbb\xbf"):
            data = data[3:]  # a UTF-8 byte order mark, as some spreadsheet exports write
        if len(data) > max_bytes:
            yield _Line(
                number,
                None,
                f"record longer than the limit of {max_bytes} bytes ({len(data)})",
                _raw(data[:_RAW_KEEP]),
            )
            continue
        yield _Line(number, data)


def _decode(line: _Line) -> tuple[str | None, str | None]:
    """(text, None) or (None, reason)."""
    assert line.data is not None
    try:
        return line.data.decode("utf-8"), None
    except UnicodeDecodeError as e:
        return None, f"invalid UTF-8 at byte {e.start + 1} of the line"


def _raw(text: str | bytes) -> str:
    if isinstance(text, bytes):
        text = text.decode("utf-8", "replace")
    # control characters (an ANSI escape, say) must not reach a terminal that shows the error
    return _CONTROL.sub("\ufffd", _SURROGATE.sub("\ufffd", text[:_RAW_KEEP]))


def _file_error(line: _Line, display: str) -> ErrorRecord:
    return ErrorRecord(
        file=display, line=line.number or None, reason=line.error or "", raw=line.raw
    )


# ---------------------------------------------------------------------------- JSONL


class _Duplicate(ValueError):
    pass


def _no_duplicates(pairs: list[tuple[str, object]]) -> dict[str, object]:
    out: dict[str, object] = {}
    for k, v in pairs:
        if k in out:
            raise _Duplicate(k)
        out[k] = v
    return out


# One decoder for every line: json.loads with a hook builds a new decoder (and scanner)
# on each call, which cost more than the parse of a short record.
_DECODER = json.JSONDecoder(object_pairs_hook=_no_duplicates)


def _json_object(text: str) -> object:
    """``json.loads(text, object_pairs_hook=_no_duplicates)``, with one decoder kept."""
    if text.startswith("\ufeff"):  # what json.loads says of a byte order mark
        raise json.JSONDecodeError("Unexpected UTF-8 BOM (decode using utf-8-sig)", text, 0)
    return _DECODER.decode(text)


def _depth_over(value: object, limit: int) -> bool:
    stack: list[tuple[object, int]] = [(value, 1)]
    while stack:
        v, d = stack.pop()
        if d > limit:
            return True
        if isinstance(v, dict):
            stack.extend((x, d + 1) for x in v.values())
        elif isinstance(v, list):
            stack.extend((x, d + 1) for x in v)
    return False


def _may_hold_bad_strings(text: str) -> bool:
    """Whether a string parsed from the JSON ``text`` could hold a control character or a
    lone surrogate: only when ``text`` holds one itself (DEL and C1 controls may stand
    unescaped in JSON) or an escape that makes one (\\b, \\f, \\uXXXX). Decoded UTF-8 holds
    no surrogate, and an escaped backslash before b, f or u errs on the side of looking.
    """
    return "\\u" in text or "\\b" in text or "\\f" in text or _CONTROL.search(text) is not None


def _bad_strings(value: object) -> str | None:
    """Why a string somewhere in a record cannot be carried through, or None."""
    stack: list[tuple[object, str]] = [(value, "")]
    while stack:
        v, path = stack.pop()
        if isinstance(v, str):
            for pattern, what in ((_SURROGATE, "lone surrogate"), (_CONTROL, "control character")):
                m = pattern.search(v)
                if m:
                    return f"{what} U+{ord(m.group()):04X} in field {path!r}"
        elif isinstance(v, dict):
            for k, x in v.items():
                if isinstance(k, str) and (_SURROGATE.search(k) or _CONTROL.search(k)):
                    return f"bad character in a field name in {path or 'the record'}"
                stack.append((x, f"{path}.{k}" if path else str(k)))
        elif isinstance(v, list):
            stack.extend((x, f"{path}[{i}]") for i, x in enumerate(v))
    return None


def _texts(lines: Iterator[_Line], display: str) -> Iterator[tuple[int, str] | ErrorRecord]:
    """Each line as (number, text), or the error record of a line that is no text or blank."""
    for line in lines:
        if line.data is None:
            yield _file_error(line, display)
            continue
        text, why = _decode(line)
        if text is None:
            yield ErrorRecord(file=display, line=line.number, reason=why or "", raw=_raw(line.data))
        elif not text.strip():
            yield ErrorRecord(file=display, line=line.number, reason="blank line", raw=_raw(text))
        else:
            yield line.number, text


def _jsonl(
    lines: Iterator[_Line], display: str, names: FieldNames, lim: Limits
) -> Iterator[Record]:
    for item in _texts(lines, display):
        if isinstance(item, ErrorRecord):
            yield item
            continue
        number, text = item
        try:
            value = _json_object(text)
        except _Duplicate as e:
            reason = f"duplicate field {e.args[0]!r}"
        except RecursionError:
            reason = "JSON nested too deeply"
        except json.JSONDecodeError as e:
            reason = f"not valid JSON: {e.msg.removesuffix(' at')} at column {e.colno}"
        else:
            yield _from_mapping(value, display, number, names, lim, text)
            continue
        yield ErrorRecord(file=display, line=number, reason=reason, raw=_raw(text))


def _from_mapping(
    value: object, display: str, number: int, names: FieldNames, lim: Limits, text: str
) -> Record:
    def err(reason: str) -> ErrorRecord:
        return ErrorRecord(file=display, line=number, reason=reason, raw=_raw(text))

    if not isinstance(value, dict):
        return err(f"not a JSON object (got {_json_kind(value)})")
    flat = text.count("{") == 1 and "[" not in text  # one object, nothing nested in it
    if not flat and _depth_over(value, lim.max_depth):
        return err(f"JSON nested deeper than {lim.max_depth} levels")
    bad = _bad_strings(value) if _may_hold_bad_strings(text) else None
    if bad:
        return err(bad)
    return _build(value, display, number, names, err, table=False)


def _json_kind(value: object) -> str:
    if isinstance(value, list):
        return "an array"
    if isinstance(value, str):
        return "a string"
    if isinstance(value, bool):
        return "a boolean"
    if isinstance(value, int | float):
        return "a number"
    return "null"


class _Reject(Exception):
    pass


def _build(
    fields: dict[str, object],
    display: str,
    number: int,
    names: FieldNames,
    err: Callable[[str], ErrorRecord],
    *,
    table: bool,
) -> Record:
    """Pick the pair's fields out of ``fields``; ``table``: values are cell strings."""

    def text_field(name: str, *, required: bool) -> str | None:
        if name not in fields or (not required and fields[name] in ("", None)):
            if required:
                raise _Reject(f"missing field {name!r}")
            return None
        v = fields[name]
        if not isinstance(v, str):
            raise _Reject(f"field {name!r} is not a string (got {_json_kind(v)})")
        return v

    try:
        source = text_field(names.source, required=True)
        proposal = text_field(names.proposal, required=True)
        assert source is not None and proposal is not None
        gold = text_field(names.gold, required=False)
        lang = text_field(names.lang, required=False)
        if lang is not None and not _LANG_TAG.fullmatch(lang):
            raise _Reject(f"field {names.lang!r} is not a language tag: {lang[:40]!r}")
        rid: str | None
        raw_id = fields.get(names.id)
        if raw_id in ("", None):
            rid = None
        elif isinstance(raw_id, str):
            rid = raw_id
        elif isinstance(raw_id, int) and not isinstance(raw_id, bool):
            rid = str(raw_id)
        else:
            raise _Reject(f"field {names.id!r} is not a string or integer")
        score = _score(fields.get(names.score), names.score)
        candidates = _candidates(fields.get(names.candidates), names.candidates, table=table)
    except _Reject as e:
        return err(str(e))
    return InputRecord(
        file=display,
        line=number,
        fields=fields,
        source=source,
        proposal=proposal,
        id=rid,
        lang=lang,
        score=score,
        gold=gold,
        candidates=candidates,
    )


def _score(v: object, name: str) -> float | None:
    if v in ("", None):
        return None
    if isinstance(v, bool):
        raise _Reject(f"field {name!r} is not a number")
    if isinstance(v, int | float):
        f = float(v)
    elif isinstance(v, str):
        try:
            f = float(v)
        except ValueError:
            raise _Reject(f"field {name!r} is not a number: {v[:40]!r}") from None
    else:
        raise _Reject(f"field {name!r} is not a number")
    if f != f or f in (float("inf"), float("-inf")):
        raise _Reject(f"field {name!r} is not a finite number")
    return f


def _candidates(v: object, name: str, *, table: bool) -> tuple[str, ...] | None:
    if v in ("", None):
        return None
    if table and isinstance(v, str):
        try:
            v = json.loads(v)
        except (json.JSONDecodeError, RecursionError):
            raise _Reject(f"field {name!r} is not a JSON array of strings") from None
    if not isinstance(v, list) or not all(isinstance(x, str) for x in v):
        raise _Reject(f"field {name!r} is not an array of strings")
    return tuple(v)


# ---------------------------------------------------------------------------- plain pairs


def _pairs(lines: Iterator[_Line], display: str, names: FieldNames) -> Iterator[Record]:
    for item in _texts(lines, display):
        if isinstance(item, ErrorRecord):
            yield item
            continue
        number, text = item
        cells = text.split("\t")
        if len(cells) != 2:
            yield ErrorRecord(
                file=display,
                line=number,
                reason=f"expected source<TAB>proposal, got {len(cells)} cell(s)",
                raw=_raw(text),
            )
            continue
        m = _CONTROL.search(text.replace("\t", " "))
        if m:
            yield ErrorRecord(
                file=display,
                line=number,
                reason=f"control character U+{ord(m.group()):04X} in the line",
                raw=_raw(text),
            )
            continue
        fields: dict[str, object] = {names.source: cells[0], names.proposal: cells[1]}
        yield InputRecord(
            file=display, line=number, fields=fields, source=cells[0], proposal=cells[1]
        )


# ---------------------------------------------------------------------------- CSV / TSV


def _quote_open_after(text: str, delimiter: str, in_quote: bool) -> bool:
    """Scan one line as csv.reader does (a quote opens a cell only at its start, a doubled
    quote inside a quoted cell is a literal quote); is a quoted cell still open after it?"""
    at_start = not in_quote
    i, n = 0, len(text)
    while i < n:
        c = text[i]
        if in_quote:
            if c == '"':
                if i + 1 < n and text[i + 1] == '"':
                    i += 2
                    continue
                in_quote = False
        elif c == '"' and at_start:
            in_quote = True
        at_start = (not in_quote) and c == delimiter
        i += 1
    return in_quote


def _table(
    lines: Iterator[_Line], display: str, names: FieldNames, lim: Limits, *, delimiter: str
) -> Iterator[Record]:
    """CSV (quoted cells may span lines) or TSV (no quoting, one record a line)."""
    quoted = delimiter == ","
    header: list[str] | None = None
    header_error: str | None = None
    pending: list[str] = []
    pending_start = 0
    pending_bytes = 0
    in_quote = False
    emitted = 0  # records yielded after the header

    def err(number: int, reason: str, raw: str | bytes | None) -> ErrorRecord:
        return ErrorRecord(
            file=display, line=number, reason=reason, raw=None if raw is None else _raw(raw)
        )

    def record(number: int, text: str) -> Record | None:
        """The record for one complete row; None for the header."""
        nonlocal header, header_error
        try:
            if quoted:
                cells = next(csv.reader([text], delimiter=delimiter, strict=True))
            else:
                cells = text.split(delimiter)
        except csv.Error as e:
            return err(number, f"bad CSV: {e}", text)
        if header is None and header_error is None:
            header = cells
            header_error = _header_problem(cells, names)
            return None
        if header_error is not None:
            return err(number, header_error, text)
        assert header is not None
        if not text.strip():
            return err(number, "blank line", text)
        if len(cells) != len(header):
            return err(number, f"row has {len(cells)} cell(s), the header has {len(header)}", text)
        fields: dict[str, object] = dict(zip(header, cells, strict=True))
        bad = _bad_strings(fields)
        if bad:
            return err(number, bad, text)
        return _build(fields, display, number, names, lambda r: err(number, r, text), table=True)

    for line in lines:
        if line.number == 0:  # empty file
            yield _file_error(line, display)
            return
        text, why = (None, line.error) if line.data is None else _decode(line)
        if text is None:
            if header is None and header_error is None:
                # The first line is the header even when it cannot be read; taking the
                # next line for it would turn a data row into field names.
                header_error = f"the header cannot be read: {why}"
                pending, in_quote = [], False
                continue
            emitted += 1  # a row after the header: the header's problem needs no record
            if pending:
                yield err(
                    pending_start,
                    f"record broken at its line {line.number}: {why}",
                    pending[0],
                )
                pending, in_quote = [], False
            elif line.data is None:
                yield _file_error(line, display)
            else:
                yield err(line.number, why or "", line.data)
            continue
        if not pending:
            pending_start, pending_bytes = line.number, 0
        pending.append(text)
        pending_bytes += len(text.encode("utf-8", "surrogatepass")) + 1
        if quoted:
            in_quote = _quote_open_after(text, delimiter, in_quote)
            if in_quote:
                if pending_bytes > lim.max_record_bytes:
                    yield err(
                        pending_start,
                        f"record longer than the limit of {lim.max_record_bytes} bytes",
                        pending[0],
                    )
                    pending, in_quote = [], False
                continue
        out = record(pending_start, "\n".join(pending))
        pending = []
        if out is not None:
            emitted += 1
            yield out
    if pending:
        yield err(pending_start, "unterminated quoted cell at the end of the file", pending[0])
    elif header is None and header_error is None:
        yield ErrorRecord(file=display, line=None, reason="empty file: no header")
    elif header_error is not None and not emitted:
        yield ErrorRecord(file=display, line=1, reason=header_error)


def _header_problem(cells: list[str], names: FieldNames) -> str | None:
    seen: set[str] = set()
    for c in cells:
        if c in seen:
            return f"the header names field {c!r} twice"
        seen.add(c)
    for need in (names.source, names.proposal):
        if need not in seen:
            shown = ", ".join(repr(c[:40]) for c in cells[:8])
            return f"the header has no field {need!r} (it has {shown})"
    return None
