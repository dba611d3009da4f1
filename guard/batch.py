"""Check a stream of records, in input order, in this process or spread over several.

Every record in gives exactly one ``Outcome`` out, in the same order: a report, or the
reason it has none (it could not be read, it is over a limit, or the engine failed on it).
The batch never stops for one record. With ``jobs > 1`` records go to a pool of worker
processes, each of which loads the ruleset once; results come back in order, so the
output is the same byte for byte as with one job. A worker that dies (a crash in native
code, say) breaks the pool: the records it may have held are checked again one by one in a
fresh pool, and the one that breaks it again is reported as an error outcome. Nothing waits
forever on a dead worker.

This module never prints; it only turns records into outcomes and counts them.
"""

from __future__ import annotations

import functools
import gc
import multiprocessing
import signal
from collections import Counter, deque
from collections.abc import Callable, Iterable, Iterator, Mapping, Sequence
from concurrent.futures import Future, ProcessPoolExecutor
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass, field

from guard.errors import RecordError
from guard.io.read import ErrorRecord, InputRecord, Limits
from guard.records import Finding, Report, TokenKind, Verdict, quick_init
from guard.text.tokenize import spans

CRASHED = "the worker process checking this record died"
TIMED_OUT = "the worker checking this record took too long and was stopped"
NO_WORKERS = "not checked: worker processes kept dying at once; run with one job to see why"
_MAX_DEAD_STARTS = 3


@quick_init
@dataclass(frozen=True, slots=True, kw_only=True)
class Digest:
    """What ``guard filter`` keeps of a report: the verdicts, the two guarded texts and
    what a run's tally counts. A worker process sends this instead of the whole report,
    which costs more to pickle and unpickle than the check itself, in the main process
    that every worker waits on."""

    lang: str
    verdict: Verdict
    rewrite_verdicts: tuple[Verdict, ...]
    guarded: str
    guarded_strict: str
    tallied: tuple[tuple[str, str, str], ...]  # (rule, action, term or "") per finding

    @classmethod
    def of(cls, report: Report) -> Digest:
        return cls(
            lang=report.lang,
            verdict=report.verdict,
            rewrite_verdicts=tuple(rv.verdict for rv in report.rewrites),
            guarded=report.guarded,
            guarded_strict=report.guarded_strict,
            tallied=tuple(_tallied(f) for f in report.findings),
        )

    def guarded_text(self, *, undo_flagged: bool = False) -> str:
        return self.guarded_strict if undo_flagged else self.guarded


def _tallied(f: Finding) -> tuple[str, str, str]:
    term = f.evidence.get("term")
    return f.rule, f.action.value, term if isinstance(term, str) else ""


@quick_init
@dataclass(frozen=True, slots=True, kw_only=True)
class Outcome:
    """One record and what came of it: a ``report`` (or, when the batch was asked for
    digests, a ``digest``), or an ``error`` saying why not."""

    record: InputRecord | ErrorRecord
    report: Report | None = None
    error: str | None = None
    digest: Digest | None = None


@quick_init
@dataclass(frozen=True, slots=True, kw_only=True)
class Job:
    """What a worker needs to check one pair (records stay in the main process)."""

    source: str
    proposal: str
    lang: str | None
    score: float | None


Checker = Callable[[Job], Report]
"""Checks one pair; may raise, and the batch turns that into an error outcome."""

CheckerFactory = Callable[..., Checker]
"""Builds a checker from ruleset references (and ``overrides=`` when there are any), once
per process. Must be picklable."""


def guard_checker(
    ruleset_refs: tuple[str, ...], overrides: Mapping[str, object] | None = None
) -> Checker:
    """The engine's checker for these rulesets (raises RulesetError when they are bad).

    ``overrides`` are settings by key path (``rules.edit-budget.action``), applied last.
    Meant for a batch process: it calls ``gc.freeze()`` once the ruleset is loaded, which
    leaves everything alive at that moment out of later garbage collections.
    """
    from guard.api import Guard, load_ruleset

    engine = Guard(load_ruleset(*ruleset_refs, overrides=overrides))
    # The ruleset and word lists live as long as the batch: the cyclic garbage collector
    # need not walk them again each time it looks at the oldest generation (one such walk
    # took 76 ms with 100k terms, a p99 spike for whichever record triggered it).
    gc.collect()
    gc.freeze()

    def check(job: Job) -> Report:
        return engine.check(job.source, job.proposal, lang=job.lang, score=job.score)

    return check


