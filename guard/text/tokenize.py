r"""Split text into tokens that tile it exactly and keep whole what must not be cut.

Every character of the text belongs to exactly one token, in order, so joining the
token texts gives the text back and the offsets of a token are offsets into the text.
That is what lets alignment map a change back to the source without guessing.

What a token is:

* Literal tokens are kept whole: URLs (``scheme://…``, ``www.…``), e-mail addresses,
  file paths (``/usr/local/bin``, ``./x``, ``~/x``, ``C:\dir\file``, ``dir/file.ext``),
  numbers with decimal marks and an attached unit (``12``, ``3.5mm``, ``1,000.5``,
  ``10%``, ``-4``, ``5mg/kg``), ``@handles``, ``#tags``, identifiers (``snake_case``,
  ``camelCase``, ``PascalCase``, ``dotted.names``, ``name()``), option flags (``-v``,
  ``--dry-run``, ``--color=auto``) and codes that mix letters and digits (``XR-220``,
  ``A4``, ``H2O``, ``v2.3.1``).
* A word is a run of letters, marks, digits and connectors; internal hyphens and
  apostrophes stay inside (``well-known``, ``don't``, ``O'Neil``).
* French and Italian elision is split after the apostrophe (``l'`` + ``homme``,
  ``dell'`` + ``anno``): the article and the noun are two words, and a spelling fix
  of the noun must not look like a change of the article. Only a closed list of
  elided forms is split, so English contractions stay whole.
* In scripts written without spaces between words (Han, Hiragana, Katakana, Thai,
  Lao, Khmer, Myanmar, Tai Tham) every grapheme cluster is its own word token, so
  alignment there works grapheme by grapheme.
* Identifiers by shape: camelCase needs two lower-case letters before the first
  capital, PascalCase a first part of three letters or more (``PumpController``,
  ``HTTPServer``), so ``iPump`` or ``McName`` stay words (their shape still says
  internal capital, see :mod:`guard.text.shape`).
* Whitespace runs are SPACE tokens; any other character is a PUNCT, SYMBOL or (for
  ½, ², Ⅻ) NUMBER token of one grapheme cluster.

No token ends inside a grapheme cluster: combining marks, emoji ZWJ sequences and
flags stay with their base.

>>> [t.text for t in tokenize("See ./run.sh --dry-run, e-mail ops@example.org!") if t.text != " "]
['See', './run.sh', '--dry-run', ',', 'e-mail', 'ops@example.org', '!']
"""

from __future__ import annotations

import functools
import re

import regex

from guard.records import Token, TokenKind

__all__ = ["Span", "spans", "tokenize"]

# Characters that must not start a new token: they extend the cluster before them.
_EXTEND = r"[\p{GCB=Extend}\p{GCB=ZWJ}\p{GCB=SpacingMark}]"
# A token may end here only at a grapheme cluster boundary.
_END = rf"(?!{_EXTEND})(?<!\p{{GCB=Prepend}})"
# Scripts written without spaces between words.
_NOSPACE = (
    r"\p{scx=Han}\p{scx=Hiragana}\p{scx=Katakana}\p{scx=Thai}\p{scx=Lao}"
    r"\p{scx=Khmer}\p{scx=Myanmar}\p{scx=Tai_Tham}"
)
_W = rf"[\w--[{_NOSPACE}]]"  # a word character of a script that uses spaces
# A word of letters and marks, starting with a letter. Runs of such words separated by
# single spaces are the bulk of prose: one match takes the whole run and Python splits it.
_PLAIN = rf"[[\p{{L}}]--[{_NOSPACE}]][[\p{{L}}\p{{M}}]--[{_NOSPACE}]]*+"
_SEG = r"[\w\-+~%$]+(?:\.[\w\-+~%$]+)*"  # a path segment: dots only inside
_TAIL_STOP = r"""[^\s<>"'`.,;:!?)\]}]"""  # what a URL may end with

_ELISION = r"""(?<![\w'’])
      (?i:[ldjmnstc]|qu|jusqu|lorsqu|puisqu|quoiqu|presqu|dell|nell|all|dall|sull|coll
          |quell|un|nessun|buon|bell|sant)
      ['’](?=\p{L})"""
