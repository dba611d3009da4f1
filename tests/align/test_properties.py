"""Alignment invariants over arbitrary Unicode (DESIGN "Alignment"), as hypothesis properties.

* applying no rewrite gives the source back; applying all gives the proposal;
* every rewrite names the text at its span, in both texts; rewrites are sorted and
  do not overlap;
* nothing raises, whatever the input.

Proposals are drawn both independently and as random edits of the source, since a
speller's proposal is mostly the source with a few changes.
"""

from __future__ import annotations

import random

from hypothesis import example, given, settings
from hypothesis import strategies as st

from guard.align import align, apply
from guard.align import rewrites as rewrites_module
from guard.records import Refinement, RewriteKind, TokenKind
from guard.text.tokenize import spans, tokenize

PIECES = [
    "pump",
    "Valve",
    "the",
    "e\u0301",
    "cafe\u0301",
    "\U0001f469\u200d\U0001f4bb",
    "\U0001f44d\U0001f3fd",
    "\U0001f1eb\U0001f1f7",
    "שלום",
    "עולם",
    "مرحبا",
    "東京",
    "我喜欢",
    "タワー",
    "สวัสดี",
    "ครับ",
    "XR-220",
    "3.5mm",
    "1,000",
    "l'",
    "don't",
    "well-known",
    "os.path",
    "./x.sh",
    "a@b.org",
    "https://x.org/a",
    "-",
    ".",
    ",",
    "'",
    "/",
    "#",
    "@",
    "\u200b",
    "\u202e",
    "\u00ad",
    "\u0301",
    "\u0600",
    " ",
    " ",
    " ",
    "  ",
    "\t",
    "\n",
    "\r\n",
    "\u00a0",
    "\u3000",
    "\ud800",  # a lone surrogate: not text, but a Python str can hold one
    "5mg/kg",
    "C:\\x\\y.txt",
    "🇫🇷🇫",
]
SMALL_EDITS = [" ", "-", "e", "\u0301", "\u200d", "X", "字", "ั", "'", "s", "1", ""]


def _char(rng: random.Random) -> str:
    """Any code point but a lone surrogate, leaning to the planes text lives in."""
    cp = rng.choice([rng.randrange(0x80), rng.randrange(0x3000), rng.randrange(0x110000)])
    return chr(cp) if not 0xD800 <= cp < 0xE000 else "?"


def _text(rng: random.Random) -> str:
    parts = []
    for _ in range(rng.randrange(15)):
        parts.append(rng.choice(PIECES) if rng.random() < 0.7 else _char(rng))
    return "".join(parts)


def _edit(rng: random.Random, source: str) -> str:
    """The source with a few character edits: typos, splits, joins, case, new pieces."""
    text = list(source)
    for _ in range(rng.randrange(5)):
        at = rng.randrange(len(text) + 1)
        op = rng.choice(["insert", "delete", "replace", "swap", "case", "piece"])
        if op == "insert":
            text.insert(at, rng.choice(SMALL_EDITS) if rng.random() < 0.7 else _char(rng))
        elif op == "piece":
            text[at:at] = list(rng.choice(PIECES))
        elif at < len(text):
            if op == "delete":
                del text[at]
            elif op == "replace":
                text[at] = rng.choice(SMALL_EDITS) or _char(rng)
            elif op == "case":
                text[at] = text[at].swapcase()
            elif op == "swap" and at + 1 < len(text):
                text[at], text[at + 1] = text[at + 1], text[at]
    return "".join(text)


@st.composite
def pairs(draw: st.DrawFn) -> tuple[str, str]:
    """Half hypothesis' own text (which it shrinks well), half built from pieces by a
    seeded generator (cheap to draw, so 10,000 examples stay quick)."""
    if draw(st.booleans()):
        source = draw(st.text())
        proposal = draw(st.text() | st.just(source))
        return source, proposal
    rng = draw(st.randoms(use_true_random=False))
    source = _text(rng)
    return source, (_edit(rng, source) if rng.random() < 0.7 else _text(rng))


