"""Align a source with a speller's proposal and cut the difference into rewrites.

A rewrite is the unit every rule and verdict speaks about, so its boundaries matter:
one typo fix is one rewrite, a split ("notebook" → "note book") or a join comes out
whole, and unchanged whitespace around a change stays outside it. Two invariants hold
for any pair of strings (tested as properties over arbitrary Unicode):

* ``apply(source, []) == source``
* ``apply(source, align(source, proposal)) == proposal``

Alignment works on tokens (see :mod:`guard.text.tokenize`), with Levenshtein opcodes over
the token sequences computed by rapidfuzz; changes that only whitespace separates are
then aligned again word by word, with joins and splits as moves of their own, so that
neighbouring joins do not borrow each other's words. In scripts written without spaces each
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
from typing import cast

import regex
from rapidfuzz.distance import OSA, Levenshtein, Postfix, Prefix

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


def _window(source: str, proposal: str) -> tuple[int, int, int]:
    """``(start, source_end, proposal_end)`` of the region alignment must look at.

    Outside it the two texts are equal, and its edges are token boundaries of both.
    When the change begins right after a space and ends right before one, between plain
    ASCII characters (the usual word-for-word fix), its own edges are such boundaries:
    no token but whitespace holds a space, and no ASCII character extends a cluster.
    """
    prefix = Prefix.similarity(source, proposal)
    suffix = min(Postfix.similarity(source, proposal), min(len(source), len(proposal)) - prefix)
    start = _cut_before(source, prefix)
    skip = start  # past plain spaces that end at or before the change
    while skip < prefix and source[skip] == " ":
        skip += 1
    if skip > start and _plain_at(source, skip) and _plain_at(proposal, skip):
        start = skip
    src_end, prop_end = len(source) - suffix, len(proposal) - suffix
    if (
        suffix
        and source[src_end] == " "
        and src_end > start
        and prop_end > start
        and _plain_at(source, src_end - 1)
        and _plain_at(proposal, prop_end - 1)
    ):
        return start, src_end, prop_end
    cut = _cut_after(source, src_end + 1) if suffix > 1 else None
    if cut is None:
        return start, len(source), len(proposal)
    kept = len(source) - cut  # common tail left outside the window
    return start, len(source) - kept, len(proposal) - kept


def _plain_at(text: str, i: int) -> bool:
    """Whether ``text[i]`` is an ASCII character other than whitespace, or ``i`` is the end."""
    return i >= len(text) or (text[i].isascii() and not text[i].isspace())


def _cut_before(text: str, limit: int) -> int:
    """The last start of a whitespace run before ``limit`` (0 if none).

    Found with str methods when the space before ``limit`` follows a plain ASCII
    character (no whitespace run and no Prepend character there), else by the pattern.
    An earlier cut than the last one would also be right, only wider.
    """
    at = text.rfind(" ", 0, limit)
    while at > 0 and text[at - 1] == " ":
        at -= 1
    if at > 0 and text[at - 1].isascii() and not text[at - 1].isspace():
        return at
    back = _CUT_BACK.search(text, 0, limit)
    return back.start() if back is not None else 0


def _cut_after(text: str, pos: int) -> int | None:
    """The first start of a whitespace run at or after ``pos`` (None if none)."""
    at = text.find(" ", pos)
    if at > 0 and text[at - 1].isascii() and not text[at - 1].isspace():
        return at
    forward = _CUT.search(text, pos)
    return forward.start() if forward is not None else None


def _classify(old: str, new: str, n_old: int, n_new: int) -> RewriteKind:
    """The kind of a rewrite of ``n_old`` tokens other than whitespace into ``n_new``."""
    if not old:
        return RewriteKind.INSERT
    if not new:
        return RewriteKind.DELETE
    if 1 in (n_old, n_new) and max(n_old, n_new) > 1 and _squash(old) == _squash(new):
        return RewriteKind.SPLIT if n_old == 1 else RewriteKind.JOIN
    return RewriteKind.REPLACE


def _refinement(old: str, new: str) -> Refinement | None:
    """The one kind of difference ``old`` and ``new`` differ by, if only one."""
    if old.casefold() == new.casefold():
        return Refinement.CASE
    if old.isascii() and new.isascii():
        if old.isalnum() and new.isalnum():
            return None  # letters and digits only: no accent, space or punctuation to differ
        bare_old, bare_new = old.replace(" ", ""), new.replace(" ", "")
        if bare_old.isalnum() and bare_new.isalnum():  # and plain spaces: a join or split
            return Refinement.SPACING if bare_old == bare_new else None
    elif strip_accents(old) == strip_accents(new) and _diacritics_only(old, new):
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
    if text.isascii():
        bare = text.replace(" ", "")
        if bare.isalnum():  # letters, digits and plain spaces: what most joins are
            return bare.lower()
    return _SPACE_OR_HYPHEN.sub("", text).casefold()


def _regions(
    a: Sequence[str], b: Sequence[str], a_space: Sequence[bool], b_space: Sequence[bool]
) -> list[tuple[int, int, int, int]]:
    """Changed token regions ``(i1, i2, j1, j2)``, one a rewrite, in order.

    rapidfuzz's opcodes find what changed; changes separated only by unchanged
    whitespace form a group, which :func:`_realign` aligns again word by word, so that
    "to day to morrow" -> "today tomorrow" gives two joins, not a shifted pair.
    """
    groups: list[list[list[int]]] = []  # each group: its changed blocks [i1, i2, j1, j2]
    gap_is_space = False  # the unchanged run since the last change is only whitespace
    # Plain tuples, cheaper to read than the Opcode records (the stub says Opcode, whose
    # fields unpack in the same order).
    ops = cast(list[tuple[str, int, int, int, int]], Levenshtein.opcodes(a, b).as_list())
    for tag, i1, i2, j1, j2 in ops:
        if tag == "equal":
            gap_is_space = all(a_space[i1:i2])
            continue
        if groups and groups[-1][-1][1] == i1 and groups[-1][-1][3] == j1:
            groups[-1][-1][1], groups[-1][-1][3] = i2, j2  # adjacent: one block
        elif groups and gap_is_space:
            groups[-1].append([i1, i2, j1, j2])
        else:
            groups.append([[i1, i2, j1, j2]])
    out: list[tuple[int, int, int, int]] = []
    for blocks in groups:
        i1, j1 = blocks[0][0], blocks[0][2]
        i2, j2 = blocks[-1][1], blocks[-1][3]
        if (
            _may_split_or_join(blocks, a_space, b_space)
            and not _one_region(a, b, blocks)
            and (i2 - i1) * (j2 - j1) <= _REALIGN_LIMIT
        ):
            out.extend(_realign(a, b, a_space, b_space, i1, i2, j1, j2))
        else:  # rapidfuzz's blocks are already the rewrites
            out.extend((b1, b2, c1, c2) for b1, b2, c1, c2 in blocks)
    return out


# Beyond this many token pairs a group keeps rapidfuzz's alignment (the realignment is
# quadratic Python; real changes are a few tokens).
_REALIGN_LIMIT = 400
# A join whose letters differ in more than half is no join (the distance then counts 1).
_JOIN_CUTOFF = 0.5


def _may_split_or_join(
    blocks: Sequence[Sequence[int]], a_space: Sequence[bool], b_space: Sequence[bool]
) -> bool:
    """Whether realigning a group could change its rewrites.

    Not when every block is one token for one (word-for-word fixes between unchanged
    spaces), and not when no whitespace is involved (a split or join needs some: this
    spares the scripts written without spaces).
    """
    if all(i2 - i1 == 1 and j2 - j1 == 1 for i1, i2, j1, j2 in blocks):
        return False
    if len(blocks) > 1:
        return True  # the gaps between blocks are whitespace
    i1, i2, j1, j2 = blocks[0]
    return any(a_space[i1:i2]) or any(b_space[j1:j2])


def _one_region(a: Sequence[str], b: Sequence[str], blocks: Sequence[Sequence[int]]) -> bool:
    """Whether realigning would give back the group's one block whole: a join or split
    ("colleges that" -> "collegesthat"), where one side is one token that the other side
    does not hold. Realignment cuts a block only at tokens it finds equal on both sides
    (none: every step is a change) or between two word-for-word fixes (one token on a side
    allows one), so its path is one region. A property test compares the two.
    """
    if len(blocks) != 1:
        return False
    i1, i2, j1, j2 = blocks[0]
    if i2 - i1 == 1:
        return a[i1] not in b[j1:j2]
    if j2 - j1 == 1:
        return b[j1] not in a[i1:i2]
    return False


def _realign(
    a: Sequence[str],
    b: Sequence[str],
    a_space: Sequence[bool],
    b_space: Sequence[bool],
    i1: int,
    i2: int,
    j1: int,
    j2: int,
) -> list[tuple[int, int, int, int]]:
    """Align ``a[i1:i2]`` with ``b[j1:j2]`` by least cost, with splits and joins as moves.

    Costs: equal tokens 0; a word for a word, their normalized character distance
    (optimal string alignment, 0 to 1); whitespace for whitespace 0.2; inserting or
    deleting a word 1, whitespace 0.3; a join of two or three words (with the whitespace
    between) into one, or a split, 0.5 a joined word boundary plus twice the distance of
    the joined letters. The path's consecutive changes make one region each.

    Ties go to the move tried first: cells in row order, and from each cell the diagonal,
    a deletion, an insertion, the joins, then the splits (each the shorter first); a move
    replaces a cell's best only when strictly cheaper. The tables are flat lists indexed
    ``i * (m + 1) + j``, and a back pointer is the previous cell's index times two, plus
    one when the step changed something: this runs on the slowest pairs a speller gives
    (joins next to other fixes), so it makes no object per cell.
    """
    n, m = i2 - i1, j2 - j1
    xs, ys = a[i1:i2], b[j1:j2]
    y_space = b_space[j1:j2]
    y_gap = [0.3 if sp else 1.0 for sp in y_space]  # inserting each token of b
    a3, a5 = _joined(xs, a_space[i1:i2])
    b3, b5 = _joined(ys, y_space)
    width = m + 1
    # Every cell is reached (by deletions, then insertions) before its row is processed,
    # so no cell is skipped as unreached.
    cost = [float("inf")] * ((n + 1) * width)
    back = [0] * ((n + 1) * width)
    cost[0] = 0.0
    dist = OSA.normalized_distance
    for i in range(n):
        x = xs[i]
        row = i * width
        x_space = a_space[i1 + i]
        x_gap = 0.3 if x_space else 1.0
        x3, x5 = a3[i], a5[i]  # None unless x is a word
        for here in range(row, row + m):
            c = cost[here]
            code = 2 * here + 1  # back pointer of a changing step from here
            j = here - row
            y = ys[j]
            y_sp = y_space[j]
            to = here + width + 1
            if x == y:
                if c < cost[to]:
                    cost[to] = c
                    back[to] = code - 1
            elif y_sp:
                if x_space:
                    v = c + 0.2
                    if v < cost[to]:
                        cost[to] = v
                        back[to] = code
            elif not x_space:
                v = c + dist(x, y)
                if v < cost[to]:
                    cost[to] = v
                    back[to] = code
            v = c + x_gap
            if v < cost[here + width]:
                cost[here + width] = v
                back[here + width] = code
            v = c + y_gap[j]
            if v < cost[here + 1]:
                cost[here + 1] = v
                back[here + 1] = code
            if y_sp or x_space:
                continue  # a join or a split takes words on both sides
            if x3 is not None:  # x and the next word joined into y
                v = c + 0.5 + 2 * dist(x3, y, score_cutoff=_JOIN_CUTOFF)
                to = here + 3 * width + 1
                if v < cost[to]:
                    cost[to] = v
                    back[to] = code
                if x5 is not None:
                    v = c + 1.0 + 2 * dist(x5, y, score_cutoff=_JOIN_CUTOFF)
                    to = here + 5 * width + 1
                    if v < cost[to]:
                        cost[to] = v
                        back[to] = code
            y3 = b3[j]
            if y3 is not None:  # x split into y and the next word
                v = c + 0.5 + 2 * dist(x, y3, score_cutoff=_JOIN_CUTOFF)
                to = here + width + 3
                if v < cost[to]:
                    cost[to] = v
                    back[to] = code
                y5 = b5[j]
                if y5 is not None:
                    v = c + 1.0 + 2 * dist(x, y5, score_cutoff=_JOIN_CUTOFF)
                    to = here + width + 5
                    if v < cost[to]:
                        cost[to] = v
                        back[to] = code
        here = row + m  # the end of b: only a deletion
        v = cost[here] + x_gap
        if v < cost[here + width]:
            cost[here + width] = v
            back[here + width] = 2 * here + 1
    row = n * width  # the end of a: only insertions
    for here in range(row, row + m):
        v = cost[here] + y_gap[here - row]
        if v < cost[here + 1]:
            cost[here + 1] = v
            back[here + 1] = 2 * here + 1
    return _path(back, width, a_space, b_space, i1, j1)


def _joined(
    tokens: Sequence[str], space: Sequence[bool]
) -> tuple[list[str | None], list[str | None]]:
    """The letters of 2 and of 3 words starting at each token (None where the tokens
    there are not word, space, word (, space, word))."""
    n = len(tokens)
    two: list[str | None] = [None] * n
    three: list[str | None] = [None] * n
    for i in range(n - 2):
        if not space[i] and space[i + 1] and not space[i + 2]:
            two[i] = joined = tokens[i] + tokens[i + 2]
            if i + 4 < n and space[i + 3] and not space[i + 4]:
                three[i] = joined + tokens[i + 4]
    return two, three


def _path(
    back: Sequence[int],
    width: int,
    a_space: Sequence[bool],
    b_space: Sequence[bool],
    i1: int,
    j1: int,
) -> list[tuple[int, int, int, int]]:
    """The regions of the least-cost path that ends in the last cell of ``back``."""
    steps: list[tuple[int, int, int, int] | None] = []  # in text order; None: unchanged
    to = len(back) - 1
    while to:
        code = back[to]
        at = code >> 1
        pi, pj = divmod(at, width)
        i, j = divmod(to, width)
        steps.append((i1 + pi, i1 + i, j1 + pj, j1 + j) if code & 1 else None)
        to = at
    steps.reverse()
    path: list[tuple[int, int, int, int]] = []
    # A word fixed, the spacing after it changed, then the next word fixed on its own
    # ("l'alimengation" -> "l alimentation": the elision broken, a typo fixed) makes
    # two rewrites, so that the verdict on one does not take the other with it.
    fixed = spaced = False  # the step before is a word fix / the one before that is
    for s in steps:
        if s is None:
            fixed = spaced = False
            continue
        p, q, r, t = s
        word_fix = q - p == 1 and t - r == 1 and not a_space[p] and not b_space[r]
        apart = word_fix and spaced
        if path and path[-1][1] == p and path[-1][3] == r and not apart:
            path[-1] = (path[-1][0], q, path[-1][2], t)  # adjacent change: extend
        else:
            path.append(s)
        spaced = fixed and all(a_space[p:q]) and all(b_space[r:t])
        fixed = word_fix
    return path


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
    one_a, one_b = spans(src_win), spans(prop_win)
    if len(one_a) == 1 and len(one_b) == 1:  # one token for another: the usual fix
        return (
            Rewrite(
                index=0,
                start=start,
                end=src_end,
                old=src_win,
                new=prop_win,
                new_start=start,
                new_end=prop_end,
                kind=RewriteKind.REPLACE,
                refinement=_refinement(src_win, prop_win),
                old_tokens=(Token(text=src_win, start=start, end=src_end, kind=one_a[0][2]),),
                new_tokens=(Token(text=prop_win, start=start, end=prop_end, kind=one_b[0][2]),),
            ),
        )
    if " " in src_win:
        fixes = _word_for_word(src_win, prop_win, start, one_a, one_b)
        if fixes is not None:
            return fixes
    return _by_opcodes(source, proposal, start, one_a, one_b)


def _by_opcodes(
    source: str, proposal: str, start: int, one_a: Sequence[_Span], one_b: Sequence[_Span]
) -> tuple[Rewrite, ...]:
    """The general path: rapidfuzz's opcodes over the window's tokens (``one_a``,
    ``one_b``: its spans, relative to ``start``), realigned where words were split or
    joined."""
    a = [source[s + start : e + start] for s, e, _ in one_a]
    b = [proposal[s + start : e + start] for s, e, _ in one_b]
    a_space = [k is _SPACE_KIND for _, _, k in one_a]
    b_space = [k is _SPACE_KIND for _, _, k in one_b]
    rewrites: list[Rewrite] = []
    for i1, i2, j1, j2 in _regions(a, b, a_space, b_space):
        old_start = (one_a[i1][0] if i1 < i2 else _position(one_a, i1)) + start
        old_end = one_a[i2 - 1][1] + start if i1 < i2 else old_start
        new_start = (one_b[j1][0] if j1 < j2 else _position(one_b, j1)) + start
        new_end = one_b[j2 - 1][1] + start if j1 < j2 else new_start
        old, new = source[old_start:old_end], proposal[new_start:new_end]
        if old == new:
            continue  # the same text cut into other tokens by what precedes it: no change
        n_old = i2 - i1 - sum(a_space[i1:i2])
        n_new = j2 - j1 - sum(b_space[j1:j2])
        rewrites.append(
            Rewrite(
                index=len(rewrites),
                start=old_start,
                end=old_end,
                old=old,
                new=new,
                new_start=new_start,
                new_end=new_end,
                kind=_classify(old, new, n_old, n_new),
                refinement=_refinement(old, new),
                old_tokens=_tokens(a, one_a, i1, i2, start),
                new_tokens=_tokens(b, one_b, j1, j2, start),
            )
        )
    return tuple(rewrites)


def _tokens(
    texts: Sequence[str], span_list: Sequence[_Span], i1: int, i2: int, offset: int
) -> tuple[Token, ...]:
    """The records of tokens ``i1`` to ``i2`` (``texts``: their texts; ``span_list``: their
    spans, relative to ``offset``)."""
    return tuple(
        [
            Token(
                text=texts[i],
                start=span_list[i][0] + offset,
                end=span_list[i][1] + offset,
                kind=span_list[i][2],
            )
            for i in range(i1, i2)
        ]
    )


# More changed words than this may have another alignment as cheap as the word-for-word
# one (see _word_for_word).
_WORD_FOR_WORD_MAX = 3


def _word_for_word(
    src_win: str,
    prop_win: str,
    start: int,
    a_spans: Sequence[_Span],
    b_spans: Sequence[_Span],
) -> tuple[Rewrite, ...] | None:
    """The rewrites of a window where the speller changed a few words but not the
    spacing, or None when the window is not that simple.

    Two fixes in one query ("juust ttial for" -> "just trial for") put spaces inside
    the window, and the general path then runs Levenshtein opcodes over all of it. When
    both windows alternate word and whitespace tokens, token for token, and differ only
    in at most three words, the word-for-word substitutions are the only cheapest
    alignment: any other has a deletion and an insertion, and either shifts words onto
    whitespace over the stretch between them (one substitution per token there, more than
    the changed words it could save) or shifts by a word and its space at both ends (four
    edits). So the general path would cut exactly these rewrites (a property test
    compares the two); this finds them from the spans alone.
    """
    if len(a_spans) != len(b_spans):
        return None
    out: list[Rewrite] = []
    space = a_spans[0][2] is _SPACE_KIND
    for (s, e, k), (t, f, q) in zip(a_spans, b_spans, strict=True):
        if (k is _SPACE_KIND) is not space:
            return None  # not one word, one space, one word...
        space = not space
        old, new = src_win[s:e], prop_win[t:f]
        if old == new:
            continue
        if k is _SPACE_KIND or q is _SPACE_KIND or len(out) == _WORD_FOR_WORD_MAX:
            return None
        out.append(
            Rewrite(
                index=len(out),
                start=start + s,
                end=start + e,
                old=old,
                new=new,
                new_start=start + t,
                new_end=start + f,
                kind=RewriteKind.REPLACE,
                refinement=_refinement(old, new),
                old_tokens=(Token(text=old, start=start + s, end=start + e, kind=k),),
                new_tokens=(Token(text=new, start=start + t, end=start + f, kind=q),),
            )
        )
    return tuple(out)


_SPACE_KIND = TokenKind.SPACE


def _position(span_list: Sequence[_Span], i: int) -> int:
    """Where token ``i`` of a window starts (its end, past the last), relative to it."""
    if i < len(span_list):
        return span_list[i][0]
    return span_list[-1][1] if span_list else 0


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
