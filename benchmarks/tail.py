"""The slowest changed pairs of the benchmark, timed on their own.

    .venv/bin/python benchmarks/tail.py                        # about a minute
    .venv/bin/python benchmarks/tail.py --save-tail tail.json  # also keep which pairs
    .venv/bin/python benchmarks/tail.py --tail tail.json       # time those pairs again

The p99 of ``run.py`` is one number over 10,000 pairs; which pairs make it (joins and
splits next to other fixes, realigned word by word) is what a change to the slow path
must speed up. This script builds the same workload as ``run.py`` (``workload.py``, same
seed and sizes) and checks every changed pair on the thread's CPU clock: once (the first
call, which also fills the engine's memos and the lexicon's), then a few more times,
keeping each pair's fastest (the least disturbed by the machine). For both it prints the
median, the p99 and the mean of the slowest 1% of pairs; the slowest 1% of the second
are the pairs whose own work (alignment) is slow, not the ones that met a word first.

Which pairs are slowest depends on the code measured, so ``--save-tail`` writes them and
``--tail`` times exactly those, to compare two versions of the code on the same pairs:
``align`` alone and the whole check, each the fastest of ``--rounds`` calls per pair (the
check's rules then mostly come from the memo, so that figure is mostly alignment).
Nothing here asserts a time.
"""

from __future__ import annotations

import argparse
import gc
import json
import statistics
import sys
import tempfile
import time
from collections.abc import Callable, Sequence
from pathlib import Path

import workload as wl


def _fastest(
    fn: Callable[[str, str], object], pairs: Sequence[tuple[str, str]], rounds: int
) -> list[float]:
    """Each pair's least thread CPU time over ``rounds`` calls, in microseconds."""
    clock = time.thread_time_ns
    cost = min(-(clock() - clock()) for _ in range(1000))  # reading the clock is not free
    best = [float("inf")] * len(pairs)
    for _ in range(rounds):
        gc.collect()
        for k, (source, proposal) in enumerate(pairs):
            t0 = clock()
            fn(source, proposal)
            t = clock() - t0 - cost
            if t < best[k]:
                best[k] = t
    return [max(0.0, t) / 1000 for t in best]


def _p(values: Sequence[float], q: float) -> float:
    """Nearest-rank percentile (as run.py's ``percentile``)."""
    ordered = sorted(values)
    return ordered[max(0, -(-len(ordered) * q // 100) - 1)]


def _tail(values: Sequence[float]) -> float:
    """The mean of the slowest 1% of ``values``."""
    ordered = sorted(values, reverse=True)
    return statistics.fmean(ordered[: max(1, len(ordered) // 100)])


def main(argv: Sequence[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--pairs", type=int, default=10_000, help="changed pairs (default 10,000)")
    ap.add_argument("--terms", type=int, default=100_000, help="invented terms (as run.py)")
    ap.add_argument(
        "--rounds", type=int, default=5, help="calls per pair after the first; the fastest counts"
    )
    ap.add_argument("--save-tail", type=Path, help="write the slowest 1%% of pairs here")
    ap.add_argument("--tail", type=Path, help="time these pairs (a --save-tail file)")
    args = ap.parse_args(argv)

    from guard.align import align
    from guard.api import Guard, load_ruleset

    words = wl.english_words()
    gc.disable()
    try:
        terms = wl.make_terms(args.terms, avoid=frozenset(words))
        pool = wl.make_pairs(args.pairs, words=words, terms=terms)
    finally:
        gc.enable()
    with tempfile.TemporaryDirectory(prefix="guard-tail-") as tmp:
        guard = Guard(load_ruleset(str(wl.write_ruleset(Path(tmp) / "ruleset", terms))))
    del terms

    def check(source: str, proposal: str) -> object:
        return guard.check(source, proposal, lang="en")

    pairs = [(p.source, p.proposal) for p in pool]
    cold = _fastest(check, pairs, 1)
    us = _fastest(check, pairs, args.rounds)
    ranked = sorted(range(len(pairs)), key=lambda k: -us[k])
    slow = ranked[: max(1, len(pairs) // 100)]
    print(f"{len(pairs):,} changed pairs, thread CPU clock")
    for name, got in (("first call", cold), (f"fastest of {args.rounds} more", us)):
        print(f"  check, {name:>18}: median {statistics.median(got):6.1f} us, "
              f"p99 {_p(got, 99):6.1f} us, slowest 1% mean {_tail(got):6.1f} us")
    if args.save_tail:
        args.save_tail.write_text(json.dumps([pairs[k] for k in slow], indent=0), "utf-8")
    if args.tail:
        tail = [tuple(p) for p in json.loads(args.tail.read_text("utf-8"))]
        fixed: list[tuple[str, str]] = [(s, p) for s, p in tail]
        on_check = _fastest(check, fixed, args.rounds)
        on_align = _fastest(align, fixed, args.rounds)
        print(f"  the {len(fixed)} pairs of {args.tail.name}:")
        for name, got in (("check", on_check), ("align", on_align)):
            print(f"  {name:>24}: mean {statistics.fmean(got):6.1f} us, "
                  f"median {statistics.median(got):6.1f} us")
    return 0


if __name__ == "__main__":
    sys.exit(main())
