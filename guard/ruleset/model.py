"""The compiled, read-only form of a ruleset that rules consult.

A ruleset is loaded and compiled once (guard.ruleset.load / guard.ruleset.compile) and then
shared, unchanged, by every check, in any number of threads. Nothing here does I/O.
"""

from __future__ import annotations

import enum
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import TYPE_CHECKING

import regex

from guard.records import Action, Origin

if TYPE_CHECKING:
    from guard.ruleset.lexicon import Lexicon
    from guard.text.normalize import NormalizedText


class CasePolicy(enum.StrEnum):
    EXACT = "exact"
    FOLD = "fold"


WordCounts = Mapping[str, int]
"""A domain vocabulary: each folded word of the team's documents -> how often they use it
(0: its list gave no count, and the word is trusted whole)."""


def merge_counts(into: dict[str, int], words: Mapping[str, int]) -> None:
    """Add ``words`` to ``into``: the counts of two lists add up, and a word one list gives
    without a count stays uncounted (a hand-kept list vouches for the word whatever a
    harvest counted).

    >>> v = {"tar": 3, "cwd": 0}
    >>> merge_counts(v, {"tar": 2, "cwd": 5, "sed": 1})
    >>> v
    {'tar': 5, 'cwd': 0, 'sed': 1}
    """
    for word, n in words.items():
        add_count(into, word, n)


def add_count(into: dict[str, int], word: str, n: int) -> None:
    """Add one word's count to ``into`` as :func:`merge_counts` does."""
    had = into.get(word)
    into[word] = n if had is None else 0 if had == 0 or n == 0 else had + n


@dataclass(frozen=True, slots=True, kw_only=True)
class TermEntry:
    """One protected term (or critical word) as written in its list, with where it came from."""

    term: str
    key: NormalizedText  # NFC, and case-folded when case is FOLD
    kind: str
    case: CasePolicy
    origin: Origin  # term-list file and line


@dataclass(frozen=True, slots=True, kw_only=True)
class TermHit:
    """A protected term found in a text, as offsets into that (original, unfolded) text."""

    start: int
    end: int
    entry: TermEntry


@dataclass(frozen=True, slots=True, kw_only=True)
class PatternEntry:
    name: str
    source: str  # the regex as written
    compiled: regex.Pattern[str] = field(compare=False)
    kind: str
    origin: Origin


@dataclass(frozen=True, slots=True, kw_only=True)
class PatternHit:
    start: int
    end: int
    entry: PatternEntry


@dataclass(frozen=True, slots=True, kw_only=True)
class PatternTimeout:
    """A pattern that ran out of time on a text: the rewrite it might cover is flagged."""

    entry: PatternEntry


@dataclass(frozen=True, slots=True, kw_only=True)
class PairEntry:
    """A from => to pair of a blocked or allowed list. ``old_key``/``new_key`` are folded."""

    old: str
    new: str
    old_key: NormalizedText
    new_key: NormalizedText
    origin: Origin


@dataclass(frozen=True, slots=True, kw_only=True)
class RuleSettings:
    """A rule's resolved settings: defaults, then each ruleset in the extends chain in order.

    ``options`` holds every option of the rule (defaults filled in); ``per_lang`` the
    per-language overrides; ``origins`` where each option key was last set
    (``action``, ``min-zipf``, ``lang.de.min-zipf``...), for explanations and `rules show`.
    """

    name: str
    action: Action | None  # None = the rule is off
    options: Mapping[str, object]
    per_lang: Mapping[str, Mapping[str, object]]
    origins: Mapping[str, Origin]

    def option(self, key: str, lang: str | None = None) -> object:
        """The value of ``key`` for ``lang`` (its primary subtag), else the general value."""
        if lang and self.per_lang:
            primary = lang.split("-", 1)[0].lower()
            for tag in (lang, primary):
                over = self.per_lang.get(tag)
                if over is not None and key in over:
                    return over[key]
        return self.options[key]

    def for_lang(self, lang: str) -> RuleSettings:
        """These settings with ``lang``'s overrides folded in: the engine resolves them
        once per language instead of on every option lookup."""
        if not self.per_lang:
            return self
        options = {key: self.option(key, lang) for key in self.options}
        origins = dict(self.origins)
        for key in self.options:
            origin = self.origin_of(key, lang)
            if origin is not None:
                origins[key] = origin
        return RuleSettings(
            name=self.name, action=self.action, options=options, per_lang={}, origins=origins
        )

    def origin_of(self, key: str, lang: str | None = None) -> Origin | None:
        if lang:
            primary = lang.split("-", 1)[0].lower()
            for tag in (lang, primary):
                got = self.origins.get(f"lang.{tag}.{key}")
                if got is not None:
                    return got
        return self.origins.get(key)


