"""`guard check`: judge a batch of pairs, write a report, and exit for a CI gate.

A thin layer over guard.io (read), guard.batch (check) and guard.report (write). The
ruleset is loaded before any record is read, so a bad ruleset exits 2 at once. Exit codes
are in guard.cli.common. A one-line tally goes to stderr at the end.
"""

from __future__ import annotations

import os
import sys

import click

from guard.batch import Summary, check_records
from guard.cli import common
from guard.io.write import atomic_output
from guard.records import Verdict
from guard.report import REPORTERS, ReportOptions

_FAIL_ON = {"veto": Verdict.VETO, "flag": Verdict.FLAG, "never": None}


@click.command("check")
@click.argument("files", nargs=-1, type=click.Path(exists=True, dir_okay=False, allow_dash=True))
@common.rules_option
@common.lang_option
@click.option(
    "--format",
    "fmt",
    type=click.Choice(list(REPORTERS)),
    default="text",
    show_default=True,
    help="Report format.",
)
@click.option("--output", "-o", metavar="FILE", help="Write the report here (atomically).")
@click.option(
    "--fail-on",
    type=click.Choice(list(_FAIL_ON)),
    default="veto",
    show_default=True,
    help="Exit 1 when a pair gets this verdict or worse, or a record cannot be checked.",
)
@common.jobs_option
@common.input_options
@click.pass_context
def command(
    ctx: click.Context,
    files: tuple[str, ...],
    rules: tuple[str, ...],
    settings: tuple[str, ...],
    lang: str | None,
    fmt: str,
    output: str | None,
    fail_on: str,
    jobs: int,
    record_timeout: float,
    input_format: str | None,
    fields: tuple[str, ...],
    max_record_bytes: int,
    max_tokens: int,
) -> None:
    """Check the pairs in FILE... (or stdin, '-') and report every rewrite's verdict.

    Exit 0: nothing at or above --fail-on; 1: something is; 2: usage or ruleset error;
    130: interrupted (the --output file is left as it was).
    """
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
    progress = common.Progress(report_on_terminal=output is None and sys.stdout.isatty())
    try:
        with atomic_output(output) as stream:
            to_terminal = output is None and common.wants_colour(sys.stdout)
            options = ReportOptions(
                color=fmt == "text" and to_terminal,
                rule_docs=common.rule_docs(),
                tool_version=common.version(),
                title="guard report: "
                + ", ".join("stdin" if p == "-" else os.path.basename(p) for p in inputs.paths),
            )
            reporter = REPORTERS[fmt](stream, options)
            reporter.start()
            outcomes = check_records(
                inputs.records,
                inputs.refs,
                jobs=jobs,
                lang_default=lang,
                limits=inputs.limits,
                overrides=inputs.overrides,
                checker=inputs.checker,
                record_timeout=record_timeout,
            )
            for outcome in common.tally(outcomes, summary, progress):
                reporter.record(outcome)
                summary.written += 1
            reporter.finish(summary)
    except BrokenPipeError:
        raise common.output_closed() from None
    except KeyboardInterrupt:
        progress.close()
        raise common.interrupted(summary, "check", output) from None
    progress.close()
    click.echo(f"guard check: {summary.line()}", err=True)
    ctx.exit(_exit_code(summary, _FAIL_ON[fail_on]))


def _exit_code(summary: Summary, fail_on: Verdict | None) -> int:
    if fail_on is None:
        return common.EXIT_OK
    worst = summary.worst()
    if summary.errors or (worst is not None and worst.rank >= fail_on.rank):
        return common.EXIT_FAIL
    return common.EXIT_OK
