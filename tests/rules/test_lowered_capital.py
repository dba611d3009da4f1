"""letter-shape's ``lowered-action``: a rewrite that only lowers a capitalised word.

That a sentence starts with a capital and that a typo changes letters rather than the
case a writer chose are facts of the trade (common practice, no source). The verdicts
come from the bundled base ruleset; the comparison with ``lowered-action = "off"`` shows
what the option itself decides.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from guard.api import Guard, load_ruleset
from guard.records import Action, Report


def letter_shape(report: Report) -> set[Action]:
    return {f.action for f in report.findings if f.rule == "letter-shape"}


@pytest.fixture(scope="module")
def base() -> Guard:
    return Guard(load_ruleset("base"))


@pytest.fixture(scope="module")
def lowered_off(tmp_path_factory: pytest.TempPathFactory) -> Guard:
    path: Path = tmp_path_factory.mktemp("off") / "ruleset.toml"
    path.write_text(
        '[ruleset]\nname = "off"\nextends = ["base"]\n\n'
        '[rules.letter-shape]\nlowered-action = "off"\n',
        encoding="utf-8",
    )
    return Guard(load_ruleset(path))


CASES = [
    # a sentence start lowered: no other rule sees it
    ("Commence le transfert.", "commence le transfert.", "fr", set()),
    ("Restart the server.", "restart the server.", "en", set()),
    # a capitalised word inside a sentence lowered: title-action (flag) sees it otherwise
    ("Open the Printer Settings.", "Open the printer Settings.", "en", {Action.FLAG}),
]


@pytest.mark.parametrize(("source", "proposal", "lang", "when_off"), CASES)
def test_a_lowered_capital_is_vetoed(
    base: Guard,
    lowered_off: Guard,
    source: str,
    proposal: str,
    lang: str,
    when_off: set[Action],
) -> None:
    assert letter_shape(base.check(source, proposal, lang=lang)) == {Action.VETO}
    assert letter_shape(lowered_off.check(source, proposal, lang=lang)) == when_off


def test_a_letter_change_is_not_a_lowered_capital(base: Guard) -> None:
    # a typo fixed at a sentence start keeps its capital: nothing for letter-shape
    assert letter_shape(base.check("Teh server.", "The server.", lang="en")) == set()
    # a German noun put in capitals mid-sentence is no lowering: title-action vetoes it
    report = base.check("Die Datei ist leer.", "Die DATEI ist leer.", lang="de")
    assert letter_shape(report) == {Action.VETO}
    assert "only lowers" not in report.findings[0].message
