"""What a token looks like: letter case shape, digits, and the scripts of its letters.

Rules read these facts to tell a likely acronym, brand or name from an ordinary word,
and a look-alike letter swap (a Latin word with one Cyrillic letter) from an honest
fix. The script facts follow UTS #39 (Unicode Security Mechanisms), section 5.1
"Mixed-Script Detection". Nothing here decides anything: it only describes.

Script data comes from the ``regex`` module's Unicode tables (``\\p{sc=…}`` and
``\\p{scx=…}``), so it tracks the Unicode version of that module, not of ``unicodedata``.
"""

from __future__ import annotations

import enum
import functools

import regex
import regex._regex as _regex_tables

__all__ = [
    "Shape",
    "all_scripts",
    "has_digit",
    "is_mixed_script",
    "resolved_script_set",
    "script_names",
    "scripts_of",
    "shape_of",
]


class Shape(enum.StrEnum):
    """The letter-case shape of a token."""

    LOWER = "lower"  # every cased letter is lower case: "pump"
    TITLE = "title"  # one capital then lower case, in each part: "Pump", "Jean-Luc", "A"
    ALLCAPS = "allcaps"  # two or more cased letters, all capitals: "ZKTL", "XR-220", "U.S"
    INTERNAL_CAP = "internal-cap"  # a capital after a lower-case letter: "iPump", "McName"
    NOCASE = "nocase"  # no cased letter at all: "42", "東京", "שלום"


_CASED = regex.compile(r"[\p{Lu}\p{Ll}\p{Lt}]")
_UPPERISH = regex.compile(r"[\p{Lu}\p{Lt}]")  # capitals and titlecase digraphs (ǅ)
_LOWER = regex.compile(r"\p{Ll}")
# A run of letters (with their marks); the parts a title-case check looks at.
_LETTER_RUN = regex.compile(r"\p{L}[\p{L}\p{M}]*")
_DIGIT = regex.compile(r"\p{N}")


def shape_of(text: str) -> Shape:
    """The case shape of ``text`` (remembered for short texts: rules ask about the same
    words over and over).

    A single capital letter counts as TITLE, not ALLCAPS, so "A" or "I" at the start of
    a sentence is not taken for an acronym. Each run of letters (split at hyphens,
    apostrophes, digits) may start with its own capital: "Jean-Luc" and "O'Neil" are
    TITLE, while "H2O" (H, O) is ALLCAPS.

    >>> " ".join(shape_of(w) for w in ("pump", "Pump", "PUMP", "pUMP", "McName", "42"))
    'lower title allcaps internal-cap internal-cap nocase'
    >>> " ".join(shape_of(w) for w in ("Jean-Luc", "Well-known", "x-Ray", "H2O", "A", "ǅemal"))
    'title title internal-cap allcaps title title'
    """
    return _shape_of(text) if len(text) <= _CACHED_LENGTH else _find_shape(text)


_CACHED_LENGTH = 64


@functools.lru_cache(maxsize=1 << 13)
def _shape_of(text: str) -> Shape:
    return _find_shape(text)


def _find_shape(text: str) -> Shape:
    if text.isascii():  # str's own case tests, read as the general rules below read them
        if text.islower():
            return Shape.LOWER
        if text.isupper():
            return Shape.ALLCAPS if sum(c.isupper() for c in text) >= 2 else Shape.TITLE
        if text.istitle():
            return Shape.TITLE
        if text.upper() == text.lower():
            return Shape.NOCASE
    return _shape_by_letters(text)


def _shape_by_letters(text: str) -> Shape:
    cased = _CASED.findall(text)
    if not cased:
        return Shape.NOCASE
    upper = sum(1 for ch in cased if _UPPERISH.match(ch))
    if upper == 0:
        return Shape.LOWER
    if upper == len(cased):
        return Shape.ALLCAPS if upper >= 2 else Shape.TITLE
    if _LOWER.match(cased[0]):
        return Shape.INTERNAL_CAP  # lower case first, a capital further on: "x-Ray"
    for run in _LETTER_RUN.findall(text):
        # In a title-case run only the first cased letter may be a capital.
        if any(_UPPERISH.match(ch) for ch in _CASED.findall(run)[1:]):
            return Shape.INTERNAL_CAP
    return Shape.TITLE


