"""The term matcher: whole words, longest first, offsets into the text as given.

Case-folding facts used below come from the Unicode Character Database, CaseFolding.txt
(full folding, status F): U+00DF ß -> "ss"; U+1E9E ẞ -> "ss"; U+0130 İ -> "i" U+0307;
U+FB01 ﬁ -> "fi". Canonical equivalence of "é" and "e" + U+0301 is from UAX #15
(Unicode Normalization Forms). Each expected offset counts characters of the original text.
"""

from __future__ import annotations

import unicodedata

import pytest
import regex
from hypothesis import given, settings
from hypothesis import strategies as st

from guard.records import Origin
from guard.ruleset.model import CasePolicy, TermEntry
from guard.ruleset.terms import TermMatcher, first_pieces, pieces
from guard.text.normalize import normalize_key


def entry(term: str, case: CasePolicy = CasePolicy.FOLD, line: int = 1) -> TermEntry:
    return TermEntry(
        term=term,
        key=normalize_key(term, fold=case is CasePolicy.FOLD),
        kind="term",
        case=case,
        origin=Origin(file="terms.txt", line=line),
    )


EXACT = CasePolicy.EXACT


def spans(terms: list[TermEntry], text: str) -> list[tuple[int, int, str]]:
    hits = TermMatcher(terms).find(text)
    for h in hits:
        assert 0 <= h.start < h.end <= len(text)
    return [(h.start, h.end, h.entry.term) for h in hits]


@pytest.mark.parametrize(
    ("terms", "text", "expected"),
    [
        # CaseFolding.txt: ß and "SS" both fold to "ss"
        pytest.param([entry("Straße")], "STRASSE", [(0, 7, "Straße")], id="sharp-s-upper"),
        pytest.param([entry("STRASSE")], "die Straße 4", [(4, 10, "STRASSE")], id="sharp-s-text"),
        # CaseFolding.txt: U+1E9E capital sharp s folds to "ss" (1 char -> 2)
        pytest.param([entry("strasse")], "Die STRAẞE.", [(4, 10, "strasse")], id="capital-sharp-s"),
        # a term after a character that folds longer keeps its original offsets
        pytest.param([entry("Quillmate")], "Maß Quillmate", [(4, 13, "Quillmate")], id="after-ss"),
        # CaseFolding.txt: İ folds to i + U+0307 (1 char -> 2)
        pytest.param([entry("İstanbul")], "in İSTANBUL now", [(3, 11, "İstanbul")], id="dotted-I"),
        pytest.param([entry("Quillmate")], "İİ QUILLMATE", [(3, 12, "Quillmate")], id="after-I"),
        # CaseFolding.txt: U+FB01 ﬁ folds to "fi"
        pytest.param([entry("file")], "the ﬁle ok", [(4, 7, "file")], id="fi-ligature"),
        pytest.param([entry("Straße")], "Straßenbahn", [], id="inside-longer-word"),
        pytest.param([entry("strass")], "Straße", [], id="ends-inside-folded-char"),
        pytest.param(
            [entry("bilge pump")],
            "New Bilge  Pump,\tbilge\u00a0pump; bilge pumps",
            [(4, 15, "bilge pump"), (17, 27, "bilge pump")],
            id="multiword-any-space",
        ),
        pytest.param(
            [entry("bilge"), entry("bilge pump"), entry("pump room")],
            "bilge pump room",
            [(0, 10, "bilge pump")],
            id="longest-first",
        ),
        pytest.param(
            [entry("bilge"), entry("bilge pump")],
            "a bilge pump",
            [(2, 12, "bilge pump")],
            id="nested",
        ),
        pytest.param([entry("IT", EXACT)], "it IT It", [(3, 5, "IT")], id="exact-case"),
        # UAX #15: "e" + U+0301 is canonically equivalent to "é"
        pytest.param([entry("café", EXACT)], "cafe\u0301 noir", [(0, 5, "café")], id="nfd-text"),
        pytest.param([entry("cafe", EXACT)], "cafe\u0301 noir", [], id="mark-is-part-of-word"),
        pytest.param([entry("C#", EXACT)], "use C# daily", [(4, 6, "C#")], id="symbol-edge"),
        pytest.param([entry("XR-220", EXACT)], "XR-220B, XR-220.", [(9, 15, "XR-220")], id="code"),
    ],
)
def test_find(terms: list[TermEntry], text: str, expected: list[tuple[int, int, str]]) -> None:
    assert spans(terms, text) == expected


