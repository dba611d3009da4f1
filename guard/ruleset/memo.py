"""A bounded memo whose lookup is a dict lookup in C: for the per-token questions rules ask
of a ruleset (is this a protected term? how common is this word?) on every rewrite.

``Memo(compute, size).__getitem__`` answers a key seen lately at the cost of a dict
lookup, and calls ``compute`` (Python) only for a key not yet seen. When ``size`` keys are
held, the memo is emptied and fills again: real traffic repeats its words, so the
working set comes back at once. Any thread may empty it; no answer depends on it.
"""

from __future__ import annotations

from collections.abc import Callable, Hashable
from typing import Generic, TypeVar

K = TypeVar("K", bound=Hashable)
V = TypeVar("V")


class Memo(dict[K, V], Generic[K, V]):
    """``compute(key)``, remembered for the last up to ``size`` keys.

    >>> calls = []
    >>> m = Memo(lambda k: calls.append(k) or len(k), size=2)
    >>> m["ab"], m["ab"], m["abc"], calls
    (2, 2, 3, ['ab', 'abc'])
    >>> m["x"], len(m)  # full: emptied, then "x" kept
    (1, 1)
    """

    __slots__ = ("_compute", "_size")

    def __init__(self, compute: Callable[[K], V], size: int) -> None:
        super().__init__()
        self._compute = compute
        self._size = size

    def __missing__(self, key: K) -> V:
        got = self._compute(key)
        if len(self) >= self._size:
            self.clear()
        self[key] = got
        return got
