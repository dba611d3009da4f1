"""Find protected terms in a text: one Aho-Corasick pass per case policy, original offsets.

Terms are keyed by :func:`guard.text.normalize.normalize_key`: NFC for ``exact`` terms,
NFC plus full case folding for ``fold`` terms. The text is brought to the same form
before matching, and every hit is mapped back to offsets in the text as given, because
folding changes lengths (``ß`` -> ``ss``, ``ﬁ`` -> ``fi``, ``İ`` -> ``i`` + U+0307). Maps
are computed only when a step changes the text (most texts are already NFC and fold
length for length), and only looked up for the hits found.

A term matches whole words only: the character before and after a hit, in the original
text, must not be a letter, digit or combining mark (where the term's own edge is one).
Words of a multiword term match across any run of whitespace. Where hits overlap, the
longest wins. Nothing here reads files; the matcher is read-only once built and may be
shared by any number of threads.
"""

from __future__ import annotations

import unicodedata
from collections.abc import Iterable, Sequence

import ahocorasick  # type: ignore[import-not-found]  # ships no type stubs
import regex

from guard.ruleset.model import CasePolicy, TermEntry, TermHit
from guard.text.normalize import fold_with_map, normalize_key

_CLUSTER = regex.compile(r"\X")
_ODD_SPACE = regex.compile(r"[^\S ]| {2,}")  # whitespace other than single U+0020
_SPACE_RUN = regex.compile(r"\s+")


def is_word_char(ch: str) -> bool:
    """Letters, digits and combining marks: what a term may not touch at either end.

    >>> is_word_char("a"), is_word_char("7"), is_word_char("\u0301"), is_word_char("-")
    (True, True, True, False)
    """
    return ch.isalnum() or unicodedata.category(ch)[0] in "LMN"


def collapse_spaces(text: str) -> str:
    """Runs of whitespace as one U+0020, ends stripped: how term keys spell their spaces.

    >>> collapse_spaces(" bilge\t\u00a0pump ")
    'bilge pump'
    """
    return " ".join(text.split())


def _nfc_with_map(text: str) -> tuple[str, list[int]]:
    """NFC of ``text`` and, per output index, the input index (plus a final entry).

    Composition never crosses a grapheme cluster boundary, so each cluster is composed
    on its own and all its output characters map to the cluster's start.
    """
    parts: list[str] = []
    origin: list[int] = []
    for m in _CLUSTER.finditer(text):
        composed = unicodedata.normalize("NFC", m.group())
        parts.append(composed)
        origin.extend([m.start()] * len(composed))
    origin.append(len(text))
    return "".join(parts), origin


def _spaces_with_map(text: str) -> tuple[str, list[int]]:
    """Every whitespace run as one U+0020, with the map back (plus a final entry)."""
    parts: list[str] = []
    origin: list[int] = []
    pos = 0
    for m in _SPACE_RUN.finditer(text):
        parts.append(text[pos : m.start()])
        origin.extend(range(pos, m.start()))
        parts.append(" ")
        origin.append(m.start())
        pos = m.end()
    parts.append(text[pos:])
    origin.extend(range(pos, len(text) + 1))
    return "".join(parts), origin


class _View:
    """A derived form of the text with the chain of maps back to the original."""

    __slots__ = ("maps", "text")

    def __init__(self, text: str, maps: tuple[Sequence[int], ...]) -> None:
        self.text = text
        self.maps = maps  # applied last-first: maps[-1] maps into maps[-2]'s text...

    def derive(self, text: str, origin: Sequence[int] | None) -> _View:
        return _View(text, self.maps if origin is None else (*self.maps, origin))

    def original(self, i: int) -> int:
        for m in reversed(self.maps):
            i = m[i]
        return i


