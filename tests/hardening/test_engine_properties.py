"""Properties of the public API over arbitrary Unicode: whatever a speller returns, the
guard answers, and its answer is consistent with itself.

For any source and proposal (combining marks, right-to-left text, CJK, emoji ZWJ
sequences, control and format characters, lone surrogates):

- ``Guard.check`` raises nothing;
- every rewrite's offsets point at its old text in the source and its new text in the
  proposal, and applying all of them gives the proposal;
- the guarded text is the source with exactly the accepted and flagged rewrites applied,
  and the strict guarded text with only the accepted ones (applied here by the test's own
  splice, not the package's);
- when every rewrite is accepted, the guarded text is the proposal; when every rewrite is
  vetoed, it is the source;
- the pair's verdict is the worst of its rewrites' verdicts (accept < flag < veto).
"""

from __future__ import annotations

from collections.abc import Iterable
from functools import cache

from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from guard.api import Guard, load_ruleset
from guard.records import Report, RewriteVerdict, Verdict

RULESETS = ("base", "clinic-notes")
LANGS = ("en", "de", "fr")
_RANK = {Verdict.ACCEPT: 0, Verdict.FLAG: 1, Verdict.VETO: 2}  # the order DESIGN.md gives


@cache
def _guard(name: str) -> Guard:
    return Guard(load_ruleset(name))


# ---------------------------------------------------------------- strategies

_POOLS = [
    "abcdefghijklmnopqrstuvwxyz ABCDEFGHIJKLMNOPQRSTUVWXYZ 0123456789",
    "éèêëçñßøåäöüÉÅİıœ",  # Latin with diacritics, Turkish dotted and dotless i
    "\u0301\u0308\u0327\u20dd",  # combining marks (General_Category Mn/Me)
    "שלום עולם مرحبا بالعالم",  # Hebrew and Arabic (right-to-left)
    "東京タワー漢字かなカナ한국어",  # Han, Kana, Hangul (no spaces between words)
    "\U0001f468\u200d\U0001f469\u200d\U0001f467\U0001f44d\U0001f3fd\ufe0f",  # emoji ZWJ
    "\u200b\u200c\u200d\u2060\u00ad\ufeff\u202a\u202e\u2066\u2069\u061c",  # Cf, bidi
    "\x00\x01\x07\x1b\x7f\x85\t\n\r\x0b\x0c\u2028\u2029\u00a0\u3000",  # controls, breaks
    ".,;:!?-'\"()[]{}/\\@#$%&*+=<>_~`|",
    "https://x.example/a?b=1 user@x.example v1.2.3 snake_case camelCase",
]

chunk = st.one_of(
    *(st.text(alphabet=pool, min_size=1, max_size=8) for pool in _POOLS),
    st.text(max_size=6),  # any code point hypothesis likes, surrogates included
)
texts = st.lists(chunk, max_size=6).map("".join)


@st.composite
def edited(draw: st.DrawFn) -> tuple[str, str]:
    """A source and a proposal made from it by a few edits, as a speller makes them."""
    source = draw(texts)
    out = source
    for _ in range(draw(st.integers(0, 4))):
        i = draw(st.integers(0, len(out)))
        j = draw(st.integers(i, min(len(out), i + 6)))
        out = out[:i] + draw(chunk | st.just("")) + out[j:]
    return source, out


pairs = st.one_of(edited(), st.tuples(texts, texts))

# Generator data (invented sentences, everyday misspellings): pairs built from them are
# mostly accepted, so the "every rewrite accepted" branch of the checks runs often.
_WORDS = [
    "the",
    "cat",
    "sat",
    "on",
    "a",
    "mat",
    "and",
    "we",
    "will",
    "receive",
    "it",
    "from",
    "a",
    "separate",
    "shelf",
    "today",
]
_TYPOS = {"the": "teh", "receive": "recieve", "separate": "seperate", "and": "adn"}


@st.composite
def typo_fixes(draw: st.DrawFn) -> tuple[str, str]:
    words = draw(st.lists(st.sampled_from(_WORDS), min_size=1, max_size=10))
    typoed = [_TYPOS[w] if w in _TYPOS and draw(st.booleans()) else w for w in words]
    return " ".join(typoed), " ".join(words)


