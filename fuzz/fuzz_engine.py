"""Fuzz the engine through the public API: any source and proposal, any bundled ruleset.

What must hold for every pair (the same invariants tests/hardening/test_engine_properties.py
checks in a short run, here for as long as you like):

- ``Guard.check`` never raises;
- each rewrite's offsets point at its old text in the source and its new text in the
  proposal, rewrites do not overlap, and applying all of them gives the proposal;
- the guarded text is the source with the accepted and flagged rewrites applied, the
  strict guarded text with the accepted ones only;
- the pair's verdict is the worst of its rewrites' (accept < flag < veto);
- a rewrite that brings in more of a Cf or Bidi_Control character (UAX #9) than it takes
  out is vetoed (the hidden-character rule is a hard rule).

Runs under atheris (coverage-guided, libFuzzer) when it is installed, else as a long
hypothesis run. See fuzz/README.md.
"""

from __future__ import annotations

import sys
import unicodedata
from collections import Counter
from functools import cache

import harness
from harness import atheris

if atheris is not None:
    with atheris.instrument_imports(include=["guard"]):
        from guard.api import Guard, load_ruleset
        from guard.records import Report, Verdict
        from guard.ruleset.bundled import bundled_names
else:
    from guard.api import Guard, load_ruleset
    from guard.records import Report, Verdict
    from guard.ruleset.bundled import bundled_names

RULESETS = tuple(bundled_names())
LANGS = ("en", "de", "fr", "nl", "es", None)
_ORDER = (Verdict.ACCEPT, Verdict.FLAG, Verdict.VETO)


@cache
def _guard(name: str) -> Guard:
    return Guard(load_ruleset(name))


def _hidden(text: str) -> Counter[str]:
    """Cf characters (UnicodeData.txt) and the UAX #9 Bidi_Control ones (all Cf too),
    counted with Python's unicodedata, which the engine does not use for this."""
    return Counter(ch for ch in text if unicodedata.category(ch) == "Cf")


def check(source: str, proposal: str, ruleset: str, lang: str | None) -> Report:
    """Every property above for one pair; raises AssertionError on a violation."""
    report = _guard(ruleset).check(source, proposal, lang=lang)
    rvs = sorted(report.rewrites, key=lambda v: v.rewrite.start)
    pieces: dict[Verdict | None, list[str]] = {None: [], Verdict.ACCEPT: [], Verdict.FLAG: []}
    at = 0
    for rv in rvs:
        rw = rv.rewrite
        assert rw.start >= at, "overlapping rewrites"
        assert source[rw.start : rw.end] == rw.old and proposal[rw.new_start : rw.new_end] == rw.new
        gap = source[at : rw.start]
        pieces[None] += [gap, rw.new]
        pieces[Verdict.ACCEPT] += [gap, rw.new if rv.verdict is Verdict.ACCEPT else rw.old]
        pieces[Verdict.FLAG] += [gap, rw.old if rv.verdict is Verdict.VETO else rw.new]
        at = rw.end
        if _hidden(rw.new) - _hidden(rw.old):
            assert rv.verdict is Verdict.VETO, (rw.old, rw.new, rv.verdict)
    tail = source[at:]
    assert "".join(pieces[None]) + tail == proposal
    assert "".join(pieces[Verdict.FLAG]) + tail == report.guarded
    assert "".join(pieces[Verdict.ACCEPT]) + tail == report.guarded_strict
    worst = max((_ORDER.index(rv.verdict) for rv in rvs), default=0)
    assert report.verdict is _ORDER[worst]
    return report


def one_input(data: bytes) -> None:
    assert atheris is not None
    fdp = atheris.FuzzedDataProvider(data)
    ruleset = RULESETS[fdp.ConsumeIntInRange(0, len(RULESETS) - 1)]
    lang = LANGS[fdp.ConsumeIntInRange(0, len(LANGS) - 1)]
    source = fdp.ConsumeUnicode(fdp.ConsumeIntInRange(0, 200))
    if fdp.ConsumeBool():  # an edit of the source, as a speller makes it
        cut = fdp.ConsumeIntInRange(0, len(source))
        end = fdp.ConsumeIntInRange(cut, len(source))
        proposal = source[:cut] + fdp.ConsumeUnicode(12) + source[end:]
    else:
        proposal = fdp.ConsumeUnicode(200)
    check(source, proposal, ruleset, lang)


def load_all() -> None:
    """Load every ruleset before fuzzing, so that loading is not what is measured."""
    for name in RULESETS:
        _guard(name)


def hypothesis_run(examples: int, seed: int | None) -> None:
    from hypothesis import strategies as st

    alphabet = st.one_of(
        st.characters(),
        st.sampled_from("\u200b\u200d\u2060\u202e\u2066\u2069\u061c\u00ad\u0301\u0430\u03bf"),
        st.sampled_from("teh cat Rechnung 東京 שלום 👨\u200d👩 XR-220 v1.2 0.5mg "),
    )
    text = st.lists(alphabet, max_size=60).map("".join)

    @st.composite
    def cases(draw: st.DrawFn) -> tuple[str, str, str, str | None]:
        source = draw(text)
        if draw(st.booleans()):
            proposal = draw(text)
        else:
            i = draw(st.integers(0, len(source)))
            j = draw(st.integers(i, len(source)))
            proposal = source[:i] + draw(text) + source[j:]
        return source, proposal, draw(st.sampled_from(RULESETS)), draw(st.sampled_from(LANGS))

    harness.run_hypothesis("fuzz_engine", cases(), lambda c: check(*c), examples, seed)


if __name__ == "__main__":
    harness.main(
        sys.argv,
        one_input=one_input,
        hypothesis_run=hypothesis_run,
        default_examples=5_000,
        prepare=load_all,
    )
