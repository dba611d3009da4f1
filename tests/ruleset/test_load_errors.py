"""A ruleset with one of each error: every problem is reported in one run, each with the
file, the line and the key path where it is."""

from __future__ import annotations

from collections.abc import Callable, Mapping
from pathlib import Path

import pytest

from guard.errors import Problem, RulesetError
from guard.rules.base import Rule
from guard.ruleset.load import Limits, load_sources

MAIN = """\
[ruleset]
name = "harbour line"
extends = ["./broken.toml", "../../outside.toml"]
languages = ["en", "english"]
colour = "blue"

[[terms]]
file = "terms/missing.txt"

[[terms]]
file = "terms/latin1.txt"
case = "upper"

[[terms]]
file = "../../etc/passwd"

[[patterns]]
name = "part"
regex = '[A-Z'

[[patterns]]
name = "slow"
regex = '^(a+)+$'

[pairs]
blocked = "pairs/blocked.txt"

[rules.edit-budget]
action = "block"
max-distance = "two"
max-distanse = 3

[rules.real-word.lang.english]
min-zipf = 3.0

[rules.edit-budget.lang.de]
max-distance = 1

[rules.spell-check]
action = "flag"

[[examples]]
source = "a"
proposal = "b"
expect = "maybe"

[extras]
x = 1
"""

BROKEN = """\
[ruleset]
name = = "broken"
"""

# (file relative to the ruleset folder, line, key, a piece of the message)
EXPECTED = [
    ("broken.toml", 2, None, "TOML syntax: Invalid value"),
    ("ruleset.toml", 2, "ruleset.name", "only letters, digits and '-'"),
    ("ruleset.toml", 3, "ruleset.extends[1]", "'../../outside.toml' leaves the ruleset's folder"),
    ("ruleset.toml", 4, "ruleset.languages[1]", "'english' is not a BCP 47 language tag"),
    ("ruleset.toml", 5, "ruleset.colour", "unknown key 'colour'"),
    ("ruleset.toml", 8, "terms[0].file", "list file 'terms/missing.txt' not found"),
    ("terms/latin1.txt", 2, None, "not valid UTF-8: byte 0xe9 at column 4"),
    ("ruleset.toml", 12, "terms[1].case", "case must be 'exact' or 'fold'"),
    ("ruleset.toml", 15, "terms[2].file", "'../../etc/passwd' leaves the ruleset's folder"),
    ("ruleset.toml", 19, "patterns[0].regex", "invalid regex"),
    ("ruleset.toml", 23, "patterns[1].regex", "can backtrack catastrophically"),
    ("pairs/blocked.txt", 2, None, "expected one pair 'old => new'"),
    ("ruleset.toml", 29, "rules.edit-budget.action", "action must be one of veto, flag, off"),
    ("ruleset.toml", 30, "rules.edit-budget.max-distance", "expected an integer, got a string"),
    ("ruleset.toml", 31, "rules.edit-budget.max-distanse", "did you mean 'max-distance'"),
    ("ruleset.toml", 33, "rules.real-word.lang.english", "not a BCP 47 language tag"),
    ("ruleset.toml", 37, "rules.edit-budget.lang.de.max-distance", "cannot be set per language"),
    ("ruleset.toml", 39, "rules.spell-check", "unknown rule 'spell-check'"),
    ("ruleset.toml", 45, "examples[0].expect", "expect must be one of accept, flag, veto"),
    ("ruleset.toml", 47, "extras", "unknown key 'extras'"),
]


def _load_problems(folder: Path, registry: Mapping[str, Rule]) -> tuple[Problem, ...]:
    with pytest.raises(RulesetError) as info:
        load_sources([folder / "ruleset.toml"], registry=registry)
    return info.value.problems


def test_every_error_is_reported_once_with_file_line_and_key(
    write: Callable[[dict[str, str | bytes]], Path], registry: Mapping[str, Rule]
) -> None:
    folder = (
        write(
            {
                "rules/ruleset.toml": MAIN,
                "rules/broken.toml": BROKEN,
                "rules/terms/latin1.txt": b"ok term\ncaf\xe9\n",
                "rules/pairs/blocked.txt": "colour => color\nno arrow here\n",
            }
        )
        / "rules"
    )
    got = _load_problems(folder, registry)
    seen = {(Path(p.file).relative_to(folder).as_posix(), p.line, p.key) for p in got}
    for file, line, key, fragment in EXPECTED:
        matches = [
            p
            for p in got
            if Path(p.file).relative_to(folder).as_posix() == file
            and p.line == line
            and p.key == key
            and fragment in p.message
        ]
        assert matches, f"missing {file}:{line} [{key}] {fragment!r}; got {sorted(seen, key=str)}"
    assert len(got) == len(EXPECTED), "\n".join(str(p) for p in got)
    assert all(p.severity == "error" for p in got)


@pytest.mark.parametrize(
    ("limits", "message"),
    [
        pytest.param(Limits(max_list_lines=3), "list has more than 3 lines", id="lines"),
        pytest.param(Limits(max_list_bytes=10), "is larger than 10 bytes", id="bytes"),
        pytest.param(Limits(max_term_chars=4), "term longer than 4 characters", id="term"),
        pytest.param(Limits(max_toml_bytes=20), "is larger than 20 bytes", id="toml"),
    ],
)
def test_size_limits_are_errors(
    write: Callable[[dict[str, str | bytes]], Path],
    registry: Mapping[str, Rule],
    limits: Limits,
    message: str,
) -> None:
    root = write(
        {
            "ruleset.toml": '[ruleset]\nname = "r"\nextends = []\n[[terms]]\nfile = "t.txt"\n',
            "t.txt": "alpha\nbe\nga\nde\n",
        }
    )
    with pytest.raises(RulesetError) as info:
        load_sources([root / "ruleset.toml"], registry=registry, limits=limits)
    (problem,) = info.value.problems
    assert message in problem.message


def test_a_toml_syntax_error_in_the_named_file_has_its_line(
    write: Callable[[dict[str, str | bytes]], Path], registry: Mapping[str, Rule]
) -> None:
    root = write({"r.toml": '[ruleset]\nname = "r"\n\n[rules.edit-budget\naction = "flag"\n'})
    with pytest.raises(RulesetError) as info:
        load_sources([root / "r.toml"], registry=registry)
    (problem,) = info.value.problems
    assert (problem.file, problem.line) == (str(root / "r.toml"), 4)
    assert problem.message.startswith("TOML syntax: ")
