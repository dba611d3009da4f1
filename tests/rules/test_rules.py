"""Each rule of the catalogue: a case it accepts and a case it objects to, through one helper.

The pairs here are textbook cases of each rule's job (common practice, no source), and the
Zipf values the frequency rules rely on are wordfreq's own (the reference library).
"""

from __future__ import annotations

from pathlib import Path

import pytest

from guard.api import Guard, load_ruleset
from guard.records import Action, Report
from guard.rules import REGISTRY

FIXTURE = Path(__file__).parent / "fixture" / "ruleset.toml"


@pytest.fixture(scope="module")
def guard() -> Guard:
    return Guard(load_ruleset(FIXTURE))


def rule_actions(report: Report, rule: str) -> set[Action]:
    """The actions ``rule`` asked for anywhere in the report (counted or overridden)."""
    found = list(report.findings)
    for rv in report.rewrites:
        found.extend(rv.overridden)
    return {f.action for f in found if f.rule == rule}


# (rule, source, proposal, lang, score, expected action or None for "no finding")
CASES = [
    ("hidden-character", "pay now", "pay now", "en", None, None),
    ("hidden-character", "pay now", "pa\u200by now", "en", None, Action.VETO),
    ("hidden-character", "abc \u202edef", "abd \u202edef", "en", None, None),
    ("hidden-character", "pay the bill", "pay the \u202ebill", "en", None, Action.VETO),
    ("script-change", "the colour", "the colr", "en", None, None),
    ("script-change", "pay the bill", "pаy the bill", "en", None, Action.VETO),
    ("script-change", "Москва", "Масква", "ru", None, None),
    # a typo fixed inside a word that already mixed scripts adds no look-alike
    ("script-change", "the inv\u043eicr is due", "the inv\u043eice is due", "en", None, None),
    ("blocked-pair", "give hydroxyzine", "give hydroxine", "en", None, None),
    ("blocked-pair", "give hydroxyzine", "give hydralazine", "en", None, Action.VETO),
    ("protected-term", "Quillmate sycn", "Quillmate sync", "en", None, None),
    ("protected-term", "open Quillmate now", "open Quill mate now", "en", None, Action.VETO),
    ("protected-term", "the bilge pump", "the bulge pump", "en", None, Action.VETO),
    ("protected-term", "HAFENSTRASSE 4", "Hafenstrasse 4", "de", None, None),
    ("protected-term", "Hafenstraße 4", "Hafenstrasse 4", "de", None, None),
    ("protected-term", "Hafenstraße 4", "Hafenstrafe 4", "de", None, Action.VETO),
    ("protected-term", "open Quilmate now", "open Quillmate now", "en", None, Action.FLAG),
    # a typo fixed in another part of a compound leaves the term's characters alone ...
    ("protected-term", "the Patchg-Quillmate", "the Patch-Quillmate", "en", None, None),
    # ... but a change right against the term extends or cuts it
    ("protected-term", "the Quillmate-X", "the Quillmates-X", "en", None, Action.VETO),
    ("protected-pattern", "HM-2207 bilge pmup", "HM-2207 bilge pump", "en", None, None),
    ("protected-term", "open Quilmate now", "open Quillmate now", "en", None, Action.FLAG),
    ("protected-pattern", "order HM-2207 today", "order HM-2270 today", "en", None, Action.VETO),
    ("literal-token", "see teh docs", "see the docs", "en", None, None),
    ("literal-token", "use --colour=auto", "use --color=auto", "en", None, Action.VETO),
    ("literal-token", "a 3.5mm jack", "a 35mm jack", "en", None, Action.VETO),
    ("literal-token", "mail ana@example.org", "mail ana@example.com", "en", None, Action.VETO),
    ("literal-token", "call get_user_nmae", "call get_user_name", "en", None, Action.VETO),
    ("literal-token", "order HM-2207", "order HM-2270", "en", None, Action.VETO),
    ("letter-shape", "start the HTTTP server", "start the HTTP server", "en", None, None),
    ("letter-shape", "export as JSON", "export as Jason", "en", None, Action.VETO),
    ("letter-shape", "the NASA budget", "the Nasa budget", "en", None, Action.VETO),
    (
        "letter-shape",
        "we met Mrs Kowalczyk today",
        "we met Mrs Kowalski today",
        "en",
        None,
        Action.FLAG,
    ),
    ("critical-word", "do not recieve", "do not receive", "en", None, None),
    ("critical-word", "do nto stop", "do not stop", "en", None, None),
    ("critical-word", "do not stop", "do now stop", "en", None, Action.VETO),
    ("critical-word", "give 5 mg", "give 5 mcg", "en", None, Action.VETO),
    ("edit-budget", "we recieve it", "we receive it", "en", None, None),
    ("edit-budget", "fill the form", "fill the format", "en", None, Action.FLAG),
    ("real-word", "see teh docs", "see the docs", "en", None, None),
    ("real-word", "load the kernel", "load the kennel", "en", None, Action.VETO),
    ("clipped-word", "we recieve it", "we receive it", "en", None, None),
    ("clipped-word", "reindex the table", "index the table", "en", None, Action.VETO),
    ("compound-word", "we recieve it", "we receive it", "en", None, None),
    ("compound-word", "load the userlist", "load the setlist", "en", None, Action.VETO),
    ("split-word", "see thereport now", "see the report now", "en", None, None),
    ("split-word", "read the nodelist", "read the node lost", "en", None, Action.VETO),
    ("mentioned-word", "we recieve it. Then", "we receive it. Then", "en", None, None),
    ("mentioned-word", "run 'mandb' again", "run 'mand' again", "en", None, Action.VETO),
    ("rarer-target", "we recieve it", "we receive it", "en", None, None),
    ("rarer-target", "clear the cache", "clear the cachet", "en", None, Action.FLAG),
    ("unknown-target", "we recieve it", "we receive it", "en", None, None),
    ("unknown-target", "we recieve it", "we receeve it", "en", None, Action.FLAG),
    ("foreign-word", "we recieve it", "we receive it", "en", None, None),
    ("foreign-word", "the Zeitgeist of it", "the Seitgeist of it", "en", None, Action.FLAG),
    ("short-token", "see teh docs", "see the docs", "en", None, None),
    ("short-token", "add 5 ml water", "add 5 my water", "en", None, Action.VETO),
    (
        "rewrite-density",
        "the bilge pmup is noisy today",
        "the bilge pump is noisy today",
        "en",
        None,
        None,
    ),
    (
        "rewrite-density",
        "the engine is noisy today",
        "a quiet motor was fitted yesterday",
        "en",
        None,
        Action.VETO,
    ),
    ("low-confidence", "we recieve it", "we receive it", "en", 0.93, None),
    ("low-confidence", "we recieve it", "we receive it", "en", 0.21, Action.FLAG),
    ("no-lexicon", "we recieve it", "we receive it", "en", None, None),
    ("no-lexicon", "we recieve it", "we receive it", "xx", None, Action.NOTE),
]


