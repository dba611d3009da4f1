"""`guard rules lint | test | show | diff`: keep rulesets healthy in version control.

Thin commands over guard.vocab.lint, .selftest, .show and .diff. Exit codes:

- lint: 0 no errors (warnings allowed), 1 warnings under ``--strict``, 2 any error.
- test: 0 every example passed, 1 some failed, 2 a ruleset could not be loaded.
- show: 0, or 2 when the ruleset could not be loaded.
- diff: 0 no rewrite went from veto to accept, 1 some did or some input record could not
  be read or checked (what was not compared was not reviewed; the rest of the batch is
  still compared and reported), 2 a ruleset or revision could not be loaded or the usage
  is wrong, before any record is read.

With no PATH, lint and test take every ``ruleset.toml`` and ``guard-rules.toml`` below the
current folder, so that a pre-commit hook needs no arguments.
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Sequence
from pathlib import Path

import click

from guard.errors import GuardError, RulesetError
from guard.io.read import FORMATS, InputRecord, read_records
from guard.records import Report
from guard.ruleset import load_ruleset
from guard.ruleset.bundled import bundled_path, is_bundled_name
from guard.ruleset.model import CompiledRuleset
from guard.vocab import diff as diffing
from guard.vocab import lint as linting
from guard.vocab import selftest
from guard.vocab.show import RENDERERS, describe

EXIT_OK = 0
EXIT_FAIL = 1
EXIT_ERROR = 2


def _ref(ref: str) -> str:
    """A bundled name as its file; a name that is also a folder here means the folder."""
    if not is_bundled_name(ref):
        return ref
    return f".{os.sep}{ref}" if Path(ref).exists() else str(bundled_path(ref))


def _targets(refs: Sequence[str]) -> list[str]:
    """The rulesets named (bundled names mapped to their files), or every one found below."""
    if refs:
        return [_ref(r) for r in refs]
    here = Path.cwd()
    found = linting.find_rulesets(here)
    if not found:
        names = " or ".join(linting.RULESET_NAMES)
        raise click.UsageError(f"no PATH given and no {names} below {here}")
    return [str(p.relative_to(here)) for p in found]


def _display_base(refs: Sequence[str]) -> Path | None:
    """Where output names files from: the current folder, unless every ruleset was named by
    an absolute path (as scripts and tests do), in which case files keep absolute names."""
    if refs and all(Path(r).is_absolute() for r in refs):
        return None
    return Path.cwd()


def _show_problems(error: RulesetError, base: Path | None) -> None:
    """A ruleset's problems on stderr, ordered and named as lint names them."""
    for problem in linting.collect(error.problems, [], relative_to=base).problems:
        click.echo(linting.format_problem(problem), err=True)


@click.group("rules")
def rules() -> None:
    """Lint, test, show and diff rulesets."""


@rules.command("lint")
@click.argument("paths", nargs=-1, metavar="[PATH|NAME]...")
@click.option("--strict", is_flag=True, help="Warnings fail too (exit 1).")
@click.pass_context
def lint_command(ctx: click.Context, paths: tuple[str, ...], strict: bool) -> None:
    """Report every error and warning of the rulesets named, sorted by file and line.

    With no PATH, every ruleset.toml and guard-rules.toml below the current folder. Exit 2
    on any error; with --strict, exit 1 on warnings alone; else 0.
    """
    result = linting.lint(_targets(paths), relative_to=_display_base(paths))
    for line in linting.format_result(result):
        click.echo(line)
    if result.errors:
        ctx.exit(EXIT_ERROR)
    ctx.exit(EXIT_FAIL if strict and result.warnings else EXIT_OK)


@rules.command("test")
@click.argument("paths", nargs=-1, metavar="[PATH|NAME]...")
@click.option("-q", "--quiet", is_flag=True, help="Show failures only.")
@click.pass_context
def examples_command(ctx: click.Context, paths: tuple[str, ...], quiet: bool) -> None:
    """Run the examples each ruleset named carries, through the guard engine.

    With no PATH, every ruleset.toml and guard-rules.toml below the current folder. Exit 1
    if an example fails, 2 if a ruleset cannot be loaded, else 0.
    """
    outcomes: list[selftest.Outcome] = []
    broken = 0
    base = _display_base(paths)
    for target in _targets(paths):
        try:
            ruleset = load_ruleset(target)
        except RulesetError as e:
            click.echo(f"{target}: cannot load the ruleset", err=True)
            _show_problems(e, base)
            broken += 1
            continue
        results = selftest.run_examples(ruleset)
        click.echo(f"{ruleset.name} ({target}): {linting.plural(len(results), 'example')}")
        for outcome in results:
            if not (quiet and outcome.passed):
                for line in selftest.format_outcome(outcome, relative_to=base):
                    click.echo(f"  {line}")
        outcomes.extend(results)
    not_loaded = f", {broken} not loaded" if broken else ""
    click.echo(selftest.summary(outcomes) + not_loaded)
    if broken:
        ctx.exit(EXIT_ERROR)
    ctx.exit(EXIT_OK if all(o.passed for o in outcomes) else EXIT_FAIL)