def count_tokens(text: str, limit: int) -> int:
    """Tokens of ``text`` that are not spaces, counting no further than ``limit + 1``.

    >>> count_tokens("bilge pump XR-220", 100)
    3
    """
    n = 0
    for _, _, kind in spans(text):
        if kind is not TokenKind.SPACE:
            n += 1
            if n > limit:
                break
    return n


def check_records(
    records: Iterable[InputRecord | ErrorRecord],
    ruleset_refs: Sequence[str],
    *,
    jobs: int = 1,
    lang_default: str | None = None,
    limits: Limits | None = None,
    overrides: Mapping[str, object] | None = None,
    checker: Checker | None = None,
    checker_factory: CheckerFactory = guard_checker,
    chunk_size: int = 16,
    mp_context: str | None = None,
    record_timeout: float | None = None,
    digests: bool = False,
) -> Iterator[Outcome]:
    """One outcome per record, in order.

    ``digests``: outcomes carry a ``Digest`` of each report instead of the report (what
    ``guard filter`` needs; with ``jobs > 1`` the workers make them).

    ``checker`` is the in-process checker to use with one job (built from
    ``checker_factory`` when not given); with ``jobs > 1`` every worker builds its own
    with ``checker_factory(ruleset_refs)``. ``lang_default`` is the language of records
    that name none (None: the ruleset's first language). ``overrides`` are ruleset
    settings by key path, passed to the factory. ``record_timeout`` (seconds, with
    ``jobs > 1`` only) ends a worker stuck on one record and makes that record an error.
    """
    lim = limits or Limits()
    refs = tuple(ruleset_refs)
    if overrides:
        checker_factory = functools.partial(checker_factory, overrides=dict(overrides))
    prepared = (_prepare(r, lang_default, lim) for r in records)
    if jobs <= 1:
        check = checker if checker is not None else checker_factory(refs)
        for record, job, error in prepared:
            if job is None:
                yield Outcome(record=record, error=error)
            else:
                yield _outcome(record, _run(check, job, digests))
        return
    pool = _Pool(refs, jobs, checker_factory, chunk_size, mp_context, record_timeout, digests)
    yield from pool.run(prepared)


_Prepared = tuple[InputRecord | ErrorRecord, Job | None, str | None]


def _prepare(record: InputRecord | ErrorRecord, lang_default: str | None, lim: Limits) -> _Prepared:
    if isinstance(record, ErrorRecord):
        return record, None, record.reason
    for name, text in (("source", record.source), ("proposal", record.proposal)):
        if len(text) <= lim.max_tokens:
            continue  # every token holds at least one character
        n = count_tokens(text, lim.max_tokens)
        if n > lim.max_tokens:
            return record, None, f"the {name} has more than {lim.max_tokens} tokens"
    job = Job(
        source=record.source,
        proposal=record.proposal,
        lang=record.lang or lang_default,
        score=record.score,
    )
    return record, job, None


def _run(check: Checker, job: Job, digests: bool) -> Report | Digest | str:
    """The report (or its digest), or the reason the engine gave none. The batch must go
    on either way."""
    try:
        report = check(job)
        return Digest.of(report) if digests else report
    except RecordError as e:
        return e.reason
    except RecursionError:
        return "the engine ran out of stack on this record"
    except Exception as e:  # any engine fault is this record's error, not the batch's
        return f"the engine failed: {type(e).__name__}: {e}"


def _outcome(record: InputRecord | ErrorRecord, result: Report | Digest | str) -> Outcome:
    if isinstance(result, str):
        return Outcome(record=record, error=result)
    if isinstance(result, Digest):
        return Outcome(record=record, digest=result)
    return Outcome(record=record, report=result)


# The checker of a worker process, set once by the pool's initializer: a process pool
# gives no other place to keep per-process state between tasks.
_WORKER_CHECK: Checker | None = None
# A checker the parent built before forking, with the factory and refs it came from:
# forked workers take it as it is (copy-on-write) instead of loading the ruleset again.
_FORKED: tuple[CheckerFactory, tuple[str, ...], Checker] | None = None


