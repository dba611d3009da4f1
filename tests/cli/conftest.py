"""A small ruleset and pairs whose verdicts do not hang on tuning: a blocked pair (a hard
rule) vetoes, a protected term set to flag flags, a plain typo fix is accepted. The
marine-parts words are invented demo data."""

from __future__ import annotations

from pathlib import Path

import pytest

RULESET = """\
[ruleset]
name = "cli-test"
extends = ["base"]
languages = ["en"]

[[terms]]
file = "terms.txt"
kind = "term"
case = "fold"

[pairs]
blocked = "blocked.txt"

[rules.protected-term]
action = "flag"

# Frequency evidence is tuned over time; these tests are about the CLI, not the tuning.
[rules.real-word]
action = "off"
"""

ACCEPT = {"source": "teh anchor", "proposal": "the anchor"}
FLAG = {"source": "pintle and gudgeon set", "proposal": "pintle and gudgeons set"}
VETO = {"source": "check the valve", "proposal": "check the value"}


@pytest.fixture
def ruleset(tmp_path: Path) -> str:
    folder = tmp_path / "rules"
    folder.mkdir()
    (folder / "ruleset.toml").write_text(RULESET)
    (folder / "terms.txt").write_text("gudgeon\n")
    (folder / "blocked.txt").write_text("valve => value\n")
    return str(folder / "ruleset.toml")
