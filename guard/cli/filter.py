"""`guard filter`: pass records through and add the guarded text, streaming.

Output has the format of the input: JSONL records keep every field and gain ``guarded``;
CSV/TSV rows keep every cell and gain ``guarded`` and ``error`` columns; plain
``source<TAB>proposal`` lines become plain guarded lines. A record that cannot be read or
checked still gives one output record: ``{"error": {...}}`` in JSONL, a row with the
``error`` cell filled in CSV/TSV, and in plain lines the source unchanged when it could be
read (every rewrite undone) or an empty line when it could not. Each such error is also
told on stderr with its file and line. CSV output here is data for programs, so cells are
written as they are (the spreadsheet defusing of ``check --format csv`` is not applied).

Exit 0 when every record was checked, 1 when some could not be, 2 for a usage or ruleset
error (before any record is read), 130 when interrupted.
"""

from __future__ import annotations

import csv
from typing import Protocol, TextIO

import click

from guard.batch import Outcome, Summary, check_records
from guard.cli import common
from guard.io.read import InputRecord
from guard.io.write import atomic_output
from guard.report.base import error_json, visible
from guard.report.jsonl import dumps


@click.command("filter")
@click.argument("files", nargs=-1, type=click.Path(exists=True, dir_okay=False, allow_dash=True))
@common.rules_option
@common.lang_option
@click.option(
    "--undo-flagged",
    is_flag=True,
    help="Undo flagged rewrites too (by default only vetoed ones are undone).",
)
@click.option("--output", "-o", metavar="FILE", help="Write here (atomically) instead of stdout.")
@common.jobs_option
@common.input_options
@click.pass_context
def command(
    ctx: click.Context,
    files: tuple[str, ...],
    rules: tuple[str, ...],
    settings: tuple[str, ...],
    lang: str | None,
    undo_flagged: bool,
    output: str | None,
    jobs: int,
    record_timeout: float,
    input_format: str | None,
    fields: tuple[str, ...],
    max_record_bytes: int,
    max_tokens: int,
) -> None:
    """Add the guarded text to every record of FILE... (or stdin, '-').

    Exit 0: every record checked; 1: some could not be; 2: usage or ruleset error;
    130: interrupted.
    """
    formats = sorted(set(common.input_formats(list(files) or ["-"], input_format)))
    if len(formats) > 1:
        raise click.UsageError(
            f"filter writes the format it reads, and the inputs mix {', '.join(formats)}"
        )
    common.check_output(output)
    inputs = common.open_inputs(
        files,
        rules=rules,
        settings=settings,
        input_format=input_format,
        fields=fields,
        max_record_bytes=max_record_bytes,
        max_tokens=max_tokens,
    )
    summary = Summary()
    try:
        # Records from standard input may come one at a time from a process waiting for
        # each answer: every line goes out as it is done. From files, lines go out in
        # blocks (a write call per line cost a few percent of a record).
        streaming = not files or "-" in files
        with atomic_output(output, line_buffering=streaming) as stream:
            writer = _writer(formats[0], stream, undo_flagged)
            outcomes = check_records(
                inputs.records,
                inputs.refs,
                jobs=jobs,
                lang_default=lang,
                limits=inputs.limits,
                overrides=inputs.overrides,
                checker=inputs.checker,
                record_timeout=record_timeout,
                digests=True,
            )
            for outcome in common.tally(outcomes, summary):
                if outcome.digest is None:
                    click.echo(
                        f"guard filter: {visible(outcome.record.where)}: error: "
                        f"{visible(outcome.error or '')}",
                        err=True,
                    )
                writer.write(outcome)
                summary.written += 1
            writer.close()
    except BrokenPipeError:
        raise common.output_closed() from None
    except KeyboardInterrupt:
        raise common.interrupted(summary, "filter", output) from None
    click.echo(f"guard filter: {summary.line()}", err=True)
    ctx.exit(common.EXIT_FAIL if summary.errors else common.EXIT_OK)


