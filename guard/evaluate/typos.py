"""Synthetic misspellings: turn clean text (the gold) into a source with typos in it.

Evaluation needs pairs whose right answer is known. This module takes clean text and
injects keyboard-style typos into some of its word tokens, so that the clean text is the
gold and the damaged text is what a speller gets to fix.

The error model
---------------
A misspelt word gets one edit most of the time and two edits otherwise. Damerau (1964,
"A technique for computer detection and correction of spelling errors", Commun. ACM
7(3):171-176; abstract verified) built his corrector on the observation that most
misspellings are a single wrong, missing or extra letter or a single transposition of two
adjacent letters; the share he reported, "over 80 percent" of the errors in his sample, is
from memory (the body of the paper, not verified here). So ``DEFAULT_MIX`` gives 80% of
misspelt words one edit and 20% two.

The kinds of a single edit and their default weights (the relative weights are common
practice, no source):

==============  ======  ===========================================================
kind            weight  what it does
==============  ======  ===========================================================
substitute      0.35    one letter replaced; 80% of the time by a keyboard neighbour
delete          0.20    one letter dropped
insert          0.15    one letter added; 80% of the time a neighbour of the letter
                        before or after it
transpose       0.15    two adjacent letters swapped
double          0.075   a letter typed twice ("adress" -> "address" is the reverse)
undouble        0.075   a doubled letter typed once ("address" -> "adress")
==============  ======  ===========================================================

A kind that cannot apply to a word (undouble on a word with no double letter, transpose
on a word whose letters are all equal) is drawn again from the kinds that can.

What is left alone
------------------
Only word tokens with at least ``min_letters`` letters are damaged (very short words
mostly become other real words). Literal tokens (URLs, paths, identifiers, codes, flags,
numbers...) are left as they are unless ``include_literals`` is set: a person copying a
path makes typos in it too, but the measure that matters most is what a speller does to
literals that were right. Typos never bring digits or new punctuation into a token and
a damaged word must still be one token of the same kind.

Determinism
-----------
Record ``i`` is damaged with its own ``random.Random(f"{seed}/{i}")`` (a string seed is
hashed with SHA-512 by the random module, so it does not depend on PYTHONHASHSEED), so a
run over part of a file, or in parallel chunks, gives each record the same typos as a
whole run. A share ``clean_share`` of records is kept clean on purpose, so that what a
speller does to clean text is measured too; every other record gets at least one typo.

This module does no I/O; reading and writing files is the job of guard.evaluate.jsonl.
"""

from __future__ import annotations

import enum
import itertools
import random
from collections.abc import Iterable, Iterator, Mapping
from dataclasses import dataclass, field

from guard.evaluate.jsonl import CleanText
from guard.evaluate.keyboards import layout_for, layout_letters, neighbours
from guard.records import LITERAL_KINDS, Token, TokenKind
from guard.text.tokenize import tokenize


class EditKind(enum.StrEnum):
    """One kind of single-letter typo."""

    SUBSTITUTE = "substitute"
    DELETE = "delete"
    INSERT = "insert"
    TRANSPOSE = "transpose"
    DOUBLE = "double"
    UNDOUBLE = "undouble"


@dataclass(frozen=True, slots=True, kw_only=True)
class TypoMix:
    """How typos are drawn: the weight of each edit kind and how many edits a word gets.

    ``edits_per_word`` maps a number of edits to its weight; ``neighbour_share`` is the
    share of substitutions and insertions that use a keyboard neighbour rather than any
    letter of the layout.
    """

    kinds: Mapping[EditKind, float] = field(
        default_factory=lambda: {
            EditKind.SUBSTITUTE: 0.35,
            EditKind.DELETE: 0.20,
            EditKind.INSERT: 0.15,
            EditKind.TRANSPOSE: 0.15,
            EditKind.DOUBLE: 0.075,
            EditKind.UNDOUBLE: 0.075,
        }
    )
    edits_per_word: Mapping[int, float] = field(default_factory=lambda: {1: 0.8, 2: 0.2})
    neighbour_share: float = 0.8


DEFAULT_MIX = TypoMix()
"""Mostly single edits (80%, after Damerau 1964; see the module docstring)."""


