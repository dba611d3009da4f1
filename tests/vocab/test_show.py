"""`guard rules show`: the resolved ruleset, each setting with the file and line it came from."""

from __future__ import annotations

import json
import re
from pathlib import Path

from click.testing import CliRunner

from guard.cli.rules import command
from guard.ruleset.bundled import bundled_path

FIXTURES = Path(__file__).parent / "fixtures"
GOOD = FIXTURES / "good" / "ruleset.toml"


def _invoke(*args: str) -> tuple[int, str, str]:
    result = CliRunner().invoke(command, ["show", *args])
    assert result.exception is None or isinstance(result.exception, SystemExit), result.output
    return result.exit_code, result.stdout, result.stderr


def test_json_names_the_chain_origins_and_counts() -> None:
    code, out, err = _invoke(str(GOOD), "--format", "json")
    assert (code, err) == (0, "")
    data = json.loads(out)
    base = str(bundled_path("base").resolve())
    assert data["name"] == "tollmere-valves"
    assert data["chain"] == [base, str(GOOD)]
    rules = {r["name"]: r for r in data["rules"]}
    # [rules.edit-budget] action = "flag" is line 21 of the fixture; its other options
    # keep the values the base ruleset set.
    assert (rules["edit-budget"]["action"], rules["edit-budget"]["from"]) == ("flag", f"{GOOD}:21")
    for option in rules["edit-budget"]["options"]:
        assert option["from"] is None or option["from"].startswith(base + ":")
    assert data["terms"] == {
        "total": 2,
        "by_kind": {"name": 2},
        "lists": [
            {
                "file": str(GOOD.parent / "terms" / "products.txt"),
                "kind": "name",
                "case": "fold",
                "count": 2,
            },
        ],
    }
    assert [(p["name"], p["regex"]) for p in data["patterns"]] == [("valve-code", r"\bTV-\d{3}\b")]
    assert (data["pairs"]["blocked"], data["pairs"]["allowed"]) == (0, 1)
    assert data["examples"] == 2


def test_text_gives_every_rule_and_option_an_origin() -> None:
    code, out, _ = _invoke(str(GOOD))
    assert code == 0
    lines = out.splitlines()
    assert lines[0] == "ruleset tollmere-valves: Service notes of the invented Tollmere Valve Works"
    assert f"  edit-budget: flag  [{GOOD}:21]" in lines
    start, end = (
        lines.index("rules:"),
        next(i for i, x in enumerate(lines) if x.startswith("terms:")),
    )
    for line in lines[start + 1 : end]:
        assert re.search(r"  \[(default|.+:\d+)\]$", line), line
    assert lines[end] == "terms: 2 (name 2)"
    assert f"  {GOOD.parent / 'terms' / 'products.txt'}: 2 name, case fold" in lines
    assert "pairs: 0 blocked, 1 allowed" in lines
    assert lines[-1] == "examples: 2"


def test_a_bundled_name_is_shown() -> None:
    code, out, _ = _invoke("base", "--format", "json")
    assert code == 0
    assert json.loads(out)["name"] == "base"


def test_an_unloadable_ruleset_exits_2_with_its_problems() -> None:
    broken = FIXTURES / "broken" / "ruleset.toml"
    code, out, err = _invoke(str(broken))
    assert (code, out) == (2, "")
    expected = f"{broken}:6 [ruleset.colour]: error: unknown key 'colour'"
    assert any(line.startswith(expected) for line in err.splitlines()), err