def has_digit(text: str) -> bool:
    """Whether ``text`` holds a numeric character (any \\p{N}: 7, ٣, ½, ²).

    >>> has_digit("XR-220"), has_digit("x²"), has_digit("pump")
    (True, True, False)
    """
    return _DIGIT.search(text) is not None


# --- scripts ------------------------------------------------------------------------


# Long script names of more than one word, as PropertyValueAliases.txt spells them. The
# regex tables keep names without underscores (OLDITALIC), so the word breaks come from
# here; a script missing from this list keeps its one-word capitalised form.
_MULTIWORD = [
    "Anatolian_Hieroglyphs",
    "Bassa_Vah",
    "Beria_Erfe",
    "Canadian_Aboriginal",
    "Caucasian_Albanian",
    "Cypro_Minoan",
    "Dives_Akuru",
    "Egyptian_Hieroglyphs",
    "Gunjala_Gondi",
    "Gurung_Khema",
    "Hanifi_Rohingya",
    "Imperial_Aramaic",
    "Inscriptional_Pahlavi",
    "Inscriptional_Parthian",
    "Katakana_Or_Hiragana",
    "Kayah_Li",
    "Khitan_Small_Script",
    "Kirat_Rai",
    "Linear_A",
    "Linear_B",
    "Masaram_Gondi",
    "Meetei_Mayek",
    "Mende_Kikakui",
    "Meroitic_Cursive",
    "Meroitic_Hieroglyphs",
    "Nag_Mundari",
    "New_Tai_Lue",
    "Nyiakeng_Puachue_Hmong",
    "Ol_Chiki",
    "Ol_Onal",
    "Old_Hungarian",
    "Old_Italic",
    "Old_North_Arabian",
    "Old_Permic",
    "Old_Persian",
    "Old_Sogdian",
    "Old_South_Arabian",
    "Old_Turkic",
    "Old_Uyghur",
    "Pahawh_Hmong",
    "Pau_Cin_Hau",
    "Phags_Pa",
    "Psalter_Pahlavi",
    "SignWriting",
    "Sora_Sompeng",
    "Syloti_Nagri",
    "Tai_Le",
    "Tai_Tham",
    "Tai_Viet",
    "Tai_Yo",
    "Tolong_Siki",
    "Tulu_Tigalari",
    "Warang_Citi",
    "Zanabazar_Square",
]
_SPELLING = {name.replace("_", "").upper(): name for name in _MULTIWORD}


def _canonical_name(upper_name: str) -> str:
    key = upper_name.replace("_", "")
    return _SPELLING.get(key, key.capitalize())


@functools.cache
def _script_table() -> tuple[tuple[str, regex.Pattern[str], regex.Pattern[str]], ...]:
    """Every script the ``regex`` tables know: (long name, ``\\p{sc=}``, ``\\p{scx=}``).

    The long name of a script is the alias that is not its four-letter ISO 15924 code
    (Han, not Hani); Thai, Cham and a few others have only one alias.
    """
    # regex publishes no API for its property tables; get_properties is its own lookup.
    lookup = _regex_tables.get_properties  # type: ignore[attr-defined]
    properties: dict[str, tuple[int, dict[str, int]]] = lookup()
    values = properties["SC"][1]
    aliases: dict[int, list[str]] = {}
    for name, value in values.items():
        aliases.setdefault(value, []).append(name)
    table = []
    for names in aliases.values():
        long_names = [n for n in names if len(n) != 4] or names
        name = _canonical_name(max(long_names, key=len))
        if name == "Unknown":
            continue
        sc = regex.compile(rf"\p{{sc={name}}}")
        scx = regex.compile(rf"\p{{scx={name}}}")
        table.append((name, sc, scx))
    return tuple(sorted(table))


