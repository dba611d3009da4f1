"""The benchmark must keep running: a smoke-size run prints every figure issue 6 asks for.

Nothing here looks at a time or a verdict (performance belongs to the benchmark, not the
tests): only that each figure was measured, or says plainly why not ("no cache"), and that
the workload is the same from one run to the next.
"""

from __future__ import annotations

import doctest
import importlib.util
import json
import subprocess
import sys
from pathlib import Path
from types import ModuleType

import pytest

Smoke = tuple[subprocess.CompletedProcess[str], dict[str, dict[str, object]]]
BENCH = Path(__file__).resolve().parents[2] / "benchmarks"

# The figures issue 6 lists, each with its ratio partner (the keys run.py's --json gives).
EXPECTED = {
    "api.changed.median": "changed query pairs through the API: median",
    "api.changed.p99": "changed query pairs through the API: p99",
    "api.changed.cpu.median": "changed pairs, median on the thread's CPU clock",
    "api.changed.cpu.p99": "changed pairs, p99 on the thread's CPU clock",
    "api.unchanged": "unchanged pairs, the fast path",
    "api.unchanged.cpu": "unchanged pairs, CPU time",
    "api.mixed": "mixed traffic, 70% unchanged",
    "naive.changed": "the naive post-filter floor",
    "ratio.guard_over_naive": "the guard against the floor",
    "filter.jobs1": "guard filter end to end, one process",
    "filter.jobs1.cpu": "guard filter, one process, per CPU second",
    "filter.jobs2": "guard filter end to end, --jobs 2",
    "filter.jobs2.per_core": "guard filter, per core",
    "filter.rss_growth": "memory flat while streaming",
    "speller.guard": "the guard on the spellers' queries",
    "speller.symspell-words": "symspellpy word by word",
    "share.symspell-words": "share of symspellpy word by word",
    "speller.symspell-compound": "symspellpy whole text",
    "share.symspell-compound": "share of symspellpy whole text",
    "speller.pyspell-d1": "pyspellchecker distance 1",
    "share.pyspell-d1": "share of pyspellchecker distance 1",
    "speller.pyspell-d2": "pyspellchecker distance 2",
    "share.pyspell-d2": "share of pyspellchecker distance 2",
    "startup.10k.cold": "start-up, smallest ruleset, cold",
    "startup.100k.cold": "start-up, middle ruleset, cold",
    "startup.1M.cold": "start-up, largest ruleset, cold",
    "startup.100k.cold.cpu": "start-up, middle ruleset, cold, CPU time",
    "startup.10k.cached": "start-up, smallest ruleset, from cache",
    "startup.100k.cached": "start-up, middle ruleset, from cache",
    "startup.1M.cached": "start-up, largest ruleset, from cache",
    "rss.cached_lexicon": "peak RSS with terms and English frequencies",
}


def _load(name: str) -> ModuleType:
    """A benchmark script as a module, importing its sibling as it does when run."""
    spec = importlib.util.spec_from_file_location(name, BENCH / f"{name}.py")
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    before = set(sys.modules)
    sys.path.insert(0, str(BENCH))
    sys.modules[name] = module  # dataclasses look their module up while being made
    try:
        spec.loader.exec_module(module)
    finally:
        sys.path.remove(str(BENCH))
        for added in set(sys.modules) - before:
            del sys.modules[added]
    return module


@pytest.fixture(scope="module")
def smoke(tmp_path_factory: pytest.TempPathFactory) -> Smoke:
    out = tmp_path_factory.mktemp("bench") / "figures.json"
    run = subprocess.run(
        [sys.executable, str(BENCH / "run.py"), "--smoke", "--json", str(out)],
        capture_output=True, text=True, timeout=600, check=False,
    )
    doc = json.loads(out.read_text(encoding="utf-8")) if out.exists() else {"rows": []}
    return run, {r["key"]: r for r in doc["rows"]}


