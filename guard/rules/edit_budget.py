"""edit-budget: the rewrite moves a word further than its length allows.

Distance is the optimal string alignment (restricted Damerau-Levenshtein) distance of the
case-folded words, computed by rapidfuzz; a substitution of keys that neighbour on a
QWERTY, QWERTZ or AZERTY keyboard costs ``adjacent-cost`` instead of 1, because such slips
are the commonest typing errors. The budget is one edit per ``letters-per-edit`` letters of
the source word, at least 1, at most ``max-distance``. Splits and joins are measured with
spaces and hyphens removed.

Accepts: "recieve" -> "receive" (distance 1). Flags: "form" -> "format" (distance 2 on a
four-letter word, budget 1).
"""

from __future__ import annotations

import regex
from rapidfuzz.distance import OSA, Levenshtein

from guard.records import Action, Finding, Rewrite, RewriteKind, Tier
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.rules.words import content_tokens
from guard.ruleset.model import RuleSettings

NAME = "edit-budget"
_DISCOUNT_MAX_LEN = 64
_JOINERS = regex.compile(r"[\s\-‐‑]+")
_ROWS = (
    ("1234567890", "qwertyuiop", "asdfghjkl", "zxcvbnm"),  # QWERTY
    ("1234567890", "qwertzuiop", "asdfghjkl", "yxcvbnm"),  # QWERTZ
    ("1234567890", "azertyuiop", "qsdfghjklm", "wxcvbn"),  # AZERTY
)


def _neighbours() -> dict[str, frozenset[str]]:
    near: dict[str, set[str]] = {}
    for rows in _ROWS:
        for r, row in enumerate(rows):
            for c, ch in enumerate(row):
                around = near.setdefault(ch, set())
                for dr in (-1, 0, 1):
                    rr = r + dr
                    if 0 <= rr < len(rows):
                        for dc in (-1, 0, 1):
                            cc = c + dc
                            if (dr or dc) and 0 <= cc < len(rows[rr]):
                                around.add(rows[rr][cc])
    return {k: frozenset(v) for k, v in near.items()}


NEIGHBOURS = _neighbours()


def weighted_distance(old: str, new: str, adjacent_cost: float) -> float:
    """OSA distance, with keyboard-neighbour substitutions costing ``adjacent_cost``.

    >>> weighted_distance("cat", "cst", 0.5)   # a and s neighbour
    0.5
    >>> weighted_distance("cat", "cut", 0.5)
    1.0
    """
    dist = float(OSA.distance(old, new))
    if dist == 0 or adjacent_cost >= 1.0 or max(len(old), len(new)) > _DISCOUNT_MAX_LEN:
        return dist  # edit operations of very long tokens cost quadratic time; no discount
    near = sum(
        1
        for op in Levenshtein.editops(old, new)
        if op.tag == "replace" and new[op.dest_pos] in NEIGHBOURS.get(old[op.src_pos], ())
    )
    return max(dist - near * (1.0 - adjacent_cost), adjacent_cost)


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    if rw.refinement is not None or rw.kind in (RewriteKind.INSERT, RewriteKind.DELETE):
        return None
    old_words = content_tokens(rw.old_tokens)
    if not old_words:
        return None
    old = (rw.old if rw.old.isalnum() else _JOINERS.sub("", rw.old)).casefold()
    new = (rw.new if rw.new.isalnum() else _JOINERS.sub("", rw.new)).casefold()
    cost = settings.options["adjacent-cost"]
    per = settings.options["letters-per-edit"]
    cap = settings.options["max-distance"]
    assert isinstance(cost, float) and isinstance(per, int) and isinstance(cap, int)
    letters = len(old_words[0].text) if len(old_words) == 1 else max(len(t.text) for t in old_words)
    budget = min(cap, max(1, letters // max(per, 1)))
    if OSA.distance(old, new, score_cutoff=budget) <= budget:
        return None  # within budget before any keyboard discount
    dist = weighted_distance(old, new, cost)
    if dist > budget:
        return finding(
            NAME,
            Tier.EVIDENCE,
            settings,
            "'{old}' -> '{new}' is {distance} edits away; a {letters}-letter word allows {budget}",
            rewrite=rw.index,
            old=rw.old,
            new=rw.new,
            distance=dist,
            letters=letters,
            budget=budget,
        )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    local=True,
    tier=Tier.EVIDENCE,
    default_action=Action.FLAG,
    options={
        "max-distance": OptionSpec(
            default=2, type=int, doc="most edits any word may take", per_lang=True
        ),
        "letters-per-edit": OptionSpec(
            default=4, type=int, doc="one edit allowed per this many letters", per_lang=True
        ),
        "adjacent-cost": OptionSpec(
            default=0.5, type=float, doc="cost of substituting a keyboard neighbour", per_lang=True
        ),
    },
    check=check,
    doc=__doc__ or "",
)
