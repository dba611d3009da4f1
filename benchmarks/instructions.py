"""Instructions per check, counted by valgrind: a figure that noisy neighbours cannot move.

    .venv/bin/python benchmarks/instructions.py              # about 3 minutes
    .venv/bin/python benchmarks/instructions.py --pairs 500  # quicker, a little rougher

On a shared machine the wall-clock and even the CPU-clock figures of ``run.py`` move by a
third between runs, which hides a change of a few percent. valgrind's callgrind tool
counts the instructions a process executes instead, the same for the same code, inputs
and interpreter whatever else the machine does (seen here: equal totals twice, once with
the other core busy). The script builds the benchmark's workload (``workload.py``, same
seed), then runs a child interpreter under callgrind three times on the same ruleset:
checking no pair, N changed pairs, and N unchanged pairs, each after the same warm-up;
the differences divided by N are the instructions per pair. Fewer instructions is not
always less time (cache misses, branch mispredictions), but for pure-Python code the two
move together closely enough to choose between two versions of a function.

Needs valgrind (Debian's package). Prints one table; exits 1 when a run failed.
"""

from __future__ import annotations

import argparse
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

import workload as wl

_WARM = 1_000  # pairs checked before counting: loads frequencies, fills the memos


def _inner(ruleset: str, pairs_file: str, what: str, n: int) -> None:
    """The child: load, warm up, then check ``n`` pairs of the kind asked for."""
    from guard.api import Guard, load_ruleset

    pairs = json.loads(Path(pairs_file).read_text(encoding="utf-8"))
    guard = Guard(load_ruleset(ruleset))
    for source, proposal in pairs[:_WARM]:
        guard.check(source, proposal, lang="en")
    counted = pairs[_WARM : _WARM + n]
    if what == "changed":
        for source, proposal in counted:
            guard.check(source, proposal, lang="en")
    elif what == "unchanged":
        for source, _ in counted:
            guard.check(source, source, lang="en")


def _count(args: list[str], env: dict[str, str]) -> int:
    """Instructions callgrind counted for the child process ``args``."""
    run = subprocess.run(
        ["valgrind", "--tool=callgrind", "--callgrind-out-file=/dev/null", *args],
        capture_output=True,
        text=True,
        env=env,
        check=False,
    )
    found = re.search(r"Collected : (\d+)", run.stderr)
    if run.returncode != 0 or found is None:
        raise RuntimeError(f"callgrind run failed ({run.returncode}): {run.stderr[-400:]}")
    return int(found.group(1))


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--pairs", type=int, default=2_000, help="pairs counted (default 2,000)")
    ap.add_argument("--terms", type=int, default=10_000, help="invented terms in the ruleset")
    ap.add_argument(
        "--inner", nargs=4, metavar=("RULESET", "PAIRS", "WHAT", "N"), help=argparse.SUPPRESS
    )
    args = ap.parse_args(argv)
    if args.inner:
        ruleset, pairs_file, what, n = args.inner
        _inner(ruleset, pairs_file, what, int(n))
        return 0
    if shutil.which("valgrind") is None:
        print("instructions.py needs valgrind (apt-get install valgrind)", file=sys.stderr)
        return 1
    with tempfile.TemporaryDirectory(prefix="guard-instr-") as tmp:
        folder = Path(tmp)
        words = wl.english_words()
        terms = wl.make_terms(args.terms, avoid=frozenset(words))
        pool = wl.make_pairs(_WARM + args.pairs, words=words, terms=terms)
        toml = wl.write_ruleset(folder / "ruleset", terms)
        pairs_file = folder / "pairs.json"
        pairs_file.write_text(json.dumps([(p.source, p.proposal) for p in pool]), "utf-8")
        # a fixed hash seed: string hashes decide dict and set probing, and with them a
        # few percent of the count from one run to the next
        env = {**os.environ, "XDG_CACHE_HOME": str(folder / "cache"), "PYTHONHASHSEED": "0"}
        me = [sys.executable, str(Path(__file__).resolve()), "--inner", str(toml), str(pairs_file)]
        _count([*me, "none", "0"], env)  # fills the private cache: later runs read it
        try:
            base = _count([*me, "none", "0"], env)
            changed = _count([*me, "changed", str(args.pairs)], env)
            unchanged = _count([*me, "unchanged", str(args.pairs)], env)
        except RuntimeError as e:
            print(e, file=sys.stderr)
            return 1
    print(
        f"guard instructions per check (callgrind), {args.terms:,}-term ruleset (+ base), "
        f"{args.pairs:,} pairs after {_WARM:,} to warm up, seed {wl.SEED}"
    )
    print(f"changed pair:   {(changed - base) / args.pairs:>10,.0f} instructions")
    print(f"unchanged pair: {(unchanged - base) / args.pairs:>10,.0f} instructions")
    return 0


if __name__ == "__main__":
    sys.exit(main())
