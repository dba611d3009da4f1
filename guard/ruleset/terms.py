"""Find protected terms in a text: whole words, longest first, offsets into the text as given.

Terms are keyed by :func:`guard.text.normalize.normalize_key`: NFC for ``exact`` terms,
NFC plus full case folding for ``fold`` terms. A term matches whole words only: it may
not start or end inside a run of letters, digits and combining marks. So the text is cut
into *pieces* (a run of letters, digits and marks; any other visible character alone;
in scripts written without spaces, Han, Kana, Thai and their neighbours, each
character alone, so that a term is found inside an unspaced run), and a term is a
sequence of pieces. Matching looks each piece up in one dict per case policy, which
holds the keys and the first pieces of longer keys; where a longer term may start, it
joins the next pieces (whitespace between them as one space) and looks the phrase up in
the same dict. Text of plain ASCII words is cut by ``str.split``, and when no key has a
lower-case piece (codes, acronyms, names), lower-case words are not looked up at all.

Why pieces and dicts rather than a character automaton: a term can only start and end
at piece edges anyway, so nothing is lost; building is a dict insert per term (an
automaton over a million terms has some ten million nodes and takes seconds to build and
hundreds of megabytes to hold); and offsets come straight from the pieces of the text as
given, so case folding that changes lengths (``ß`` -> ``ss``, ``ﬁ`` -> ``fi``, ``İ`` ->
``i`` + U+0307) needs no offset map at all. Only a text that is not in NFC is composed
first, with a map back.

Nothing here reads files; a matcher is read-only once built (its memos of recent
answers aside, which change no answer) and may be shared by any number of threads.
"""

from __future__ import annotations

import re
import unicodedata
from array import array
from bisect import bisect_right
from collections.abc import Callable, Iterable, Iterator, Mapping, Sequence
from itertools import compress, islice, repeat
from operator import not_, or_
from typing import overload

import regex

from guard.records import Origin
from guard.ruleset.memo import Memo
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


def _first_piece(key: str) -> tuple[str, int] | None:
    """(first piece, number of pieces) of a term key; None when it has no pieces."""
    found = _ASCII_PIECE.findall(key) if key.isascii() else pieces(key)
    return (found[0], len(found)) if found else None


_ALNUM_RUN = re.compile(r"[A-Za-z0-9]+")
_LINE_HEAD = re.compile(r"^ *([A-Za-z0-9]+|[^ \n])", re.MULTILINE)


