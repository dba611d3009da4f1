"""Rulesets: read them (load), compile them for matching (compile), find terms (terms),
know word frequencies (lexicon), find the bundled ones (bundled).

>>> from guard.ruleset import load_ruleset  # doctest: +SKIP
>>> load_ruleset("base").name  # doctest: +SKIP
'base'
"""

from __future__ import annotations

from collections.abc import Mapping
from pathlib import Path

from guard.errors import Problem
from guard.ruleset.compile import compile_ruleset
from guard.ruleset.load import Limits, ResolvedRuleset, load_sources, resolve
from guard.ruleset.model import CompiledRuleset

__all__ = [
    "CompiledRuleset",
    "Limits",
    "ResolvedRuleset",
    "compile_ruleset",
    "load_problems",
    "load_ruleset",
    "load_sources",
]


def load_ruleset(
    *refs: str | Path,
    overrides: Mapping[str, object] | None = None,
    allow_outside: bool = False,
) -> CompiledRuleset:
    """Load, check and compile rulesets by bundled name or path; several act as one.

    Raises guard.errors.RulesetError listing every problem found.
    """
    return compile_ruleset(
        load_sources(refs or ("base",), overrides=overrides, allow_outside=allow_outside)
    )


def load_problems(path: str | Path, *, allow_outside: bool = False) -> list[Problem]:
    """Every error and lint warning of the ruleset at ``path`` (for `rules lint`); never raises
    for the ruleset's own faults."""
    _, errors, warnings = resolve([path], allow_outside=allow_outside, lint=True)
    return [*errors, *warnings]