def test_boundaries_case_takes_the_only_whole_word() -> None:
    # "pumps" and "pump2" continue the word; "_" is not a letter, digit or mark
    assert spans([entry("pump")], "pumps pump2 _pump") == [(13, 17, "pump")]


def test_hits_map_back_to_the_original_text() -> None:
    text = "ﬁx the İSTANBUL Straße file"
    terms = [entry("istanbul"), entry("İstanbul"), entry("strasse"), entry("fix")]
    got = [text[s:e] for s, e, _ in spans(terms, text)]
    assert got == ["ﬁx", "İSTANBUL", "Straße"]


def test_exact_and_fold_terms_on_the_same_span_keep_the_exact_one() -> None:
    exact, fold = entry("Kettlewick", EXACT, line=1), entry("kettlewick", line=2)
    (hit,) = TermMatcher([fold, exact]).find("Kettlewick")
    assert hit.entry == exact


def test_lookup_is_an_exact_key_match() -> None:
    m = TermMatcher([entry("Straße"), entry("bilge pump"), entry("XR-220", EXACT)])
    assert m.lookup("STRASSE") is not None
    assert m.lookup("Bilge   Pump") is not None
    assert m.lookup("bilge") is None
    assert m.lookup("XR-220") is not None
    assert m.lookup("xr-220") is None


def test_duplicate_keys_keep_the_first_listing() -> None:
    first, second = entry("Quillmate", line=1), entry("QUILLMATE", line=9)
    m = TermMatcher([first, second])
    assert len(m) == 1 and m.lookup("quillmate") == first


def test_no_terms_no_hits() -> None:
    assert TermMatcher([]).find("anything") == ()
    assert TermMatcher([]).lookup("anything") is None


def test_terms_in_scripts_written_without_spaces_match_inside_a_run() -> None:
    # Han and Kana are written without spaces between words: a term is found inside a run
    terms = [entry("東京", EXACT), entry("タワー", EXACT)]
    assert spans(terms, "東京タワーへ行く") == [(0, 2, "東京"), (2, 5, "タワー")]


@pytest.mark.parametrize(
    "text",
    ["Bilge pump XR-220, C# x", "a  b\tc\x0bd\x0ce\r\nf", "no terms at all here", "x.y-z_w"],
)
def test_the_ascii_cut_agrees_with_the_unicode_cut(text: str) -> None:
    from guard.ruleset.terms import _ASCII_PIECE, pieces

    assert _ASCII_PIECE.findall(text) == pieces(text)


_PARTS = ["Straße", "STRASSE", "İstanbul", "ﬁle", "file", "bilge", "pump", "東京", "XR-220", "é"]
_TERMS = [entry("strasse"), entry("İstanbul"), entry("file"), entry("bilge pump")]
_TERMS += [entry("東京", EXACT), entry("XR-220", EXACT)]


@given(
    st.lists(
        st.one_of(
            st.sampled_from(_PARTS),
            st.sampled_from([" ", "  ", "\t", "\u00a0", ", ", "-", "e\u0301"]),
            st.text(max_size=3),
        ),
        max_size=12,
    )
)
@settings(max_examples=300, deadline=None)
def test_every_hit_is_its_term_in_the_original_text(parts: list[str]) -> None:
    text = "".join(parts)
    m = TermMatcher(_TERMS)
    hits = m.find(text)
    last_end = 0
    for h in hits:
        assert last_end <= h.start < h.end <= len(text)  # ordered, not overlapping
        last_end = h.end
        found = " ".join(text[h.start : h.end].split())
        fold = h.entry.case is CasePolicy.FOLD
        assert normalize_key(found, fold=fold) == h.entry.key


@given(
    st.text(max_size=8),
    st.sampled_from([("STRASSE", "strasse"), ("ﬁle", "file"), ("İSTANBUL", "İstanbul")]),
    st.sampled_from([("Bilge\u00a0PUMP", "bilge pump"), ("XR-220", "XR-220"), ("東京", "東京")]),
    st.text(max_size=8),
)
@settings(max_examples=300, deadline=None)
def test_a_term_set_apart_by_spaces_is_always_found(
    before: str, one: tuple[str, str], two: tuple[str, str], after: str
) -> None:
    text = f"{before} {one[0]} {two[0]} {after}"
    start = len(before) + 1
    expected = [
        (start, start + len(one[0]), one[1]),
        (start + len(one[0]) + 1, start + len(one[0]) + 1 + len(two[0]), two[1]),
    ]
    got = spans(_TERMS, text)
    for hit in expected:
        assert hit in got


