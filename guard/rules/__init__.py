"""The rule catalogue: one module per rule, one explicit registry.

The order of REGISTRY is the order rules run and are listed in reports: hard rules first,
then domain rules, then evidence rules.
"""

from __future__ import annotations

from collections.abc import Mapping
from types import MappingProxyType

from guard.rules import (
    blocked_pair,
    clipped_word,
    compound_word,
    critical_word,
    edit_budget,
    foreign_word,
    hidden_character,
    letter_shape,
    literal_token,
    low_confidence,
    mentioned_word,
    no_lexicon,
    protected_pattern,
    protected_term,
    rarer_target,
    real_word,
    rewrite_density,
    script_change,
    short_token,
    split_word,
    unknown_target,
)
from guard.rules.base import OptionSpec, PairContext, Rule, Scope

__all__ = ["REGISTRY", "OptionSpec", "PairContext", "Rule", "Scope", "get_rule"]

REGISTRY: Mapping[str, Rule] = MappingProxyType(
    {
        m.RULE.name: m.RULE
        for m in (
            hidden_character,
            script_change,
            blocked_pair,
            protected_term,
            protected_pattern,
            literal_token,
            letter_shape,
            critical_word,
            edit_budget,
            real_word,
            clipped_word,
            compound_word,
            split_word,
            mentioned_word,
            rarer_target,
            unknown_target,
            foreign_word,
            short_token,
            rewrite_density,
            low_confidence,
            no_lexicon,
        )
    }
)


def get_rule(name: str) -> Rule:
    """The rule called ``name``; a KeyError that lists the known names otherwise."""
    try:
        return REGISTRY[name]
    except KeyError:
        raise KeyError(f"unknown rule '{name}'; known rules: {', '.join(REGISTRY)}") from None