class _Rows(Protocol):
    def writerow(self, cells: list[str], /) -> object: ...


class _Writer:
    def __init__(self, stream: TextIO, undo_flagged: bool) -> None:
        self.stream = stream
        self.undo_flagged = undo_flagged

    def guarded(self, outcome: Outcome) -> str | None:
        digest = outcome.digest
        return None if digest is None else digest.guarded_text(undo_flagged=self.undo_flagged)

    def write(self, outcome: Outcome) -> None:
        raise NotImplementedError

    def close(self) -> None:
        pass


class _JsonlWriter(_Writer):
    def write(self, outcome: Outcome) -> None:
        rec = outcome.record
        out: dict[str, object] = dict(rec.fields) if isinstance(rec, InputRecord) else {}
        guarded = self.guarded(outcome)
        if guarded is None:
            out["error"] = error_json(outcome)
        else:
            out["guarded"] = guarded
        self.stream.write(dumps(out) + "\n")


class _PlainWriter(_Writer):
    def write(self, outcome: Outcome) -> None:
        guarded = self.guarded(outcome)
        if guarded is None:
            rec = outcome.record
            guarded = rec.source if isinstance(rec, InputRecord) else ""
        self.stream.write(guarded + "\n")


class _TableWriter(_Writer):
    """CSV/TSV rows: the first readable record's header, then ``guarded`` and ``error``.

    Rows before the first readable record (errors) wait until the header is known; a
    record whose fields differ from that header becomes an error row.
    """

    def __init__(self, stream: TextIO, undo_flagged: bool, delimiter: str) -> None:
        super().__init__(stream, undo_flagged)
        self.writer: _Rows = _TsvRows(stream) if delimiter == "\t" else csv.writer(stream)
        self.header: list[str] | None = None
        self.waiting: list[Outcome] = []

    def write(self, outcome: Outcome) -> None:
        rec = outcome.record
        if self.header is None:
            if not isinstance(rec, InputRecord):
                self.waiting.append(outcome)
                return
            self.header = [k for k in rec.fields if k not in ("guarded", "error")]
            self.writer.writerow([*self.header, "guarded", "error"])
            for waiting in self.waiting:
                self._row(waiting)
            self.waiting = []
        self._row(outcome)

    def _row(self, outcome: Outcome) -> None:
        assert self.header is not None
        rec = outcome.record
        cells = [""] * len(self.header)
        error = outcome.error
        guarded = self.guarded(outcome)
        if isinstance(rec, InputRecord):
            if [k for k in rec.fields if k not in ("guarded", "error")] != self.header:
                error, guarded = "the record's fields differ from the first input's header", None
            else:
                cells = [str(rec.fields[k]) for k in self.header]
        where = f"{rec.where}: " if guarded is None else ""
        self.writer.writerow([*cells, guarded or "", f"{where}{error}" if guarded is None else ""])

    def close(self) -> None:
        if self.header is None:
            self.header = []
            self.writer.writerow(["guarded", "error"])
            for waiting in self.waiting:
                self._row(waiting)


class _TsvRows:
    """TSV has no quoting: a cell cannot hold a tab or a line break (they become spaces)."""

    def __init__(self, stream: TextIO) -> None:
        self.stream = stream

    def writerow(self, cells: list[str]) -> None:
        clean = (c.replace("\t", " ").replace("\r", " ").replace("\n", " ") for c in cells)
        self.stream.write("\t".join(clean) + "\n")


def _writer(fmt: str, stream: TextIO, undo_flagged: bool) -> _Writer:
    if fmt == "jsonl":
        return _JsonlWriter(stream, undo_flagged)
    if fmt == "pairs":
        return _PlainWriter(stream, undo_flagged)
    return _TableWriter(stream, undo_flagged, "," if fmt == "csv" else "\t")