@pytest.mark.parametrize(
    ("rule", "source", "proposal", "lang", "score", "expected"),
    CASES,
    ids=[f"{c[0]}:{c[1]}->{c[2]}" for c in CASES],
)
def test_rule(
    guard: Guard,
    rule: str,
    source: str,
    proposal: str,
    lang: str,
    score: float | None,
    expected: Action | None,
) -> None:
    report = guard.check(source, proposal, lang=lang, score=score)
    actions = rule_actions(report, rule)
    if expected is None:
        assert actions == set(), report
    else:
        assert expected in actions, report


def test_every_rule_has_an_accepting_and_an_objecting_case() -> None:
    covered_ok = {c[0] for c in CASES if c[5] is None}
    covered_bad = {c[0] for c in CASES if c[5] is not None}
    assert covered_ok == set(REGISTRY) == covered_bad


@pytest.mark.parametrize("name", list(REGISTRY))
def test_rule_docstring_has_both_examples(name: str) -> None:
    doc = REGISTRY[name].doc
    assert "Accepts" in doc
    assert any(word in doc for word in ("Vetoes", "Flags", "Notes")), doc


def test_allowed_pair_overrides_domain_and_evidence_but_not_hard_rules(guard: Guard) -> None:
    # real-word objects to colour -> color (both common English words, wordfreq) ...
    plain = Guard(load_ruleset("base")).check("the colour red", "the color red", lang="en")
    assert plain.verdict.value == "veto"
    # ... the allowed pair sets that aside, but never a hard rule.
    report = guard.check("the colour red", "the color red", lang="en")
    assert report.verdict.value == "accept"
    assert report.rewrites[0].overridden
    assert report.rewrites[0].allowed_by is not None
    assert report.rewrites[0].allowed_by.file.endswith("allowed.txt")
    hostile = guard.check("the colour red", "the c​olor red", lang="en")
    assert hostile.verdict.value == "veto"
