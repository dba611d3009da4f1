"""guard.text.tokenize: literal tokens kept whole, tiling, grapheme clusters never split."""

from __future__ import annotations

import pytest
import regex
from hypothesis import given, settings
from hypothesis import strategies as st

from guard.records import Token, TokenKind
from guard.text.tokenize import _scan, spans, tokenize

K = TokenKind


def words(text: str) -> list[tuple[str, TokenKind]]:
    """The non-space tokens of ``text`` as (text, kind)."""
    return [(t.text, t.kind) for t in tokenize(text) if t.kind is not K.SPACE]


# One literal token in context: (text, the token, its kind). The examples are invented.
LITERALS = [
    pytest.param(
        "see https://docs.example.org/a/b?x=1.",
        "https://docs.example.org/a/b?x=1",
        K.URL,
        id="url-trailing-dot-out",
    ),
    pytest.param("at www.example.com, then", "www.example.com", K.URL, id="url-www"),
    pytest.param("(https://example.org/x)", "https://example.org/x", K.URL, id="url-in-parens"),
    pytest.param("mail ops.team@example.org.", "ops.team@example.org", K.EMAIL, id="email"),
    pytest.param("in /usr/local/bin now", "/usr/local/bin", K.PATH, id="path-absolute"),
    pytest.param("run ./build.sh", "./build.sh", K.PATH, id="path-dot-slash"),
    pytest.param("edit ~/.config/app.toml", "~/.config/app.toml", K.PATH, id="path-home"),
    pytest.param("go ../up/there", "../up/there", K.PATH, id="path-dot-dot"),
    pytest.param(
        "open C:\\Data\\report.txt now", "C:\\Data\\report.txt", K.PATH, id="path-windows"
    ),
    pytest.param(
        "see src/pump/valve.py here", "src/pump/valve.py", K.PATH, id="path-relative-with-ext"
    ),
    pytest.param("pipe 3.5mm wide", "3.5mm", K.NUMBER, id="number-decimal-unit"),
    pytest.param("cost 1,000.5 each", "1,000.5", K.NUMBER, id="number-thousands"),
    pytest.param("up 10% today", "10%", K.NUMBER, id="number-percent"),
    pytest.param("at -4 degrees", "-4", K.NUMBER, id="number-negative"),
    pytest.param("take 12 now", "12", K.NUMBER, id="number-integer"),
    pytest.param("add ½ cup", "½", K.NUMBER, id="number-vulgar-fraction"),  # U+00BD is No
    pytest.param("area in m² here", "²", K.NUMBER, id="number-superscript"),  # U+00B2 is No
    pytest.param("use 2,5 ml", "2,5", K.NUMBER, id="number-decimal-comma"),
    pytest.param("dose 5mg/kg daily", "5mg/kg", K.NUMBER, id="number-unit-per-unit"),
    pytest.param("at +5 now", "+5", K.NUMBER, id="number-plus"),
    pytest.param("at \u22123 now", "\u22123", K.NUMBER, id="number-minus-sign"),  # U+2212
    pytest.param("on 2031-01-05 now", "2031-01-05", K.NUMBER, id="number-date"),
    pytest.param("mail ops+alerts@example.org", "ops+alerts@example.org", K.EMAIL, id="email-plus"),
    pytest.param(
        "see https://x.example/a?b=1&c=2#top now",
        "https://x.example/a?b=1&c=2#top",
        K.URL,
        id="url-query-fragment",
    ),
    pytest.param("call __init__ now", "__init__", K.IDENTIFIER, id="dunder"),
    pytest.param("ask @pump_team now", "@pump_team", K.HANDLE, id="handle"),
    pytest.param("tag #release2 now", "#release2", K.HASHTAG, id="hashtag"),
    pytest.param("call read_config here", "read_config", K.IDENTIFIER, id="snake-case"),
    pytest.param("call readConfig here", "readConfig", K.IDENTIFIER, id="camel-case"),
    pytest.param("class PumpController here", "PumpController", K.IDENTIFIER, id="pascal-case"),
    pytest.param("use os.path.join here", "os.path.join", K.IDENTIFIER, id="dotted-name"),
    pytest.param("edit config.yaml first", "config.yaml", K.IDENTIFIER, id="file-name"),
    pytest.param("call flush() first", "flush()", K.IDENTIFIER, id="call"),
    pytest.param("run -v now", "-v", K.FLAG, id="short-flag"),
    pytest.param("run --color=auto now", "--color=auto", K.FLAG, id="flag-with-value"),
    pytest.param("run --dry-run now", "--dry-run", K.FLAG, id="long-flag"),
    pytest.param("the XR-220 pump", "XR-220", K.CODE, id="code-hyphen"),
    pytest.param("an A4 sheet", "A4", K.CODE, id="code-short"),
    pytest.param("pure H2O only", "H2O", K.CODE, id="code-formula"),
    pytest.param("in v2.3.1 only", "v2.3.1", K.CODE, id="code-version"),
]


