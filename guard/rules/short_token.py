"""short-token: the rewrite changes a very short word (likely an abbreviation or unit).

Two letters leave a speller almost no evidence: "mg", "IV", "ok", "km" all look like typos.

Accepts: "teh" -> "the" (three letters, above the default). Vetoes: "ml" -> "my".
"""

from __future__ import annotations

from guard.records import Action, Finding, Refinement, Rewrite, Tier, TokenKind
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.ruleset.model import RuleSettings

NAME = "short-token"


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    if rw.refinement is Refinement.CASE:
        return None
    max_len = settings.option("max-length", ctx.lang)
    assert isinstance(max_len, int)
    new_texts = {t.text for t in rw.new_tokens}
    for tok in rw.old_tokens:
        if tok.kind is TokenKind.WORD and len(tok.text) <= max_len and tok.text not in new_texts:
            return finding(
                NAME,
                Tier.EVIDENCE,
                settings,
                "'{word}' has only {length} letter(s)",
                rewrite=rw.index,
                word=tok.text,
                length=len(tok.text),
            )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    local=True,
    tier=Tier.EVIDENCE,
    default_action=Action.FLAG,
    options={
        "max-length": OptionSpec(
            default=2, type=int, doc="words this short or shorter count", per_lang=True
        ),
    },
    check=check,
    doc=__doc__ or "",
)
