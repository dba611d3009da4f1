"""The evaluation's parts: tuning, held-out and harvest lines do not overlap, and a part
gets the typos it would get inside a longer run (so held-out numbers are reproducible)."""

from __future__ import annotations

import gzip
import importlib.util
import json
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


@pytest.mark.parametrize("lang", ["en", "de", "fr", "es", "nl"])
def test_the_harvest_corpus_holds_no_scored_or_tuning_line(run: ModuleType, lang: str) -> None:
    # lines 0-899 of a set are scored (0-599) or tuned on (600-899); none may be harvested
    scored = {r.text for r in run.load_set(lang, 900)}
    assert len(scored) > 800
    with gzip.open(run.HARVEST / f"{lang}.jsonl.gz", "rt", encoding="utf-8") as fh:
        harvested = [json.loads(line)["text"] for line in fh]
    assert len(harvested) > 10_000
    assert scored.isdisjoint(harvested)


@pytest.mark.parametrize("lang", ["en", "nl"])
def test_a_part_gets_the_typos_of_the_whole(run: ModuleType, lang: str) -> None:
    whole = run.typo_set(lang, 40, 1)
    part = run.typo_set(lang, 15, 1, 25)
    assert [r["id"] for r in part] == [r["id"] for r in whole[25:]]
    assert part == whole[25:]