def _start_method() -> str:
    """fork where there is one: workers then inherit the lexicons the parent loaded, which
    otherwise cost each worker seconds; the CLI runs no threads that fork could break."""
    methods = multiprocessing.get_all_start_methods()
    for method in ("fork", "forkserver", "spawn"):
        if method in methods:
            return method
    return "spawn"


def _build_before_fork(factory: CheckerFactory, refs: tuple[str, ...]) -> None:
    """Build the checker (ruleset, word frequencies) once in the parent, for every forked
    worker to inherit; a ruleset error is left for each worker to report."""
    global _FORKED
    try:
        _FORKED = (factory, refs, factory(refs))
    except Exception:
        _FORKED = None


def _init_worker(factory: CheckerFactory, refs: tuple[str, ...]) -> None:
    global _WORKER_CHECK
    # Ctrl-C goes to the whole process group; only the main process decides what to do.
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    forked = _FORKED
    if forked is not None and forked[0] is factory and forked[1] == refs:
        _WORKER_CHECK = forked[2]
    else:
        _WORKER_CHECK = factory(refs)


def _work(jobs: list[Job | None], digests: bool) -> list[Report | Digest | str | None]:
    check = _WORKER_CHECK
    if check is None:
        return ["the worker process has no ruleset loaded" if j else None for j in jobs]
    return [None if j is None else _run(check, j, digests) for j in jobs]


_Results = list[Report | Digest | str | None]


@dataclass(slots=True)
class _Pool:
    """A process pool that is replaced when a worker dies, and given up on when fresh
    pools keep dying before they check anything (a worker that cannot even start)."""

    refs: tuple[str, ...]
    jobs: int
    factory: CheckerFactory
    chunk_size: int
    mp_context: str | None
    timeout: float | None  # seconds a record may take in a worker
    digests: bool  # workers send digests, not reports
    generation: int = 0
    executor: ProcessPoolExecutor | None = None
    produced: bool = False  # has the current pool returned any result?
    dead_starts: int = 0  # pools in a row that died before returning anything
    usable: bool = True

    def _renew(self) -> None:
        if self.executor is not None:
            self.executor.shutdown(wait=False, cancel_futures=True)
            self.executor = None
        if not self.usable:
            return
        method = self.mp_context or _start_method()
        if method == "fork" and self.generation == 0:
            _build_before_fork(self.factory, self.refs)
        self.executor = ProcessPoolExecutor(
            max_workers=self.jobs,
            mp_context=multiprocessing.get_context(method),
            initializer=_init_worker,
            initargs=(self.factory, self.refs),
        )
        self.generation += 1
        self.produced = False

    def _broken(self) -> None:
        """The current pool died: start another, unless pools keep dying at once."""
        if not self.produced:
            self.dead_starts += 1
            if self.dead_starts >= _MAX_DEAD_STARTS:
                self.usable = False
        self._renew()

    def _got_result(self) -> None:
        self.produced = True
        self.dead_starts = 0

    def run(self, prepared: Iterator[_Prepared]) -> Iterator[Outcome]:
        window: deque[tuple[list[_Prepared], Future[_Results] | None, int]] = deque()
        self._renew()
        try:
            exhausted = False
            while True:
                while not exhausted and len(window) < self.jobs * 4:
                    chunk = _take(prepared, self.chunk_size)
                    if not chunk:
                        exhausted = True
                        break
                    future = self._submit([j for _, j, _ in chunk])
                    window.append((chunk, future, self.generation))
                if not window:
                    return
                chunk, future, generation = window.popleft()
                results = self._results(chunk, future, generation)
                for (record, job, error), result in zip(chunk, results, strict=True):
                    if job is None or result is None:
                        yield Outcome(record=record, error=error)
                    else:
                        yield _outcome(record, result)
        finally:
            if self.executor is not None:
                self.executor.shutdown(wait=False, cancel_futures=True)

    def _results(
        self, chunk: list[_Prepared], future: Future[_Results] | None, generation: int
    ) -> _Results:
        if future is not None:
            limit = None if self.timeout is None else self.timeout * len(chunk)
            try:
                results = future.result(timeout=limit)
            except BrokenProcessPool:
                if generation == self.generation:
                    self._broken()
            except TimeoutError:
                self._stop_workers()
                self._renew()
            else:
                self._got_result()
                return results
        return self._one_by_one(chunk)

    def _stop_workers(self) -> None:
        """End the current pool's processes: one of them is stuck on a record.

        ProcessPoolExecutor offers no way to stop a running task before Python 3.14
        (``terminate_workers``); before that, its worker processes are ended directly.
        """
        executor = self.executor
        if executor is None:
            return
        terminate = getattr(executor, "terminate_workers", None)
        if callable(terminate):
            terminate()
            return
        processes = getattr(executor, "_processes", None) or {}
        for process in list(processes.values()):
            process.terminate()

    def _submit(self, jobs: list[Job | None]) -> Future[_Results] | None:
        for _ in range(2):
            if self.executor is None:
                return None
            try:
                return self.executor.submit(_work, jobs, self.digests)
            except BrokenProcessPool:
                self._broken()
        return None

    def _one_by_one(self, chunk: list[_Prepared]) -> _Results:
        """Check a chunk record by record, so that a record that kills a worker is named."""
        out: _Results = []
        for _, job, _ in chunk:
            if job is None:
                out.append(None)
                continue
            future = self._submit([job])
            if future is None:
                out.append(NO_WORKERS)
                continue
            try:
                out.append(future.result(timeout=self.timeout)[0])
            except BrokenProcessPool:
                out.append(CRASHED)
                self._broken()
            except TimeoutError:
                out.append(f"{TIMED_OUT} ({self.timeout:g} s)")
                self._stop_workers()
                self._renew()
            else:
                self._got_result()
        return out


