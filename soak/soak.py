"""Soak run: stream many generated records through `guard filter` and watch its memory.

A release gate that grows with its input will one day be killed half-way through a batch.
This script feeds ``--records`` generated records (made on the fly and written into a
pipe: nothing lands on disk) to ``guard filter`` running as a child process, reads its
output as it comes, and every second samples the guard process's resident memory from
``/proc/<pid>/status`` (``VmRSS`` now, ``VmHWM`` the peak so far; Linux only). Worker
processes under ``--jobs`` are sampled too and reported as one total.

It checks that nothing was lost: one output line per input line, in order, each good
record back with its ``id`` and a ``guarded`` text, each deliberately broken line (one in
every ``--bad-every``) back as an error record naming its line. At the end it prints a
table of memory at 10 %, 50 % and 100 % of the input and says whether the peak stayed
flat. Exit 0 when every record came back and memory stayed flat, 1 otherwise.

Not part of the test suite (it takes minutes). Run it from the repository root::

    .venv/bin/python soak/soak.py                       # one million records
    .venv/bin/python soak/soak.py --records 200000 --jobs 2

The texts are invented: short sentences about an imaginary parts depot, with typos a
speller would fix and a few rewrites the guard refuses.
"""

from __future__ import annotations

import argparse
import contextlib
import json
import os
import platform
import random
import shutil
import subprocess
import sys
import threading
import time
from collections.abc import Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import IO

_WORDS = [
    "the",
    "pump",
    "housing",
    "ships",
    "from",
    "depot",
    "four",
    "on",
    "monday",
    "with",
    "a",
    "spare",
    "gasket",
    "and",
    "two",
    "bolts",
    "the",
    "valve",
    "seat",
    "needs",
    "a",
    "new",
    "seal",
    "before",
    "the",
    "pressure",
    "test",
    "at",
    "noon",
]
_TYPOS = {
    "the": "teh",
    "pump": "pmup",
    "housing": "housnig",
    "spare": "sapre",
    "gasket": "gakset",
    "valve": "vlave",
    "pressure": "presure",
    "before": "bfeore",
    "monday": "mnoday",
}
_FLAT_RATIO = 1.25
"""Peak memory at the end may be at most this much above the peak at 10 % of the input.
A judgement, not a standard (common practice, no source): startup and the first records
load everything that is loaded once; after that a streaming filter should not grow."""
_FLAT_SLACK_MIB = 16.0
"""Absolute slack on top of the ratio, for allocator noise on a small process."""


def make_record(i: int, rng: random.Random, bad_every: int) -> bytes:
    """Line ``i`` of the input: a JSON record with ``id`` = i, or a broken line."""
    if bad_every and i % bad_every == bad_every - 1:
        return b'{"id": ' + str(i).encode() + b', "source": "unterminated\n'
    words = [rng.choice(_WORDS) for _ in range(rng.randint(4, 14))]
    source = list(words)
    for k, w in enumerate(words):
        if w in _TYPOS and rng.random() < 0.3:
            source[k] = _TYPOS[w]
    proposal = list(words)
    if rng.random() < 0.05:  # a rewrite the guard should refuse: a number changed
        source.append("4")
        proposal.append("40")
    record = {"id": i, "source": " ".join(source), "proposal": " ".join(proposal)}
    return json.dumps(record).encode() + b"\n"


@dataclass(slots=True)
class Progress:
    """Counters shared by the feeding and reading threads and the sampler."""

    written: int = 0
    read: int = 0
    problems: list[str] = field(default_factory=list)
    errors_seen: int = 0
    done_reading: threading.Event = field(default_factory=threading.Event)


@dataclass(frozen=True, slots=True)
class Sample:
    elapsed: float
    read: int
    rss_kib: int
    hwm_kib: int
    workers_rss_kib: int


