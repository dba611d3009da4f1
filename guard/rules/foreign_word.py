"""foreign-word: the source word is common in another language the ruleset lists.

Code-switching ("the Zeitgeist of...", "a déjà vu") is deliberate; a speller tuned on one
language "fixes" the other. The rule objects when the word's Zipf in one of the ruleset's
``other-languages`` (and, by default, its other ``languages``: technical German is full of
English) is at least ``min-zipf`` and higher than in the pair's language.

Accepts: "recieve" -> "receive" (not a word of another listed language).
Flags: with other-languages = ["de"], "the Zeitgeist" -> "the Seitgeist".
"""

from __future__ import annotations

import functools

from guard.records import Action, Finding, Rewrite, Tier, TokenKind
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.rules.words import zipf
from guard.ruleset.model import RuleSettings

NAME = "foreign-word"


@functools.lru_cache(maxsize=256)
def _other_languages(listed: tuple[str, ...], lang: str) -> tuple[str, ...]:
    """The listed languages other than ``lang`` (by primary subtag), each once, in order:
    the same few answers for every rewrite, so they are kept."""
    primary = lang.split("-", 1)[0].lower()
    return tuple(
        other for other in dict.fromkeys(listed) if other.split("-", 1)[0].lower() != primary
    )


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    rs = ctx.ruleset
    listed = (
        (*rs.other_languages, *rs.languages)
        if settings.options["include-ruleset-languages"]
        else rs.other_languages
    )
    if not listed:
        return None
    others = _other_languages(tuple(listed), ctx.lang)
    if not others:
        return None
    min_zipf = settings.options["min-zipf"]
    assert isinstance(min_zipf, float)
    for tok in rw.old_tokens:
        if tok.kind is not TokenKind.WORD:
            continue
        here = zipf(ctx, tok.text)
        for lang in others:
            lex = ctx.ruleset.lexicon(lang)
            if lex is None:
                continue
            there = lex.zipf(tok.text)
            if there >= min_zipf and there > here:
                return finding(
                    NAME,
                    Tier.EVIDENCE,
                    settings,
                    "'{word}' is a common {other} word (Zipf {zipf_other}); "
                    "Zipf {zipf_here} in {lang}",
                    rewrite=rw.index,
                    word=tok.text,
                    other=lang,
                    lang=ctx.lang,
                    zipf_other=there,
                    zipf_here=here,
                )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    local=True,
    tier=Tier.EVIDENCE,
    default_action=Action.FLAG,
    options={
        "include-ruleset-languages": OptionSpec(
            default=True,
            type=bool,
            doc="also count the ruleset's own languages other than the pair's",
            per_lang=True,
        ),
        "min-zipf": OptionSpec(
            default=3.5,
            type=float,
            doc="Zipf in the other language from which a word counts",
            per_lang=True,
        ),
    },
    check=check,
    doc=__doc__ or "",
)
