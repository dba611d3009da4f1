"""Regex safety checks for ruleset patterns.

Catastrophic cases come from the literature:
- OWASP, "Regular expression Denial of Service - ReDoS" (owasp.org/www-community/attacks),
  whose "evil regex" list gives (a+)+, ([a-zA-Z]+)*, (a|aa)+, (a|a?)+, (.*a){x} for x > 10,
  an e-mail validator and a Java class-name validator (list from memory; the ^(a+)+$ case
  and its doubling paths are quoted on mirrors of that page).
- Russ Cox, "Regular Expression Matching Can Be Simple And Fast" (2007): a?^n a^n, written
  here as (?:a?){28}a{28}.
Safe patterns are the kind rulesets use (docs/rulesets.md: part numbers, versions).
"""

from __future__ import annotations

import pytest
import regex

from guard.vocab.patterns import matches_empty, probe, risks, static_risks

OWASP_EMAIL = (
    r"^([a-zA-Z0-9])(([\-.]|[_]+)?([a-zA-Z0-9]+))*(@){1}[a-z0-9]+[.]{1}"
    r"(([a-z]{2,3})|([a-z]{2,3}[.]{1}[a-z]{2,3}))$"
)
OWASP_JAVA_CLASS = r"^(([a-z])+.)+[A-Z]([a-z])+$"

RISKY = [
    # (pattern, word expected in the message)
    pytest.param(r"^(a+)+$", "nested quantifier", id="owasp-a-plus-plus"),
    pytest.param(r"([a-zA-Z]+)*", "nested quantifier", id="owasp-letters-star"),
    pytest.param(r"(a|aa)+", "overlapping alternatives", id="owasp-a-or-aa"),
    pytest.param(r"(a|a?)+", "overlapping alternatives", id="owasp-a-or-optional-a"),
    pytest.param(r"(.*a){11}", "nested quantifier", id="owasp-dot-star-a-x"),
    pytest.param(OWASP_EMAIL, "nested quantifier", id="owasp-email"),
    pytest.param(OWASP_JAVA_CLASS, "nested quantifier", id="owasp-java-class"),
    pytest.param(r"(?:a?){28}a{28}", "nested quantifier", id="cox-a-optional-n"),
    # Shapes named in the brief of this module (common practice, no source).
    pytest.param(r"(a*)*", "nested quantifier", id="star-of-star"),
    pytest.param(r"(\w+\s?)+", "nested quantifier", id="words-optional-space"),
    pytest.param(r"(a|a)+", "overlapping alternatives", id="same-alternative"),
    pytest.param(r"(\w|\d)+", "overlapping alternatives", id="word-or-digit"),
    pytest.param(r"\w+\w+", "adjacent quantifiers", id="word-word"),
    pytest.param(r".*.*=", "adjacent quantifiers", id="dot-star-dot-star"),
    pytest.param(r"\p{L}+(?:\p{Ll}|\p{Lu})+", "adjacent quantifiers", id="unicode-classes"),
    pytest.param(r"(?V1)[[a-z]--[aeiou]]+[b-d]+", "adjacent quantifiers", id="version-1-sets"),
    pytest.param(r"(?i)[a-z]+[A-Z]+", "adjacent quantifiers", id="ignorecase-overlap"),
]


@pytest.mark.parametrize(("pattern", "expected"), RISKY)
def test_risky_shapes_are_flagged(pattern: str, expected: str) -> None:
    risks = static_risks(pattern)
    assert any(expected in message for message in risks), risks


SAFE = [
    pytest.param(r"\b[A-Z]{2}-\d{4}\b", id="part-number"),
    pytest.param(r"\b[A-Z]{2}-\d{3,4}[A-Z]?\b", id="part-number-suffix"),
    pytest.param(r"\bv\d+(?:\.\d+){1,3}\b", id="version"),
    pytest.param(r"\d{1,3}(?:,\d{3})*(?:\.\d+)?", id="grouped-number"),
    pytest.param(r"(\w+\s)+", id="words-each-with-space"),
    pytest.param(r"(cat|car)+", id="alternatives-differ-later"),
    pytest.param(r"\p{Lu}{2,}\d*", id="unicode-acronym"),
    pytest.param(r"(?<lot>L\d{6})", id="named-group"),
    pytest.param(r"(?i)\b(?:mg|ml)\b", id="inline-flag"),
    pytest.param("(?x) \\d+  # digits\n -\\d+", id="verbose"),
    pytest.param(r"[A-Z][a-z]+(?: [A-Z][a-z]+)*", id="capitalised-words"),
    pytest.param(r"(?>a+)b", id="atomic"),
    pytest.param(r"a++b", id="possessive"),
    pytest.param(r"(?V1)[[a-z]--[aeiou]]+[aeiou]+", id="version-1-disjoint-sets"),
    pytest.param(r"[a-z]+[A-Z]+", id="disjoint-cases"),
]


