"""The `guard` command: a click group whose subcommands live one per module in guard/cli/.

This module only wires commands together and maps errors to exit codes; every command is a
thin layer over a library function. Exit codes: 0 nothing at or above the failing level,
1 something is, 2 usage or ruleset error, 130 interrupted.
"""

from __future__ import annotations

import importlib
from collections.abc import Sequence

import click

from guard import __version__

# Subcommand modules, each defining a click command object named `command`.
COMMAND_MODULES: tuple[str, ...] = (
    "guard.cli.rules",
    "guard.cli.check",
    "guard.cli.filter",
    "guard.cli.explain",
    "guard.cli.harvest",
    "guard.cli.typos",
    "guard.cli.propose",
    "guard.cli.score",
)


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option(__version__, prog_name="guard")
def cli() -> None:
    """Judge a speller's rewrites against domain rulesets; veto the risky ones and say why."""


for _name in COMMAND_MODULES:
    cli.add_command(importlib.import_module(_name).command)


def main(argv: Sequence[str] | None = None) -> int:
    """Run the CLI and return its exit code (never raises SystemExit to a Python caller).

    A command reports its outcome by returning an int exit code.
    """
    try:
        rv = cli.main(
            args=list(argv) if argv is not None else None, prog_name="guard", standalone_mode=False
        )
    except click.exceptions.Exit as e:
        return e.exit_code
    except click.ClickException as e:
        e.show()
        return 2 if isinstance(e, click.UsageError) else e.exit_code
    except click.Abort:
        click.echo("guard: interrupted", err=True)
        return 130
    except KeyboardInterrupt:
        click.echo("guard: interrupted", err=True)
        return 130
    return rv if isinstance(rv, int) else 0