def script_names() -> frozenset[str]:
    """The long names of every script known to the Unicode tables in use.

    >>> {"Latin", "Cyrillic", "Greek", "Han", "Common", "Inherited"} <= script_names()
    True
    """
    return frozenset(name for name, _, _ in _script_table())


_NEUTRAL = frozenset({"Common", "Inherited"})
# UTS #39 section 5.1 augments script sets with the writing systems that combine
# scripts: Han with Bopomofo (Hanb), Japanese (Jpan), Korean (Kore).
_AUGMENT = {
    "Han": frozenset({"Hanb", "Jpan", "Kore"}),
    "Hiragana": frozenset({"Jpan"}),
    "Katakana": frozenset({"Jpan"}),
    "Hangul": frozenset({"Kore"}),
    "Bopomofo": frozenset({"Hanb"}),
}


@functools.cache
def _all_scripts() -> frozenset[str]:
    return frozenset(script_names() - _NEUTRAL) | frozenset({"Hanb", "Jpan", "Kore"})


@functools.lru_cache(maxsize=8192)
def _script_of_char(ch: str) -> str:
    for name, sc, _ in _script_table():
        if sc.match(ch):
            return name
    return "Unknown"


@functools.lru_cache(maxsize=8192)
def _extensions_of_char(ch: str) -> frozenset[str]:
    """The augmented Script_Extensions of one character; ALL for Common/Inherited."""
    found = {name for name, _, scx in _script_table() if scx.match(ch)}
    if not found or found & _NEUTRAL:
        return _all_scripts()
    for name in list(found):
        found |= _AUGMENT.get(name, frozenset())
    return frozenset(found)


def scripts_of(text: str) -> frozenset[str]:
    """The Script property values of the letters and marks of ``text``, less Common/Inherited.

    >>> sorted(scripts_of("Circle")), sorted(scripts_of("Сirclе"))
    (['Latin'], ['Cyrillic', 'Latin'])
    >>> scripts_of("42 %")
    frozenset()
    """
    if text.isascii():  # ASCII letters are all Latin; the rest of ASCII is Common
        return _LATIN if text.upper() != text.lower() else _NONE
    names = {_script_of_char(ch) for ch in _LETTERS_AND_MARKS.findall(text)}
    return frozenset(names - _NEUTRAL)


_LETTERS_AND_MARKS = regex.compile(r"[\p{L}\p{M}]")
_LATIN = frozenset({"Latin"})
_NONE: frozenset[str] = frozenset()


def resolved_script_set(text: str) -> frozenset[str]:
    """The UTS #39 (section 5.1) resolved script set of ``text``.

    It is the intersection, over all characters, of each character's Script_Extensions,
    where Common and Inherited stand for every script, and where Han, Hiragana,
    Katakana, Hangul and Bopomofo are augmented with Hanb, Jpan and Kore. Text of only
    Common/Inherited characters resolves to every script (:func:`all_scripts`).

    >>> sorted(resolved_script_set("Circle"))
    ['Latin']
    >>> resolved_script_set("Сirclе")  # Cyrillic С and е in a Latin word
    frozenset()
    >>> sorted(resolved_script_set("カタカナ漢字"))
    ['Jpan']
    """
    if text.isascii():
        return _LATIN if text.upper() != text.lower() else _all_scripts()
    result = _all_scripts()
    for ch in text:
        result = result & _extensions_of_char(ch)
        if not result:
            break
    return result


def all_scripts() -> frozenset[str]:
    """What UTS #39 calls ALL: every script, plus Hanb, Jpan and Kore.

    >>> resolved_script_set("123 !") == all_scripts()
    True
    """
    return _all_scripts()


def is_mixed_script(text: str) -> bool:
    """Whether ``text`` is mixed-script in the sense of UTS #39 section 5.1 (empty resolved set).

    >>> is_mixed_script("Circle"), is_mixed_script("Сirclе"), is_mixed_script("東京タワー")
    (False, True, False)
    """
    return not resolved_script_set(text)
