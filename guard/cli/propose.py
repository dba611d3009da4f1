"""`guard propose`: run a speller over each record's source and fill in its proposal."""

from __future__ import annotations

from pathlib import Path

import click

from guard.evaluate.jsonl import describe_error, read_jsonl, write_records
from guard.evaluate.spellers import BUILT_IN, SpellerError, propose_records


@click.command("propose")
@click.argument("file", type=click.Path(exists=True, dir_okay=False, path_type=Path))
@click.option(
    "--speller",
    "-s",
    required=True,
    help=f"One of {', '.join(BUILT_IN)}, or module:function for any Python callable.",
)
@click.option("--lang", default="en", show_default=True, help="Language of records without one.")
@click.option(
    "--output",
    "-o",
    type=click.Path(dir_okay=False, path_type=Path),
    default=None,
    help="Write here instead of standard output.",
)
def command(file: Path, speller: str, lang: str, output: Path | None) -> int:
    """Add a 'proposal' field to each JSONL record of FILE: SPELLER's correction of 'source'.

    Every other field is kept; an unreadable record becomes an error record."""
    records = propose_records(read_jsonl(file), speller=speller, lang=lang)
    try:
        written, errors = write_records(
            records, output, on_error=lambda r: click.echo(describe_error(r), err=True)
        )
    except SpellerError as e:
        raise click.UsageError(str(e)) from e
    click.echo(f"propose: {written} records written, {errors} unreadable", err=True)
    return 1 if errors else 0