@rules.command("show")
@click.argument("ref", metavar="NAME|PATH")
@click.option(
    "--format",
    "fmt",
    type=click.Choice(sorted(RENDERERS)),
    default="text",
    show_default=True,
    help="text for people, json for scripts.",
)
@click.pass_context
def show_command(ctx: click.Context, ref: str, fmt: str) -> None:
    """Show the ruleset NAME|PATH as resolved after extends, with where each setting came from.

    Exit 2 when the ruleset cannot be loaded.
    """
    try:
        ruleset = load_ruleset(_ref(ref))
    except RulesetError as e:
        _show_problems(e, _display_base([ref]))
        ctx.exit(EXIT_ERROR)
    click.echo(RENDERERS[fmt](describe(ruleset, relative_to=_display_base([ref]))))


def _checker(ruleset: CompiledRuleset, lang: str | None) -> diffing.PairChecker:
    from guard.api import Guard

    guard = Guard(ruleset)

    def check(record: InputRecord) -> Report:
        return guard.check(
            record.source, record.proposal, lang=record.lang or lang, score=record.score
        )

    return check


def _load_version(which: str, ref: str, workdir: Path) -> CompiledRuleset | None:
    """Load one side of a diff, reporting why it cannot be loaded on stderr."""
    try:
        return load_ruleset(_ref(diffing.materialize(ref, workdir)))
    except RulesetError as e:
        click.echo(f"{which} ruleset {ref}: cannot load", err=True)
        _show_problems(e, _display_base([ref]))
    except GuardError as e:
        click.echo(f"{which} ruleset: {e}", err=True)
    return None


@rules.command("diff")
@click.argument("old", metavar="OLD")
@click.argument("new", metavar="NEW")
@click.option(
    "--pairs",
    "pairs_path",
    required=True,
    metavar="FILE",
    help="Pairs to check under both versions: JSONL, CSV, TSV ('-' for stdin, JSONL).",
)
@click.option("--input-format", type=click.Choice(FORMATS), default=None, help="Format of --pairs.")
@click.option("--lang", default=None, help="Language of pairs that carry no 'lang' field.")
@click.option(
    "--format",
    "fmt",
    type=click.Choice(sorted(diffing.RENDERERS)),
    default="text",
    show_default=True,
    help="text for people, json for scripts.",
)
@click.pass_context
def diff_command(
    ctx: click.Context,
    old: str,
    new: str,
    pairs_path: str,
    input_format: str | None,
    lang: str | None,
    fmt: str,
) -> None:
    """Show which verdicts change on a batch between ruleset OLD and ruleset NEW.

    OLD and NEW are paths, bundled names, or REV:PATH for the ruleset at PATH as it was at
    git revision REV. Exit 1 when any rewrite goes from veto to accept or a record cannot
    be read or checked (the rest of the batch is still compared); 2 when a version cannot
    be loaded.
    """
    try:
        records = read_records([pairs_path], input_format=input_format)
    except GuardError as e:
        raise click.UsageError(str(e)) from e
    with tempfile.TemporaryDirectory(prefix="guard-diff-") as tmp:
        versions = []
        for which, ref in (("old", old), ("new", new)):
            (Path(tmp) / which).mkdir()
            versions.append(_load_version(which, ref, Path(tmp) / which))
    before, after = versions
    if before is None or after is None:
        ctx.exit(EXIT_ERROR)
    result = diffing.diff_batch(records, _checker(before, lang), _checker(after, lang))
    click.echo(diffing.RENDERERS[fmt](result, old_name=old, new_name=new))
    ctx.exit(EXIT_FAIL if result.loosened or result.errors else EXIT_OK)


command = rules
"""The group guard.cli.main registers."""
