"""unknown-target: the new word is known neither to the language lexicon nor to the ruleset.

A speller that proposes a word nobody writes has invented it.

Accepts: "recieve" -> "receive". Flags: "recieve" -> "receeve".
"""

from __future__ import annotations

from guard.records import Action, Finding, Rewrite, Tier, TokenKind
from guard.rules.base import PairContext, Rule, Scope, finding
from guard.rules.words import domain_known, zipf
from guard.ruleset.model import RuleSettings

NAME = "unknown-target"


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    if ctx.lexicon is None:
        return None
    old_texts = {t.text for t in rw.old_tokens}
    for tok in rw.new_tokens:
        if tok.kind is not TokenKind.WORD or tok.text in old_texts:
            continue
        if zipf(ctx, tok.text) == 0.0 and not domain_known(ctx, tok.text):
            return finding(
                NAME,
                Tier.EVIDENCE,
                settings,
                "'{word}' is known neither to the {lang} lexicon nor to the ruleset",
                rewrite=rw.index,
                word=tok.text,
                lang=ctx.lang,
            )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    local=True,
    tier=Tier.EVIDENCE,
    default_action=Action.FLAG,
    check=check,
    doc=__doc__ or "",
)
