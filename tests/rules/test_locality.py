"""Rules marked ``local`` read nothing of a pair but the rewrite itself.

The engine keeps their findings per rewrite and reuses them in other pairs, so the
property is: the same rewrite in any context gives the same findings, and a report
built with reused findings equals one built from scratch. Pairs are generated from a
pool that reaches every rule of the fixture (real words, acronyms, title-case names,
codes, a protected term and pattern, critical and foreign words, punctuation); the
same fix lands at sentence starts, after punctuation, next to terms, alone.
"""

from __future__ import annotations

from pathlib import Path

from hypothesis import given, settings
from hypothesis import strategies as st

from guard.api import load_ruleset
from guard.engine import Engine
from guard.rules import REGISTRY, Scope

FIXTURE = Path(__file__).parent / "fixture" / "ruleset.toml"
RULESET = load_ruleset(FIXTURE)
REMEMBERING = Engine(RULESET)  # shared by every example: its memo fills across contexts
FRESH = Engine(RULESET, memo_size=0)

WORDS = [
    "the",
    "pump",
    "is",
    "not",
    "broken",
    "Quillmate",
    "HM-2207",
    "NASA",
    "Berlin",
    "und",
    "qu",
    "3.5mm",
    "--colour=auto",
    "bilge",
    "Hafenstraße",
    "teh",
    ".",
    ",",
    "!",
]
FIXES = [
    ("teh", "the"),
    ("pmup", "pump"),
    ("not", "now"),
    ("NASA", "NSA"),
    ("Berlin", "Merlin"),
    ("und", "and"),
    ("qu", "que"),
    ("3.5mm", "35mm"),
    ("bilge", "bulge"),
    ("brokn", "broken"),
    ("Quillmate", "Quill mate"),
    ("HM-2207", "HM-2270"),
    ("no", "on"),
    ("pump", "pump."),
    ("'mandb'", "'mand'"),
    ("mandb", "mand"),
    ("reindex", "index"),
    ("bijv. de", "bij. de"),
]


@st.composite
def pairs(draw: st.DrawFn) -> tuple[str, str, str]:
    left = draw(st.lists(st.sampled_from(WORDS), max_size=4))
    right = draw(st.lists(st.sampled_from(WORDS), max_size=4))
    fixes = draw(st.lists(st.sampled_from(FIXES), min_size=1, max_size=2))
    src = " ".join([*left, *(a for a, _ in fixes), *right])
    prop = " ".join([*left, *(b for _, b in fixes), *right])
    return src, prop, draw(st.sampled_from(["en", "de"]))


def test_the_fixture_has_local_and_placed_rewrite_rules() -> None:
    local = {r.name for r in REGISTRY.values() if r.local}
    assert {"edit-budget", "real-word", "critical-word"} <= local
    assert all(REGISTRY[name].scope is Scope.REWRITE for name in local)
    assert not {"protected-term", "protected-pattern", "letter-shape", "mentioned-word"} & local


@settings(max_examples=1500, deadline=None)
@given(pairs())
def test_reused_findings_give_the_report_built_from_scratch(pair: tuple[str, str, str]) -> None:
    src, prop, lang = pair
    assert REMEMBERING.check(src, prop, lang=lang) == FRESH.check(src, prop, lang=lang)
