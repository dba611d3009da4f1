"""Find protected terms in a text: whole words, longest first, offsets into the text as given.

Terms are keyed by :func:`guard.text.normalize.normalize_key`: NFC for ``exact`` terms,
NFC plus full case folding for ``fold`` terms. A term matches whole words only: it may
not start or end inside a run of letters, digits and combining marks. So the text is cut
into *pieces* (a run of letters, digits and marks; any other visible character alone;
in scripts written without spaces, Han, Kana, Thai and their neighbours, each
character alone, so that a term is found inside an unspaced run), and a term is a
sequence of pieces. Matching looks each piece up in a table of first pieces and, where
a term may start, joins the next pieces (whitespace between them as one space) and looks
the phrase up in a dict of keys.

Why pieces and dicts rather than a character automaton: a term can only start and end
at piece edges anyway, so nothing is lost; building is a dict insert per term (an
automaton over a million terms has some ten million nodes and takes seconds to build and
hundreds of megabytes to hold); and offsets come straight from the pieces of the text as
given, so case folding that changes lengths (``ß`` -> ``ss``, ``ﬁ`` -> ``fi``, ``İ`` ->
``i`` + U+0307) needs no offset map at all. Only a text that is not in NFC is composed
first, with a map back.

Nothing here reads files; a matcher is read-only once built and may be shared by any
number of threads.
"""

from __future__ import annotations

import re
import unicodedata
from array import array
from bisect import bisect_right
from collections.abc import Iterable, Iterator, Sequence
from typing import overload

import regex

from guard.records import Origin
from guard.ruleset.model import CasePolicy, TermEntry, TermHit
from guard.text.normalize import NormalizedText, normalize_key

_UNSPACED = r"\p{Han}\p{Hiragana}\p{Katakana}\p{Thai}\p{Lao}\p{Khmer}\p{Myanmar}"
_PIECE = regex.compile(
    rf"[{_UNSPACED}]\p{{M}}*|[[\p{{L}}\p{{M}}\p{{N}}]--[{_UNSPACED}]]+|\S", regex.V1
)
# The same cut for ASCII text, with the standard library's faster engine. Whitespace is
# spelt out: Unicode White_Space (which the pattern above uses) has no U+001C..U+001F.
_ASCII_PIECE = re.compile(r"[A-Za-z0-9]+|[^ \t\n\r\x0b\x0c]")
_CLUSTER = regex.compile(r"\X")


def collapse_spaces(text: str) -> str:
    """Runs of whitespace as one U+0020, ends stripped: how term keys spell their spaces.

    >>> collapse_spaces(" bilge\t\u00a0pump ")
    'bilge pump'
    """
    return " ".join(text.split())


def pieces(text: str) -> list[str]:
    """The pieces a term or text is cut into (see the module docstring).

    >>> pieces("Dr. Ilse XR-220B, C#")
    ['Dr', '.', 'Ilse', 'XR', '-', '220B', ',', 'C', '#']
    >>> pieces("東京タワー")
    ['東', '京', 'タ', 'ワ', 'ー']
    """
    return _PIECE.findall(text)


def _first_piece(key: str) -> tuple[str, int]:
    """(first piece, number of pieces) of a term key."""
    if key.isascii():
        if key.isalnum():
            return key, 1
        if key.replace(" ", "").isalnum():  # plain words and single spaces (keys have no runs)
            return key.partition(" ")[0], key.count(" ") + 1
        found = _ASCII_PIECE.findall(key)
    else:
        found = pieces(key)
    return found[0], len(found)


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