# Invisible characters (General_Category Cf and the UAX #9 Bidi_Control characters): a
# proposal that only adds them must have every rewrite vetoed.
_HIDDEN = (
    "\u200b\u200c\u200d\u2060\u00ad\ufeff"  # Cf
    "\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069\u200e\u200f\u061c"  # Bidi_Control
)


@st.composite
def hidden_insertions(draw: st.DrawFn) -> tuple[str, str]:
    source = draw(st.text(alphabet=_POOLS[0] + _POOLS[1] + _POOLS[3], min_size=1, max_size=30))
    out = source
    for _ in range(draw(st.integers(1, 3))):
        i = draw(st.integers(0, len(out)))
        out = out[:i] + draw(st.sampled_from(_HIDDEN)) + out[i:]
    return source, out


# ---------------------------------------------------------------- the properties


def _splice(source: str, rewrites: Iterable[RewriteVerdict]) -> str:
    """The source with these rewrites applied, by offsets, independently of guard.align."""
    out: list[str] = []
    at = 0
    for rv in sorted(rewrites, key=lambda v: (v.rewrite.start, v.rewrite.end)):
        rw = rv.rewrite
        assert rw.start >= at, "rewrites overlap"
        out.append(source[at : rw.start])
        out.append(rw.new)
        at = rw.end
    out.append(source[at:])
    return "".join(out)


def _assert_consistent(report: Report, source: str, proposal: str) -> None:
    assert (report.source, report.proposal) == (source, proposal)
    rvs = report.rewrites
    for rv in rvs:
        rw = rv.rewrite
        assert source[rw.start : rw.end] == rw.old
        assert proposal[rw.new_start : rw.new_end] == rw.new
        assert rv.verdict in _RANK
    assert _splice(source, rvs) == proposal
    kept = [rv for rv in rvs if rv.verdict in (Verdict.ACCEPT, Verdict.FLAG)]
    assert report.guarded == _splice(source, kept)
    assert report.guarded_strict == _splice(
        source, [rv for rv in rvs if rv.verdict is Verdict.ACCEPT]
    )
    if all(rv.verdict is Verdict.ACCEPT for rv in rvs):
        assert report.guarded == report.guarded_strict == proposal
    if rvs and all(rv.verdict is Verdict.VETO for rv in rvs):
        assert report.guarded == report.guarded_strict == source
    worst = max((rv.verdict for rv in rvs), key=_RANK.__getitem__, default=Verdict.ACCEPT)
    assert report.verdict is worst
    if source == proposal:
        assert rvs == () and report.verdict is Verdict.ACCEPT


_SETTINGS = settings(max_examples=120, deadline=None, suppress_health_check=[HealthCheck.too_slow])


@_SETTINGS
@given(
    pair=pairs,
    ruleset=st.sampled_from(RULESETS),
    lang=st.sampled_from((*LANGS, None)),
    score=st.none() | st.floats(allow_nan=False, allow_infinity=False),
)
@example(pair=("teh cat", "the cat"), ruleset="base", lang="en", score=None)
@example(pair=("pay now", "pa\u200by now"), ruleset="base", lang="en", score=None)
@example(pair=("a\ud800b", "a\udc00b"), ruleset="clinic-notes", lang="de", score=None)
@example(pair=("", "\u202e"), ruleset="base", lang=None, score=0.0)
def test_any_pair_gets_a_consistent_answer(
    pair: tuple[str, str], ruleset: str, lang: str | None, score: float | None
) -> None:
    source, proposal = pair
    report = _guard(ruleset).check(source, proposal, lang=lang, score=score)
    _assert_consistent(report, source, proposal)


@_SETTINGS
@given(pair=typo_fixes(), ruleset=st.sampled_from(RULESETS))
def test_typo_fixes_are_consistent(pair: tuple[str, str], ruleset: str) -> None:
    source, proposal = pair
    _assert_consistent(_guard(ruleset).check(source, proposal, lang="en"), source, proposal)


@_SETTINGS
@given(pair=hidden_insertions(), ruleset=st.sampled_from(RULESETS))
def test_a_proposal_that_only_adds_hidden_characters_is_vetoed_whole(
    pair: tuple[str, str], ruleset: str
) -> None:
    source, proposal = pair
    report = _guard(ruleset).check(source, proposal, lang="en")
    _assert_consistent(report, source, proposal)
    assert report.rewrites and all(rv.verdict is Verdict.VETO for rv in report.rewrites)
    assert report.guarded == source
