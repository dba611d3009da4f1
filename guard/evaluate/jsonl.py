"""Reading and writing the evaluation files: clean text in, JSONL records in and out.

Every input line that holds a record gives exactly one output record: a line that cannot
be read becomes an error record naming the file and line, never a silent drop.
"""

from __future__ import annotations

import json
import sys
from collections.abc import Callable, Iterable, Iterator, Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import IO


@dataclass(frozen=True, slots=True, kw_only=True)
class CleanText:
    """One input text to damage: its id and language, when the input gave them."""

    text: str
    id: str | None = None
    lang: str | None = None


@dataclass(frozen=True, slots=True, kw_only=True)
class BadLine:
    """An input line that could not be read, with where it was and why."""

    file: str
    line: int
    reason: str

    def record(self) -> dict[str, object]:
        """The error record written in place of the output this line would have given."""
        return {"error": self.reason, "file": self.file, "line": self.line}


@dataclass(frozen=True, slots=True, kw_only=True)
class Numbered:
    """A JSON object read from a file, with its line number."""

    file: str
    line: int
    data: dict[str, object]


def _is_jsonl(path: Path, lines: list[str]) -> bool:
    if path.suffix.lower() in {".jsonl", ".ndjson"}:
        return True
    first = next((s for s in lines if s.strip()), "")
    return first.lstrip().startswith("{")


def read_jsonl(path: Path) -> Iterator[Numbered | BadLine]:
    """Every non-blank line of a JSONL file as an object, or a BadLine saying why not."""
    name = str(path)
    with path.open(encoding="utf-8") as fh:
        for n, raw in enumerate(fh, start=1):
            if not raw.strip():
                continue
            try:
                data = json.loads(raw)
            except json.JSONDecodeError as e:
                yield BadLine(file=name, line=n, reason=f"not JSON: {e.msg} (column {e.colno})")
                continue
            if not isinstance(data, dict):
                yield BadLine(file=name, line=n, reason="not a JSON object")
                continue
            yield Numbered(file=name, line=n, data=data)


def read_clean(path: Path) -> Iterator[CleanText | BadLine]:
    """The clean texts of a file: JSONL with a ``text`` (or ``gold``) field, else one per line.

    In a plain text file every non-blank line is one text (a sentence or a paragraph).
    """
    name = str(path)
    try:
        lines = path.read_text(encoding="utf-8").splitlines()
    except UnicodeDecodeError as e:
        yield BadLine(file=name, line=1, reason=f"not UTF-8 text: {e.reason}")
        return
    if not _is_jsonl(path, lines):
        for n, line in enumerate(lines, start=1):
            if line.strip():
                yield CleanText(text=line, id=f"{path.stem}:{n}")
        return
    for item in read_jsonl(path):
        if isinstance(item, BadLine):
            yield item
            continue
        text = item.data.get("text", item.data.get("gold"))
        if not isinstance(text, str):
            yield BadLine(file=name, line=item.line, reason="no string field 'text' or 'gold'")
            continue
        rid = item.data.get("id")
        lang = item.data.get("lang")
        yield CleanText(
            text=text,
            id=str(rid) if rid is not None else f"{path.stem}:{item.line}",
            lang=lang if isinstance(lang, str) else None,
        )


def write_jsonl(records: Iterable[dict[str, object]], out: IO[str]) -> int:
    """Write records one per line (UTF-8 kept readable); return how many were written."""
    count = 0
    for record in records:
        out.write(json.dumps(record, ensure_ascii=False))
        out.write("\n")
        count += 1
    return count


def write_records(
    records: Iterable[dict[str, object]],
    output: Path | None,
    *,
    on_error: Callable[[dict[str, object]], None],
    stdout: IO[str] | None = None,
) -> tuple[int, int]:
    """Write records to ``output`` (or ``stdout``); call ``on_error`` for each error record.

    Returns (records written, error records among them).
    """
    errors = 0

    def counted() -> Iterator[dict[str, object]]:
        nonlocal errors
        for record in records:
            if "error" in record:
                errors += 1
                on_error(record)
            yield record

    if output is None:
        written = write_jsonl(counted(), stdout if stdout is not None else sys.stdout)
    else:
        with output.open("w", encoding="utf-8") as fh:
            written = write_jsonl(counted(), fh)
    return written, errors


def describe_error(record: Mapping[str, object]) -> str:
    """One line for an error record: ``file:line: reason``."""
    return f"{record.get('file')}:{record.get('line')}: {record.get('error')}"