@dataclass(frozen=True, slots=True, kw_only=True)
class TypoOptions:
    """Settings of a typo run. ``rate`` is the chance that an eligible word gets a typo."""

    rate: float = 0.15
    seed: int = 0
    layout: str | None = None  # None: the usual layout of each record's language
    mix: TypoMix = DEFAULT_MIX
    clean_share: float = 0.2
    include_literals: bool = False
    min_letters: int = 3

    def __post_init__(self) -> None:
        if not 0.0 <= self.rate <= 1.0:
            raise ValueError(f"rate must be between 0 and 1, got {self.rate}")
        if not 0.0 <= self.clean_share <= 1.0:
            raise ValueError(f"clean share must be between 0 and 1, got {self.clean_share}")
        if self.min_letters < 1:
            raise ValueError(f"min letters must be at least 1, got {self.min_letters}")


@dataclass(frozen=True, slots=True, kw_only=True)
class Typo:
    """One damaged token: where it is in the gold, what it was, what it became, and how."""

    start: int
    end: int
    gold: str
    typo: str
    edits: tuple[EditKind, ...]


@dataclass(frozen=True, slots=True, kw_only=True)
class Damaged:
    """The result for one text: the damaged source and every typo in it."""

    source: str
    gold: str
    typos: tuple[Typo, ...]
    clean_on_purpose: bool


def _weighted(rng: random.Random, weights: Mapping[EditKind, float]) -> EditKind:
    kinds = list(weights)
    return rng.choices(kinds, weights=[weights[k] for k in kinds])[0]


def _letter_positions(word: str) -> list[int]:
    return [i for i, ch in enumerate(word) if ch.isalpha()]


def _match_case(template: str, letter: str) -> str:
    return letter.upper() if template.isupper() else letter


def _near(rng: random.Random, ch: str, layout: str, mix: TypoMix) -> str:
    """A keyboard neighbour of ``ch`` most of the time, else any letter of the layout."""
    near = neighbours(layout).get(ch.lower(), "")
    if near and rng.random() < mix.neighbour_share:
        pick = rng.choice(near)
    else:
        pick = rng.choice(layout_letters(layout))
    return _match_case(ch, pick)


def _adjacent(word: str, *, same: bool) -> list[int]:
    """Positions i where letters i and i+1 are side by side and equal (or differ)."""
    letters = _letter_positions(word)
    return [
        i
        for i, j in itertools.pairwise(letters)
        if j == i + 1
        and (word[i] == word[j]) == same
        and (same or word[i].lower() != word[j].lower())
    ]


def _applicable(word: str) -> set[EditKind]:
    letters = _letter_positions(word)
    kinds = {EditKind.SUBSTITUTE, EditKind.INSERT, EditKind.DOUBLE}
    if len(letters) >= 2:
        kinds.add(EditKind.DELETE)
    if _adjacent(word, same=False):
        kinds.add(EditKind.TRANSPOSE)
    if _adjacent(word, same=True):
        kinds.add(EditKind.UNDOUBLE)
    return kinds


def _keep_case(original: str, damaged: str) -> str:
    """Keep a Title or ALLCAPS word's case pattern: Shift is held for the first key or all."""
    if original.isupper():
        return damaged.upper()
    if original[:1].isupper() and original[1:] == original[1:].lower():
        return damaged[:1].upper() + damaged[1:].lower()
    return damaged


def apply_edit(word: str, kind: EditKind, rng: random.Random, layout: str, mix: TypoMix) -> str:
    """Apply one edit of ``kind`` to the letters of ``word`` (never to other characters).

    A Title or ALLCAPS word keeps its case pattern (a typist holds Shift for the first key,
    or for all of them), so ``Tern`` transposed becomes ``Etrn``, not ``eTrn``.

    >>> apply_edit("address", EditKind.UNDOUBLE, random.Random(1), "qwerty", DEFAULT_MIX)
    'adress'
    >>> apply_edit("Tern", EditKind.TRANSPOSE, random.Random(3), "qwerty", DEFAULT_MIX)
    'Etrn'
    """
    return _keep_case(word, _edit(word, kind, rng, layout, mix))


def _edit(word: str, kind: EditKind, rng: random.Random, layout: str, mix: TypoMix) -> str:
    letters = _letter_positions(word)
    if kind is EditKind.SUBSTITUTE:
        i = rng.choice(letters)
        return word[:i] + _near(rng, word[i], layout, mix) + word[i + 1 :]
    if kind is EditKind.DELETE:
        i = rng.choice(letters)
        return word[:i] + word[i + 1 :]
    if kind is EditKind.INSERT:
        i = rng.choice(letters)
        after = rng.random() < 0.5
        new = _near(rng, word[i], layout, mix)
        at = i + 1 if after else i
        return word[:at] + new + word[at:]
    if kind is EditKind.TRANSPOSE:
        i = rng.choice(_adjacent(word, same=False))
        return word[:i] + word[i + 1] + word[i] + word[i + 2 :]
    if kind is EditKind.DOUBLE:
        i = rng.choice(letters)
        return word[: i + 1] + word[i] + word[i + 1 :]
    # UNDOUBLE
    i = rng.choice(_adjacent(word, same=True))
    return word[:i] + word[i + 1 :]