# ----------------------------------------------------------- against a plain reading

# The module docstring's definition of a piece, written out again here: a run of letters,
# marks and digits; a character of a script written without spaces, with its marks; any
# other character that is not white space, alone.
_UNSPACED = r"\p{Han}\p{Hiragana}\p{Katakana}\p{Thai}\p{Lao}\p{Khmer}\p{Myanmar}"
_ORACLE_PIECE = regex.compile(
    rf"[{_UNSPACED}]\p{{M}}*|[[\p{{L}}\p{{M}}\p{{N}}]--[{_UNSPACED}]]+|\S", regex.V1
)


def _oracle(terms: list[TermEntry], text: str) -> list[tuple[int, int, TermEntry]]:
    """Every run of pieces whose phrase (pieces joined by one space where white space
    parts them) is a key, exact terms before fold terms and the first listing first; then
    the longest of overlapping hits, on a tie the earlier, then the exact."""
    keys: dict[tuple[int, str], TermEntry] = {}
    for e in terms:
        keys.setdefault((0 if e.case is EXACT else 1, e.key), e)
    spans = [m.span() for m in _ORACLE_PIECE.finditer(text)]
    found = []
    for rank in (0, 1):
        for i in range(len(spans)):
            phrase = ""
            for j in range(i, len(spans)):
                piece = text[spans[j][0] : spans[j][1]]
                gap = " " if j > i and spans[j][0] > spans[j - 1][1] else ""
                phrase += gap + (piece.casefold() if rank else piece)
                hit = keys.get((rank, phrase))
                if hit is not None:
                    found.append((spans[i][0], spans[j][1], rank, hit))
    found.sort(key=lambda h: (h[0] - h[1], h[0], h[2]))
    taken: list[tuple[int, int, TermEntry]] = []
    for start, end, _, e in found:
        if all(end <= s or start >= t for s, t, _ in taken):
            taken.append((start, end, e))
    return sorted(taken, key=lambda h: h[0])


_WORDS = ["KT", "XR-220", "Tromel", "pump", "Pump", "4821", "Ilse", "DR.", "a", "İSTANBUL",
          "Straße", "東京", "C#", "bilge"]


@given(
    st.lists(
        st.tuples(st.lists(st.sampled_from(_WORDS), min_size=1, max_size=3), st.booleans()),
        max_size=6,
    ),
    st.lists(
        st.one_of(
            st.sampled_from(_WORDS),
            st.sampled_from([" ", " ", "  ", "\t", "-", ".", ",", "\u00a0", "\x1c"]),
            st.text(max_size=2),
        ),
        max_size=14,
    ),
)
@settings(max_examples=500, deadline=None)
def test_find_agrees_with_a_plain_reading_of_the_rules(
    specs: list[tuple[list[str], bool]], parts: list[str]
) -> None:
    # Lists of codes and names only (no lower-case piece) take the matcher's shortcut past
    # lower-case words; lists with one take the other way: both are drawn here.
    terms = [
        entry(" ".join(words), CasePolicy.FOLD if fold else EXACT, line=n)
        for n, (words, fold) in enumerate(specs, 1)
    ]
    for text in ("".join(parts), " ".join(parts), " ".join(parts).lower()):
        text = unicodedata.normalize("NFC", text)
        assert [(s, e, h.term) for s, e, h in _oracle(terms, text)] == spans(terms, text)


@given(
    st.lists(
        st.lists(st.sampled_from([*_WORDS, " ", "-", "\x1c", "é", "\u0301"]), max_size=5),
        max_size=4,
    )
)
def test_first_pieces_keeps_the_most_pieces_of_each_first_piece(keys: list[list[str]]) -> None:
    expected: dict[str, int] = {}
    for parts in keys:
        cut = pieces("".join(parts))
        if len(cut) > 1:
            expected[cut[0]] = max(expected.get(cut[0], 0), len(cut))
    assert first_pieces(["".join(parts) for parts in keys]) == expected
