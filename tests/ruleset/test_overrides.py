"""Command-line overrides: the last layer, with "<override>" as their origin."""

from __future__ import annotations

from collections.abc import Callable, Mapping
from pathlib import Path

import pytest

from guard.errors import RulesetError
from guard.records import Action
from guard.rules.base import Rule
from guard.ruleset.load import OVERRIDE_FILE, load_sources

Write = Callable[[dict[str, str | bytes]], Path]


@pytest.fixture
def ruleset(bundled: Path, write: Write) -> Path:
    return (
        write({"r.toml": '[ruleset]\nname = "r"\n[rules.real-word]\nmin-zipf = 3.0\n'}) / "r.toml"
    )


@pytest.mark.parametrize(
    ("key", "value", "rule", "read", "expected"),
    [
        pytest.param("rules.real-word.min-zipf", 4.5, "real-word", "min-zipf", 4.5, id="option"),
        pytest.param("rules.real-word.min-zipf", "4.25", "real-word", "min-zipf", 4.25, id="text"),
        pytest.param("rules.real-word.min-zipf", 5, "real-word", "min-zipf", 5.0, id="int-float"),
        pytest.param(
            "rules.real-word.skip-names", "false", "real-word", "skip-names", False, id="bool"
        ),
        pytest.param(
            "rules.edit-budget.max-distance", "1", "edit-budget", "max-distance", 1, id="int"
        ),
    ],
)
def test_an_override_sets_an_option_and_its_origin(
    ruleset: Path,
    registry: Mapping[str, Rule],
    key: str,
    value: object,
    rule: str,
    read: str,
    expected: object,
) -> None:
    got = load_sources([ruleset], overrides={key: value}, registry=registry).rules[rule]
    assert got.options[read] == expected
    assert type(got.options[read]) is type(expected)
    origin = got.origin_of(read)
    assert origin is not None and origin.file == OVERRIDE_FILE and origin.key == key


def test_overrides_of_action_and_per_language(ruleset: Path, registry: Mapping[str, Rule]) -> None:
    got = load_sources(
        [ruleset],
        overrides={
            "rules.edit-budget.action": "veto",
            "rules.low-confidence.action": "flag",
            "rules.real-word.lang.DE.min-zipf": "3.75",
        },
        registry=registry,
    ).rules
    assert got["edit-budget"].action is Action.VETO
    assert got["low-confidence"].action is Action.FLAG
    assert got["real-word"].option("min-zipf", "de") == 3.75
    assert got["real-word"].option("min-zipf", "en") == 3.0  # the ruleset's value stands
    origin = got["real-word"].origin_of("min-zipf", "de")
    assert origin is not None and origin.file == OVERRIDE_FILE


@pytest.mark.parametrize(
    ("key", "value", "message"),
    [
        pytest.param("real-word.min-zipf", 1.0, "override keys look like", id="shape"),
        pytest.param("rules.real-wurd.min-zipf", 1.0, "unknown rule 'real-wurd'", id="rule"),
        pytest.param("rules.real-word.min-zip", 1.0, "has no option 'min-zip'", id="option"),
        pytest.param("rules.real-word.min-zipf", "high", "expected a number", id="type"),
        pytest.param("rules.real-word.action", "block", "action must be one of", id="action"),
        pytest.param("rules.real-word.lang.xx_1.min-zipf", 1.0, "not a BCP 47", id="tag"),
        pytest.param(
            "rules.real-word.lang.de.skip-names", True, "cannot be set per language", id="per-lang"
        ),
    ],
)
def test_a_bad_override_is_an_error_naming_the_key(
    ruleset: Path, registry: Mapping[str, Rule], key: str, value: object, message: str
) -> None:
    with pytest.raises(RulesetError) as info:
        load_sources([ruleset], overrides={key: value}, registry=registry)
    (problem,) = info.value.problems
    assert (problem.file, problem.key) == (OVERRIDE_FILE, key)
    assert message in problem.message
