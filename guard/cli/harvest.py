"""`guard harvest`: propose protected terms from a corpus, with the evidence for each.

A thin layer over guard.vocab.harvest. Every unreadable input (file, JSONL line, proposal
record) is listed on stderr with its file and line, and the command then exits 2 without
output, so that a draft list is never built from part of a corpus without saying so.
Exit codes: 0 done; 2 usage or input error.
"""

from __future__ import annotations

import json
from collections.abc import Sequence
from pathlib import Path

import click

from guard.errors import GuardError, RecordError
from guard.io.read import ErrorRecord, InputFormatError, read_records
from guard.vocab.harvest import (
    DEFAULT_MAX_ZIPF,
    DEFAULT_MIN_COUNT,
    DEFAULT_MIN_G2,
    Candidate,
    harvest,
    rank_attacked,
    read_corpus,
    vocabulary,
    wordfreq_lang,
    write_drafts,
    write_vocabulary,
)

EXIT_OK = 0
EXIT_INPUT = 2
_CONTEXT_WIDTH = 70


@click.command("harvest")
@click.argument("corpus", nargs=-1, required=True, type=click.Path(exists=True, path_type=Path))
@click.option("--lang", required=True, metavar="TAG", help="Language of the corpus (BCP 47).")
@click.option(
    "--field",
    default="text",
    show_default=True,
    metavar="NAME",
    help="JSONL input: the field that holds a document's text.",
)
@click.option(
    "--min-count",
    type=click.IntRange(min=1),
    default=DEFAULT_MIN_COUNT,
    show_default=True,
    help="Fewest occurrences a candidate needs.",
)
@click.option(
    "--max-zipf",
    type=float,
    default=DEFAULT_MAX_ZIPF,
    show_default=True,
    help="Skip words more common than this Zipf frequency.",
)
@click.option(
    "--min-g2",
    type=float,
    default=DEFAULT_MIN_G2,
    show_default=True,
    help="Keyness a lowercase term needs (10.83: p < 0.001).",
)
@click.option("--top", type=click.IntRange(min=1), default=None, help="Show only the best N.")
@click.option(
    "--out",
    type=click.Path(file_okay=False, path_type=Path),
    default=None,
    metavar="DIR",
    help="Also write draft term lists to DIR/terms/<kind>.txt.",
)
@click.option(
    "--vocabulary/--no-vocabulary",
    "with_vocabulary",
    default=True,
    show_default=True,
    help="With --out, also write DIR/vocabulary.txt: every word of the corpus, for a "
    "ruleset's [vocabulary].",
)
@click.option("--force", is_flag=True, help="Overwrite draft lists that exist in --out.")
@click.option(
    "--proposals",
    type=click.Path(exists=True, dir_okay=False, allow_dash=True),
    default=None,
    metavar="FILE",
    help="Pairs a speller produced: rank candidates by how often it changed them.",
)
@click.option(
    "--format",
    "fmt",
    type=click.Choice(["text", "jsonl"]),
    default="text",
    show_default=True,
    help="A table for people, or one JSON object per candidate.",
)
def command(
    corpus: tuple[Path, ...],
    lang: str,
    field: str,
    min_count: int,
    max_zipf: float,
    min_g2: float,
    top: int | None,
    out: Path | None,
    with_vocabulary: bool,
    force: bool,
    proposals: str | None,
    fmt: str,
) -> int:
    """Propose protected terms from CORPUS (files, or folders searched for *.txt, *.md,
    *.rst and *.jsonl): acronyms, codes, identifiers, names and rare domain terms, ranked
    by keyness against the language at large, each with counts and a context.

    The list is a draft to review: it holds false candidates and is never complete.
    """
    try:
        wordfreq_lang(lang)
    except GuardError as e:
        raise click.BadParameter(str(e), param_hint="--lang") from None
    problems: list[RecordError] = []
    docs = list(read_corpus(corpus, field=field, errors=problems))
    pairs, bad_pairs = _read_pairs(proposals) if proposals is not None else ([], [])
    if problems or bad_pairs:
        for message in [*map(str, problems), *bad_pairs]:
            click.echo(f"guard harvest: {message}", err=True)
        raise click.exceptions.Exit(EXIT_INPUT)
    if not docs:
        click.echo("guard harvest: no documents found in the corpus", err=True)
        raise click.exceptions.Exit(EXIT_INPUT)
    found = harvest(docs, lang=lang, min_count=min_count, max_zipf=max_zipf, min_g2=min_g2)
    attacked = proposals is not None
    if attacked:
        found = rank_attacked(pairs, found)
    shown = found if top is None else found[:top]
    if fmt == "jsonl":
        for c in shown:
            click.echo(json.dumps(_as_json(c), ensure_ascii=False))
    else:
        click.echo(_table(shown, attacked=attacked), nl=False)
    if out is not None:
        try:
            written = write_drafts(shown, out, overwrite=force)
            if with_vocabulary:
                written.append(write_vocabulary(vocabulary(docs), out, overwrite=force))
        except GuardError as e:
            click.echo(f"guard harvest: {e} (use --force to replace them)", err=True)
            raise click.exceptions.Exit(EXIT_INPUT) from None
        for path in written:
            click.echo(f"guard harvest: wrote {path}", err=True)
    click.echo(
        f"guard harvest: {len(docs)} documents, {len(found)} candidates, {len(shown)} shown",
        err=True,
    )
    return EXIT_OK


def _read_pairs(path: str) -> tuple[list[tuple[str, str]], list[str]]:
    """(source, proposal) of every readable record, and each problem as "file:line: reason"."""
    pairs: list[tuple[str, str]] = []
    bad: list[str] = []
    try:
        for r in read_records([path]):
            if isinstance(r, ErrorRecord):
                bad.append(f"{r.where}: {r.reason}")
            else:
                pairs.append((r.source, r.proposal))
    except InputFormatError as e:
        raise click.BadParameter(str(e), param_hint="--proposals") from None
    return pairs, bad


def _as_json(c: Candidate) -> dict[str, object]:
    return {
        "term": c.term,
        "kind": c.kind.value,
        "count": c.count,
        "documents": c.documents,
        "zipf": c.zipf,
        "g2": round(c.g2, 4),
        "attacks": c.attacks,
        "score": round(c.score, 4),
        "contexts": list(c.contexts),
    }


def _table(candidates: Sequence[Candidate], *, attacked: bool) -> str:
    """A plain-text table, one candidate a row, the first context cut to fit."""
    head = ["term", "kind", "count", "docs", "zipf", "G²"] + (["attacks"] if attacked else [])
    rows = [
        [
            c.term,
            c.kind.value,
            str(c.count),
            str(c.documents),
            f"{c.zipf:.2f}",
            f"{c.g2:.1f}",
            *([str(c.attacks)] if attacked else []),
        ]
        for c in candidates
    ]
    widths = [max([len(h)] + [len(r[i]) for r in rows]) for i, h in enumerate(head)]
    lines = []
    for cells, context in [(head, "context")] + [
        (r, _cut(c.contexts[0] if c.contexts else ""))
        for r, c in zip(rows, candidates, strict=True)
    ]:
        left = [cells[0].ljust(widths[0]), cells[1].ljust(widths[1])]
        right = [cell.rjust(w) for cell, w in zip(cells[2:], widths[2:], strict=True)]
        lines.append("  ".join([*left, *right, context]).rstrip())
    return "\n".join(lines) + "\n"


def _cut(context: str) -> str:
    if len(context) <= _CONTEXT_WIDTH:
        return context
    return context[: _CONTEXT_WIDTH - 1] + "…"
