"""`guard score`: what a speller's rewrites do against gold, alone and with the guard.

A thin layer over guard.evaluate.score (scoring), guard.evaluate.sweep (one setting over a
range) and guard.evaluate.render (text, JSONL, HTML). Exit codes: 0 scored; 1 some record
could not be read, or a --min-prevented / --min-kept target was missed; 2 usage or ruleset
error.
"""

from __future__ import annotations

from pathlib import Path

import click

from guard.cli import common
from guard.errors import RulesetError
from guard.evaluate.jsonl import read_jsonl
from guard.evaluate.render import FORMATS, ScoreReport
from guard.evaluate.score import score_inputs
from guard.evaluate.sweep import guard_factory, parse_sweep, run_sweep
from guard.io.write import atomic_output


@click.command("score")
@click.argument("file", type=click.Path(exists=True, dir_okay=False, path_type=Path))
@common.rules_option
@common.lang_option
@click.option(
    "--undo-flagged", is_flag=True, help="Count flagged rewrites as undone too (strict mode)."
)
@click.option(
    "--format",
    "fmt",
    type=click.Choice(list(FORMATS)),
    default="text",
    show_default=True,
    help="Report format.",
)
@click.option("--output", "-o", metavar="FILE", help="Write the report here (atomically).")
@click.option(
    "--html", "html_output", metavar="FILE",
    help="Also write the HTML report here (one run, two reports).",
)  # fmt: skip
@click.option(
    "--sweep",
    "sweep_spec",
    metavar="SETTING=START:STOP:STEP",
    help="Re-score with one ruleset setting over a range, e.g. rules.real-word.min-zipf=2:4:0.25.",
)
@click.option(
    "--examples", type=click.IntRange(0), default=10, show_default=True,
    help="How many guard mistakes of each kind to list.",
)  # fmt: skip
@click.option(
    "--min-prevented", type=click.FloatRange(0, 100), default=None, metavar="PCT",
    help="Exit 1 when fewer overcorrections than this percentage are prevented.",
)  # fmt: skip
@click.option(
    "--min-kept", type=click.FloatRange(0, 100), default=None, metavar="PCT",
    help="Exit 1 when fewer good corrections than this percentage are kept.",
)  # fmt: skip
def command(
    file: Path,
    rules: tuple[str, ...],
    settings: tuple[str, ...],
    lang: str | None,
    undo_flagged: bool,
    fmt: str,
    output: str | None,
    html_output: str | None,
    sweep_spec: str | None,
    examples: int,
    min_prevented: float | None,
    min_kept: float | None,
) -> int:
    """Score the JSONL records of FILE (fields source, proposal, gold; optional id, lang,
    score): token outcomes of the speller alone and with the guard, P/R/F0.5, per rule,
    per token shape and kind."""
    from guard.api import Guard, load_ruleset

    refs = rules or common.default_rules()
    overrides = common.parse_settings(settings)
    try:
        spec = parse_sweep(sweep_spec) if sweep_spec else None
    except ValueError as e:
        raise click.BadParameter(str(e), param_hint="--sweep") from e
    try:
        guard = Guard(load_ruleset(*refs, overrides=overrides))
        if spec is not None:
            load_ruleset(*refs, overrides={**overrides, spec.setting: spec.values[0]})
    except RulesetError as e:
        for problem in e.problems:
            click.echo(str(problem), err=True)
        return common.EXIT_USAGE
    from guard.evaluate.score import read_inputs

    inputs, bad = read_inputs(read_jsonl(file), lang=lang or guard.ruleset.default_language)
    summary = score_inputs(
        inputs,
        lambda s, p, lg, sc: guard.check(s, p, lang=lg, score=sc),
        undo_flagged=undo_flagged,
        errors=len(bad),
        examples=examples,
    )
    points = (
        run_sweep(
            inputs,
            spec,
            guard_factory(refs, overrides),
            undo_flagged=undo_flagged,
            errors=len(bad),
        )
        if spec is not None
        else ()
    )
    report = ScoreReport(
        input=str(file),
        rulesets=tuple(refs),
        undo_flagged=undo_flagged,
        summary=summary,
        bad_lines=tuple(f"{b.file}:{b.line}: {b.reason}" for b in bad),
        sweep_setting=spec.setting if spec is not None else None,
        sweep=points,
    )
    with atomic_output(output) as stream:
        stream.write(FORMATS[fmt](report))
    if html_output is not None:
        with atomic_output(html_output) as stream:
            stream.write(FORMATS["html"](report))
    for b in bad:
        click.echo(f"{b.file}:{b.line}: {b.reason}", err=True)
    missed = (
        min_prevented is not None
        and (summary.prevented_share or 0.0) * 100 < min_prevented
        and summary.overcorrections > 0
    ) or (
        min_kept is not None and (summary.kept_share or 0.0) * 100 < min_kept and summary.good > 0
    )
    return common.EXIT_FAIL if bad or missed else common.EXIT_OK