# Word characters with internal joiners: digit.digit, letter'letter, hyphens and dots.
_CHUNK = rf"""{_W}+
      (?:(?:(?<=\d)[.,](?=\d)|(?<=\p{{L}}\p{{M}}*)['’·](?=\p{{L}})|[\-‐.](?={_W})){_W}+)*
      (?:\(\)|(?<=\d)(?:%|‰))?"""
# Punctuation and symbols that can start a literal token (path, handle, tag, flag,
# signed number, identifier): all others are a token of their own at once.
_STARTERS = r"/\\.~@#\-+\u2212_"
# After a word, what could make it part of a URL, e-mail or path.
_LITERAL_NEXT = r"[@/\\+]|:[/\\]"

# Alternatives are tried in order at each token start. An alternative that scans a run
# of characters has a lookbehind that stops it from starting again inside such a run,
# so that a failed scan is never repeated at every position (which would be quadratic).
# The first ones are the fast, common cases (whitespace, runs of plain words,
# punctuation, a word that no literal can continue); the literal kinds follow; the last
# ones take whatever is left. Flags (pairs of regional indicators) are matched before
# the last resort \X, which in the regex module rescans a long run of them for every
# cluster.
# Format placeholders of program messages: printf (%s, %-10.2f, %1$s, %lu), Python
# (%(name)s, {0}, {name!r:>8}), shell and template variables ($HOME, ${name}).
_PLACEHOLDER = (
    r"%(?:\d+\$)?[-+ #0']*(?:\d+|\*)?(?:\.(?:\d+|\*))?"
    r"(?:hh|ll|[hlLqjzt]|I64|I32)?[diouxXeEfFgGaAcspn]"
    r"|%\([A-Za-z_]\w*\)[-+ #0]*\d*(?:\.\d+)?[diouxXeEfFgGcrsa]"
    r"|\{(?:[A-Za-z_][\w.]*|\d+)?(?:![rsa])?(?::[^{}\s]{0,12})?\}"
    r"|\$\{[A-Za-z_]\w*\}|\$[A-Za-z_]\w*"
)

_PATTERN = rf"""
  (?P<space>(?>\r\n|\s)+{_END})
| (?P<placeholder>(?<!%)(?:{_PLACEHOLDER})(?![\w]){_END})
| (?P<prose>{_PLAIN}(?:\x20{_PLAIN})*(?![\w\-‐.'’·(%‰]|{_LITERAL_NEXT}){_END})
| (?P<mark>[\p{{P}}--[{_STARTERS}]]{_END})
| (?P<sign>[\p{{S}}--[{_STARTERS}\p{{Regional_Indicator}}]]{_END})
| (?P<cluster>(?=[[\w]&&[{_NOSPACE}]])\X)
| (?P<elision>{_ELISION}{_END})
| (?P<word>(?!www\.)(?>{_CHUNK})(?!{_LITERAL_NEXT}){_END})
| (?P<measure>(?<![\w.,])\d+(?:[.,]\d+)*\p{{L}}+(?:/\p{{L}}+){{1,2}}(?![\w/]){_END})
| (?P<url>(?<![\w+.\-])(?:[A-Za-z][A-Za-z0-9+.\-]*://|www\.)[^\s<>"'`]*{_TAIL_STOP}{_END})
| (?P<email>(?<![\w.+\-])[\w+\-]+(?:\.[\w+\-]+)*@[\w\-]+(?:\.[\w\-]+)+{_END})
| (?P<path>
      (?<![\w/\\])[A-Za-z]:\\(?>{_SEG}(?:\\{_SEG})*){_END}
    | (?<![\w/.~])(?:~|\.{{1,2}})(?>(?:/\.?{_SEG})+)/?{_END}
    | (?<![\w/.~])(?>(?:/\.?{_SEG}){{2,}})/?{_END}
    | (?<![\w/.~\-+%$])(?=\p{{L}}|_|\.)(?>\.?{_SEG}(?:/\.?{_SEG})+)(?<=\.[A-Za-z]\w{{0,15}}){_END}
  )
| (?P<handle>(?<![\w@])@\w+(?:[.\-]\w+)*{_END})
| (?P<hashtag>(?<![\w#&])\#\w*[^\W\d_]\w*{_END})
| (?P<flag>(?<![\w\-])--?[A-Za-z][\w\-]*(?<!-)(?:=[^\s,;]*[^\s.,;:!?)'"])?{_END})
| (?P<number>(?<![\w.\-+\u2212])[\-+\u2212]\d+(?:[.,]\d+)*(?:%|‰|\p{{L}}+)?{_END})
| (?P<chunk>{_CHUNK}{_END})
| (?P<regional>\p{{Regional_Indicator}}{{2}}{_END})
| (?P<other>\X)
"""

