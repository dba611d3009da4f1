"""Re-score a batch over a range of one ruleset setting, to pick an operating point.

A threshold trades overcorrections prevented against good corrections kept. A sweep
loads the ruleset once per value with that one setting overridden (the loader's
``overrides``, keyed like ``rules.real-word.min-zipf``), checks the same records again
and scores them, so that an owner sees the whole curve instead of guessing.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from decimal import Decimal, InvalidOperation
from pathlib import Path

from guard.evaluate.score import ScoreInput, Summary, score_inputs
from guard.records import Report


@dataclass(frozen=True, slots=True, kw_only=True)
class SweepSpec:
    """``SETTING=START:STOP:STEP``: the setting's key path and the values to try."""

    setting: str
    values: tuple[int | float, ...]


def parse_sweep(spec: str) -> SweepSpec:
    """Parse ``SETTING=START:STOP:STEP``; STOP is included when the steps land on it.

    Integers stay integers (for settings such as a maximum distance); decimals are
    stepped exactly, so 0.1 steps do not drift.

    >>> parse_sweep("rules.real-word.min-zipf=3:4:0.25").values
    (3.0, 3.25, 3.5, 3.75, 4.0)
    >>> parse_sweep("rules.edit-budget.max-distance=1:3:1").values
    (1, 2, 3)
    """
    setting, eq, rng = spec.partition("=")
    parts = rng.split(":")
    if not eq or not setting.strip() or len(parts) != 3:
        raise ValueError(f"sweep {spec!r}: expected SETTING=START:STOP:STEP")
    try:
        start, stop, step = (Decimal(p.strip()) for p in parts)
    except InvalidOperation:
        raise ValueError(f"sweep {spec!r}: START, STOP and STEP must be numbers") from None
    if step <= 0:
        raise ValueError(f"sweep {spec!r}: STEP must be positive")
    if stop < start:
        raise ValueError(f"sweep {spec!r}: STOP is below START")
    count = int((stop - start) / step) + 1
    if count > 200:
        raise ValueError(f"sweep {spec!r}: {count} values; at most 200")
    integral = all(p.strip().lstrip("-").isdigit() for p in parts)
    values: list[int | float] = []
    for k in range(count):
        v = start + step * k
        values.append(int(v) if integral else float(v))
    if not all(math.isfinite(v) for v in values):
        raise ValueError(f"sweep {spec!r}: values must be finite")
    return SweepSpec(setting=setting.strip(), values=tuple(values))


@dataclass(frozen=True, slots=True, kw_only=True)
class SweepPoint:
    """The score of the batch with the setting at ``value``."""

    value: int | float
    summary: Summary


CheckerFactory = Callable[[str, "int | float"], Callable[[str, str, str, "float | None"], Report]]
"""Builds a checker for (setting, value)."""


def guard_factory(
    refs: Sequence[str | Path], overrides: Mapping[str, object] | None = None
) -> CheckerFactory:
    """A factory that loads ``refs`` with ``overrides`` and the swept setting over them."""
    from guard.api import Guard, load_ruleset

    def make(setting: str, value: int | float) -> Callable[[str, str, str, float | None], Report]:
        guard = Guard(load_ruleset(*refs, overrides={**(overrides or {}), setting: value}))

        def check(source: str, proposal: str, lang: str, score: float | None) -> Report:
            return guard.check(source, proposal, lang=lang, score=score)

        return check

    return make


def run_sweep(
    inputs: Sequence[ScoreInput],
    spec: SweepSpec,
    factory: CheckerFactory,
    *,
    undo_flagged: bool = False,
    errors: int = 0,
) -> tuple[SweepPoint, ...]:
    """Score ``inputs`` once per value of the swept setting."""
    return tuple(
        SweepPoint(
            value=value,
            summary=score_inputs(
                inputs,
                factory(spec.setting, value),
                undo_flagged=undo_flagged,
                errors=errors,
                examples=0,
            ),
        )
        for value in spec.values
    )
