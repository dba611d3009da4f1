"""The pipeline's records: frozen, complete when created, and unchanged by a trip through
pickle (batch workers send every report to the main process that way)."""

from __future__ import annotations

import copy
import dataclasses
import pickle

import pytest

from guard.api import Guard
from guard.records import Origin, Report, Token, TokenKind, Verdict, unchanged_report

PAIRS = [
    pytest.param("Send the JSON file", "Send the Jason file", id="vetoed"),
    pytest.param("teh pump is brokn", "the pump is broken", id="accepted"),
    pytest.param("a note book here", "a notebook here", id="join"),
    pytest.param("same text", "same text", id="unchanged"),
]


@pytest.fixture(scope="module")
def guard() -> Guard:
    return Guard("base")


@pytest.mark.parametrize(("source", "proposal"), PAIRS)
@pytest.mark.parametrize("protocol", [2, pickle.HIGHEST_PROTOCOL], ids=["p2", "highest"])
def test_a_report_survives_pickle(guard: Guard, source: str, proposal: str, protocol: int) -> None:
    report = guard.check(source, proposal, lang="en")
    back = pickle.loads(pickle.dumps(report, protocol=protocol))
    assert back == report and type(back) is Report
    assert [rv.rewrite for rv in back.rewrites] == [rv.rewrite for rv in report.rewrites]
    assert hash(back.rewrites) == hash(report.rewrites)
    assert copy.deepcopy(report) == report


def test_records_stay_frozen_and_keep_defaults() -> None:
    tok = Token(text="pump", start=0, end=4, kind=TokenKind.WORD)
    with pytest.raises(dataclasses.FrozenInstanceError):
        tok.text = "pimp"  # type: ignore[misc]
    assert Origin(file="a.toml") == Origin(file="a.toml", line=None, key=None)
    with pytest.raises(TypeError):
        Token("pump", 0, 4, TokenKind.WORD)  # type: ignore[call-arg]  # keyword-only


def test_the_unchanged_report_is_the_one_the_keyword_constructor_makes() -> None:
    # the maker (a mutable twin given the class) must set every field, each to what the
    # dataclass would hold, and hand back an ordinary Report
    made = unchanged_report("same text", "de", "base")
    expected = Report(
        source="same text",
        proposal="same text",
        lang="de",
        verdict=Verdict.ACCEPT,
        rewrites=(),
        pair_findings=(),
        guarded="same text",
        guarded_strict="same text",
        ruleset="base",
    )
    assert made == expected and type(made) is Report
    assert all(
        getattr(made, f.name) == getattr(expected, f.name) for f in dataclasses.fields(Report)
    )
    with pytest.raises(dataclasses.FrozenInstanceError):
        made.source = "other"  # type: ignore[misc]
    assert not hasattr(made, "__dict__")
    assert pickle.loads(pickle.dumps(made)) == made and hash(made) == hash(expected)


def test_a_subclass_of_a_record_keeps_its_class() -> None:
    # quick_init's twin has the record's own layout only; a subclass is set field by field
    class Marked(Token):
        pass

    tok = Marked(text="pump", start=0, end=4, kind=TokenKind.WORD)
    assert type(tok) is Marked and (tok.text, tok.start, tok.end) == ("pump", 0, 4)
    plain = Token(text="pump", start=0, end=4, kind=TokenKind.WORD)
    assert type(plain) is Token and not hasattr(plain, "__dict__")
