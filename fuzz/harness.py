"""What both fuzz harnesses share: choosing atheris or hypothesis, and a long hypothesis run.

A harness gives a libFuzzer entry (bytes -> None) and a hypothesis strategy with a check;
``main`` runs the first under atheris when it is installed and ``--hypothesis`` is not
given, else the second for ``--examples`` examples (``--seed`` to explore new ground).
"""

from __future__ import annotations

import argparse
from collections.abc import Callable
from typing import Any

try:
    import atheris
except ImportError:  # the hypothesis fallback needs no instrumentation
    atheris = None


def run_hypothesis(
    name: str, strategy: Any, check: Callable[[Any], None], examples: int, seed: int | None
) -> None:
    """``check`` on ``examples`` values drawn from ``strategy``; the smallest failing
    value is printed by hypothesis when one fails."""
    from hypothesis import HealthCheck, given, settings
    from hypothesis import seed as set_seed

    @settings(
        max_examples=examples,
        deadline=None,
        database=None,
        derandomize=seed is None,
        suppress_health_check=list(HealthCheck),
    )
    @given(strategy)
    def run(value: Any) -> None:
        check(value)

    if seed is not None:
        run = set_seed(seed)(run)
    run()
    print(f"{name}: {examples} hypothesis examples, no violation")


def main(
    argv: list[str],
    *,
    one_input: Callable[[bytes], None],
    hypothesis_run: Callable[[int, int | None], None],
    default_examples: int,
    prepare: Callable[[], None] | None = None,
) -> None:
    parser = argparse.ArgumentParser(add_help=False)
    parser.add_argument("--hypothesis", action="store_true")
    parser.add_argument("--examples", type=int, default=default_examples)
    parser.add_argument("--seed", type=int, default=None)
    args, rest = parser.parse_known_args(argv[1:])
    if args.hypothesis or atheris is None:
        hypothesis_run(args.examples, args.seed)
        return
    if prepare is not None:
        prepare()
    atheris.Setup([argv[0], *rest], one_input)
    atheris.Fuzz()
