"""short-token: the rewrite changes a very short word (likely an abbreviation or unit).

Two letters leave a speller almost no evidence: "mg", "IV", "ok", "km" all look like typos.
One case is told apart: a short word that gets back one dropped letter, all its own
letters kept in order, and so becomes one of the language's commonest words ("qu" ->
"que", "th" -> "the") is a typo fixed, when ``restored-min-zipf`` is set and the new
word's Zipf is at least that: a dropped letter is among the commonest slips, and an
abbreviation or unit that gains a letter rarely becomes a word that common.

Accepts: "teh" -> "the" (three letters, above the default). Vetoes: "ml" -> "my".
"""

from __future__ import annotations

from guard.records import Action, Finding, Refinement, Rewrite, Tier, TokenKind
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.rules.words import one_word_change, zipf
from guard.ruleset.model import RuleSettings

NAME = "short-token"


def _restored_letter(rw: Rewrite, ctx: PairContext, settings: RuleSettings) -> bool:
    """The rewrite adds one letter to a short word, keeping its letters in order, and
    lands on a word at least ``restored-min-zipf`` common ("qu" -> "que")."""
    floor = settings.options["restored-min-zipf"]
    assert isinstance(floor, float)
    change = one_word_change(rw)
    if floor <= 0.0 or change is None:
        return False
    old, new = change[0].casefold(), change[1].casefold()
    if len(new) != len(old) + 1:
        return False
    if not any(new[:i] + new[i + 1 :] == old for i in range(len(new))):
        return False
    return zipf(ctx, change[1]) >= floor


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    if rw.refinement is Refinement.CASE:
        return None
    max_len = settings.options["max-length"]
    assert isinstance(max_len, int)
    new_texts = {t.text for t in rw.new_tokens}
    for tok in rw.old_tokens:
        if tok.kind is TokenKind.WORD and len(tok.text) <= max_len and tok.text not in new_texts:
            if _restored_letter(rw, ctx, settings):
                return None
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
        "restored-min-zipf": OptionSpec(
            default=0.0,
            type=float,
            doc="a short word that gets back one dropped letter and becomes a word at "
            "least this common (Zipf) is a typo fixed (0: never)",
            per_lang=True,
        ),
    },
    check=check,
    doc=__doc__ or "",
)