def misspell(
    word: str, rng: random.Random, *, layout: str, mix: TypoMix = DEFAULT_MIX
) -> tuple[str, tuple[EditKind, ...]]:
    """Damage one word with one or more edits drawn from ``mix``; the result differs.

    Returns the word unchanged with no edits only when no edit can change it (a word
    without letters).

    >>> misspell("logger", random.Random(7), layout="qwerty")
    ('loggee', (<EditKind.SUBSTITUTE: 'substitute'>,))
    """
    if not _letter_positions(word):
        return word, ()
    counts = list(mix.edits_per_word)
    n = rng.choices(counts, weights=[mix.edits_per_word[c] for c in counts])[0]
    for _attempt in range(20):
        out = word
        done: list[EditKind] = []
        for _ in range(n):
            allowed = _applicable(out)
            weights = {k: w for k, w in mix.kinds.items() if k in allowed and w > 0}
            if not weights:
                break
            kind = _weighted(rng, weights)
            out = apply_edit(out, kind, rng, layout, mix)
            done.append(kind)
        if out != word and done:
            return out, tuple(done)
    return word, ()


def _eligible(token: Token, options: TypoOptions) -> bool:
    if token.kind is TokenKind.WORD:
        pass
    elif not (options.include_literals and token.kind in LITERAL_KINDS):
        return False
    return sum(ch.isalpha() for ch in token.text) >= options.min_letters


def _still_one_token(original: Token, damaged: str) -> bool:
    got = tokenize(damaged)
    return len(got) == 1 and got[0].kind is original.kind


def damage_text(text: str, rng: random.Random, *, lang: str, options: TypoOptions) -> Damaged:
    """Inject typos into ``text`` with ``rng``; ``text`` itself is the gold.

    >>> d = damage_text("The logger writes one file per day.", random.Random("0/0"),
    ...                 lang="en", options=TypoOptions(rate=1.0, clean_share=0.0))
    >>> d.gold == "The logger writes one file per day." and d.source != d.gold
    True
    """
    layout = layout_for(options.layout, lang).name
    if rng.random() < options.clean_share:
        return Damaged(source=text, gold=text, typos=(), clean_on_purpose=True)
    tokens = [t for t in tokenize(text) if _eligible(t, options)]
    if not tokens:
        return Damaged(source=text, gold=text, typos=(), clean_on_purpose=False)
    chosen = [t for t in tokens if rng.random() < options.rate]
    if not chosen:
        chosen = [rng.choice(tokens)]
    typos: list[Typo] = []
    for token in chosen:
        for _attempt in range(5):
            new, edits = misspell(token.text, rng, layout=layout, mix=options.mix)
            if edits and _still_one_token(token, new):
                typos.append(
                    Typo(start=token.start, end=token.end, gold=token.text, typo=new, edits=edits)
                )
                break
    parts: list[str] = []
    at = 0
    for typo in typos:
        parts.append(text[at : typo.start])
        parts.append(typo.typo)
        at = typo.end
    parts.append(text[at:])
    return Damaged(source="".join(parts), gold=text, typos=tuple(typos), clean_on_purpose=False)


def record_rng(seed: int, index: int) -> random.Random:
    """The generator for record ``index`` (0-based) of a run with ``seed``.

    >>> record_rng(1, 0).random() == record_rng(1, 0).random() != record_rng(0, 1).random()
    True
    """
    return random.Random(f"{seed}/{index}")


def typo_records(
    texts: Iterable[CleanText], *, lang: str, options: TypoOptions, start: int = 0
) -> Iterator[dict[str, object]]:
    """Yield one output record ``{id, source, gold, lang, typos}`` per input text.

    ``start`` is the index of the first text in the whole input, so that a chunk of a file
    gets the same typos as the whole file would.
    """
    for offset, clean in enumerate(texts):
        index = start + offset
        record_lang = clean.lang or lang
        damaged = damage_text(
            clean.text, record_rng(options.seed, index), lang=record_lang, options=options
        )
        yield {
            "id": clean.id if clean.id is not None else str(index + 1),
            "source": damaged.source,
            "gold": damaged.gold,
            "lang": record_lang,
            "typos": [
                {
                    "start": t.start,
                    "gold": t.gold,
                    "typo": t.typo,
                    "edits": [str(e) for e in t.edits],
                }
                for t in damaged.typos
            ],
        }