@settings(max_examples=10_000, deadline=None)
@given(pairs())
# found by this test: a combining mark that takes the place of a space glues the next
# token to the previous one, so "5mg/kg" is cut into other tokens on the two sides
@example(("pumpValvethe--\r\n-os.path! 5mg/kg", "upmpValvethe--\r\n-os.path!\u03015mg/kg"))
def test_alignment_round_trips(pair: tuple[str, str]) -> None:
    source, proposal = pair
    rewrites = align(source, proposal)
    assert apply(source, []) == source
    assert apply(source, rewrites) == proposal
    at = 0
    for i, r in enumerate(rewrites):
        assert r.index == i
        assert r.start >= at  # sorted, not overlapping
        at = r.end
        assert source[r.start : r.end] == r.old
        assert proposal[r.new_start : r.new_end] == r.new
        assert r.old != r.new
        assert (r.kind is RewriteKind.INSERT) == (r.old == "")
        assert (r.kind is RewriteKind.DELETE) == (r.new == "")
        assert "".join(t.text for t in r.old_tokens) == r.old
        assert "".join(t.text for t in r.new_tokens) == r.new
    if source == proposal:
        assert rewrites == ()


@settings(max_examples=300, deadline=None)
@given(pairs(), st.data())
def test_any_subset_applies(pair: tuple[str, str], data: st.DataObject) -> None:
    source, proposal = pair
    rewrites = align(source, proposal)
    chosen = [r for r in rewrites if data.draw(st.booleans())]
    result = apply(source, chosen)
    # what is not chosen stays as in the source: undoing the chosen ones gives it back
    undo = align(result, source)
    assert apply(result, undo) == source


@settings(max_examples=300, deadline=None)
@given(pairs())
def test_rewrite_tokens_are_the_texts_own_tokens(pair: tuple[str, str]) -> None:
    # align tokenizes only the changed region; its tokens must be those of the whole text
    source, proposal = pair
    source_tokens, proposal_tokens = set(tokenize(source)), set(tokenize(proposal))
    for r in align(source, proposal):
        assert set(r.old_tokens) <= source_tokens
        assert set(r.new_tokens) <= proposal_tokens


WORDS = st.lists(st.text(alphabet="abcdefgh", min_size=1, max_size=6), min_size=2, max_size=8)


@settings(max_examples=300, deadline=None)
@given(WORDS, st.data())
def test_one_space_less_is_one_join_and_back_one_split(
    words: list[str], data: st.DataObject
) -> None:
    # definition of the kinds (guard.records.RewriteKind): same letters, n tokens to 1
    i = data.draw(st.integers(0, len(words) - 2))
    source = " ".join(words)
    proposal = " ".join([*words[:i], words[i] + words[i + 1], *words[i + 2 :]])
    (join,) = align(source, proposal)
    assert (join.kind, join.refinement) == (RewriteKind.JOIN, Refinement.SPACING)
    assert join.old.replace(" ", "") == join.new
    (split,) = align(proposal, source)
    assert (split.kind, split.refinement) == (RewriteKind.SPLIT, Refinement.SPACING)


# Few distinct words, so that repeated words and shifted sequences (the cases where
# another alignment could tie with word-for-word substitution) come up often.
FEW_WORDS = st.sampled_from(["a", "b", "ab", "pump", "XR-220", "e\u0301", "東", ",", "a,"])
SPACES = st.sampled_from([" ", " ", " ", "  ", "\t", "\u00a0"])


