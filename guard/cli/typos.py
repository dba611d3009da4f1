"""`guard typos`: clean text in, evaluation records with synthetic misspellings out."""

from __future__ import annotations

from collections.abc import Iterator
from pathlib import Path

import click

from guard.evaluate.jsonl import BadLine, describe_error, read_clean, write_records
from guard.evaluate.keyboards import LAYOUTS
from guard.evaluate.typos import TypoOptions, typo_records


def _records(
    files: tuple[Path, ...], lang: str, options: TypoOptions
) -> Iterator[dict[str, object]]:
    index = 0
    for path in files:
        for item in read_clean(path):
            if isinstance(item, BadLine):
                yield item.record()
            else:
                yield from typo_records([item], lang=lang, options=options, start=index)
            index += 1


@click.command("typos")
@click.argument(
    "files", nargs=-1, required=True, type=click.Path(exists=True, dir_okay=False, path_type=Path)
)
@click.option("--lang", default="en", show_default=True, help="Language of records without one.")
@click.option(
    "--rate",
    type=click.FloatRange(0, 1),
    default=0.15,
    show_default=True,
    help="Chance that an eligible word gets a typo.",
)
@click.option("--seed", type=int, default=0, show_default=True, help="Same seed, same typos.")
@click.option(
    "--layout",
    type=click.Choice(sorted(LAYOUTS)),
    default=None,
    help="Keyboard layout for neighbour keys [default: the usual one for each language].",
)
@click.option(
    "--clean-share",
    type=click.FloatRange(0, 1),
    default=0.2,
    show_default=True,
    help="Share of records kept clean on purpose (to measure overcorrection of clean text).",
)
@click.option(
    "--include-literals",
    is_flag=True,
    help="Damage literal tokens too (paths, codes, identifiers, flags...).",
)
@click.option(
    "--output",
    "-o",
    type=click.Path(dir_okay=False, path_type=Path),
    default=None,
    help="Write here instead of standard output.",
)
def command(
    files: tuple[Path, ...],
    lang: str,
    rate: float,
    seed: int,
    layout: str | None,
    clean_share: float,
    include_literals: bool,
    output: Path | None,
) -> int:
    """Write {id, source, gold, lang, typos} records: gold is the clean text of FILES
    (plain text, one text a line, or JSONL with a 'text' field), source the same text
    with synthetic misspellings."""
    options = TypoOptions(
        rate=rate,
        seed=seed,
        layout=layout,
        clean_share=clean_share,
        include_literals=include_literals,
    )
    written, errors = write_records(
        _records(files, lang, options),
        output,
        on_error=lambda r: click.echo(describe_error(r), err=True),
    )
    click.echo(f"typos: {written} records written, {errors} unreadable", err=True)
    return 1 if errors else 0