_TOKEN = regex.compile(_PATTERN, regex.VERBOSE | regex.VERSION1)

_NUMBER = regex.compile(r"\d+(?:[.,]\d+)*(?:\p{L}+|%|‰)?", regex.VERSION1)
_HAS_DIGIT = regex.compile(r"\d")
_HAS_LETTER = regex.compile(r"\p{L}")
# readConfig, PumpController, HTTPServer; each run of one case is scanned once
_CAMEL = regex.compile(
    r"(?<!\p{Ll})\p{Ll}{2,}\p{Lu}|\p{Lu}\p{Ll}{2,}\p{Lu}\p{Ll}|(?<!\p{Lu})\p{Lu}{2,}\p{Ll}{2,}"
)
_PUNCT = regex.compile(r"\p{P}")
_NUMERIC = regex.compile(r"\p{N}")

_GROUP_KIND = {
    "placeholder": TokenKind.PLACEHOLDER,
    "url": TokenKind.URL,
    "email": TokenKind.EMAIL,
    "path": TokenKind.PATH,
    "handle": TokenKind.HANDLE,
    "hashtag": TokenKind.HASHTAG,
    "flag": TokenKind.FLAG,
    "number": TokenKind.NUMBER,
    "measure": TokenKind.NUMBER,  # 5mg/kg, 2km/h
    "elision": TokenKind.WORD,
    "mark": TokenKind.PUNCT,
    "sign": TokenKind.SYMBOL,
    "regional": TokenKind.SYMBOL,  # a flag: two regional indicators (UAX #29 GB12, GB13)
    "cluster": TokenKind.WORD,
    "space": TokenKind.SPACE,
}


def _chunk_kind(chunk: str) -> TokenKind:
    """Classify a run of word characters and internal joiners."""
    if chunk.isalpha():
        return _plain_kind(chunk)
    if chunk.isdigit():
        return TokenKind.NUMBER
    if chunk.endswith("()"):
        return TokenKind.IDENTIFIER
    has_letter = _HAS_LETTER.search(chunk) is not None
    if "_" in chunk and has_letter:
        return TokenKind.IDENTIFIER
    if _HAS_DIGIT.search(chunk) is not None:
        if _NUMBER.fullmatch(chunk) is not None or not has_letter:
            return TokenKind.NUMBER
        return TokenKind.CODE
    if not has_letter:
        return TokenKind.PUNCT if chunk.strip("_") == "" else TokenKind.SYMBOL
    if "." in chunk:
        # os.path.join, config.yaml are names; e.g, U.S are abbreviations
        parts = chunk.split(".")
        return TokenKind.IDENTIFIER if min(map(len, parts)) >= 2 else TokenKind.WORD
    if chunk.isascii() and _CAMEL.search(chunk) is not None:
        return TokenKind.IDENTIFIER
    return TokenKind.WORD


def _plain_kind(word: str) -> TokenKind:
    """Letters and marks followed by nothing that could make them a literal."""
    if word[1:].islower() or not word.isascii() or _CAMEL.search(word) is None:
        return TokenKind.WORD
    return TokenKind.IDENTIFIER


def _other_kind(cluster: str) -> TokenKind:
    if _PUNCT.match(cluster):
        return TokenKind.PUNCT
    # numeric characters that are not decimal digits: ½, ², Ⅻ
    return TokenKind.NUMBER if _NUMERIC.match(cluster) else TokenKind.SYMBOL


_CLASSIFY = {"word": _chunk_kind, "chunk": _chunk_kind, "other": _other_kind}
_SPACE = TokenKind.SPACE


Span = tuple[int, int, TokenKind]


