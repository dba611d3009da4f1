"""guard.text.normalize against the Unicode standards it implements.

Sources named beside each check: UAX #15 (Unicode Normalization Forms), CaseFolding.txt
and PropList.txt of the Unicode Character Database, UAX #9 (bidi algorithm).
"""

from __future__ import annotations

import sys
import unicodedata

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from guard.text.normalize import (
    fold_with_map,
    hidden_characters,
    nfc,
    normalize_key,
    strip_accents,
)

# UAX #15, section 1.2 "Normalization Forms", Figures 3 to 5 (examples of NFD and NFC;
# the code points are the standard's, the figure numbers from memory).
UAX15_CANONICAL = [
    # (source, NFD, NFC)
    pytest.param("\u212b", "A\u030a", "\u00c5", id="fig3-angstrom-sign-singleton"),
    pytest.param("\u2126", "\u03a9", "\u03a9", id="fig3-ohm-sign-singleton"),
    pytest.param("\u00c5", "A\u030a", "\u00c5", id="fig4-a-ring-composite"),
    pytest.param("\u00f4", "o\u0302", "\u00f4", id="fig4-o-circumflex-composite"),
    pytest.param("\u1e69", "s\u0323\u0307", "\u1e69", id="fig5-s-dot-below-dot-above"),
    pytest.param("\u1e0b\u0323", "d\u0323\u0307", "\u1e0d\u0307", id="fig5-d-dot-above-dot-below"),
    pytest.param("q\u0307\u0323", "q\u0323\u0307", "q\u0323\u0307", id="fig5-q-reordered-marks"),
]


@pytest.mark.parametrize(("source", "nfd", "composed"), UAX15_CANONICAL)
def test_nfc_matches_uax15_examples(source: str, nfd: str, composed: str) -> None:
    assert nfc(source) == composed
    assert nfc(nfd) == composed  # NFD and NFC of one text give one key
    assert normalize_key(source, fold=False) == normalize_key(nfd, fold=False)


def test_nfc_keeps_compatibility_characters() -> None:
    # UAX #15, Figure 6: the ligature U+FB01 is unchanged by NFC (only NFKC splits it),
    # so a key built without folding keeps it.
    assert nfc("\ufb01") == "\ufb01"
    assert normalize_key("\ufb01", fold=False) == "\ufb01"


# CaseFolding.txt (Unicode Character Database), statuses C (common) and F (full).
CASE_FOLDING = [
    pytest.param("\u00df", "ss", id="00DF-F-sharp-s"),
    pytest.param("\u1e9e", "ss", id="1E9E-F-capital-sharp-s"),
    pytest.param("\u0130", "i\u0307", id="0130-F-capital-I-dot"),
    pytest.param("\ufb01", "fi", id="FB01-F-fi-ligature"),
    pytest.param("\u03c2", "\u03c3", id="03C2-C-final-sigma"),
    pytest.param("\u212a", "k", id="212A-C-kelvin-sign"),
    pytest.param("\u0131", "\u0131", id="0131-no-entry-dotless-i"),
]


@pytest.mark.parametrize(("char", "folded"), CASE_FOLDING)
def test_fold_follows_casefolding_txt(char: str, folded: str) -> None:
    assert normalize_key(char, fold=True) == nfc(folded)
    text, origin = fold_with_map(char)
    assert text == folded
    assert origin == (0,) * len(folded) + (1,)


def test_fold_keys_meet_across_spellings() -> None:
    # CaseFolding.txt 00DF; F; 0073 0073 and UAX #15 Figure 4: one key for all four.
    spellings = ["STRASSE", "Straße", "strasse", "Stra\u00dfe"]
    assert len({normalize_key(s, fold=True) for s in spellings}) == 1


def test_fold_with_map_offsets_survive_length_changes() -> None:
    # ß -> ss (CaseFolding.txt 00DF; F), İ -> i + U+0307 (0130; F), ﬁ -> fi (FB01; F)
    text = "Maße İzmir ﬁle dosage"
    folded, origin = fold_with_map(text)
    assert folded == "masse i̇zmir file dosage"
    a = folded.index("dosage")
    assert text[origin[a] : origin[a + len("dosage")]] == "dosage"
    b = folded.index("file")
    assert text[origin[b] : origin[b + len("file")]] == "ﬁle"
    c = folded.index("i̇zmir")
    assert text[origin[c] : origin[c + len("i̇zmir")]] == "İzmir"