@pytest.mark.parametrize("pattern", SAFE)
def test_safe_patterns_pass(pattern: str) -> None:
    assert static_risks(pattern) == []


@pytest.mark.parametrize(
    ("pattern", "expected"),
    [
        pytest.param(r"(?R)x", "group syntax", id="recursion"),
        pytest.param(r"(a", "does not compile", id="broken"),
    ],
)
def test_unreadable_patterns_say_so(pattern: str, expected: str) -> None:
    [message] = static_risks(pattern)
    assert message.startswith("not analysed:")
    assert expected in message


# Exponential in the regex module itself: the probe runs out of time on every machine this
# could run on (2^30 paths at 30 characters), so these are not timing assertions.
@pytest.mark.parametrize(
    "pattern",
    [
        pytest.param(r"^(a|aa)+$", id="owasp-a-or-aa-anchored"),
        pytest.param(r"(a|a)+$", id="same-alternative-anchored"),
        pytest.param(OWASP_JAVA_CLASS, id="owasp-java-class"),
    ],
)
def test_probe_finds_exponential_patterns(pattern: str) -> None:
    message = probe(regex.compile(pattern))
    assert message is not None
    assert "ran out of time" in message


@pytest.mark.parametrize(
    "pattern",
    [
        pytest.param(r"\b[A-Z]{2}-\d{4}\b", id="part-number"),
        pytest.param(r"\bv\d+(?:\.\d+){1,3}\b", id="version"),
        pytest.param(r"\p{Lu}{2,}\d*", id="unicode-acronym"),
    ],
)
def test_probe_passes_linear_patterns(pattern: str) -> None:
    assert probe(regex.compile(pattern)) is None


@pytest.mark.parametrize(
    ("pattern", "expected"),
    [
        pytest.param(r"\d*", True, id="star"),
        pytest.param(r"\d+", False, id="plus"),
        pytest.param(r"\b", True, id="boundary"),
        pytest.param(r"[A-Z]{2}|", True, id="empty-alternative"),
        pytest.param(r"(?:QM-)?\d{0,4}", True, id="all-optional"),
        pytest.param(r"\b[A-Z]{2}-\d{4}\b", False, id="part-number"),
        pytest.param(r"(?=x)", True, id="lookahead-only"),
        pytest.param(r"(?V1)[[a-z]--[aeiou]]*", True, id="version-1-nested-set"),
        pytest.param(r"(?V1)[[a-z]--[aeiou]]+", False, id="version-1-nested-set-plus"),
        pytest.param(r"(?R)?x", False, id="recursion-falls-back-to-running"),
    ],
)
def test_matches_empty(pattern: str, expected: bool) -> None:
    assert matches_empty(pattern) is expected
    # Cross-check with the engine itself where the empty text shows it.
    if expected and not pattern.startswith("(?="):
        assert regex.compile(pattern).fullmatch("") is not None or pattern == r"\b"


@pytest.mark.parametrize(
    ("pattern", "shape", "severity"),
    [
        pytest.param(r"^(a+)+$", "nested-quantifier", "error", id="nested"),
        pytest.param(r"(a|aa)+", "overlapping-alternatives", "error", id="alternatives"),
        pytest.param(r"\d+\.?\d*", "adjacent-quantifiers", "warning", id="adjacent"),
        pytest.param(r"(?R)x", "not-analysed", "warning", id="unread"),
    ],
)
def test_risk_severity(pattern: str, shape: str, severity: str) -> None:
    # Exponential shapes are errors, polynomial ones and unread patterns warnings.
    [risk] = risks(pattern)
    assert (risk.shape, risk.severity) == (shape, severity)
