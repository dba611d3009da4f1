"""What a rule is: a name, what it looks at, its options with defaults, and a pure check.

Rules never do I/O, never print, never keep state: they get one rewrite (or the pair), the
pair's context and their resolved settings, and return what they saw: one finding, or None.
One finding per rule and rewrite is all a verdict needs (the worst action counts), and a
plain return costs a sixth of a generator on the engine's hottest loop. Everything they
consult was loaded and compiled before the first check.
"""

from __future__ import annotations

import enum
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

from guard.records import Action, EvidenceValue, Finding, Origin, Rewrite, Tier, quick_init

if TYPE_CHECKING:
    from guard.ruleset.lexicon import Lexicon
    from guard.ruleset.model import (
        CompiledRuleset,
        PatternHit,
        PatternTimeout,
        RuleSettings,
        TermHit,
    )


class Scope(enum.StrEnum):
    REWRITE = "rewrite"  # called once per rewrite
    PAIR = "pair"  # called once per pair, with rewrite=None


@dataclass(frozen=True, slots=True, kw_only=True)
class OptionSpec:
    """One option of a rule: its type, default and a sentence for `rules show` and the docs."""

    default: object
    type: type | tuple[type, ...]
    doc: str
    per_lang: bool = False  # may be overridden under [rules.<name>.lang.<tag>]
    choices: tuple[object, ...] | None = None  # the only values allowed, when listed


@quick_init
@dataclass(frozen=True, slots=True, kw_only=True)
class PairContext:
    """What every rule may know about the pair under check. Built once per pair."""

    source: str
    proposal: str
    lang: str
    score: float | None
    source_words: int  # whitespace-separated words in the source (for density)
    rewrites: tuple[Rewrite, ...]
    term_hits: tuple[TermHit, ...]  # protected terms in the source
    pattern_hits: tuple[PatternHit, ...]  # protected-pattern matches in the source
    pattern_timeouts: tuple[PatternTimeout, ...]
    ruleset: CompiledRuleset
    lexicon: Lexicon | None  # None: wordfreq lacks the pair's language


CheckFn = Callable[["Rewrite | None", PairContext, "RuleSettings"], "Finding | None"]
"""A rule's check: the rewrite (None for a pair rule), the pair, and the rule's settings
resolved for the pair's language (``RuleSettings.for_lang``, which the engine applies once
per language), so a check reads ``settings.options[key]``: a dict lookup, where
``settings.option(key, lang)`` would be a method call on the hottest loop."""


@dataclass(frozen=True, slots=True, kw_only=True)
class Rule:
    """A rule of the catalogue. ``check`` is pure; ``doc`` shows a case it accepts and one
    it objects to."""

    name: str
    scope: Scope
    tier: Tier
    default_action: Action | None  # None: off unless a ruleset turns it on
    options: Mapping[str, OptionSpec] = field(default_factory=dict)
    check: CheckFn
    doc: str
    # True when the findings of a rewrite rule depend on nothing but the rewrite's texts
    # and token kinds, its index, the pair's language, the ruleset and the lexicons: not
    # on where the rewrite sits, on the other rewrites or on the rest of the text. The
    # engine then reuses them for the same rewrite in another pair (speller traffic
    # repeats its fixes); tests/rules/test_locality.py holds every local rule to it.
    local: bool = False


def finding(
    rule: str,
    tier: Tier,
    settings: RuleSettings,
    template: str,
    *,
    rewrite: int | None,
    origin: Origin | None = None,
    action: Action | None = None,
    **evidence: EvidenceValue,
) -> Finding:
    """Build a finding with the rule's configured action (or an explicit one)."""
    act = action if action is not None else settings.action
    assert act is not None, "an off rule must not be called"
    return Finding(
        rule=rule,
        tier=tier,
        action=act,
        template=template,
        evidence=evidence,
        rewrite=rewrite,
        origin=origin if origin is not None else settings.origin_of("action"),
    )
