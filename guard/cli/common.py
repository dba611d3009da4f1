"""What `check`, `filter` and `explain` share: options, ruleset loading, exit codes, progress.

Exit codes (the same for every command here):

- 0: nothing at or above the failing level (``--fail-on``);
- 1: something is (for ``check``, a record that could not be read or checked counts as
  failing, unless ``--fail-on never``: what was not checked was not guarded);
- 2: a usage or ruleset error, reported before any record is read;
- 130: interrupted (Ctrl-C); what was processed so far is told on stderr, and an
  ``--output`` file is left as it was before the run.

Ruleset default: ``./guard-rules.toml`` when that file exists in the current folder, else
the bundled ``base`` ruleset. ``--rules`` may be given several times; the rulesets then act
as one, later ones over earlier ones.
"""

from __future__ import annotations

import io
import os
import sys
import time
import tomllib
from collections.abc import Callable, Iterable, Iterator, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any, TextIO, TypeVar

import click

from guard import __version__
from guard.batch import Checker, Outcome, Summary, guard_checker
from guard.errors import RulesetError
from guard.io.read import (
    FORMATS,
    ErrorRecord,
    FieldNames,
    InputFormatError,
    InputRecord,
    Limits,
    detect_format,
    read_records,
)

EXIT_OK = 0
EXIT_FAIL = 1
EXIT_USAGE = 2
EXIT_INTERRUPTED = 130

RULES_FILE = "guard-rules.toml"

F = TypeVar("F", bound=Callable[..., Any])


def default_rules(folder: Path | None = None) -> tuple[str, ...]:
    """``guard-rules.toml`` of ``folder`` (default: the current one) if it exists, else base."""
    here = folder if folder is not None else Path.cwd()
    candidate = here / RULES_FILE
    return (str(candidate),) if candidate.is_file() else ("base",)


def rules_option(f: F) -> F:
    """``--rules`` and ``--set``: which rulesets, and settings over them."""
    f = click.option(
        "--set",
        "settings",
        multiple=True,
        metavar="KEY=VALUE",
        help="A ruleset setting over the rulesets, e.g. rules.edit-budget.action=off or "
        "rules.real-word.lang.de.min-zipf=3.5 (VALUE as in TOML); repeatable.",
    )(f)
    return click.option(
        "--rules",
        "rules",
        multiple=True,
        metavar="NAME|PATH",
        help=f"Ruleset: a bundled name or a ruleset.toml path; repeatable. "
        f"Default: ./{RULES_FILE} if it exists, else the bundled 'base'.",
    )(f)


def parse_settings(values: Sequence[str]) -> dict[str, object]:
    """``--set KEY=VALUE`` values; VALUE is read as a TOML value, else taken as text.

    >>> parse_settings(["rules.edit-budget.max-distance=3", "rules.short-token.action=off"])
    {'rules.edit-budget.max-distance': 3, 'rules.short-token.action': 'off'}
    """
    out: dict[str, object] = {}
    for value in values:
        key, sep, raw = value.partition("=")
        if not sep or not key.strip():
            raise click.BadParameter(f"{value!r}: expected KEY=VALUE", param_hint="--set")
        try:
            parsed: object = tomllib.loads(f"v = {raw}")["v"]
        except tomllib.TOMLDecodeError:
            parsed = raw
        out[key.strip()] = parsed
    return out


def lang_option(f: F) -> F:
    return click.option(
        "--lang",
        metavar="TAG",
        default=None,
        help="Language (BCP 47) of records that name none. Default: the ruleset's first.",
    )(f)


def jobs_option(f: F) -> F:
    """``--jobs`` and ``--record-timeout`` (the time limit a worker process has per record)."""
    f = click.option(
        "--record-timeout",
        type=click.FloatRange(min=0, min_open=True),
        default=300.0,
        show_default=True,
        metavar="SECONDS",
        help="With --jobs 2 or more: a worker stuck longer on one record is stopped, and "
        "the record becomes an error record.",
    )(f)
    return click.option(
        "--jobs",
        "-j",
        type=click.IntRange(min=1),
        default=1,
        show_default=True,
        help="Worker processes. The output is the same as with one.",
    )(f)


def input_options(f: F) -> F:
    """The options that say how to read records (format, field names, limits)."""
    for option in reversed(
        (
            click.option(
                "--input-format",
                type=click.Choice(FORMATS),
                default=None,
                help="Format of every input. Default: from the file extension "
                "(.jsonl .json .csv .tsv .txt, each optionally .gz); stdin is jsonl.",
            ),
            click.option(
                "--field",
                "fields",
                multiple=True,
                metavar="ROLE=NAME",
                help="Read ROLE (source, proposal, lang, id, score, gold, candidates) from "
                "the input field NAME; repeatable.",
            ),
            click.option(
                "--max-record-bytes",
                type=click.IntRange(min=1),
                default=Limits().max_record_bytes,
                show_default=True,
                help="A longer record becomes an error record.",
            ),
            click.option(
                "--max-tokens",
                type=click.IntRange(min=1),
                default=Limits().max_tokens,
                show_default=True,
                help="A source or proposal with more tokens becomes an error record.",
            ),
        )
    ):
        f = option(f)
    return f


def field_names(values: Sequence[str]) -> FieldNames:
    """``--field ROLE=NAME`` values as FieldNames; a usage error for a bad one."""
    roles = set(FieldNames.__dataclass_fields__)
    chosen: dict[str, str] = {}
    for value in values:
        role, sep, name = value.partition("=")
        if not sep or not name or role not in roles:
            raise click.BadParameter(
                f"{value!r}: expected ROLE=NAME with ROLE one of {', '.join(sorted(roles))}",
                param_hint="--field",
            )
        chosen[role] = name
    names = FieldNames(**chosen)
    if names.source == names.proposal:
        raise click.BadParameter("source and proposal name the same field", param_hint="--field")
    return names


