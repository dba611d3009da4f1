"""Compile a resolved ruleset into the read-only form every check shares.

Compiling builds what matching needs once: the term tables, the pair and critical-word
tables keyed by folded text, and a lexicon provider that loads a language's word
frequencies the first time a pair in that language asks. The result holds no mutable
state a check could change, so one CompiledRuleset serves any number of threads.
"""

from __future__ import annotations

from collections.abc import Iterable
from types import MappingProxyType

from guard.ruleset.lexicon import Lexicon, get_lexicon
from guard.ruleset.load import ResolvedRuleset
from guard.ruleset.model import CompiledRuleset, PairEntry, TermEntry
from guard.ruleset.terms import TermMatcher


class LexiconProvider:
    """Word frequencies by language, loaded on first use through the cached ``get_lexicon``.

    It keeps nothing itself: ``get_lexicon`` is a process-wide cached loader, safe to call
    from several threads (at worst two threads build the same lexicon once each).
    """

    __slots__ = ()

    def get(self, lang: str) -> Lexicon | None:
        """The lexicon of ``lang`` (BCP 47), or None when wordfreq lacks the language."""
        return get_lexicon(lang)


def _pair_table(pairs: Iterable[PairEntry]) -> MappingProxyType[tuple[str, str], PairEntry]:
    table: dict[tuple[str, str], PairEntry] = {}
    for p in pairs:
        table.setdefault((p.old_key, p.new_key), p)  # the first listing wins; lint reports
    return MappingProxyType(table)


def _critical_table(words: Iterable[TermEntry]) -> MappingProxyType[str, TermEntry]:
    table: dict[str, TermEntry] = {}
    for w in words:
        table.setdefault(w.key, w)
    return MappingProxyType(table)


def compile_ruleset(resolved: ResolvedRuleset) -> CompiledRuleset:
    """The compiled, shareable form of ``resolved``.

    >>> from guard.ruleset.load import load_sources  # doctest: +SKIP
    >>> rs = compile_ruleset(load_sources(["base"]))  # doctest: +SKIP
    >>> rs.find_terms("no terms here")  # doctest: +SKIP
    ()
    """
    return CompiledRuleset(
        name=resolved.name,
        description=resolved.description,
        files=resolved.files,
        languages=resolved.languages,
        other_languages=resolved.other_languages,
        rules=resolved.rules,
        # The table is a Sequence[TermEntry] that makes entries on demand; model.py types
        # this field as a tuple, which would make every entry up front (see the note there).
        terms=resolved.terms,
        patterns=resolved.patterns,
        blocked=_pair_table(resolved.blocked),
        allowed=_pair_table(resolved.allowed),
        critical=_critical_table(resolved.critical),
        examples=resolved.examples,
        matcher=TermMatcher(resolved.terms),
        lexicons=LexiconProvider(),
        vocabulary=resolved.vocabulary,
    )