def spans(text: str) -> tuple[Span, ...]:
    """``(start, end, kind)`` of each token, without building :class:`Token` records.

    Alignment uses this to avoid making records for the unchanged part of a text.

    >>> spans("H2O at 3.5mm")  # doctest: +NORMALIZE_WHITESPACE
    ((0, 3, <TokenKind.CODE: 'code'>), (3, 4, <TokenKind.SPACE: 'space'>),
     (4, 6, <TokenKind.WORD: 'word'>), (6, 7, <TokenKind.SPACE: 'space'>),
     (7, 12, <TokenKind.NUMBER: 'number'>))
    """
    if text.isascii():
        if text.isalpha():  # one plain word: the window of most fixes
            return ((0, len(text), _plain_kind(text)),)
        if text.replace(" ", "").isalpha() or _SIMPLE.fullmatch(text):
            return _plain_spans(text)
    if len(text) <= _CACHED_LENGTH:
        return _cached_spans(text)
    return _scan(text)


# ASCII words of letters, digits and underscores, joined by single hyphens (pump,
# XR-220, well-known, get_user), between plain spaces: the token pattern makes each one
# token (its "prose" or "word" branch) and classifies it as _plain_kind or _chunk_kind do.
_SIMPLE_WORD = r"[A-Za-z0-9_]+(?:-[A-Za-z0-9_]+)*"
_SIMPLE = re.compile(rf" *(?:{_SIMPLE_WORD}(?: +{_SIMPLE_WORD})*)? *")


def _plain_spans(text: str) -> tuple[Span, ...]:
    """Spans of ASCII words and spaces, which the token pattern would cut at the spaces.

    A speller's change is mostly one plain word for another, and the general pattern
    costs microseconds per token in the regex module; this is what it gives for such
    text (the tokenizer tests compare the two on generated text), found with str methods:
    the pieces between single spaces are the words, and an empty piece is one more space
    in a run.
    """
    out: list[Span] = []
    gap = 0  # where the run of spaces before the next word starts
    at = 0  # where the next piece starts
    for word in text.split(" "):
        if word:
            if gap < at:
                out.append((gap, at, _SPACE))
            stop = at + len(word)
            out.append((at, stop, _plain_kind(word) if word.isalpha() else _chunk_kind(word)))
            gap = stop
            at = stop + 1
        else:
            at += 1
    if gap < len(text):
        out.append((gap, len(text), _SPACE))
    return tuple(out)


# Alignment tokenizes the changed window of each pair, a word or a few: the same windows
# come back (the words a speller lands on), so short ones are kept.
_CACHED_LENGTH = 64


@functools.lru_cache(maxsize=1 << 13)
def _cached_spans(text: str) -> tuple[Span, ...]:
    return _scan(text)


def _scan(text: str) -> tuple[Span, ...]:
    """The token pattern's own cut of ``text``."""
    out: list[Span] = []
    start = 0
    fixed, classify = _GROUP_KIND, _CLASSIFY
    for m in _TOKEN.finditer(text):
        # The tokens tile the text, so each starts where the one before ended.
        end = m.end()
        group = m.lastgroup
        if group == "prose":
            at = start
            for word in text[start:end].split(" "):
                stop = at + len(word)
                out.append((at, stop, _plain_kind(word) if word.isalpha() else _chunk_kind(word)))
                out.append((stop, stop + 1, _SPACE))
                at = stop + 1
            out.pop()  # the split made one space too many
        else:
            kind = fixed.get(group)  # type: ignore[arg-type]
            if kind is None:
                kind = classify[group](text[start:end])  # type: ignore[index]
            out.append((start, end, kind))
        start = end
    return tuple(out)


def tokenize(text: str) -> tuple[Token, ...]:
    """The tokens of ``text``, tiling it exactly.

    >>> [(t.text, t.kind.value) for t in tokenize("l'homme don't")]
    [("l'", 'word'), ('homme', 'word'), (' ', 'space'), ("don't", 'word')]
    >>> [t.text for t in tokenize("東京タワー")]
    ['東', '京', 'タ', 'ワ', 'ー']
    >>> "".join(t.text for t in tokenize("e\u0301 👩\u200d💻!")) == "e\u0301 👩\u200d💻!"
    True
    """
    return tuple(
        Token(text=text[start:end], start=start, end=end, kind=kind)
        for start, end, kind in spans(text)
    )
