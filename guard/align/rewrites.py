"""Align a source with a speller's proposal and cut the difference into rewrites.

A rewrite is the unit every rule and verdict speaks about, so its boundaries matter:
one typo fix is one rewrite, a split ("notebook" → "note book") or a join comes out
whole, and unchanged whitespace around a change stays outside it. Two invariants hold
for any pair of strings (tested as properties over arbitrary Unicode):

* ``apply(source, []) == source``
* ``apply(source, align(source, proposal)) == proposal``

Alignment works on tokens (see :mod:`guard.text.tokenize`), with Levenshtein opcodes over
the token sequences computed by rapidfuzz. In scripts written without spaces each
grapheme cluster is a token, so a change inside Han or Thai text yields a rewrite of
only the changed clusters. Only the region between the common prefix and suffix of the
two texts (widened to whitespace) is tokenized: that keeps a one-word fix in a long
sentence cheap, and it gives the same tokens as tokenizing the whole text, because no
token other than whitespace crosses the start of a whitespace run.

>>> [(r.old, r.new, r.kind.value) for r in align("a note book here", "a notebook here")]
[('note book', 'notebook', 'join')]
"""

from __future__ import annotations

import unicodedata
from collections.abc import Iterable, Sequence

import regex
from rapidfuzz.distance import Levenshtein

from guard.records import Refinement, Rewrite, RewriteKind, Token, TokenKind
from guard.text.normalize import strip_accents
from guard.text.tokenize import spans

__all__ = ["align", "apply"]

# The start of a whitespace run: every tokenization has a token boundary there.
_CUT = regex.compile(r"(?<=[^\s\p{GCB=Prepend}])(?=\s)")
_CUT_BACK = regex.compile(r"(?r)(?<=[^\s\p{GCB=Prepend}])(?=\s)")
_SPACE = regex.compile(r"\s+")
_SPACE_OR_HYPHEN = regex.compile(r"[\s\p{Pd}]+")
_PUNCT_OR_SPACE = regex.compile(r"[\p{P}\s]+")
# Combining Diacritical Marks and its Extended and Supplement blocks, and the marks for
# symbols and half marks: accents, not the vowel signs of abugidas.
_DIACRITICS = regex.compile(r"[\u0300-\u036f\u1ab0-\u1aff\u1dc0-\u1dff\u20d0-\u20ff\ufe20-\ufe2f]+")

_Span = tuple[int, int, TokenKind]


def _common_prefix(a: str, b: str) -> int:
    """Length of the common prefix, by bisection over slice comparisons (done in C)."""
    lo, hi = 0, min(len(a), len(b))
    while lo < hi:
        mid = (lo + hi + 1) // 2
        if a[:mid] == b[:mid]:
            lo = mid
        else:
            hi = mid - 1
    return lo


def _common_suffix(a: str, b: str, limit: int) -> int:
    lo, hi = 0, limit
    while lo < hi:
        mid = (lo + hi + 1) // 2
        if a[len(a) - mid :] == b[len(b) - mid :]:
            lo = mid
        else:
            hi = mid - 1
    return lo


def _window(source: str, proposal: str) -> tuple[int, int, int]:
    """``(start, source_end, proposal_end)`` of the region alignment must look at.

    Outside it the two texts are equal, and its edges are token boundaries of both.
    """
    prefix = _common_prefix(source, proposal)
    suffix = _common_suffix(source, proposal, min(len(source), len(proposal)) - prefix)
    back = _CUT_BACK.search(source, 0, prefix)
    start = back.start() if back is not None else 0
    forward = _CUT.search(source, len(source) - suffix + 1) if suffix > 1 else None
    if forward is None:
        return start, len(source), len(proposal)
    kept = len(source) - forward.start()  # common tail left outside the window
    return start, len(source) - kept, len(proposal) - kept


def _classify(
    old: str, new: str, old_spans: Sequence[_Span], new_spans: Sequence[_Span]
) -> tuple[RewriteKind, Refinement | None]:
    if not old:
        kind = RewriteKind.INSERT
    elif not new:
        kind = RewriteKind.DELETE
    else:
        kind = RewriteKind.REPLACE
        n_old = sum(1 for s in old_spans if s[2] is not TokenKind.SPACE)
        n_new = sum(1 for s in new_spans if s[2] is not TokenKind.SPACE)
        if 1 in (n_old, n_new) and max(n_old, n_new) > 1 and _squash(old) == _squash(new):
            kind = RewriteKind.SPLIT if n_old == 1 else RewriteKind.JOIN
    return kind, _refinement(old, new)


def _refinement(old: str, new: str) -> Refinement | None:
    """The one kind of difference ``old`` and ``new`` differ by, if only one."""
    if old.casefold() == new.casefold():
        return Refinement.CASE
    if strip_accents(old) == strip_accents(new) and _diacritics_only(old, new):
        return Refinement.ACCENTS
    if _SPACE.sub("", old) == _SPACE.sub("", new):
        return Refinement.SPACING
    if _PUNCT_OR_SPACE.sub("", old) == _PUNCT_OR_SPACE.sub("", new):
        return Refinement.PUNCTUATION
    return None


def _diacritics_only(old: str, new: str) -> bool:
    """Whether only generic diacritics (the Combining Diacritical Marks blocks) differ.

    strip_accents drops every nonspacing mark, and in Indic, Thai or Hebrew text those
    marks are vowels and tones, not accents: changing them changes the word.
    """
    return _DIACRITICS.sub("", unicodedata.normalize("NFD", old)) == _DIACRITICS.sub(
        "", unicodedata.normalize("NFD", new)
    )


