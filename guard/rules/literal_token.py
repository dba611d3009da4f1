"""literal-token: the rewrite changes a URL, e-mail address, path, number, identifier,
option flag, @handle, #tag or code (letters with digits).

A change to the digits of a token is always objected to. Otherwise the rule yields when the
speller moves a token that no lexicon or ruleset knows onto one the ruleset protects or
whose pattern it matches: that is the speller fixing a typo of a domain term.

Accepts: "see teh docs" -> "see the docs" (no literal touched).
Vetoes: "--colour=auto" -> "--color=auto"; "HM-2207" -> "HM-2270"; "3.5mm" -> "35mm".
"""

from __future__ import annotations

import regex

from guard.records import LITERAL_KINDS, Action, Finding, Rewrite, Tier
from guard.rules.base import PairContext, Rule, Scope, finding
from guard.rules.words import UNKNOWN_BELOW, content_tokens, domain_known, protected, zipf
from guard.ruleset.model import RuleSettings

NAME = "literal-token"
_DIGITS = regex.compile(r"\p{Nd}+")


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    old_literals = [t for t in content_tokens(rw.old_tokens) if t.kind in LITERAL_KINDS]
    if not old_literals:
        return None
    new_texts = {t.text for t in content_tokens(rw.new_tokens)}
    new_digits = _DIGITS.findall(rw.new)
    for tok in old_literals:
        if tok.text in new_texts:
            continue
        digits = _DIGITS.findall(tok.text)
        digits_changed = bool(digits) and digits != new_digits
        if not digits_changed and _fixes_toward_domain(ctx, tok.text, rw, settings):
            continue
        return finding(
            NAME,
            Tier.DOMAIN,
            settings,
            "the rewrite changes {kind} '{token}'"
            + (" (its digits change)" if digits_changed else ""),
            rewrite=rw.index,
            token=tok.text,
            kind=tok.kind.value,
            digits_changed=digits_changed,
        )
    return None


def _fixes_toward_domain(ctx: PairContext, old: str, rw: Rewrite, settings: RuleSettings) -> bool:
    new = rw.new.strip()
    below = settings.options["unknown-below"]
    assert isinstance(below, float)
    return (
        bool(new)
        and not protected(ctx, old)
        and not domain_known(ctx, old)
        and zipf(ctx, old) < below
        and domain_known(ctx, new)
    )


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    local=True,
    tier=Tier.DOMAIN,
    default_action=Action.VETO,
    options={
        "unknown-below": UNKNOWN_BELOW,
    },
    check=check,
    doc=__doc__ or "",
)