class TermMatcher:
    """Protected terms of a ruleset, compiled for matching (read-only once built).

    >>> from guard.records import Origin
    >>> from guard.ruleset.model import CasePolicy, TermEntry
    >>> e = TermEntry(term="Straße", key=normalize_key("Straße", fold=True), kind="name",
    ...     case=CasePolicy.FOLD, origin=Origin(file="t.txt", line=1))
    >>> m = TermMatcher([e])
    >>> [(h.start, h.end) for h in m.find("in der STRASSE 5")]
    [(7, 14)]
    """

    __slots__ = ("_automata", "_entries", "_keys", "_multiword")

    def __init__(self, entries: Iterable[TermEntry]) -> None:
        keys: dict[CasePolicy, dict[str, TermEntry]] = {CasePolicy.EXACT: {}, CasePolicy.FOLD: {}}
        kept: list[TermEntry] = []
        for e in entries:
            if e.key and e.key not in keys[e.case]:
                keys[e.case][e.key] = e  # the first listing wins; lint reports the others
                kept.append(e)
        automata: dict[CasePolicy, ahocorasick.Automaton] = {}
        for case, table in keys.items():
            if table:
                auto = ahocorasick.Automaton()
                for key, e in table.items():
                    auto.add_word(key, (len(key), e))
                auto.make_automaton()
                automata[case] = auto
        self._keys = keys
        self._automata = automata
        self._entries = tuple(kept)
        self._multiword = any(" " in k for table in keys.values() for k in table)

    def __len__(self) -> int:
        return len(self._entries)

    @property
    def entries(self) -> tuple[TermEntry, ...]:
        """Every distinct term, in the order first listed."""
        return self._entries

    def lookup(self, text: str) -> TermEntry | None:
        """The term ``text`` (a token or phrase) is exactly, after NFC and, for fold terms,
        case folding; None if it is none.

        >>> from guard.records import Origin
        >>> e = TermEntry(term="XR-220", key=normalize_key("XR-220", fold=False), kind="code",
        ...     case=CasePolicy.EXACT, origin=Origin(file="t.txt", line=3))
        >>> TermMatcher([e]).lookup("XR-220") is e, TermMatcher([e]).lookup("xr-220")
        (True, None)
        """
        spaced = collapse_spaces(text)
        exact = self._keys[CasePolicy.EXACT]
        if exact:
            hit = exact.get(normalize_key(spaced, fold=False))
            if hit is not None:
                return hit
        fold = self._keys[CasePolicy.FOLD]
        if fold:
            return fold.get(normalize_key(spaced, fold=True))
        return None

    def find(self, text: str) -> tuple[TermHit, ...]:
        """Every term in ``text`` on word boundaries, as offsets into ``text``, by start.

        Where hits overlap, the longest is kept (on a tie the earlier, then the exact).
        """
        if not self._automata or not text:
            return ()
        view = _View(text, ())
        if not text.isascii() and not unicodedata.is_normalized("NFC", text):
            view = view.derive(*_nfc_with_map(text))
        if self._multiword and _ODD_SPACE.search(view.text):
            view = view.derive(*_spaces_with_map(view.text))
        found: list[tuple[int, int, int, TermEntry]] = []
        exact = self._automata.get(CasePolicy.EXACT)
        if exact is not None:
            self._scan(exact, view, text, 0, found)
        fold = self._automata.get(CasePolicy.FOLD)
        if fold is not None:
            folded = view.text.casefold()
            if len(folded) == len(view.text):  # one character for one: same offsets
                self._scan(fold, view.derive(folded, None), text, 1, found)
            else:
                self._scan(fold, view.derive(*fold_with_map(view.text)), text, 1, found)
        if not found:
            return ()
        return _longest_first(found)

    @staticmethod
    def _scan(
        auto: ahocorasick.Automaton,
        view: _View,
        original: str,
        rank: int,
        out: list[tuple[int, int, int, TermEntry]],
    ) -> None:
        n = len(original)
        for last, (length, entry) in auto.iter(view.text):
            start = view.original(last + 1 - length)
            end = view.original(last + 1)
            if start >= end:
                continue
            term = entry.key
            if start > 0 and is_word_char(term[0]) and is_word_char(original[start - 1]):
                continue
            if end < n and is_word_char(term[-1]) and is_word_char(original[end]):
                continue
            out.append((start, end, rank, entry))


def _longest_first(found: list[tuple[int, int, int, TermEntry]]) -> tuple[TermHit, ...]:
    found.sort(key=lambda h: (h[0] - h[1], h[0], h[2]))
    taken: list[tuple[int, int, TermEntry]] = []
    for start, end, _, entry in found:
        if all(end <= s or start >= e for s, e, _ in taken):
            taken.append((start, end, entry))
    taken.sort(key=lambda h: h[0])
    return tuple(TermHit(start=s, end=e, entry=entry) for s, e, entry in taken)