@st.composite
def word_swaps(draw: st.DrawFn) -> tuple[str, str]:
    """A sentence and the same sentence with some words swapped for others, the spacing
    mostly kept: what a speller fixing several words of one query gives."""
    words = draw(st.lists(FEW_WORDS, min_size=1, max_size=9))
    gaps = draw(st.lists(SPACES, min_size=len(words) + 1, max_size=len(words) + 1))
    lead, trail = draw(st.booleans()), draw(st.booleans())
    new_words = list(words)
    if len(words) > 1 and draw(st.booleans()):  # a stretch shifted by a word
        i, j = sorted(draw(st.lists(st.integers(0, len(words) - 1), min_size=2, max_size=2)))
        new_words[i:j] = words[i + 1 : j + 1]
    for i in draw(st.lists(st.integers(0, len(words) - 1), max_size=5)):
        new_words[i] = draw(FEW_WORDS)
    if draw(st.integers(0, 9)) == 0:  # now and then the spacing changes too
        gaps[draw(st.integers(0, len(gaps) - 1))] = draw(SPACES)

    def join(ws: list[str], gs: list[str]) -> str:
        inner = "".join(w + g for w, g in zip(ws, gs[1:-1], strict=False)) + ws[-1]
        return (gs[0] if lead else "") + inner + (gs[-1] if trail else "")

    return join(words, gaps), join(new_words, gaps)


@settings(max_examples=3000, deadline=None)
@given(word_swaps() | pairs())
def test_word_for_word_shortcut_matches_the_general_path(pair: tuple[str, str]) -> None:
    # The shortcut claims the opcodes path would cut the same rewrites (its docstring
    # argues why); this compares the two on the same window.
    source, proposal = pair
    if source == proposal:
        return
    start, src_end, prop_end = rewrites_module._window(source, proposal)
    a, b = spans(source[start:src_end]), spans(proposal[start:prop_end])
    fast = rewrites_module._word_for_word(
        source[start:src_end], proposal[start:prop_end], start, a, b
    )
    if fast is not None:
        assert fast == rewrites_module._by_opcodes(source, proposal, start, a, b)


@settings(max_examples=3000, deadline=None)
@given(pairs(), st.data())
def test_a_lone_token_block_is_what_realignment_gives(
    pair: tuple[str, str], data: st.DataObject
) -> None:
    # _one_region skips realigning a block with one token on one side that the other side
    # lacks (its docstring argues realignment returns that block whole); this checks it.
    source, proposal = pair
    a_spans, b_spans = spans(source), spans(proposal)
    a = [source[s:e] for s, e, _ in a_spans]
    b = [proposal[s:e] for s, e, _ in b_spans]
    if not a or not b:
        return
    i1 = data.draw(st.integers(0, len(a) - 1))
    j1 = data.draw(st.integers(0, len(b) - 1))
    i2 = data.draw(st.integers(i1 + 1, min(len(a), i1 + 6)))
    j2 = data.draw(st.integers(j1 + 1, min(len(b), j1 + 6)))
    blocks = [[i1, i2, j1, j2]]
    if rewrites_module._one_region(a, b, blocks):
        a_space = [k is TokenKind.SPACE for _, _, k in a_spans]
        b_space = [k is TokenKind.SPACE for _, _, k in b_spans]
        assert rewrites_module._realign(a, b, a_space, b_space, i1, i2, j1, j2) == [
            (i1, i2, j1, j2)
        ]


@settings(max_examples=1000, deadline=None)
@given(WORDS, st.data())
def test_joins_of_any_length_are_one_region(words: list[str], data: st.DataObject) -> None:
    # the common case of the shortcut above: words joined (or split back), maybe with a typo
    i = data.draw(st.integers(0, len(words) - 2))
    k = data.draw(st.integers(2, min(4, len(words) - i)))
    joined = "".join(words[i : i + k]) + data.draw(st.sampled_from(["", "x"]))
    a = [t for w in words for t in (w, " ")][:-1]
    b = [t for w in [*words[:i], joined, *words[i + k :]] for t in (w, " ")][:-1]
    a_space = [t == " " for t in a]
    b_space = [t == " " for t in b]
    block = [[2 * i, 2 * (i + k) - 1, 2 * i, 2 * i + 1]]
    for x, y, xs, ys, blk in (
        (a, b, a_space, b_space, block[0]),
        (b, a, b_space, a_space, [block[0][2], block[0][3], block[0][0], block[0][1]]),
    ):
        if rewrites_module._one_region(x, y, [blk]):
            assert rewrites_module._realign(x, y, xs, ys, *blk) == [tuple(blk)]