def feed(out: IO[bytes], total: int, seed: int, bad_every: int, progress: Progress) -> None:
    rng = random.Random(seed)
    try:
        batch: list[bytes] = []
        for i in range(total):
            batch.append(make_record(i, rng, bad_every))
            if len(batch) == 256:
                out.write(b"".join(batch))
                progress.written += len(batch)
                batch = []
        if batch:
            out.write(b"".join(batch))
            progress.written += len(batch)
    except BrokenPipeError:
        progress.problems.append(f"guard closed its input after {progress.written} records")
    finally:
        with contextlib.suppress(BrokenPipeError):
            out.close()


def check_output(
    lines: Iterator[bytes], total: int, bad_every: int, progress: Progress, keep: int = 20
) -> None:
    """Each output line must answer the input line of the same number."""
    for line in lines:
        i = progress.read
        progress.read += 1
        if i >= total:
            _problem(progress, f"output line {i + 1} has no input line", keep)
            continue
        try:
            record = json.loads(line)
        except json.JSONDecodeError:
            _problem(progress, f"output line {i + 1} is not JSON", keep)
            continue
        if bad_every and i % bad_every == bad_every - 1:
            error = record.get("error") if isinstance(record, dict) else None
            if not isinstance(error, dict) or error.get("line") != i + 1:
                _problem(progress, f"output line {i + 1}: expected an error record", keep)
            else:
                progress.errors_seen += 1
        elif record.get("id") != i or "guarded" not in record:
            _problem(progress, f"output line {i + 1}: expected id {i} with guarded text", keep)
    progress.done_reading.set()


def _problem(progress: Progress, message: str, keep: int) -> None:
    if len(progress.problems) < keep:
        progress.problems.append(message)


def status_kib(pid: int) -> tuple[int, int]:
    """(VmRSS, VmHWM) of a process in KiB from /proc (proc(5)); (0, 0) once it is gone."""
    rss = hwm = 0
    try:
        text = Path(f"/proc/{pid}/status").read_text()
    except OSError:
        return 0, 0
    for line in text.splitlines():
        if line.startswith("VmRSS:"):
            rss = int(line.split()[1])
        elif line.startswith("VmHWM:"):
            hwm = int(line.split()[1])
    return rss, hwm


def children(pid: int) -> list[int]:
    out: list[int] = []
    try:
        tasks = list(Path(f"/proc/{pid}/task").iterdir())
    except OSError:
        return out
    for task in tasks:
        try:
            out.extend(int(c) for c in (task / "children").read_text().split())
        except OSError:
            continue
    return out


def guard_command() -> list[str]:
    here = Path(__file__).resolve().parents[1]
    exe = here / ".venv" / "bin" / "guard"
    if exe.exists():
        return [str(exe)]
    found = shutil.which("guard")
    if found:
        return [found]
    return [sys.executable, "-m", "guard.cli.main"]


def run(total: int, jobs: int, rules: str, seed: int, bad_every: int) -> int:
    cmd = [*guard_command(), "filter", "--rules", rules, "--jobs", str(jobs)]
    env = {**os.environ, "NO_COLOR": "1"}
    started = time.monotonic()
    proc = subprocess.Popen(
        cmd, stdin=subprocess.PIPE, stdout=subprocess.PIPE, stderr=subprocess.PIPE, env=env
    )
    assert proc.stdin is not None and proc.stdout is not None and proc.stderr is not None
    progress = Progress()
    stderr_tail: list[bytes] = []

    def drain_stderr() -> None:
        assert proc.stderr is not None
        for line in proc.stderr:
            stderr_tail.append(line)
            del stderr_tail[:-50]

    threads = [
        threading.Thread(
            target=feed, args=(proc.stdin, total, seed, bad_every, progress), daemon=True
        ),
        threading.Thread(
            target=check_output, args=(iter(proc.stdout), total, bad_every, progress), daemon=True
        ),
        threading.Thread(target=drain_stderr, daemon=True),
    ]
    for t in threads:
        t.start()
    samples: list[Sample] = []
    while not progress.done_reading.wait(1.0):
        rss, hwm = status_kib(proc.pid)
        workers = sum(status_kib(c)[0] for c in children(proc.pid))
        samples.append(Sample(time.monotonic() - started, progress.read, rss, hwm, workers))
        if samples[-1].elapsed > 0 and len(samples) % 60 == 0:
            print(
                f"  {samples[-1].elapsed:7.0f} s  {progress.read:>9} records out  "
                f"RSS {rss / 1024:6.1f} MiB  peak {hwm / 1024:6.1f} MiB",
                file=sys.stderr,
                flush=True,
            )
    code = proc.wait()
    elapsed = time.monotonic() - started
    for t in threads:
        t.join(timeout=10)
    return report(total, jobs, elapsed, samples, progress, code, stderr_tail, bad_every)