@pytest.mark.parametrize(("text", "token", "kind"), LITERALS)
def test_literal_token_is_kept_whole(text: str, token: str, kind: TokenKind) -> None:
    assert (token, kind) in words(text)


WORDS = [
    pytest.param("a well-known fix", ["a", "well-known", "fix"], id="hyphen-inside"),
    pytest.param("don't stop", ["don't", "stop"], id="english-contraction-whole"),
    pytest.param("it’s fine", ["it’s", "fine"], id="curly-apostrophe"),
    pytest.param("O'Neil came", ["O'Neil", "came"], id="name-apostrophe"),
    pytest.param("l'homme", ["l'", "homme"], id="french-elision-split"),
    pytest.param("qu'il", ["qu'", "il"], id="french-qu-elision"),
    pytest.param("dell'anno", ["dell'", "anno"], id="italian-elision"),
    pytest.param("e.g. this", ["e.g", ".", "this"], id="abbreviation-is-word"),
    pytest.param("iPump", ["iPump"], id="short-first-hump-is-word"),
    pytest.param("Hello, world!", ["Hello", ",", "world", "!"], id="punctuation-apart"),
    pytest.param("and/or", ["and", "/", "or"], id="slash-without-extension-is-not-path"),
    pytest.param("issue #1", ["issue", "#", "1"], id="number-sign-is-no-tag"),
    pytest.param("ratio 1:2", ["ratio", "1", ":", "2"], id="ratio"),
    pytest.param("שלום עולם", ["שלום", "עולם"], id="hebrew"),
    pytest.param("مرحبا بالعالم", ["مرحبا", "بالعالم"], id="arabic"),
    pytest.param("Привет мир", ["Привет", "мир"], id="cyrillic"),
]


@pytest.mark.parametrize(("text", "expected"), WORDS)
def test_words(text: str, expected: list[str]) -> None:
    assert [w for w, _ in words(text)] == expected


@pytest.mark.parametrize(
    ("text", "clusters"),
    [
        pytest.param("東京タワー", ["東", "京", "タ", "ワ", "ー"], id="han-katakana"),
        pytest.param("我喜欢苹果", ["我", "喜", "欢", "苹", "果"], id="chinese"),
        # Thai: a consonant with its vowel sign above is one cluster (UAX #29, Extend)
        pytest.param("สวัสดี", ["ส", "วั", "ส", "ดี"], id="thai"),
        pytest.param("ລາວ", ["ລ", "າ", "ວ"], id="lao"),
    ],
)
def test_no_space_scripts_give_one_token_per_cluster(text: str, clusters: list[str]) -> None:
    tokens = tokenize(text)
    assert [t.text for t in tokens] == clusters
    assert all(t.kind is K.WORD for t in tokens)


# Extended grapheme clusters from UAX #29 (Table 1a "Sample Grapheme Clusters" and rules
# GB9, GB11, GB12): each must stay inside one token.
CLUSTERS = [
    pytest.param("g\u0308", id="GB9-g-diaeresis"),
    pytest.param("\u1100\u1161\u11a8", id="GB6-7-hangul-jamo"),
    pytest.param("\U0001f469\u200d\U0001f4bb", id="GB11-emoji-zwj"),
    pytest.param("\U0001f1eb\U0001f1f7", id="GB12-regional-indicators"),
    pytest.param("\u0937\u093f", id="GB9a-devanagari-spacing-mark"),
    pytest.param("\U0001f44d\U0001f3fd", id="GB9-emoji-modifier"),
    pytest.param("\r\n", id="GB3-crlf"),
]


@pytest.mark.parametrize("cluster", CLUSTERS)
@pytest.mark.parametrize("context", ["{}", "a{}b", " {} ", "x {}!", "{}{}"])
def test_grapheme_clusters_are_never_split(cluster: str, context: str) -> None:
    text = context.format(cluster, cluster)
    cuts = {t.start for t in tokenize(text)} | {len(text)}
    at = 0
    while (at := text.find(cluster, at)) != -1:
        assert not any(at < c < at + len(cluster) for c in cuts), (text, cuts)
        at += len(cluster)


