"""critical-word: the rewrite adds, removes or changes a meaning-critical word.

Negations, units, dosage words and directions are listed per ruleset ([critical] files).
A speller that drops "not" or turns "mg" into "mcg" changes what the text says.

A speller that repairs a token no lexicon knows into a critical word ("nto" -> "not") adds
nothing the writer did not mean; ``allow-typo-fix`` lets that through (rulesets for
clinical text turn it off). Web frequency lists hold frequent misspellings ("nciht" has a
German Zipf of 3.2), so with ``typo-min-gain`` set, a one-word change within one edit
toward a critical word at least that much more common counts as a repair too.

Accepts: with "not" critical, "do not recieve" -> "do not receive"; "do nto stop" -> "do not stop".
Vetoes: with "not" critical, "do not stop" -> "do now stop"; with "mg" critical, "5 mg" -> "5 mcg".
"""

from __future__ import annotations

from collections import Counter

from guard.records import Action, Finding, Rewrite, Tier
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.rules.words import (
    UNKNOWN_BELOW,
    content_tokens,
    one_word_change,
    protected,
    within_edits,
    zipf,
)
from guard.ruleset.model import RuleSettings
from guard.text.normalize import NormalizedText, normalize_key

NAME = "critical-word"


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    critical = ctx.ruleset.critical
    if not critical:
        return None
    old_keys = [k for t in content_tokens(rw.old_tokens) if (k := _key(t.text)) in critical]
    new_keys = [k for t in content_tokens(rw.new_tokens) if (k := _key(t.text)) in critical]
    if old_keys == new_keys:  # the usual case: no critical word on either side
        return None
    old, new = Counter(old_keys), Counter(new_keys)
    if old == new:
        return None
    removed = sorted((old - new).elements())
    added = sorted((new - old).elements())
    if not removed and settings.options["allow-typo-fix"] and _typo_fix(ctx, rw, settings):
        return None
    word = (removed or added)[0]
    entry = critical[word]
    return finding(
        NAME,
        Tier.DOMAIN,
        settings,
        "the rewrite {change} critical word '{word}'",
        rewrite=rw.index,
        origin=entry.origin,
        change="removes" if removed else "adds",
        word=entry.term,
        removed=tuple(removed),
        added=tuple(added),
    )


def _key(text: str) -> NormalizedText:
    """The critical list's key of a word: ``normalize_key``, whose NFC step leaves ASCII
    as it is and whose case folding of ASCII is lower-casing (CaseFolding.txt)."""
    return NormalizedText(text.lower()) if text.isascii() else normalize_key(text, fold=True)


def _typo_fix(ctx: PairContext, rw: Rewrite, settings: RuleSettings) -> bool:
    """Every source word of the rewrite is unknown to the lexicon and the ruleset."""
    old = content_tokens(rw.old_tokens)
    below = settings.options["unknown-below"]
    assert isinstance(below, float)
    return (
        ctx.lexicon is not None
        and bool(old)
        and all(zipf(ctx, t.text) < below and not protected(ctx, t.text) for t in old)
    ) or _frequent_misspelling(ctx, rw, settings)


def _frequent_misspelling(ctx: PairContext, rw: Rewrite, settings: RuleSettings) -> bool:
    """One word, one edit, toward a word at least ``typo-min-gain`` Zipf more common."""
    gain = settings.options["typo-min-gain"]
    assert isinstance(gain, float)
    change = one_word_change(rw)
    if gain <= 0.0 or change is None or ctx.lexicon is None or protected(ctx, change[0]):
        return False
    old, new = change
    if not within_edits(old, new, 1):
        return False
    return zipf(ctx, new) - zipf(ctx, old) >= gain


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    local=True,
    tier=Tier.DOMAIN,
    default_action=Action.VETO,
    options={
        "unknown-below": UNKNOWN_BELOW,
        "allow-typo-fix": OptionSpec(
            default=True,
            type=bool,
            doc="let a token no lexicon knows be repaired into a critical word",
            per_lang=True,
        ),
        "typo-min-gain": OptionSpec(
            default=0.0,
            type=float,
            doc="a listed word one edit from a critical word this much more common (Zipf) "
            "is a frequent misspelling of it (0: never)",
            per_lang=True,
        ),
    },
    check=check,
    doc=__doc__ or "",
)
