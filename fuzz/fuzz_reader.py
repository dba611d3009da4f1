"""Fuzz the record reader: any bytes, in every input format, plain and gzip-compressed.

What must hold for every input (the record I/O contract of guard.io.read):

- reading never raises;
- JSONL and plain pairs give exactly one record per line, numbered 1, 2, 3... in order
  (an empty input gives one "empty file" error record);
- CSV and TSV give records whose line numbers only go up and stay within the input's
  lines (a header with no rows gives none; an empty input gives one error record);
- every error record has a reason, and its ``raw`` text holds no control character;
- the same bytes gzip-compressed on standard input read the same.

Input on standard input that starts with the gzip magic bytes is read as gzip (by
design), so for such input only the first and the last-but-one properties are checked.

Runs under atheris (coverage-guided, libFuzzer) when it is installed, else as a long
hypothesis run. See fuzz/README.md.
"""

from __future__ import annotations

import gzip
import io
import re
import sys

import harness
from harness import atheris

if atheris is not None:
    with atheris.instrument_imports():
        from guard.io.read import ErrorRecord, InputRecord, Limits, read_records
else:
    from guard.io.read import ErrorRecord, InputRecord, Limits, read_records

FORMATS = ("jsonl", "pairs", "csv", "tsv")
LIMITS = Limits(max_record_bytes=512, max_tokens=200, max_depth=8)  # small: hit the limits
_CONTROL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f\x7f-\x9f]")


def _read(data: bytes, fmt: str) -> list[InputRecord | ErrorRecord]:
    stream = io.BufferedReader(io.BytesIO(data))  # has peek(), as sys.stdin.buffer does
    return list(read_records(["-"], input_format=fmt, limits=LIMITS, stdin=stream))


def _physical_lines(data: bytes) -> int:
    if not data:
        return 0
    return data.count(b"\n") + (0 if data.endswith(b"\n") else 1)


def check(data: bytes) -> None:
    """Every property above for one input; raises AssertionError on a violation."""
    lines = _physical_lines(data)
    for fmt in FORMATS:
        records = _read(data, fmt)
        if data.startswith(b"\x1f\x8b"):  # RFC 1952 ID1 ID2: read as a gzip stream
            assert all(r.reason for r in records if isinstance(r, ErrorRecord)), fmt
            continue
        assert records or (fmt in ("csv", "tsv") and lines == 1), fmt
        numbers = [r.line for r in records]
        if fmt in ("jsonl", "pairs"):
            if lines == 0:
                assert len(records) == 1 and isinstance(records[0], ErrorRecord), fmt
            else:
                assert numbers == list(range(1, lines + 1)), (fmt, numbers[:10], lines)
        else:
            known = [n for n in numbers if n is not None]
            assert known == sorted(set(known)), (fmt, known)
            assert all(1 <= n <= max(lines, 1) for n in known), (fmt, known, lines)
        for r in records:
            if isinstance(r, ErrorRecord):
                assert r.reason, (fmt, r)
                assert r.raw is None or not _CONTROL.search(r.raw), (fmt, r.raw)
            else:
                assert isinstance(r.source, str) and isinstance(r.proposal, str)
        packed = _read(gzip.compress(data), fmt) if data else records
        assert packed == records, fmt


def one_input(data: bytes) -> None:
    check(data)


def hypothesis_run(examples: int, seed: int | None) -> None:
    from hypothesis import strategies as st

    lines = st.one_of(
        st.binary(max_size=80),
        st.text(max_size=40).map(lambda t: t.encode("utf-8", "surrogatepass")),
        st.sampled_from(
            [b'{"source": "teh", "proposal": "the"}', b"source,proposal", b"a\tb", b'"', b""]
        ),
    )
    data = st.lists(lines, max_size=12).map(b"\n".join)
    harness.run_hypothesis("fuzz_reader", data, check, examples, seed)


if __name__ == "__main__":
    harness.main(
        sys.argv, one_input=one_input, hypothesis_run=hypothesis_run, default_examples=10_000
    )