@dataclass(frozen=True, slots=True, kw_only=True)
class Example:
    """A test case a ruleset carries: a pair and the verdicts it must get."""

    source: str
    proposal: str
    lang: str | None
    expect: str  # accept | flag | veto
    rewrites: tuple[str, ...] | None
    origin: Origin


@dataclass(frozen=True, slots=True, kw_only=True)
class Settings:
    """A resolved scalar setting with where it came from (for `rules show`)."""

    value: object
    origin: Origin


class CompiledRuleset:
    """Everything rules need, compiled once. Read-only after construction.

    Term lookups go through ``find_terms`` (dict lookups over the pieces of the text) and
    ``lookup_term`` (one token or phrase). Both work on original-text offsets: case folding
    may change lengths (ß -> ss), and the offset map is only computed where a term is found.
    """

    __slots__ = (
        "_lexicons",
        "_matcher",
        "allowed",
        "blocked",
        "critical",
        "description",
        "examples",
        "files",
        "languages",
        "name",
        "other_languages",
        "patterns",
        "rules",
        "terms",
        "vocabulary",
    )

    def __init__(
        self,
        *,
        name: str,
        description: str,
        files: tuple[str, ...],
        languages: tuple[str, ...],
        other_languages: tuple[str, ...],
        rules: Mapping[str, RuleSettings],
        terms: Sequence[TermEntry],
        patterns: tuple[PatternEntry, ...],
        blocked: Mapping[tuple[str, str], PairEntry],
        allowed: Mapping[tuple[str, str], PairEntry],
        critical: Mapping[str, TermEntry],
        examples: tuple[Example, ...],
        matcher: object,
        lexicons: object,
        vocabulary: Mapping[str, WordCounts] | None = None,
    ) -> None:
        self.name = name
        self.description = description
        self.files = files
        self.languages = languages
        self.other_languages = other_languages
        self.rules = rules
        self.terms = terms
        self.patterns = patterns
        self.blocked = blocked
        self.allowed = allowed
        self.critical = critical
        self.examples = examples
        self._matcher = matcher
        self._lexicons = lexicons
        self.vocabulary: Mapping[str, WordCounts] = _with_primary_tags(vocabulary or {})

    @property
    def default_language(self) -> str:
        return self.languages[0] if self.languages else "en"

    def find_terms(self, text: str) -> tuple[TermHit, ...]:
        """Every protected term in ``text`` on word boundaries, longest first where they overlap."""
        return self._matcher.find(text)  # type: ignore[attr-defined,no-any-return]

    def lookup_term(self, text: str) -> TermEntry | None:
        """The protected term that ``text`` (a token or phrase) is exactly, if any."""
        return self._matcher.lookup(text)  # type: ignore[attr-defined,no-any-return]

    def lexicon(self, lang: str) -> Lexicon | None:
        """Word frequencies for ``lang``, or None when wordfreq lacks the language."""
        return self._lexicons.get(lang)  # type: ignore[attr-defined,no-any-return]


def _with_primary_tags(vocabulary: Mapping[str, WordCounts]) -> Mapping[str, WordCounts]:
    """The vocabulary by language tag, each list also under its primary subtag when no
    list has that tag, so that text tagged "en-GB" finds the words listed for "en" and
    text tagged "en" those listed for "en-GB"; lists for the same primary subtag merge."""
    out = dict(vocabulary)
    merged: dict[str, dict[str, int]] = {}
    for tag, words in vocabulary.items():
        primary = tag.split("-", 1)[0]
        if primary not in vocabulary:
            merge_counts(merged.setdefault(primary, {}), words)
    out.update({k: MappingProxyType(v) for k, v in merged.items()})
    return MappingProxyType(out)