def test_tokens_carry_offsets_into_the_text() -> None:
    text = "Teh XR-220 pump"
    assert tokenize(text) == (
        Token(text="Teh", start=0, end=3, kind=K.WORD),
        Token(text=" ", start=3, end=4, kind=K.SPACE),
        Token(text="XR-220", start=4, end=10, kind=K.CODE),
        Token(text=" ", start=10, end=11, kind=K.SPACE),
        Token(text="pump", start=11, end=15, kind=K.WORD),
    )


def test_space_variants_are_space_tokens() -> None:
    text = "a\u00a0b\tc\u3000d\r\ne"
    kinds = [t.kind for t in tokenize(text)]
    assert kinds == [K.WORD, K.SPACE] * 4 + [K.WORD]


def test_empty_text_has_no_tokens() -> None:
    assert tokenize("") == ()


# Text that mixes what the tokenizer must survive: combining marks, ZWJ sequences, RTL,
# CJK, Thai, literal-looking pieces, whitespace variants.
PIECES = st.sampled_from(
    [
        "a",
        "Pump",
        "e\u0301",
        "\U0001f469\u200d\U0001f4bb",
        "\U0001f1eb\U0001f1f7",
        "שלום",
        "مرحبا",
        "東京",
        "สวัสดี",
        "XR-220",
        "3.5mm",
        "-",
        "'",
        ".",
        "/",
        "@",
        "#",
        ":",
        "\\",
        "_",
        "()",
        "\u200b",
        "\u202e",
        " ",
        "  ",
        "\t",
        "\n",
        "\u00a0",
        "www.",
        "://",
        "10%",
        "l'",
        "\u0600",
        "\u0301",
        "\ufe0f",
    ]
)
MIXED = st.lists(PIECES | st.text(max_size=4), max_size=12).map("".join)


@settings(max_examples=1000, deadline=None)
@given(MIXED | st.text())
def test_tokens_tile_the_text(text: str) -> None:
    tokens = tokenize(text)
    assert "".join(t.text for t in tokens) == text
    at = 0
    for t in tokens:
        assert t.start == at and t.end > t.start and text[t.start : t.end] == t.text
        at = t.end
    assert tuple((t.start, t.end, t.kind) for t in tokens) == spans(text)


# Words of ASCII letters in every case pattern (camelCase, PascalCase, ALLCAPS, one
# letter), codes and numbers with hyphens and underscores, stray hyphens, and runs of
# spaces: the text the fast path for plain words takes, and text just outside it.
PLAIN = st.lists(
    st.from_regex(
        r"[a-z]{1,6}|[A-Z][a-z]{0,5}|[a-z]{2,4}[A-Z][a-z]{0,3}|[A-Z]{1,4}[a-z]{0,3}| {1,3}"
        r"|[A-Z]{1,3}[0-9]{0,4}-[0-9]{1,4}[A-Z]?|[0-9]{1,4}|[a-z_]{1,4}_[a-z]{1,4}|-",
        fullmatch=True,
    ),
    max_size=10,
).map("".join)


@settings(max_examples=2000, deadline=None)
@given(PLAIN)
def test_plain_words_fast_path_cuts_as_the_token_pattern(text: str) -> None:
    assert spans(text) == _scan(text)


@settings(max_examples=1000, deadline=None)
@given(MIXED | st.text())
def test_no_token_ends_inside_a_grapheme_cluster(text: str) -> None:
    # Reference: the regex module's \X, which implements UAX #29 extended grapheme
    # clusters (the tokenizer uses it only as its last resort, per character).
    boundaries = {m.end() for m in regex.finditer(r"\X", text)} | {0}
    assert {t.end for t in tokenize(text)} <= boundaries


# Format placeholders as the C standard (printf conversion specifications, C11 7.21.6.1),
# Python's str.format and %-formatting, and POSIX shell parameter expansion write them.
PLACEHOLDERS = [
    "%s",
    "%d",
    "%-10.2f",
    "%1$s",
    "%lu",
    "%(count)d",
    "{0}",
    "{name!r}",
    "$HOME",
    "${dir}",
]


@pytest.mark.parametrize("text", PLACEHOLDERS, ids=PLACEHOLDERS)
def test_format_placeholders_are_one_literal_token(text: str) -> None:
    tokens = [t for t in tokenize(f"got {text} here") if t.kind is not TokenKind.SPACE]
    assert [(t.text, t.kind) for t in tokens][1] == (text, TokenKind.PLACEHOLDER)