def _take(it: Iterator[_Prepared], n: int) -> list[_Prepared]:
    out: list[_Prepared] = []
    for item in it:
        out.append(item)
        if len(out) >= n:
            break
    return out


@dataclass(slots=True)
class Summary:
    """The tally of a run: it must reconcile, ``read == written == checked + errors``.

    ``rules`` counts findings by (rule, action), ``terms`` the evidence ``term`` of
    findings (the protected terms most often in the way), ``languages`` pair verdicts by
    language. Findings an allowed pair set aside are not counted.
    """

    read: int = 0
    written: int = 0
    checked: int = 0
    errors: int = 0
    verdicts: Counter[str] = field(default_factory=Counter)
    rewrite_verdicts: Counter[str] = field(default_factory=Counter)
    rules: Counter[tuple[str, str]] = field(default_factory=Counter)
    terms: Counter[str] = field(default_factory=Counter)
    languages: Counter[tuple[str, str]] = field(default_factory=Counter)

    def add(self, outcome: Outcome) -> None:
        report = outcome.report
        digest = outcome.digest if report is None else Digest.of(report)
        # The counts that must reconcile change together, after every call: CPython runs
        # a signal handler (Ctrl-C) only at a call or a backward jump (its eval breaker,
        # from memory), so an interrupt cannot land between them.
        if digest is None:
            self.read += 1
            self.errors += 1
            return
        self.read += 1
        self.checked += 1
        self.verdicts[digest.verdict.value] += 1
        self.languages[(digest.lang, digest.verdict.value)] += 1
        for verdict in digest.rewrite_verdicts:
            self.rewrite_verdicts[verdict.value] += 1
        for rule, action, term in digest.tallied:
            self.rules[(rule, action)] += 1
            if term:
                self.terms[term] += 1

    @property
    def reconciles(self) -> bool:
        return self.read == self.written == self.checked + self.errors

    def worst(self) -> Verdict | None:
        """The worst pair verdict seen, or None when nothing was checked."""
        seen = [Verdict(v) for v, n in self.verdicts.items() if n]
        return Verdict.worst(seen) if seen else None

    def line(self) -> str:
        """One line for a person or a log.

        >>> s = Summary(read=3, written=3, checked=2, errors=1)
        >>> s.verdicts.update({"accept": 1, "veto": 1})
        >>> s.line()
        'read 3, written 3, checked 2, errors 1; pairs: accept 1, flag 0, veto 1'
        """
        tally = ", ".join(f"{v.value} {self.verdicts[v.value]}" for v in Verdict)
        return (
            f"read {self.read}, written {self.written}, checked {self.checked}, "
            f"errors {self.errors}; pairs: {tally}"
        )