def _at(samples: list[Sample], count: int) -> Sample | None:
    """The first sample taken once ``count`` records had come out (else the last one)."""
    for s in samples:
        if s.read >= count:
            return s
    return samples[-1] if samples else None


def report(
    total: int,
    jobs: int,
    elapsed: float,
    samples: list[Sample],
    progress: Progress,
    code: int,
    stderr_tail: list[bytes],
    bad_every: int,
) -> int:
    expected_errors = total // bad_every if bad_every else 0
    print(f"guard filter soak: {total} records, --jobs {jobs}, {time.strftime('%Y-%m-%d')}")
    print(
        f"machine: {platform.machine()}, {os.cpu_count()} cores, Python {platform.python_version()}"
    )
    print(f"time: {elapsed:.0f} s ({total / elapsed:.0f} records/s); exit code {code}")
    print()
    print(
        "| input done | records out | seconds | RSS MiB | peak RSS MiB "
        "| workers RSS MiB (highest so far) |"
    )
    print("|---|---|---|---|---|---|")
    rows: dict[str, Sample] = {}
    for label, share in (("10 %", 0.1), ("50 %", 0.5), ("100 %", 1.0)):
        s = _at(samples, int(total * share)) if share < 1.0 else (samples[-1] if samples else None)
        if s is None:
            continue
        rows[label] = s
        workers = max(x.workers_rss_kib for x in samples if x.elapsed <= s.elapsed)
        print(
            f"| {label} | {s.read} | {s.elapsed:.0f} | {s.rss_kib / 1024:.1f} | "
            f"{s.hwm_kib / 1024:.1f} | {workers / 1024:.1f} |"
        )
    print()
    ok = True
    lost = total - progress.read
    print(
        f"records in {progress.written}, out {progress.read}; error records "
        f"{progress.errors_seen} of {expected_errors} planted"
    )
    if lost or progress.problems or progress.errors_seen != expected_errors:
        ok = False
        for p in progress.problems:
            print(f"  problem: {p}")
    first, last = rows.get("10 %"), rows.get("100 %")
    if first is not None and last is not None:
        limit = first.hwm_kib * _FLAT_RATIO + _FLAT_SLACK_MIB * 1024
        flat = last.hwm_kib <= limit
        print(
            f"peak memory {first.hwm_kib / 1024:.1f} MiB at 10 % -> {last.hwm_kib / 1024:.1f} "
            f"MiB at 100 %: {'flat' if flat else 'GROWS'}"
        )
        ok = ok and flat
    expected_code = 1 if expected_errors else 0  # filter exits 1 when a record is an error
    if code != expected_code:
        ok = False
        print(f"guard exited {code}, expected {expected_code}; its last stderr lines:")
        for line in stderr_tail[-10:]:
            print("  " + line.decode("utf-8", "replace").rstrip())
    elif stderr_tail:
        print(stderr_tail[-1].decode("utf-8", "replace").rstrip())
    print("result:", "PASS" if ok else "FAIL")
    return 0 if ok else 1


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--records", type=int, default=1_000_000)
    parser.add_argument("--jobs", type=int, default=1)
    parser.add_argument("--rules", default="base", help="ruleset name or path")
    parser.add_argument("--seed", type=int, default=7)
    parser.add_argument(
        "--bad-every", type=int, default=1000, help="one broken line in this many (0: none)"
    )
    args = parser.parse_args(argv)
    if not Path("/proc/self/status").exists():
        parser.error("needs Linux /proc to read memory figures")
    return run(args.records, args.jobs, args.rules, args.seed, args.bad_every)


if __name__ == "__main__":
    sys.exit(main())