def _squash(text: str) -> str:
    """The letters a split or join must keep: no spaces, no hyphens, any case."""
    return _SPACE_OR_HYPHEN.sub("", text).casefold()


def _regions(
    a: Sequence[str], b: Sequence[str], a_spans: Sequence[_Span]
) -> list[tuple[int, int, int, int]]:
    """Changed token regions ``(i1, i2, j1, j2)``: adjacent changes merged, and changes
    separated only by unchanged whitespace merged when together they are a split or join."""
    merged: list[list[int]] = []
    gap_is_space = False  # the equal run since the last change is only whitespace
    for op in Levenshtein.opcodes(a, b):
        i1, i2, j1, j2 = op.src_start, op.src_end, op.dest_start, op.dest_end
        if op.tag == "equal":
            gap_is_space = all(a_spans[i][2] is TokenKind.SPACE for i in range(i1, i2))
            continue
        last = merged[-1] if merged else None
        if last is not None and (
            (last[1] == i1 and last[3] == j1)
            or (
                gap_is_space
                and _squash("".join(a[last[0] : i2])) == _squash("".join(b[last[2] : j2]))
            )
        ):
            last[1], last[3] = i2, j2
        else:
            merged.append([i1, i2, j1, j2])
    out: list[tuple[int, int, int, int]] = []
    for i1, i2, j1, j2 in merged:
        # Merging across whitespace may bring equal tokens to the edges: leave them out.
        while i1 < i2 and j1 < j2 and a[i1] == b[j1]:
            i1, j1 = i1 + 1, j1 + 1
        while i1 < i2 and j1 < j2 and a[i2 - 1] == b[j2 - 1]:
            i2, j2 = i2 - 1, j2 - 1
        out.append((i1, i2, j1, j2))
    return out


def _tokens(text: str, span_list: Sequence[_Span], offset: int) -> tuple[Token, ...]:
    return tuple(
        Token(text=text[s - offset : e - offset], start=s, end=e, kind=k) for s, e, k in span_list
    )


def align(source: str, proposal: str) -> tuple[Rewrite, ...]:
    """The rewrites that turn ``source`` into ``proposal``, in source order.

    >>> [(r.old, r.new, r.kind.value, r.refinement) for r in align("Teh pump", "The pump")]
    [('Teh', 'The', 'replace', None)]
    >>> [(r.start, r.end, r.new, r.kind.value) for r in align("a b", "a big b")]
    [(2, 2, 'big ', 'insert')]
    >>> align("same", "same")
    ()
    """
    if source == proposal:
        return ()
    start, src_end, prop_end = _window(source, proposal)
    src_win, prop_win = source[start:src_end], proposal[start:prop_end]
    a_spans = [(s + start, e + start, k) for s, e, k in spans(src_win)]
    b_spans = [(s + start, e + start, k) for s, e, k in spans(prop_win)]
    a = [source[s:e] for s, e, _ in a_spans]
    b = [proposal[s:e] for s, e, _ in b_spans]
    rewrites: list[Rewrite] = []
    for i1, i2, j1, j2 in _regions(a, b, a_spans):
        old_spans, new_spans = a_spans[i1:i2], b_spans[j1:j2]
        old_start = a_spans[i1][0] if i1 < i2 else _position(a_spans, i1, start)
        old_end = a_spans[i2 - 1][1] if i1 < i2 else old_start
        new_start = b_spans[j1][0] if j1 < j2 else _position(b_spans, j1, start)
        new_end = b_spans[j2 - 1][1] if j1 < j2 else new_start
        old, new = source[old_start:old_end], proposal[new_start:new_end]
        kind, refinement = _classify(old, new, old_spans, new_spans)
        rewrites.append(
            Rewrite(
                index=len(rewrites),
                start=old_start,
                end=old_end,
                old=old,
                new=new,
                new_start=new_start,
                new_end=new_end,
                kind=kind,
                refinement=refinement,
                old_tokens=_tokens(source, old_spans, 0),
                new_tokens=_tokens(proposal, new_spans, 0),
            )
        )
    return tuple(rewrites)


def _position(span_list: Sequence[_Span], i: int, window_start: int) -> int:
    """The text offset where token ``i`` of a window starts (its end, past the last)."""
    if i < len(span_list):
        return span_list[i][0]
    return span_list[-1][1] if span_list else window_start


def apply(source: str, rewrites: Iterable[Rewrite]) -> str:
    """``source`` with the given rewrites applied (any subset of what :func:`align` gave).

    Raises ``ValueError`` when a rewrite does not fit ``source`` (its ``old`` is not the
    text at its span) or when two rewrites overlap.

    >>> rs = align("Teh pump is brokn", "The pump is broken")
    >>> apply("Teh pump is brokn", rs[1:])
    'Teh pump is broken'
    >>> apply("Teh pump is brokn", [])
    'Teh pump is brokn'
    """
    parts: list[str] = []
    at = 0
    for r in sorted(rewrites, key=lambda r: (r.start, r.end)):
        if r.start < at:
            raise ValueError(f"rewrite {r.index} ({r.start}:{r.end}) overlaps the one before it")
        if source[r.start : r.end] != r.old:
            raise ValueError(
                f"rewrite {r.index} does not fit the source: expected {r.old!r} at "
                f"{r.start}:{r.end}, found {source[r.start : r.end]!r}"
            )
        parts.append(source[at : r.start])
        parts.append(r.new)
        at = r.end
    parts.append(source[at:])
    return "".join(parts)
