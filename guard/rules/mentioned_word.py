"""mentioned-word: the source word is mentioned, not used: quoted alone, or abbreviated.

Technical text marks the words it names rather than uses. A word standing alone between
quote marks ('mandb', "pkcon", « ls ») is a command, a value or a label cited as it is
written; a word followed by a period and then a word in lower case ("bijv. de", "vgl. den",
"approx. two") is an abbreviation, which a speller "completes" into another word (both
common practice, no source). A speller that changes either changes what is named.
``quotes`` and ``abbreviations`` turn the two cases on and off.

Accepts: "see the 'dcos' page" -> "see the 'docs' page" with quotes = false;
"it is teh end." -> "it is the end." (the period ends the sentence).
Vetoes: "run 'mandb' again" -> "run 'mand' again"; "bijv. de map" -> "bij. de map".
"""

from __future__ import annotations

import regex

from guard.records import Action, Finding, Rewrite, Tier, Token, TokenKind
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.rules.words import content_tokens
from guard.ruleset.model import RuleSettings

NAME = "mentioned-word"
_OPENING = "'\"‘“«‹»›`„‚"
_CLOSING = "'\"’”»›«‹`“‘"
_ANY_OPENING = regex.compile("[" + regex.escape(_OPENING) + "]")
_ABBREVIATION = regex.compile(r"\.[ \t\u00a0]+\p{Ll}")


def _quoted(source: str, tok: Token) -> bool:
    """A quote mark right before the word (French guillemets: a space between allowed) that
    opens, being at the start or after a space or bracket, and one right after it that
    closes, no letter or digit following. German quotes »so«, so a closing « that ends
    one quotation and an opening » that starts the next do not make the word between them
    quoted ("»%s« für »--process«")."""
    before = source[: tok.start]
    after = source[tok.end :]
    b = before.rstrip(" \u00a0\u202f") if before.rstrip(" \u00a0\u202f")[-1:] == "«" else before
    a = after.lstrip(" \u00a0\u202f") if after.lstrip(" \u00a0\u202f")[:1] == "»" else after
    if not b or not a or b[-1] not in _OPENING or a[0] not in _CLOSING:
        return False
    opens = len(b) == 1 or b[-2].isspace() or b[-2] in "([{/"
    closes = len(a) == 1 or not a[1].isalnum()
    return opens and closes


def _abbreviated(source: str, tok: Token) -> bool:
    return source[tok.end : tok.end + 1] == "." and _ABBREVIATION.match(source, tok.end) is not None


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    source = ctx.source
    # no quote mark anywhere in the source: no word of it can stand between two; and
    # an abbreviation needs a period
    quotes = _ANY_OPENING.search(source) is not None and settings.options["quotes"]
    abbreviations = "." in source and settings.options["abbreviations"]
    if not quotes and not abbreviations:
        return None
    new_texts = {t.text for t in content_tokens(rw.new_tokens)}
    for tok in content_tokens(rw.old_tokens):
        if tok.kind is not TokenKind.WORD or tok.text in new_texts:
            continue
        if quotes and _quoted(ctx.source, tok):
            how = "stands alone between quote marks"
        elif abbreviations and _abbreviated(ctx.source, tok):
            how = "is written as an abbreviation (a period, then a word in lower case)"
        else:
            continue
        return finding(
            NAME,
            Tier.EVIDENCE,
            settings,
            "'{word}' {how}: it names something rather than being a word in use",
            rewrite=rw.index,
            word=tok.text,
            how=how,
        )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    tier=Tier.EVIDENCE,
    default_action=Action.VETO,
    options={
        "quotes": OptionSpec(
            default=True, type=bool, doc="a word alone between quote marks counts", per_lang=True
        ),
        "abbreviations": OptionSpec(
            default=True,
            type=bool,
            doc="a word followed by a period and a lower-case word counts",
            per_lang=True,
        ),
    },
    check=check,
    doc=__doc__ or "",
)
