"""The Python API: load a ruleset, check pairs, wrap any speller.

>>> g = Guard(load_ruleset("base"))
>>> g.check("Send the JSON file", "Send the Jason file", lang="en").verdict
<Verdict.VETO: 'veto'>
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path

from guard.engine import Engine
from guard.records import Report, Verdict
from guard.ruleset import load_ruleset as _load
from guard.ruleset.model import CompiledRuleset

Candidates = Sequence[tuple[str, float]]
Speller = Callable[[str], "str | Candidates"]

__all__ = ["Guard", "GuardedResult", "GuardedSpeller", "load_ruleset"]


def load_ruleset(
    *refs: str | Path,
    overrides: Mapping[str, object] | None = None,
    allow_outside: bool = False,
) -> CompiledRuleset:
    """Load and compile rulesets by bundled name or path (several refs act as one).

    Raises guard.errors.RulesetError listing every problem found.
    """
    return _load(*(refs or ("base",)), overrides=overrides, allow_outside=allow_outside)


class Guard(Engine):
    """Checks (source, proposal) pairs against one ruleset. Safe to share across threads.

    ``check(source, proposal, lang=..., score=...)`` is the engine's own (no layer in
    between: a wrapped speller calls it once per query).
    """

    __slots__ = ()

    def __init__(self, ruleset: CompiledRuleset | str | Path = "base") -> None:
        super().__init__(ruleset if isinstance(ruleset, CompiledRuleset) else load_ruleset(ruleset))

    def wrap(
        self, speller: Speller, *, lang: str | None = None, undo_flagged: bool = False
    ) -> GuardedSpeller:
        """A speller that returns guarded output: ``guard.wrap(my_speller)("teh")``."""
        return GuardedSpeller(self, speller, lang=lang, undo_flagged=undo_flagged)


@dataclass(frozen=True, slots=True, kw_only=True)
class GuardedResult:
    """What a wrapped speller did: the text it returns and the report behind it."""

    text: str
    report: Report


class GuardedSpeller:
    """Calls a speller, then the guard. For n-best spellers (a list of (text, score)), the
    best-scored candidate the guard does not veto wins; when all are vetoed, the top one's
    guarded text is returned (its vetoed rewrites undone)."""

    __slots__ = ("_guard", "_lang", "_speller", "_undo_flagged")

    def __init__(
        self, guard: Guard, speller: Speller, *, lang: str | None, undo_flagged: bool
    ) -> None:
        self._guard = guard
        self._speller = speller
        self._lang = lang
        self._undo_flagged = undo_flagged

    def __call__(self, text: str) -> str:
        return self.run(text).text

    def run(self, text: str) -> GuardedResult:
        out = self._speller(text)
        if isinstance(out, str):
            candidates: list[tuple[str, float | None]] = [(out, None)]
        else:
            candidates = sorted(((c, float(s)) for c, s in out), key=lambda cs: -(cs[1] or 0.0))
        if not candidates:
            candidates = [(text, None)]
        first: Report | None = None
        for cand, score in candidates:
            report = self._guard.check(text, cand, lang=self._lang, score=score)
            first = first or report
            if report.verdict is not Verdict.VETO:
                return GuardedResult(
                    text=report.guarded_text(undo_flagged=self._undo_flagged), report=report
                )
        assert first is not None
        return GuardedResult(text=first.guarded_text(undo_flagged=self._undo_flagged), report=first)
