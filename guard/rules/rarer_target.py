"""rarer-target: the new word is much rarer than the old one.

Spellers with small dictionaries swap ordinary domain words for rarer look-alikes. The rule
objects when the new word's Zipf frequency is more than ``margin`` below the old word's and
the old word is known at all.

Accepts: "recieve" -> "receive". Flags: "cache" -> "cachet".
"""

from __future__ import annotations

from guard.records import Action, Finding, Rewrite, RewriteKind, Tier
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.rules.real_word import SKIP
from guard.rules.words import content_tokens, phrase_zipf
from guard.ruleset.model import RuleSettings

NAME = "rarer-target"


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    if (
        ctx.lexicon is None
        or rw.refinement in SKIP
        or rw.kind in (RewriteKind.INSERT, RewriteKind.DELETE)
    ):
        return None
    if not content_tokens(rw.old_tokens) or not content_tokens(rw.new_tokens):
        return None
    z_old = phrase_zipf(ctx, rw.old_tokens)
    if z_old <= 0.0:
        return None  # an unknown word (the usual typo) cannot be made rarer
    margin = settings.options["margin"]
    assert isinstance(margin, float)
    z_new = phrase_zipf(ctx, rw.new_tokens)
    if z_new < z_old - margin:
        return finding(
            NAME,
            Tier.EVIDENCE,
            settings,
            "'{new}' (Zipf {zipf_new}) is much rarer than '{old}' (Zipf {zipf_old})",
            rewrite=rw.index,
            old=rw.old,
            new=rw.new,
            zipf_old=z_old,
            zipf_new=z_new,
        )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    local=True,
    tier=Tier.EVIDENCE,
    default_action=Action.FLAG,
    options={
        "margin": OptionSpec(
            default=1.0, type=float, doc="Zipf drop that counts as much rarer", per_lang=True
        ),
    },
    check=check,
    doc=__doc__ or "",
)
