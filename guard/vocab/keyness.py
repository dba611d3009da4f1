"""Keyness: how much more often a word occurs in a corpus than in a language at large.

Harvesting ranks candidate protected terms by Dunning's log-likelihood ratio G², computed
on the 2x2 contingency table of one word against all other words, in the target corpus
against a reference corpus::

                   target   reference
    this word        a          b
    other words      c          d

    N1 = a + c, N2 = b + d, N = N1 + N2
    E_ij = (row total i) * (column total j) / N        for each of the four cells
    G² = 2 * Σ O_ij * ln(O_ij / E_ij)                   (a cell with O = 0 adds 0)

This is the full likelihood-ratio statistic of the table (Dunning 1993, "Accurate methods
for the statistics of surprise and coincidence"), the same value as
``scipy.stats.chi2_contingency(table, lambda_="log-likelihood", correction=False)``.
Corpus linguistics often uses a 2-cell form that sums over the word's own cells only
(Rayson & Garside 2000, "Comparing corpora using frequency profiling"):
``2 * (a ln(a/E_a) + b ln(b/E_b))``. The two differ by the "other words" cells; since
``c - E_c = -(a - E_a)`` and ``d - E_d = -(b - E_b)``, those cells add about
``Σ (O - E)² / 2E``, which is small when the word is a small share of both corpora. So the
forms agree for the rare words harvesting looks for, and the 4-cell form stays exact when a
word is a large share of a small corpus.

The result is signed here: positive when the word is relatively more frequent in the
target (``a/N1 > b/N2``), negative when it is rarer there. G² is compared with the
chi-square distribution with one degree of freedom: 3.84 is p < 0.05, 6.63 p < 0.01, 10.83
p < 0.001.

The reference corpus is wordfreq's frequency list for the language. Its frequencies are
shares of all word tokens; a count needs a corpus size, and this module uses a nominal
size of one billion tokens (``NOMINAL_REFERENCE_TOKENS``) because the Zipf scale is defined
per billion words (Zipf = log10 of occurrences per billion), so the reference count of a
word is simply 10**zipf; because wordfreq's largest lists stop at about one occurrence per
hundred million (Zipf 1), so every listed word gets a count of 10 or more, never a
fraction; and because a reference should dwarf the corpora being harvested (documentation
sets of thousands to millions of tokens), as it does for the web- and book-scale sources
wordfreq blends. The choice scales every G² alike for a given corpus, so it does not change
the ranking among words with the same reference frequency; it does move the absolute
values, which is why thresholds on G² are options.

Nothing here reads files or corpora: callers pass counts.
"""

from __future__ import annotations

import math

import wordfreq

NOMINAL_REFERENCE_TOKENS = 1_000_000_000
"""The size given to the wordfreq reference corpus; see the module docstring for why."""


def log_likelihood(a: float, b: float, c: float, d: float) -> float:
    """G² of the 2x2 table [[a, b], [c, d]] (rows: word/other, columns: target/reference).

    Unsigned, four cells, natural logarithms. Counts may be fractional (reference counts
    come from frequencies). A table with an empty row or column carries no evidence: 0.

    >>> round(log_likelihood(10, 10, 90, 290), 4)
    6.1088
    >>> log_likelihood(0, 0, 5, 7)
    0.0
    """
    for value in (a, b, c, d):
        if value < 0 or math.isnan(value):
            raise ValueError(f"counts must be non-negative numbers, got {value!r}")
    n = a + b + c + d
    rows = (a + b, c + d)
    cols = (a + c, b + d)
    if 0 in rows or 0 in cols:
        return 0.0
    total = 0.0
    for observed, row, col in ((a, 0, 0), (b, 0, 1), (c, 1, 0), (d, 1, 1)):
        if observed > 0:
            expected = rows[row] * cols[col] / n
            total += observed * math.log(observed / expected)
    # Rounding can leave a tiny negative value for a table at independence.
    return max(0.0, 2.0 * total)


def signed_log_likelihood(
    count: float, target_total: float, ref_count: float, ref_total: float
) -> float:
    """G² of a word seen ``count`` times in ``target_total`` tokens against a reference.

    Positive when the word is relatively more frequent in the target than in the
    reference, negative when rarer.

    >>> round(signed_log_likelihood(10, 100, 10, 300), 4)
    6.1088
    >>> round(signed_log_likelihood(1, 100, 30, 300), 4) < 0
    True
    """
    if count > target_total or ref_count > ref_total:
        raise ValueError("a word cannot occur more often than there are tokens")
    g2 = log_likelihood(count, ref_count, target_total - count, ref_total - ref_count)
    if target_total == 0 or ref_total == 0:
        return g2
    return g2 if count / target_total >= ref_count / ref_total else -g2


def reference_count(
    term: str, lang: str, *, reference_tokens: float = NOMINAL_REFERENCE_TOKENS
) -> float:
    """Expected occurrences of ``term`` in a nominal reference corpus of ``lang``.

    wordfreq's frequency (0 for a word it does not know) times the nominal size. Phrases
    get wordfreq's own estimate for a sequence of words.

    >>> reference_count("zzqxv", "en")
    0.0
    >>> reference_count("the", "en") > 1e7
    True
    """
    return float(wordfreq.word_frequency(term, lang)) * reference_tokens


def keyness(
    term: str,
    count: int,
    target_total: int,
    lang: str,
    *,
    reference_tokens: float = NOMINAL_REFERENCE_TOKENS,
) -> float:
    """Signed G² of ``term``, seen ``count`` times among ``target_total`` corpus tokens,
    against wordfreq's ``lang`` list scaled to ``reference_tokens``.

    >>> keyness("quillmate", 5, 1000, "en") > 10.83  # unknown to wordfreq, so key
    True
    >>> keyness("the", 5, 1000, "en") < 0  # 0.5 % here, about 5 % in English
    True
    """
    ref = reference_count(term, lang, reference_tokens=reference_tokens)
    return signed_log_likelihood(count, target_total, ref, reference_tokens)