def first_pieces(keys: Iterable[str]) -> dict[str, int]:
    """First piece -> the most pieces a key starting with it has, for keys of two or more
    pieces (a one-piece key is looked up whole).

    Keys of printable ASCII, most of any list, are cut in bulk: one pass of a regex over
    them all finds their first pieces, and their piece counts are the lengths of their
    lines once every run of letters and digits is one character and spaces are gone. The
    others (other scripts, control characters) are cut one by one.

    >>> keys = ["XR-220", "bilge pump", "Quillmate", "bilge pump room", "東京"]
    >>> sorted(first_pieces(keys).items())
    [('XR', 3), ('bilge', 3), ('東', 2)]
    """
    ascii_keys: list[str] = []
    rest: list[str] = []
    for key in keys:
        if key.isascii():
            if not key.isalnum():
                (ascii_keys if key.isprintable() and key.strip(" ") else rest).append(key)
        else:
            rest.append(key)
    firsts: dict[str, int] = {}
    if ascii_keys:
        joined = "\n".join(ascii_keys)
        heads = _LINE_HEAD.findall(joined)
        counts = list(map(len, _ALNUM_RUN.sub("a", joined).replace(" ", "").split("\n")))
        # by count, fewest first, so that a later update leaves the most
        for count in sorted(set(counts)):
            if count > 1:
                firsts.update(zip(compress(heads, map(count.__eq__, counts)), repeat(count)))
    for key in rest:
        got = _first_piece(key)
        if got is None:
            continue  # blank: no text's pieces can spell it
        head, count = got
        if count > 1 and firsts.get(head, 0) < count:
            firsts[head] = count
    return firsts


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
    A run may carry its keys' :func:`first_pieces` (the loader's cache keeps them), so
    that the matcher need not cut a million keys again. Read-only once built.

    >>> t = TermTable.of([])
    >>> len(t), list(t)
    (0, [])
    """

    __slots__ = ("_heads", "_keys", "_lines", "_runs", "_starts", "_terms")

    def __init__(
        self,
        terms: list[str],
        keys: list[NormalizedText],
        lines: array[int],
        runs: list[tuple[int, str, str, CasePolicy]],
        heads: list[Mapping[str, int] | None] | None = None,
    ) -> None:
        if not len(terms) == len(keys) == len(lines):
            raise ValueError("term columns differ in length")
        if heads is not None and len(heads) != len(runs):
            raise ValueError("one first-piece table per run, or none")
        # tuples of strings: the garbage collector stops tracking them, so that its full
        # collections do not walk a million terms each time (a list it walks every time)
        self._terms = tuple(terms)
        self._keys = tuple(keys)
        self._lines = lines  # 0: no line
        self._runs = runs  # (first row, list file, kind, case), by first row
        self._starts = [r[0] for r in runs]
        # per run, first_pieces of its keys, or None: the matcher computes them
        self._heads: list[Mapping[str, int] | None] = heads or [None] * len(runs)

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
        heads: list[Mapping[str, int] | None] = []
        for t in tables:
            offset = len(terms)
            runs.extend((start + offset, file, kind, case) for start, file, kind, case in t._runs)
            heads.extend(t._heads)
            terms.extend(t._terms)
            keys.extend(t._keys)
            lines.extend(t._lines)
        return cls(terms, keys, lines, runs, heads)

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

    def rows(self) -> Iterator[tuple[int, int, CasePolicy, Mapping[str, int] | None]]:
        """(first row, end row, case, first pieces or None) of each run of rows sharing a
        list and policy."""
        ends = [*self._starts[1:], len(self)] if self._runs else []
        for (start, _, _, case), end, heads in zip(self._runs, ends, self._heads, strict=True):
            if end > start:
                yield start, end, case, heads

    def keys_of(self, start: int, end: int) -> Sequence[NormalizedText]:
        if start == 0 and end == len(self._keys):
            return self._keys
        return self._keys[start:end]


_SHIFT = 10  # table values: (row + 1) << shift | the most pieces of a key starting there
_MEMO_SIZE = 16_384  # entries remembered per matcher (a few MB), for terms found again


class TermMatcher:
    """Protected terms of a ruleset, compiled for matching (read-only once built).

    One dict per case policy answers both questions a text's piece asks, in one probe:
    is it a (one-piece) term, and do longer terms start with it, and with how many pieces
    at most. A value packs both: ``(row + 1) << shift`` (0: the piece is no term) plus the
    piece count. Keys of two or more pieces are in the same dict (no piece equals one).

    >>> from guard.records import Origin
    >>> e = TermEntry(term="Straße", key=normalize_key("Straße", fold=True), kind="name",
    ...     case=CasePolicy.FOLD, origin=Origin(file="t.txt", line=1))
    >>> m = TermMatcher([e])
    >>> [(h.start, h.end) for h in m.find("in der STRASSE 5")]
    [(7, 14)]
    """

    __slots__ = (
        "_count",
        "_entries",
        "_every",
        "_exact",
        "_fold",
        "_lower",
        "_shift",
        "_table",
        "_tables",
        "lookup",
    )

    lookup: Callable[[str], TermEntry | None]
    """The term a token or phrase is exactly (see ``_lookup``): rules ask it of every
    rewrite's old and new text, so it is a dict lookup in C for text asked lately."""

    def __init__(self, terms: TermTable | Iterable[TermEntry]) -> None:
        table = terms if isinstance(terms, TermTable) else TermTable.of(terms)
        runs = list(table.rows())
        heads_of = [
            heads if heads is not None else first_pieces(table.keys_of(start, end))
            for start, end, _, heads in runs
        ]
        most = max((max(h.values(), default=0) for h in heads_of), default=0)
        shift = max(_SHIFT, most.bit_length())
        step = 1 << shift
        exact: dict[str, int] = {}
        fold: dict[str, int] = {}
        for start, end, case, _ in runs:
            keys = table.keys_of(start, end)
            rows = range((start + 1) << shift, (end + 1) << shift, step)
            run: dict[str, int] = dict(zip(keys, rows, strict=True))
            if len(run) < len(keys):  # a key listed twice: the run's first listing wins
                run = dict(zip(reversed(keys), reversed(rows), strict=True))
            run.pop("", None)
            # Earlier runs win over later ones (lint reports the repeats).
            if case is CasePolicy.FOLD:
                fold = run | fold if fold else run
            else:
                exact = run | exact if exact else run
        self._count = len(exact) + len(fold)
        for case, into in ((CasePolicy.EXACT, exact), (CasePolicy.FOLD, fold)):
            heads = _most(h for (_, _, c, _), h in zip(runs, heads_of, strict=True) if c is case)
            # a head's count goes in the low bits, which are 0 in every value so far
            olds = map(into.get, heads, repeat(0))
            into.update(zip(heads, map(or_, olds, heads.values()), strict=True))
        self._table = table
        self._exact, self._fold, self._shift = exact, fold, shift
        # Exact-case lists (codes, acronyms, names) rarely hold a piece in lower case only.
        # When none does, a text's lower-case pieces cannot be in the table (a piece equal
        # to a key is lower case exactly when the key is) and are never looked up: most
        # words of most texts.
        self._every = (any(map(str.islower, exact)), any(map(str.islower, fold)))
        self._lower = (self._every[0] and bool(exact)) or (self._every[1] and bool(fold))
        # (table, rank, every) of the tables with keys, exact first
        self._tables = [
            (t, rank, every)
            for t, rank, every in ((exact, 0, self._every[0]), (fold, 1, self._every[1]))
            if t
        ]
        # Entries of rows found lately: a check finds the same terms again and again.
        self._entries = Memo(table.entry, _MEMO_SIZE)
        self.lookup = Memo(self._lookup, _MEMO_SIZE).__getitem__

    def __len__(self) -> int:
        return self._count

    def _lookup(self, text: str) -> TermEntry | None:
        """The term ``text`` (a token or phrase) is exactly, after NFC and, for fold terms,
        case folding; None if it is none. (``lookup`` answers the same from a memo.)

        >>> from guard.records import Origin
        >>> e = TermEntry(term="XR-220", key=normalize_key("XR-220", fold=False), kind="code",
        ...     case=CasePolicy.EXACT, origin=Origin(file="t.txt", line=3))
        >>> TermMatcher([e])._lookup("XR-220") == e, TermMatcher([e]).lookup("xr-220")
        (True, None)
        """
        if text.isascii() and text.isalnum():  # one ASCII word: its own key, no spaces
            exact_key, fold_key = text, text
        else:
            spaced = collapse_spaces(text)
            exact_key, fold_key = normalize_key(spaced, fold=False), spaced
        row = 0
        if self._exact:
            row = self._exact.get(exact_key, 0) >> self._shift
        if not row and self._fold:
            ascii = fold_key.isascii()
            fold_key = fold_key.lower() if ascii else normalize_key(fold_key, fold=True)
            row = self._fold.get(fold_key, 0) >> self._shift
        return self._entries[row - 1] if row else None

    def find(self, text: str) -> tuple[TermHit, ...]:
        """Every term in ``text`` on word boundaries, as offsets into ``text``, by start.

        Where hits overlap, the longest is kept (on a tie the earlier, then the exact).
        """
        if not text or not self._tables:
            return ()
        squeezed = text.replace(" ", "")
        lower = squeezed.isascii() and squeezed.isalpha() and squeezed.islower()
        if lower and not self._lower:
            return ()  # ASCII lower-case words only, and no key has a lower-case piece
        if text.isascii() and text.isprintable() and "  " not in text:
            if squeezed.isalnum():  # words between single spaces: the words are the pieces
                return self._find_simple(text, text.split(), None, lower)
            spaced = _SPACED_PIECE.findall(text)
            return self._find_simple(text, list(map(str.lstrip, spaced)), spaced, False)
        return self._hits(self._find_pieces(text))

    def _hits(self, found: list[tuple[int, int, int, int]]) -> tuple[TermHit, ...]:
        """The hits kept of (start, end, rank, row) found, as records."""
        if not found:
            return ()
        if len(found) == 1:
            s, e, _, row = found[0]
            return (TermHit(start=s, end=e, entry=self._entries[row]),)
        return tuple(
            TermHit(start=s, end=e, entry=self._entries[row]) for s, e, row in _longest_first(found)
        )

    def _find_simple(
        self, text: str, words: list[str], spaced: list[str] | None, lower: bool
    ) -> tuple[TermHit, ...]:
        """Hits in printable ASCII with no run of spaces, the commonest text, cut without
        offsets: ``spaced`` holds each piece with the space before it, if any (None: one
        space before every piece but the first), which is how keys spell it, and the
        offsets of a hit are sums of lengths. ``lower``: every piece is in lower case.

        Only the pieces a table may hold are looked up."""
        shift = self._shift
        mask = (1 << shift) - 1
        found: list[tuple[int, int, int, int]] = []
        for table, rank, every in self._tables:
            if lower and not every:
                continue
            if rank and not lower:  # ASCII: lower is casefold, and the cut stays the same
                words = list(map(str.lower, words))
                spaced = None if spaced is None else list(map(str.lower, spaced))
            get = table.get
            n = len(words)
            for i, word in enumerate(words):
                if not every and word.islower():
                    continue  # no key has a piece in lower case only
                value = get(word)
                if value is None:
                    continue
                if value >> shift:
                    found.append((i, i, rank, (value >> shift) - 1))
                if value & mask > 1:
                    phrase = word
                    for j in range(i + 1, min(n, i + (value & mask))):
                        phrase += " " + words[j] if spaced is None else spaced[j]
                        row = get(phrase, 0) >> shift
                        if row:
                            found.append((i, j, rank, row - 1))
        if not found:
            return ()
        if spaced is None:
            lead = 1 if text[0] == " " else 0
            for k, (i, j, rank, row) in enumerate(found):
                end = sum(map(len, words[: j + 1])) + j + lead
                found[k] = (end - len(" ".join(words[i : j + 1])), end, rank, row)
        else:
            for k, (i, j, rank, row) in enumerate(found):
                end = sum(map(len, spaced[: j + 1]))
                start = end - len(words[i]) - sum(map(len, spaced[i + 1 : j + 1]))
                found[k] = (start, end, rank, row)
        return self._hits(found)

    def _find_pieces(self, text: str) -> list[tuple[int, int, int, int]]:
        """Hits in any other text: cut by the regex, composed to NFC first if need be."""
        exact, fold, shift = self._exact, self._fold, self._shift
        every_exact, every_fold = self._every
        origin: list[int] | None = None
        view = text
        cut: re.Pattern[str] | regex.Pattern[str] = _ASCII_PIECE
        if not text.isascii():
            cut = _PIECE
            if not unicodedata.is_normalized("NFC", text):
                view, origin = _nfc_with_map(text)
        words = cut.findall(view)
        where = _Spans(cut, view)
        found: list[tuple[int, int, int, int]] = []
        if exact:
            _scan(words, where, exact, shift, 0, found, every_exact)
        if fold:
            folded = view.casefold()
            if len(folded) == len(view):  # one character for one: the same cut
                words = cut.findall(folded)
            else:
                words = [view[s:e].casefold() for s, e in map(where, range(len(words)))]
            _scan(words, where, fold, shift, 1, found, every_fold)
        if origin is None:
            return [(where(i)[0], where(j)[1], rank, row) for i, j, rank, row in found]
        return [(origin[where(i)[0]], origin[where(j)[1]], rank, row) for i, j, rank, row in found]


