"""Keyness (Dunning's G²) against a hand-worked table and against scipy."""

from __future__ import annotations

import math

import pytest
from scipy.stats import chi2, chi2_contingency  # type: ignore[import-untyped]

from guard.vocab.keyness import (
    NOMINAL_REFERENCE_TOKENS,
    keyness,
    log_likelihood,
    reference_count,
    signed_log_likelihood,
)


def test_hand_worked_table() -> None:
    # Textbook arithmetic for the 4-cell G² (Dunning 1993), done by hand:
    #   table  word: a=10 (target)  b=10 (reference)
    #          rest: c=90           d=290
    #   N1 = 100, N2 = 300, N = 400, word row = 20, rest row = 380
    #   E_a = 20*100/400 = 5     E_b = 20*300/400 = 15
    #   E_c = 380*100/400 = 95   E_d = 380*300/400 = 285
    #   10 ln(10/5)   = 10 * 0.693147 =  6.931472
    #   10 ln(10/15)  = 10 * -0.405465 = -4.054651
    #   90 ln(90/95)  = 90 * -0.054067 = -4.866050
    #   290 ln(290/285) = 290 * 0.017392 = 5.043605
    #   sum = 3.054376, G² = 2 * sum = 6.108752
    assert log_likelihood(10, 10, 90, 290) == pytest.approx(6.108752, abs=1e-6)
    # 10/100 in the target against 10/300 in the reference: overused, so positive.
    assert signed_log_likelihood(10, 100, 10, 300) == pytest.approx(6.108752, abs=1e-6)
    # Swap the corpora: the same G², now underused, so negative.
    assert signed_log_likelihood(10, 300, 10, 100) == pytest.approx(-6.108752, abs=1e-6)


TABLES = [
    pytest.param((10, 10, 90, 290), id="hand-example"),
    pytest.param((1, 0, 999, 1_000_000), id="unseen-in-reference"),
    pytest.param((3, 500.5, 4997, 999_999_499.5), id="fractional-reference"),
    pytest.param((50, 50, 50, 50), id="independent"),
    pytest.param((400, 2, 600, 9998), id="large-share"),
]


@pytest.mark.parametrize("table", TABLES)
def test_matches_scipy(table: tuple[float, float, float, float]) -> None:
    # Reference library: scipy's likelihood-ratio (G) test of a 2x2 table without
    # Yates' correction is the same 4-cell statistic.
    a, b, c, d = table
    expected = chi2_contingency([[a, b], [c, d]], lambda_="log-likelihood", correction=False)[0]
    assert log_likelihood(a, b, c, d) == pytest.approx(float(expected), rel=1e-9, abs=1e-9)


def test_two_cell_form_agrees_for_rare_words() -> None:
    # Rayson & Garside (2000) sum only the word's cells; the module docstring derives that
    # the other cells add about Σ(O-E)²/2E, small when the word is rare in both corpora.
    a, b, n1, n2 = 12, 40_000, 20_000, 1_000_000_000
    e_a = n1 * (a + b) / (n1 + n2)
    e_b = n2 * (a + b) / (n1 + n2)
    two_cell = 2 * (a * math.log(a / e_a) + b * math.log(b / e_b))
    assert log_likelihood(a, b, n1 - a, n2 - b) == pytest.approx(two_cell, rel=1e-3)


def test_significance_threshold_is_chi_square() -> None:
    # The usual cut-off 10.83 (p < 0.001, 1 degree of freedom), checked against scipy.
    assert float(chi2.ppf(0.999, 1)) == pytest.approx(10.83, abs=0.005)


def test_reference_count_is_ten_to_the_zipf() -> None:
    # Zipf is log10 of occurrences per billion words (Van Heuven et al. 2014), so with a
    # nominal billion-token reference the count is 10**zipf (wordfreq rounds zipf to 0.01).
    import wordfreq

    zipf = wordfreq.zipf_frequency("harbour", "en")
    assert NOMINAL_REFERENCE_TOKENS == 10**9
    assert math.log10(reference_count("harbour", "en")) == pytest.approx(zipf, abs=0.01)


def test_keyness_sign() -> None:
    # An invented product name wordfreq does not know is key in a corpus that uses it.
    assert keyness("quillmate", 4, 2000, "en") > 10.83
    # "the" is about 5 % of English tokens (wordfreq); 1 in 2000 is far below that.
    assert keyness("the", 1, 2000, "en") < -10.83


@pytest.mark.parametrize(
    "table",
    [pytest.param((-1, 2, 3, 4), id="negative"), pytest.param((math.nan, 2, 3, 4), id="nan")],
)
def test_rejects_bad_counts(table: tuple[float, float, float, float]) -> None:
    with pytest.raises(ValueError, match="non-negative"):
        log_likelihood(*table)


def test_empty_margin_is_no_evidence() -> None:
    assert log_likelihood(0, 0, 10, 20) == 0.0
    assert log_likelihood(5, 0, 10, 0) == 0.0