def test_smoke_run_measures_every_figure(smoke: Smoke) -> None:
    run, rows = smoke
    assert run.returncode == 0, run.stderr[-2000:]
    missing = sorted(set(EXPECTED) - set(rows))
    assert missing == [], f"figures not printed: {[EXPECTED[k] for k in missing]}"
    for key in EXPECTED:
        row = rows[key]
        if key.endswith(".cached") and row["text"] == "no cache":
            continue  # the loader keeps no compiled cache: the row says so instead of a number
        assert row["values"], f"{key}: {row['text']}"


def test_smoke_table_prints_each_row_with_target_and_verdict(smoke: Smoke) -> None:
    run, rows = smoke
    lines = run.stdout.splitlines()
    for key in EXPECTED:
        row = rows[key]
        line = next((ln for ln in lines if ln.startswith(str(row["label"]))), None)
        assert line is not None, f"{key}: no line for {row['label']!r}"
        if row["target"] is not None:
            assert str(row["target"]) in line
            assert line.rstrip().endswith(("PASS*", "FAIL*")), line
        else:
            assert line.rstrip().endswith("-"), line


@pytest.mark.parametrize("name", ["workload", "run"], ids=["workload", "run"])
def test_benchmark_doctests(name: str) -> None:
    assert doctest.testmod(_load(name)).failed == 0


def test_workload_is_the_same_from_one_build_to_the_next() -> None:
    wl = _load("workload")
    words = ["alpha", "beta", "gamma", "delta", "epsilon", "zeta"]
    terms = wl.make_terms(300, seed=7)
    assert terms == wl.make_terms(300, seed=7)
    assert len(set(terms)) == 300
    a = wl.make_pairs(200, words=words, terms=terms, seed=7)
    assert a == wl.make_pairs(200, words=words, terms=terms, seed=7)
    assert all(p.source != p.proposal for p in a)
    assert all(3 <= len(p.source.split()) <= 8 for p in a)
    assert any(p.touches_term for p in a) and not all(p.touches_term for p in a)


def test_the_instruction_count_child_checks_the_pairs_it_is_given(tmp_path: Path) -> None:
    # instructions.py runs this child under valgrind (minutes, so not here); the child
    # itself must keep working: load, warm up, check changed and unchanged pairs
    pairs = tmp_path / "pairs.json"
    pairs.write_text(json.dumps([["teh pump", "the pump"], ["bilge pmup", "bilge pump"]] * 3))
    for what in ("none", "changed", "unchanged"):
        run = subprocess.run(
            [sys.executable, str(BENCH / "instructions.py"), "--inner", "base", str(pairs),
             what, "2"],
            capture_output=True, text=True, timeout=300, check=False,
        )  # fmt: skip
        assert run.returncode == 0, run.stderr


def test_the_tail_script_keeps_the_slowest_pairs_and_times_them_again(tmp_path: Path) -> None:
    # tail.py times the slowest 1% of changed pairs; what is checked is that it runs, keeps
    # that 1% (of 300 pairs: 3) and times exactly those again, never how fast they were
    kept = tmp_path / "tail.json"
    cmd = [sys.executable, str(BENCH / "tail.py"), "--pairs", "300", "--terms", "300",
           "--rounds", "1"]  # fmt: skip
    first = subprocess.run(
        [*cmd, "--save-tail", str(kept)], capture_output=True, text=True, timeout=300, check=False
    )
    assert first.returncode == 0, first.stderr[-2000:]
    slow = json.loads(kept.read_text(encoding="utf-8"))
    assert len(slow) == 3 and all(source != proposal for source, proposal in slow)
    again = subprocess.run(
        [*cmd, "--tail", str(kept)], capture_output=True, text=True, timeout=300, check=False
    )
    assert again.returncode == 0, again.stderr[-2000:]
    assert "the 3 pairs of tail.json:" in again.stdout
    assert "check: mean" in again.stdout and "align: mean" in again.stdout
