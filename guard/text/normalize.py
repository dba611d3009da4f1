"""All Unicode normalization and case handling of guard, in one place.

Term sets, automata and lexicon keys are built only from :data:`NormalizedText`, and
:func:`normalize_key` is the only function that produces it, so two spellings that
Unicode treats as the same (NFC vs NFD, ``ß`` vs ``SS`` when folding) always meet.
Offsets never come from normalized text: :func:`fold_with_map` folds the source as it is
and keeps, for every folded character, the index of the source character it came from.

This module must never change the text the user sees; it only derives keys from it.

The hard cases, as doctests:

>>> normalize_key("Straße", fold=True) == normalize_key("STRASSE", fold=True)
True
>>> normalize_key("ﬁle", fold=True)  # the ligature U+FB01 folds to two letters
'file'
>>> normalize_key("İstanbul", fold=True)  # dotted capital I keeps its dot as U+0307
'i̇stanbul'
>>> normalize_key("e\u0301", fold=False) == "\u00e9"  # NFD input, NFC key
True
"""

from __future__ import annotations

import unicodedata
from typing import NewType

import regex

__all__ = [
    "NormalizedText",
    "fold_with_map",
    "hidden_characters",
    "nfc",
    "normalize_key",
    "strip_accents",
]

NormalizedText = NewType("NormalizedText", str)
"""NFC text, case-folded after when made with ``fold=True``; made only by :func:`normalize_key`.

Folding can leave a few characters decomposed (U+01F0 ǰ folds to j + U+030C): a folded
key is not always NFC, but every key is made the same way, so equal texts meet.
"""

# General category Cf, the UAX #9 bidi controls (all Cf today, named anyway so that the
# intent survives), and the Default_Ignorable_Code_Point characters that are not Cf but
# render as nothing: variation selectors (which can smuggle data), the combining grapheme
# joiner, the Hangul fillers.
_HIDDEN = regex.compile(r"[\p{Cf}\p{Bidi_Control}\p{Default_Ignorable_Code_Point}]")
_NONSPACING = regex.compile(r"\p{Mn}+")


def nfc(text: str) -> str:
    """The text in Unicode Normalization Form C (composed).

    >>> nfc("A\u030a") == "\u00c5"
    True
    """
    if text.isascii() or unicodedata.is_normalized("NFC", text):
        return text
    return unicodedata.normalize("NFC", text)


def normalize_key(text: str, *, fold: bool) -> NormalizedText:
    """The lookup key of ``text``: NFC, then ``str.casefold`` when ``fold``.

    Folding is full case folding (Unicode CaseFolding.txt, statuses C and F), not
    lower-casing, and it is language-neutral: Turkish dotless ı stays ı and dotted İ
    becomes i + U+0307, so a Turkish term list must spell its keys the way they fold.

    >>> normalize_key("MASSE", fold=True) == normalize_key("Maße", fold=True)
    True
    >>> normalize_key("Maße", fold=False)
    'Maße'
    >>> normalize_key("ı", fold=True)  # dotless i has no case partner to fold to
    'ı'
    >>> normalize_key("\u01f0", fold=True) == "j\u030c"  # CaseFolding.txt 01F0; F; 006A 030C
    True
    """
    composed = nfc(text)
    return NormalizedText(composed.casefold() if fold else composed)


def fold_with_map(text: str) -> tuple[str, tuple[int, ...]]:
    """Case-fold ``text`` as it is (no NFC) and map every folded index back to ``text``.

    Returns ``(folded, origin)`` where ``origin[i]`` is the index in ``text`` of the
    character that produced ``folded[i]``, plus a last entry ``len(text)``. A match at
    ``folded[a:b]`` covers ``text[origin[a]:origin[b]]``. Folding can lengthen text
    (ß → ss, ﬁ → fi, İ → i + U+0307), which is why matching on folded text needs this
    map. For NFC text, ``folded == normalize_key(text, fold=True)``.

    >>> folded, origin = fold_with_map("Maße ok")
    >>> folded
    'masse ok'
    >>> origin
    (0, 1, 2, 2, 3, 4, 5, 6, 7)
    >>> a = folded.index("ok"); text = "Maße ok"
    >>> text[origin[a]:origin[a + 2]]
    'ok'
    >>> fold_with_map("İ")
    ('i̇', (0, 0, 1))
    """
    folded = text.casefold()
    if len(folded) == len(text):
        # Same length means every character folded to exactly one character.
        return folded, tuple(range(len(text) + 1))
    parts: list[str] = []
    origin: list[int] = []
    for i, ch in enumerate(text):
        f = ch.casefold()
        parts.append(f)
        origin.extend([i] * len(f))
    origin.append(len(text))
    return "".join(parts), tuple(origin)


def strip_accents(text: str) -> str:
    """``text`` without nonspacing marks (category Mn), in NFC.

    Used to tell an accents-only change from any other. Letters whose accent is part
    of the letter itself (ø, ł, đ) have no decomposition and stay as they are.

    >>> strip_accents("Crème brûlée")
    'Creme brulee'
    >>> strip_accents("ø")
    'ø'
    """
    if text.isascii():
        return text
    return unicodedata.normalize("NFC", _NONSPACING.sub("", unicodedata.normalize("NFD", text)))


def hidden_characters(text: str) -> tuple[tuple[int, str], ...]:
    """``(index, character)`` of every invisible format character in ``text``.

    Counted as hidden: general category Cf (soft hyphen, zero-width space and joiners,
    word joiner, BOM), the bidi controls of UAX #9 (LRM, RLM, ALM, embeddings, overrides,
    isolates), and the other Default_Ignorable_Code_Point characters (variation
    selectors, combining grapheme joiner, Hangul fillers).

    >>> hidden_characters("pay\u202eusd")
    ((3, '\u202e'),)
    >>> hidden_characters("plain")
    ()
    """
    return tuple((m.start(), m.group()) for m in _HIDDEN.finditer(text))