def input_formats(files: Sequence[str], input_format: str | None) -> list[str]:
    """The format of each input, or a usage error before anything is read."""
    try:
        return [detect_format(f, input_format) for f in files]
    except InputFormatError as e:
        raise click.UsageError(str(e)) from None


@dataclass(frozen=True, slots=True, kw_only=True)
class Inputs:
    """Everything a batch command needs before its first record, in the order it is checked:
    input formats, field names, then the ruleset (exit 2 on any of them, nothing read yet)."""

    paths: list[str]
    formats: list[str]
    refs: tuple[str, ...]
    overrides: dict[str, object]
    checker: Checker
    limits: Limits
    records: Iterator[InputRecord | ErrorRecord]


def open_inputs(
    files: Sequence[str],
    *,
    rules: Sequence[str],
    settings: Sequence[str],
    input_format: str | None,
    fields: Sequence[str],
    max_record_bytes: int,
    max_tokens: int,
) -> Inputs:
    paths = list(files) or ["-"]
    formats = input_formats(paths, input_format)
    names = field_names(fields)
    refs = tuple(rules) or default_rules()
    overrides = parse_settings(settings)
    checker = load_checker(refs, overrides)
    limits = Limits(max_record_bytes=max_record_bytes, max_tokens=max_tokens)
    records = read_records(paths, input_format=input_format, field_names=names, limits=limits)
    return Inputs(
        paths=paths,
        formats=formats,
        refs=refs,
        overrides=overrides,
        checker=checker,
        limits=limits,
        records=records,
    )


def check_output(output: str | None) -> None:
    """A usage error, before anything is read, when ``--output`` cannot be written."""
    if output is None or output == "-":
        return
    folder = os.path.dirname(os.path.abspath(output))
    if os.path.isdir(output):
        raise click.BadParameter(f"{output} is a folder", param_hint="--output")
    if not os.path.isdir(folder):
        raise click.BadParameter(f"no folder {folder}", param_hint="--output")
    if not os.access(folder, os.W_OK | os.X_OK):
        raise click.BadParameter(f"cannot write in {folder}", param_hint="--output")


def load_checker(refs: Sequence[str], overrides: dict[str, object] | None = None) -> Checker:
    """The in-process checker, or every ruleset problem on stderr and exit 2."""
    try:
        return guard_checker(tuple(refs), overrides or None)
    except RulesetError as e:
        for problem in e.problems:
            click.echo(str(problem), err=True)
        raise click.exceptions.Exit(EXIT_USAGE) from None


def rule_docs() -> dict[str, str]:
    """Each rule's description, for report formats that carry rule metadata."""
    from guard.rules import REGISTRY

    return {name: rule.doc for name, rule in REGISTRY.items()}


def version() -> str:
    return __version__


def wants_colour(stream: TextIO) -> bool:
    """Colour only on a terminal and only when NO_COLOR is unset or empty (no-color.org)."""
    if os.environ.get("NO_COLOR"):
        return False
    try:
        return stream.isatty()
    except (AttributeError, ValueError):
        return False


class Progress:
    """A one-line count on stderr, redrawn at most every few tenths of a second.

    Shown only when stderr is a terminal, so logs and pipes never see it, and not when
    the report itself goes to that terminal (``report_on_terminal``), where it would
    interleave with the report.
    """

    def __init__(
        self,
        stream: TextIO | None = None,
        *,
        every: float = 0.2,
        report_on_terminal: bool = False,
    ) -> None:
        self.stream = stream if stream is not None else sys.stderr
        self.enabled = _isatty(self.stream) and not report_on_terminal
        self.every = every
        self._last = 0.0
        self._drawn = False

    def update(self, summary: Summary) -> None:
        if not self.enabled:
            return
        now = time.monotonic()
        if now - self._last < self.every:
            return
        self._last = now
        v = summary.verdicts
        self.stream.write(
            f"\r{summary.read} records: {v['veto']} veto, {v['flag']} flag, "
            f"{summary.errors} errors "
        )
        self.stream.flush()
        self._drawn = True

    def close(self) -> None:
        if self._drawn:
            self.stream.write("\r\x1b[K")
            self.stream.flush()


def _isatty(stream: TextIO) -> bool:
    try:
        return stream.isatty()
    except (AttributeError, ValueError):
        return False


def tally(
    outcomes: Iterable[Outcome], summary: Summary, progress: Progress | None = None
) -> Iterator[Outcome]:
    """Count each outcome into ``summary`` as it passes (the caller counts it written)."""
    for outcome in outcomes:
        summary.add(outcome)
        if progress is not None:
            progress.update(summary)
        yield outcome


def output_closed() -> click.exceptions.Exit:
    """Standard output was closed early (``guard filter | head``): stop quietly, exit 1.

    Standard output is pointed at /dev/null first, so that the interpreter's own final
    flush does not fail again (the practice the Python docs give for SIGPIPE).
    """
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        os.close(devnull)
    except (OSError, ValueError, io.UnsupportedOperation):
        pass
    return click.exceptions.Exit(EXIT_FAIL)


def interrupted(summary: Summary, command: str, output: str | None) -> click.exceptions.Exit:
    """Tell what was done before Ctrl-C and give the exit to raise."""
    kept = f"; {output} was left as it was" if output not in (None, "-") else ""
    click.echo(f"guard {command}: interrupted; {summary.line()}{kept}", err=True)
    return click.exceptions.Exit(EXIT_INTERRUPTED)