class TermTable(Sequence[TermEntry]):
    """Protected terms as columns, with a ``TermEntry`` made only when one is asked for.

    A ruleset may list a million terms; two Python objects per term (the entry and its
    origin) would cost seconds to create and hundreds of megabytes to hold, while a check
    only ever looks at the few terms it finds. So the loader fills columns (term, key,
    line) and runs of rows that share a list file, kind and case policy; iterating or
    indexing makes entries on the fly (equal, not identical, from one call to the next).
    Read-only once built.

    >>> t = TermTable.of([])
    >>> len(t), list(t)
    (0, [])
    """

    __slots__ = ("_keys", "_lines", "_runs", "_starts", "_terms")

    def __init__(
        self,
        terms: list[str],
        keys: list[NormalizedText],
        lines: array[int],
        runs: list[tuple[int, str, str, CasePolicy]],
    ) -> None:
        if not len(terms) == len(keys) == len(lines):
            raise ValueError("term columns differ in length")
        self._terms = terms
        self._keys = keys
        self._lines = lines  # 0: no line
        self._runs = runs  # (first row, list file, kind, case), by first row
        self._starts = [r[0] for r in runs]

    @classmethod
    def of(cls, entries: Iterable[TermEntry]) -> TermTable:
        """A table of entries made elsewhere (tests, or terms that come from no file)."""
        terms: list[str] = []
        keys: list[NormalizedText] = []
        lines = array("L")
        runs: list[tuple[int, str, str, CasePolicy]] = []
        for e in entries:
            if not runs or runs[-1][1:] != (e.origin.file, e.kind, e.case):
                runs.append((len(terms), e.origin.file, e.kind, e.case))
            terms.append(e.term)
            keys.append(e.key)
            lines.append(e.origin.line or 0)
        return cls(terms, keys, lines, runs)

    @classmethod
    def join(cls, tables: Iterable[TermTable]) -> TermTable:
        """One table holding the rows of ``tables`` in order."""
        terms: list[str] = []
        keys: list[NormalizedText] = []
        lines = array("L")
        runs: list[tuple[int, str, str, CasePolicy]] = []
        for t in tables:
            offset = len(terms)
            runs.extend((start + offset, file, kind, case) for start, file, kind, case in t._runs)
            terms.extend(t._terms)
            keys.extend(t._keys)
            lines.extend(t._lines)
        return cls(terms, keys, lines, runs)

    def __len__(self) -> int:
        return len(self._terms)

    @overload
    def __getitem__(self, index: int) -> TermEntry: ...

    @overload
    def __getitem__(self, index: slice) -> list[TermEntry]: ...

    def __getitem__(self, index: int | slice) -> TermEntry | list[TermEntry]:
        if isinstance(index, slice):
            return [self.entry(i) for i in range(*index.indices(len(self)))]
        if index < 0:
            index += len(self)
        if not 0 <= index < len(self):
            raise IndexError("term index out of range")
        return self.entry(index)

    def __iter__(self) -> Iterator[TermEntry]:
        for i in range(len(self)):
            yield self.entry(i)

    def _run(self, row: int) -> tuple[int, str, str, CasePolicy]:
        return self._runs[bisect_right(self._starts, row) - 1]

    def entry(self, row: int) -> TermEntry:
        """The entry of ``row`` (0 <= row < len)."""
        _, file, kind, case = self._run(row)
        line = self._lines[row]
        return TermEntry(
            term=self._terms[row],
            key=self._keys[row],
            kind=kind,
            case=case,
            origin=Origin(file=file, line=line or None),
        )

    def rows(self) -> Iterator[tuple[int, int, CasePolicy]]:
        """(first row, end row, case) of each run of rows sharing a list and policy."""
        ends = [*self._starts[1:], len(self)] if self._runs else []
        for (start, _, _, case), end in zip(self._runs, ends, strict=True):
            if end > start:
                yield start, end, case

    def keys_of(self, start: int, end: int) -> list[NormalizedText]:
        return self._keys[start:end]