# A piece of printable ASCII with the one space before it, if any (runs of spaces excluded)
_SPACED_PIECE = re.compile(r" ?(?:[A-Za-z0-9]+|[^ ])")


class _Spans:
    """Where the pieces of a text are, found on demand: a text is cut into pieces (cheap,
    in C) but only the few pieces around a term need their offsets. Call with a piece's
    index for its (start, end); asking in increasing order reads the text once."""

    __slots__ = ("_cut", "_it", "_known", "_next", "_text")

    def __init__(self, cut: re.Pattern[str] | regex.Pattern[str], text: str) -> None:
        self._cut, self._text = cut, text
        self._it: Iterator[re.Match[str] | regex.Match[str]] | None = None
        self._next = 0  # the index of the piece self._it gives next
        self._known: dict[int, tuple[int, int]] = {}

    def __call__(self, index: int) -> tuple[int, int]:
        got = self._known.get(index)
        if got is None:
            if self._it is None or index < self._next:
                self._it, self._next = self._cut.finditer(self._text), 0
            match = next(islice(self._it, index - self._next, None))
            self._next = index + 1
            got = self._known[index] = match.span()
        return got


def _most(tables: Iterable[Mapping[str, int]]) -> Mapping[str, int]:
    """The tables as one, keeping the largest count of each key."""
    out: Mapping[str, int] = {}
    for i, table in enumerate(tables):
        if i == 0:
            out = table
            continue
        merged = dict(out)
        for key, count in table.items():
            if merged.get(key, 0) < count:
                merged[key] = count
        out = merged
    return out


