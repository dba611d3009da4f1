"""hidden-character: the rewrite brings in invisible format characters or bidi controls.

Accepts: "teh" -> "the" (no hidden character added).
Vetoes: "pay" -> "pa\u200by" (adds U+200B ZERO WIDTH SPACE); "abc" -> "\u202eabc" (adds
U+202E RIGHT-TO-LEFT OVERRIDE). Only what the rewrite adds counts: characters already in
the source are not the speller's doing.
"""

from __future__ import annotations

import unicodedata
from collections import Counter

from guard.records import Action, Finding, Rewrite, Tier
from guard.rules.base import PairContext, Rule, Scope, finding
from guard.ruleset.model import RuleSettings
from guard.text.normalize import hidden_characters

NAME = "hidden-character"


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    if rw.new.isascii():  # no ASCII character is Cf, Bidi_Control or default-ignorable
        return None
    added = Counter(ch for _, ch in hidden_characters(rw.new))
    added.subtract(ch for _, ch in hidden_characters(rw.old))
    chars = sorted(ch for ch, n in added.items() if n > 0)
    if not chars:
        return None
    points = tuple(f"U+{ord(c):04X}" for c in chars)
    names = tuple(unicodedata.name(c, "unnamed") for c in chars)
    return finding(
        NAME,
        Tier.HARD,
        settings,
        "the rewrite inserts invisible character(s) {shown}",
        rewrite=rw.index,
        shown=", ".join(f"{p} {n}" for p, n in zip(points, names, strict=True)),
        code_points=points,
        names=names,
    )


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    local=True,
    tier=Tier.HARD,
    default_action=Action.VETO,
    check=check,
    doc=__doc__ or "",
)
