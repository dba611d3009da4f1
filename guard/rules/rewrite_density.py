"""rewrite-density (pair level): too many rewrites, or too large a share of the text.

A neural speller that paraphrases, or a hostile one that replaces the whole text, rewrites
most words at once. Only texts of at least ``min-words`` words are measured, so that a
one-word query with one fix is not "100 % rewritten". The finding applies to every rewrite
of the pair.

Rewrites that only repair a word no lexicon knows into a known word one edit away (a
plain typo fix, as "muesra" -> "muestra") are not counted: a speller that fixes every
slip of a typo-dense line is doing its job, not paraphrasing. "Unknown" is a Zipf under
``unknown-below`` in the pair's language, "known" at least that.

Accepts: "the bilge pmup is noisy today" -> "the bilge pump is noisy today".
Vetoes: "the bilge pump is noisy today" -> "a quiet pump was fitted yesterday".
"""

from __future__ import annotations

from guard.records import Action, Finding, Rewrite, Tier
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.rules.words import UNKNOWN_BELOW, content_tokens, one_word_change, within_edits, zipf
from guard.ruleset.model import RuleSettings

NAME = "rewrite-density"


def _typo_fix(rw: Rewrite, ctx: PairContext, below: float) -> bool:
    """One unknown word made into a known one, one edit away (case-folded)."""
    if ctx.lexicon is None:
        return False
    change = one_word_change(rw)
    if change is None:
        return False
    old, new = change
    if not within_edits(old, new, 1):
        return False
    return zipf(ctx, old) < below <= zipf(ctx, new)


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is None
    if not ctx.rewrites:
        return None
    words = ctx.source_words
    min_words = settings.options["min-words"]
    max_share = settings.options["max-share"]
    max_rewrites = settings.options["max-rewrites"]
    assert (
        isinstance(min_words, int)
        and isinstance(max_share, float)
        and isinstance(max_rewrites, int)
    )
    if words < min_words and not (max_rewrites and len(ctx.rewrites) > max_rewrites):
        return None  # too short for a share, too few rewrites for a count
    below = settings.options["unknown-below"]
    assert isinstance(below, float)
    counted = [r for r in ctx.rewrites if not _typo_fix(r, ctx, below)]
    if not counted:
        return None
    changed = sum(len(content_tokens(r.old_tokens)) or 1 for r in counted)
    share = changed / max(words, 1)
    if words >= min_words and share > max_share:
        return finding(
            NAME,
            Tier.EVIDENCE,
            settings,
            "the proposal rewrites {changed} of {words} words ({share_pct}%)",
            rewrite=None,
            changed=changed,
            words=words,
            share_pct=round(100 * share),
            max_share=max_share,
        )
    elif max_rewrites and len(counted) > max_rewrites:
        return finding(
            NAME,
            Tier.EVIDENCE,
            settings,
            "the proposal makes {count} rewrites; at most {max_rewrites} are expected",
            rewrite=None,
            count=len(counted),
            max_rewrites=max_rewrites,
        )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.PAIR,
    tier=Tier.EVIDENCE,
    default_action=Action.VETO,
    options={
        "max-share": OptionSpec(
            default=0.6, type=float, doc="largest share of words rewritten", per_lang=True
        ),
        "min-words": OptionSpec(
            default=5, type=int, doc="shorter texts are not measured", per_lang=True
        ),
        "max-rewrites": OptionSpec(
            default=12, type=int, doc="most rewrites in one pair (0: no limit)"
        ),
        "unknown-below": UNKNOWN_BELOW,
    },
    check=check,
    doc=__doc__ or "",
)