def _scan(
    words: list[str],
    where: Callable[[int], tuple[int, int]] | None,
    table: dict[str, int],
    shift: int,
    rank: int,
    out: list[tuple[int, int, int, int]],
    every: bool,
) -> None:
    """(first piece, last piece, rank, row) of every term among ``words`` into ``out``.

    Only pieces that may be in the table are looked at (``every`` False: no lower-case
    one is). A phrase joins the pieces after its first with a space where white space
    parts them in the text (``where`` gives the pieces' offsets; None: there always is).
    """
    n = len(words)
    get = table.get
    if every:
        values = list(map(get, words))
        at: Iterable[int] = compress(range(n), values)
    else:
        values = []
        at = compress(range(n), map(not_, map(str.islower, words)))
    mask = (1 << shift) - 1
    for i in at:
        value = values[i] if every else get(words[i])
        if value is None:
            continue
        if value >> shift:
            out.append((i, i, rank, (value >> shift) - 1))
        phrase = words[i]
        for j in range(i + 1, min(n, i + (value & mask))):
            if where is None or where(j)[0] > where(j - 1)[1]:
                phrase += " "
            phrase += words[j]
            row = get(phrase, 0) >> shift
            if row:
                out.append((i, j, rank, row - 1))


def _longest_first(found: list[tuple[int, int, int, int]]) -> list[tuple[int, int, int]]:
    """(start, end, row) of the hits kept: longest first, then earlier, then exact."""
    found.sort(key=lambda h: (h[0] - h[1], h[0], h[2]))
    taken: list[tuple[int, int, int]] = []
    for start, end, _, row in found:
        if all(end <= s or start >= e for s, e, _ in taken):
            taken.append((start, end, row))
    taken.sort(key=lambda h: h[0])
    return taken
