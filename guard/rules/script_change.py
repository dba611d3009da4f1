"""script-change: the rewrite changes the script of letters or makes a token mixed-script.

Terms from UTS #39 (Unicode Security Mechanisms): a token is mixed-script when its
resolved script set is empty. Scripts that legitimately mix in one writing system
(Han with Hiragana and Katakana; Han with Hangul) are treated as one family.

Accepts: "colour" -> "color"; "Tokio" -> "Tokyo".
Vetoes: "paypal" -> "pаypal" (U+0430 CYRILLIC SMALL LETTER A brought into a Latin word).
"""

from __future__ import annotations

from guard.records import Action, Finding, Rewrite, Tier
from guard.rules.base import PairContext, Rule, Scope, finding
from guard.rules.words import content_tokens
from guard.ruleset.model import RuleSettings
from guard.text.shape import is_mixed_script, scripts_of

NAME = "script-change"

_FAMILIES: tuple[frozenset[str], ...] = (
    frozenset({"Han", "Hiragana", "Katakana"}),
    frozenset({"Han", "Hangul"}),
    frozenset({"Han", "Bopomofo"}),
)


def _widen(scripts: frozenset[str]) -> frozenset[str]:
    out = set(scripts)
    for fam in _FAMILIES:
        if scripts & fam:
            out |= fam
    return frozenset(out)


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    old = rw.old
    if rw.new.isascii() and old.isascii() and old.upper() != old.lower():
        return None  # Latin letters for Latin letters: no script added, no ASCII token mixed
    new_scripts = scripts_of(rw.new)
    if not new_scripts:
        return None
    old_scripts = scripts_of(rw.old) or scripts_of(ctx.source)
    added = new_scripts - _widen(old_scripts)
    if old_scripts and added:
        return finding(
            NAME,
            Tier.HARD,
            settings,
            "the rewrite brings {added} letters into {old} text",
            rewrite=rw.index,
            added=" + ".join(sorted(added)),
            old=" + ".join(sorted(old_scripts)),
            old_scripts=tuple(sorted(old_scripts)),
            new_scripts=tuple(sorted(new_scripts)),
        )
    # A token that was mixed-script already (the speller fixing a typo elsewhere in it)
    # is only the rewrite's doing when the rewrite brings in a script it did not have.
    old_mixed = [t.text for t in content_tokens(rw.old_tokens) if is_mixed_script(t.text)]
    old_mixed_scripts = scripts_of("".join(old_mixed))
    for tok in content_tokens(rw.new_tokens):
        if tok.text in old_mixed or (old_mixed and scripts_of(tok.text) <= old_mixed_scripts):
            continue
        if is_mixed_script(tok.text):
            return finding(
                NAME,
                Tier.HARD,
                settings,
                "the rewrite makes '{token}' mixed-script ({scripts})",
                rewrite=rw.index,
                token=tok.text,
                scripts=" + ".join(sorted(scripts_of(tok.text))),
            )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    tier=Tier.HARD,
    default_action=Action.VETO,
    check=check,
    doc=__doc__ or "",
)
