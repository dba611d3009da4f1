"""The evaluation's parts: tuning, held-out and harvest lines do not overlap, and a part
gets the typos it would get inside a longer run (so held-out numbers are reproducible)."""

from __future__ import annotations

import importlib.util
import sys
from pathlib import Path
from types import ModuleType

import pytest

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture(scope="module")
def run() -> ModuleType:
    spec = importlib.util.spec_from_file_location("eval_run", ROOT / "evaluation" / "run.py")
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules.setdefault("eval_run", module)
    spec.loader.exec_module(module)
    return module


def test_parts_do_not_overlap(run: ModuleType) -> None:
    cap = 300
    tuning = range(run.TUNE, run.TUNE + cap)
    held_out = range(run.HELD_OUT, run.HELD_OUT + cap)
    assert set(tuning).isdisjoint(held_out)
    assert max(held_out) + 1 <= run.HARVEST_FROM


@pytest.mark.parametrize("lang", ["en", "nl"])
def test_a_part_gets_the_typos_of_the_whole(run: ModuleType, lang: str) -> None:
    whole = run.typo_set(lang, 40, 1)
    part = run.typo_set(lang, 15, 1, 25)
    assert [r["id"] for r in part] == [r["id"] for r in whole[25:]]
    assert part == whole[25:]
