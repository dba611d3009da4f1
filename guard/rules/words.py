"""Word-level evidence shared by rules: which tokens of a rewrite are words, how common a
word is in the pair's language, whether the ruleset or a lexicon knows it.

Pure helpers over the pair context; no rule logic lives here.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import regex
from rapidfuzz.distance import OSA

from guard.records import Rewrite, Token, TokenKind
from guard.rules.base import OptionSpec, PairContext

if TYPE_CHECKING:
    from guard.ruleset.lexicon import Lexicon
    from guard.ruleset.model import WordCounts

PATTERN_TIMEOUT_S = 0.05
"""Time limit for one ruleset pattern on one text (the `regex` module enforces it)."""

UNKNOWN_BELOW = OptionSpec(
    default=2.5,
    type=float,
    doc="a source word rarer than this Zipf counts as unknown (a likely typo): web "
    "frequency lists hold frequent misspellings with real Zipf values",
    per_lang=True,
)
"""The option, shared by the rules that yield to typo fixes, that says what "unknown" is."""

_NOT_WORDS = frozenset({TokenKind.SPACE, TokenKind.PUNCT, TokenKind.SYMBOL})
_APOSTROPHES = regex.compile(r"['’]")
_JOINERS = regex.compile(r"['’\-‐‑]")
_LETTER = regex.compile(r"\p{L}")
_HYPHENS = regex.compile(r"[\-‐‑]")


def content_tokens(tokens: tuple[Token, ...]) -> tuple[Token, ...]:
    """The tokens that carry content: not whitespace, punctuation or symbols."""
    if len(tokens) == 1:  # most rewrites: one token for one
        return () if tokens[0].kind in _NOT_WORDS else tokens
    return tuple(t for t in tokens if t.kind not in _NOT_WORDS)


def word_tokens(tokens: tuple[Token, ...]) -> tuple[Token, ...]:
    """Plain word tokens (letters, no literal kind)."""
    return tuple(t for t in tokens if t.kind is TokenKind.WORD)


def one_word_change(rw: Rewrite) -> tuple[str, str] | None:
    """(old, new) when a rewrite turns one word into one word, else None.

    >>> from guard.records import RewriteKind
    >>> w = lambda s: Token(text=s, start=0, end=len(s), kind=TokenKind.WORD)
    >>> rw = Rewrite(index=0, start=0, end=3, old="teh", new="the", new_start=0, new_end=3,
    ...     kind=RewriteKind.REPLACE, refinement=None,
    ...     old_tokens=(w("teh"),), new_tokens=(w("the"),))
    >>> one_word_change(rw)
    ('teh', 'the')
    """
    old = content_tokens(rw.old_tokens)
    new = content_tokens(rw.new_tokens)
    if len(old) == 1 and len(new) == 1:
        return old[0].text, new[0].text
    return None


def within_edits(old: str, new: str, most: int) -> bool:
    """Whether ``old`` and ``new`` are at most ``most`` edits apart, case folded (optimal
    string alignment: a swap of neighbours is one edit), the reach of a typo.

    >>> within_edits("Teh", "the", 1), within_edits("pump", "plump", 0)
    (True, False)
    """
    return OSA.distance(old.casefold(), new.casefold(), score_cutoff=most) <= most


def changed_parts(old: str, new: str) -> list[tuple[str, str]]:
    """The parts of a hyphenated word that a change touched, paired with what they became;
    the whole words when the parts do not pair up.

    >>> changed_parts("CSV-userlist", "CSV-setlist"), changed_parts("e-mail", "email")
    ([('userlist', 'setlist')], [('e-mail', 'email')])
    """
    if old.isalpha():  # most words: no hyphen to split at
        return [(old, new)] if old != new else []
    old_parts, new_parts = _HYPHENS.split(old), _HYPHENS.split(new)
    if len(old_parts) != len(new_parts):
        return [(old, new)]
    return [(a, b) for a, b in zip(old_parts, new_parts, strict=True) if a != b]


def compound_parts(lex: Lexicon, word: str, least: int, floor: float) -> tuple[str, str] | None:
    """The first cut of ``word`` into two words of ``least`` letters or more that the
    lexicon lists at Zipf ``floor`` or more: how an unlisted compound reads. None when
    there is none (or ``least`` is 0: no compound reading).

    >>> from guard.ruleset.lexicon import Lexicon
    >>> lex = Lexicon.from_words("xx", {"file": 425, "node": 512, "no": 300})
    >>> compound_parts(lex, "filenode", 3, 3.0), compound_parts(lex, "nodeno", 3, 3.0)
    (('file', 'node'), None)
    """
    if least < 1 or not word.isalpha():
        return None
    for i in range(least, len(word) - least + 1):
        tail = word[i:]
        if lex.zipf(tail) >= floor and lex.zipf(word[:i]) >= floor:
            return word[:i], tail
    return None


def zipf(ctx: PairContext, word: str) -> float:
    """Zipf frequency of ``word`` in the pair's language; 0.0 when unknown or no lexicon.

    Elided, contracted and hyphenated forms (l'homme, don't, Unix-Epoch) are looked up
    whole first, then as the rarest of their parts, as wordfreq itself splits them.
    """
    lex = ctx.lexicon
    if lex is None:
        return 0.0
    z = lex.zipf(word)
    if z > 0.0 or word.isalpha() or not _JOINERS.search(word):
        return z
    parts = [p for p in _JOINERS.split(word) if _LETTER.search(p)]
    if not parts:
        return 0.0
    return min(lex.zipf(p) for p in parts)


def phrase_zipf(ctx: PairContext, tokens: tuple[Token, ...]) -> float:
    """The rarest word of a phrase: a phrase is no more common than its rarest word."""
    words = content_tokens(tokens)
    if len(words) == 1:
        return zipf(ctx, words[0].text)
    if not words:
        return 0.0
    return min(zipf(ctx, t.text) for t in words)


def protected(ctx: PairContext, text: str) -> bool:
    """True when ``text`` is itself a protected term of the ruleset."""
    return ctx.ruleset.lookup_term(text) is not None


def domain_known(ctx: PairContext, text: str) -> bool:
    """The ruleset knows ``text``: a protected term, or the whole text matches a pattern."""
    if ctx.ruleset.lookup_term(text) is not None:
        return True
    for p in ctx.ruleset.patterns:
        try:
            if p.compiled.fullmatch(text, timeout=PATTERN_TIMEOUT_S):
                return True
        except TimeoutError:
            continue
    return False


def domain_vocabulary(ctx: PairContext) -> WordCounts | None:
    """The folded words of the team's own documents in the pair's language, with their
    counts (the ruleset's ``[vocabulary]``), or None when the ruleset lists none for it:
    then no rule may read a word's absence from it as evidence."""
    vocab = ctx.ruleset.vocabulary
    if not vocab:  # most rulesets: no vocabulary at all
        return None
    found = vocab.get(ctx.lang)
    if found is None and "-" in ctx.lang:
        found = vocab.get(ctx.lang.split("-", 1)[0])
    return found