@settings(max_examples=500, deadline=None)
@given(st.text())
def test_fold_with_map_is_a_map_of_casefold(text: str) -> None:
    # Reference: str.casefold, which implements CaseFolding.txt C+F character by character.
    folded, origin = fold_with_map(text)
    assert folded == text.casefold()
    assert len(origin) == len(folded) + 1
    assert origin[-1] == len(text)
    assert list(origin) == sorted(origin)
    for i, ch in enumerate(text):
        produced = "".join(f for f, o in zip(folded, origin, strict=False) if o == i)
        assert produced == ch.casefold()


@settings(max_examples=300, deadline=None)
@given(st.text())
def test_fold_with_map_agrees_with_the_key_on_nfc_text(text: str) -> None:
    composed = unicodedata.normalize("NFC", text)
    assert fold_with_map(composed)[0] == normalize_key(composed, fold=True)


@pytest.mark.parametrize(
    ("old", "stripped"),
    [
        # UnicodeData.txt decompositions: 00E9 = 0065 0301, 00FC = 0075 0308, 00E7 = 0063 0327
        pytest.param("caf\u00e9", "cafe", id="precomposed-e-acute"),
        pytest.param("cafe\u0301", "cafe", id="decomposed-e-acute"),
        pytest.param("M\u00fcller", "Muller", id="u-diaeresis"),
        pytest.param("fa\u00e7ade", "facade", id="c-cedilla"),
        # U+00F8 has no decomposition in UnicodeData.txt: it is a letter of its own
        pytest.param("\u00f8l", "\u00f8l", id="o-stroke-stays"),
        pytest.param("\u212b", "A", id="angstrom-sign"),
    ],
)
def test_strip_accents(old: str, stripped: str) -> None:
    assert strip_accents(old) == stripped


# PropList.txt, property Bidi_Control; the same list is UAX #9 section 2 (explicit
# directional formatting characters plus the implicit marks LRM, RLM, ALM).
BIDI_CONTROLS = [0x061C, 0x200E, 0x200F, *range(0x202A, 0x202F), *range(0x2066, 0x206A)]


@pytest.mark.parametrize("cp", BIDI_CONTROLS, ids=[f"U+{cp:04X}" for cp in BIDI_CONTROLS])
def test_every_bidi_control_is_hidden(cp: int) -> None:
    text = f"dose{chr(cp)}10"
    assert hidden_characters(text) == ((4, chr(cp)),)


def test_every_format_character_is_hidden() -> None:
    # Reference: unicodedata.category (the code under test uses the regex module's tables).
    cf = [chr(cp) for cp in range(sys.maxunicode + 1) if unicodedata.category(chr(cp)) == "Cf"]
    assert len(cf) > 100
    text = "".join(cf)
    assert [ch for _, ch in hidden_characters(text)] == cf


# DerivedCoreProperties.txt, Default_Ignorable_Code_Point: the invisible characters that
# are not Cf (from memory of the file, checked against unicodedata names below).
NOT_CF_BUT_INVISIBLE = [
    pytest.param("\u034f", "COMBINING GRAPHEME JOINER", id="034F-CGJ"),
    pytest.param("\u115f", "HANGUL CHOSEONG FILLER", id="115F-filler"),
    pytest.param("\u3164", "HANGUL FILLER", id="3164-filler"),
    pytest.param("\ufe0f", "VARIATION SELECTOR-16", id="FE0F-VS16"),
    pytest.param("\U000e0100", "VARIATION SELECTOR-17", id="E0100-VS17"),
]


@pytest.mark.parametrize(("char", "name"), NOT_CF_BUT_INVISIBLE)
def test_default_ignorables_are_hidden(char: str, name: str) -> None:
    assert unicodedata.name(char) == name
    assert unicodedata.category(char) != "Cf"
    assert hidden_characters(char) == ((0, char),)


def test_soft_hyphen_is_format() -> None:
    # U+00AD SOFT HYPHEN is Cf in UnicodeData.txt
    assert unicodedata.category("\u00ad") == "Cf"
    assert hidden_characters("co\u00adoperate") == ((2, "\u00ad"),)


@settings(max_examples=500, deadline=None)
@given(st.text(alphabet=st.characters(categories=["L", "N", "P", "Zs", "S"])))
def test_visible_text_has_nothing_hidden(text: str) -> None:
    # Letters, digits, punctuation, spaces and symbols are visible, except the Hangul
    # fillers, which are letters that render as nothing (DerivedCoreProperties.txt).
    fillers = {"\u115f", "\u1160", "\u3164", "\uffa0"}
    assert [ch for _, ch in hidden_characters(text)] == [ch for ch in text if ch in fillers]