class TermMatcher:
    """Protected terms of a ruleset, compiled for matching (read-only once built).

    >>> from guard.records import Origin
    >>> e = TermEntry(term="Straße", key=normalize_key("Straße", fold=True), kind="name",
    ...     case=CasePolicy.FOLD, origin=Origin(file="t.txt", line=1))
    >>> m = TermMatcher([e])
    >>> [(h.start, h.end) for h in m.find("in der STRASSE 5")]
    [(7, 14)]
    """

    __slots__ = ("_exact", "_exact_first", "_fold", "_fold_first", "_table")

    def __init__(self, terms: TermTable | Iterable[TermEntry]) -> None:
        table = terms if isinstance(terms, TermTable) else TermTable.of(terms)
        exact: dict[str, int] = {}
        fold: dict[str, int] = {}
        for start, end, case in table.rows():
            keys = table.keys_of(start, end)
            # Later rows first, so that within a run the first listing wins; earlier runs
            # win over later ones through the merge order. Lint reports the repeats.
            run: dict[str, int] = dict(
                zip(reversed(keys), range(end - 1, start - 1, -1), strict=True)
            )
            run.pop("", None)
            if case is CasePolicy.FOLD:
                fold = run | fold
            else:
                exact = run | exact
        self._table = table
        self._exact, self._exact_first = exact, _firsts(exact)
        self._fold, self._fold_first = fold, _firsts(fold)

    def __len__(self) -> int:
        return len(self._exact) + len(self._fold)

    def lookup(self, text: str) -> TermEntry | None:
        """The term ``text`` (a token or phrase) is exactly, after NFC and, for fold terms,
        case folding; None if it is none.

        >>> from guard.records import Origin
        >>> e = TermEntry(term="XR-220", key=normalize_key("XR-220", fold=False), kind="code",
        ...     case=CasePolicy.EXACT, origin=Origin(file="t.txt", line=3))
        >>> TermMatcher([e]).lookup("XR-220") == e, TermMatcher([e]).lookup("xr-220")
        (True, None)
        """
        spaced = collapse_spaces(text)
        row: int | None = None
        if self._exact:
            row = self._exact.get(normalize_key(spaced, fold=False))
        if row is None and self._fold:
            row = self._fold.get(normalize_key(spaced, fold=True))
        return None if row is None else self._table.entry(row)

    def find(self, text: str) -> tuple[TermHit, ...]:
        """Every term in ``text`` on word boundaries, as offsets into ``text``, by start.

        Where hits overlap, the longest is kept (on a tie the earlier, then the exact).
        """
        if not text or not (self._exact or self._fold):
            return ()
        origin: list[int] | None = None
        view = text
        cut: re.Pattern[str] | regex.Pattern[str] = _ASCII_PIECE
        if not text.isascii():
            cut = _PIECE
            if not unicodedata.is_normalized("NFC", text):
                view, origin = _nfc_with_map(text)
        spans: list[tuple[int, int]] | None = None
        found: list[tuple[int, int, int, int]] = []
        for rank, keys, firsts in (
            (0, self._exact, self._exact_first),
            (1, self._fold, self._fold_first),
        ):
            if not keys:
                continue
            if rank == 0:
                words = cut.findall(view)
            else:
                folded = view.casefold()
                if len(folded) == len(view):  # one character for one: the same cut
                    words = cut.findall(folded)
                else:
                    spans = spans or [m.span() for m in cut.finditer(view)]
                    words = [view[s:e].casefold() for s, e in spans]
            if firsts.keys().isdisjoint(words):
                continue  # most texts: no piece can start a term
            spans = spans or [m.span() for m in cut.finditer(view)]
            _scan(words, spans, firsts, keys, rank, found)
        if not found:
            return ()
        if origin is not None:
            found = [(origin[s], origin[e], rank, row) for s, e, rank, row in found]
        return tuple(
            TermHit(start=s, end=e, entry=self._table.entry(row))
            for s, e, row in _longest_first(found)
        )


def _firsts(keys: dict[str, int]) -> dict[str, int]:
    """First piece -> the most pieces a term starting with it has.

    Most keys are one plain ASCII word, their own first piece: they are taken in bulk,
    and only the others (spaces, punctuation, other scripts) are cut into pieces.
    """
    firsts: dict[str, int] = dict.fromkeys(filter(str.isalnum, filter(str.isascii, keys)), 1)
    for key in keys.keys() - firsts.keys():
        head, count = _first_piece(key)
        if firsts.get(head, 0) < count:
            firsts[head] = count
    return firsts


def _scan(
    words: list[str],
    spans: list[tuple[int, int]],
    firsts: dict[str, int],
    keys: dict[str, int],
    rank: int,
    out: list[tuple[int, int, int, int]],
) -> None:
    n = len(words)
    for i, word in enumerate(words):
        most = firsts.get(word)
        if most is None:
            continue
        phrase = word
        for j in range(i, min(n, i + most)):
            if j > i:
                phrase += (" " if spans[j][0] > spans[j - 1][1] else "") + words[j]
            row = keys.get(phrase)
            if row is not None:
                out.append((spans[i][0], spans[j][1], rank, row))


def _longest_first(found: list[tuple[int, int, int, int]]) -> list[tuple[int, int, int]]:
    """(start, end, row) of the hits kept: longest first, then earlier, then exact."""
    found.sort(key=lambda h: (h[0] - h[1], h[0], h[2]))
    taken: list[tuple[int, int, int]] = []
    for start, end, _, row in found:
        if all(end <= s or start >= e for s, e, _ in taken):
            taken.append((start, end, row))
    taken.sort(key=lambda h: h[0])
    return taken
