"""`guard rules test`: a ruleset's examples run through the real engine, reported like tests."""

from __future__ import annotations

import shutil
import subprocess
from pathlib import Path

import pytest
from click.testing import CliRunner

from guard.cli.rules import command
from guard.errors import RecordError
from guard.records import Report
from guard.ruleset import load_ruleset
from guard.ruleset.bundled import bundled_path
from guard.ruleset.model import Example
from guard.vocab.selftest import (
    engine_checker,
    format_outcome,
    run_examples,
    summary,
    verdict_diff,
)

GOOD = Path(__file__).parent / "fixtures" / "good"

# An example the good fixture's term list makes wrong: 'quillon' is a protected name
# (terms/products.txt line 2), so its rewrite is vetoed, while 'vlave => valve' is an
# allowed pair (pairs/allowed.txt line 2).
WRONG_EXAMPLE = """
[[examples]]
source = "the quillon seal is worn, replace the vlave"
proposal = "the quill seal is worn, replace the valve"
expect = "accept"
rewrites = ["accept", "accept"]
"""


def _invoke(*args: str) -> tuple[int, str, str]:
    result = CliRunner().invoke(command, ["test", *args])
    assert result.exception is None or isinstance(result.exception, SystemExit), result.output
    return result.exit_code, result.stdout, result.stderr


@pytest.fixture
def failing(tmp_path: Path) -> Path:
    folder = tmp_path / "failing"
    shutil.copytree(GOOD, folder)
    toml = folder / "ruleset.toml"
    toml.write_text(toml.read_text(encoding="utf-8") + WRONG_EXAMPLE, encoding="utf-8")
    return toml


def test_passing_examples_exit_0() -> None:
    toml = GOOD / "ruleset.toml"
    code, out, err = _invoke(str(toml))
    assert (code, err) == (0, "")
    assert out.splitlines() == [
        f"tollmere-valves ({toml}): 2 examples",
        f"  PASS  {toml}:23 [examples[0]]  'the quillon seal is worn' -> 'the quill seal is worn'",
        f"  PASS  {toml}:30 [examples[1]]  'replace the vlave spring'"
        " -> 'replace the valve spring'",
        "2 passed, 0 failed",
    ]


def test_a_failing_example_shows_expected_actual_and_why(failing: Path) -> None:
    code, out, _ = _invoke(str(failing))
    assert code == 1
    terms = failing.parent / "terms" / "products.txt"
    allowed = failing.parent / "pairs" / "allowed.txt"
    base = bundled_path("base")
    clip_line = base.read_text(encoding="utf-8").splitlines().index("[rules.clipped-word]") + 2
    lines = out.splitlines()
    start = lines.index(
        f"  FAIL  {failing}:37 [examples[2]]  'the quillon seal is worn, replace the vlave'"
        " -> 'the quill seal is worn, replace the valve'"
    )
    assert lines[start + 1 : start + 7] == [
        "        pair verdict: expected accept, got veto",
        "        rewrite 1 'quillon' -> 'quill': veto (expected accept)",
        "          protected-term (veto): the rewrite changes protected name 'quillon'"
        f" [{terms}:2]",
        # 'quill' is 'quillon' with 'on' cut off: the base ruleset's clipped-word objects too
        "          clipped-word (veto): 'quillon' -> 'quill' only cuts 'on' off its end: a"
        f" clipped word, not a typo fix [{base}:{clip_line} [rules.clipped-word.action]]",
        "        rewrite 2 'vlave' -> 'valve': accept (expected accept)",
        f"          allowed by {allowed}:2",
    ]
    assert lines[start + 7 :] == [
        "        --- expected",
        "        +++ actual",
        "        @@ -1,3 +1,3 @@",
        "        -pair: accept",
        "        -rewrite 1 'quillon'->'quill': accept",
        "        +pair: veto",
        "        +rewrite 1 'quillon'->'quill': veto",
        "         rewrite 2 'vlave'->'valve': accept",
        "2 passed, 1 failed",
    ]


def test_a_wrong_number_of_rewrites_fails_and_says_so(tmp_path: Path) -> None:
    folder = tmp_path / "counts"
    shutil.copytree(GOOD, folder)
    toml = folder / "ruleset.toml"
    extra = WRONG_EXAMPLE.replace('expect = "accept"', 'expect = "veto"').replace(
        'rewrites = ["accept", "accept"]', 'rewrites = ["veto", "accept", "accept"]'
    )
    toml.write_text(toml.read_text(encoding="utf-8") + extra, encoding="utf-8")
    code, out, _ = _invoke("--quiet", str(toml))
    assert code == 1
    lines = out.splitlines()
    assert lines[2:4] == [
        "        pair verdict: veto, as expected",
        "        rewrites: expected 3 rewrites, got 2",
    ]
    assert "        -rewrite 3 (no such rewrite): accept" in lines


def test_quiet_shows_failures_only(failing: Path) -> None:
    code, out, _ = _invoke("--quiet", str(failing))
    assert code == 1
    assert not any("PASS" in line for line in out.splitlines())
    assert sum("FAIL" in line for line in out.splitlines()) == 1
    assert out.splitlines()[-1] == "2 passed, 1 failed"


@pytest.mark.skipif(shutil.which("diff") is None, reason="needs the diff program")
def test_verdict_diff_hunks_match_gnu_diff(failing: Path, tmp_path: Path) -> None:
    # Reference: GNU diffutils `diff -U1` writes the unified format ("@@ -l,s +l,s @@",
    # lines prefixed "-", "+", " "); our hunks must read exactly as its hunks do.
    outcome = run_examples(load_ruleset(failing))[2]
    ours = verdict_diff(outcome)
    minus = [x[1:] for x in ours[3:] if x[0] in " -"]
    plus = [x[1:] for x in ours[3:] if x[0] in " +"]
    (tmp_path / "expected").write_text("\n".join(minus) + "\n", encoding="utf-8")
    (tmp_path / "actual").write_text("\n".join(plus) + "\n", encoding="utf-8")
    gnu = subprocess.run(
        ["diff", "-U1", "expected", "actual"], cwd=tmp_path, capture_output=True, text=True
    )
    assert gnu.returncode == 1
    assert ours[2:] == gnu.stdout.splitlines()[2:]


def test_a_ruleset_that_does_not_load_exits_2_with_its_problems() -> None:
    broken = Path(__file__).parent / "fixtures" / "broken" / "ruleset.toml"
    code, out, err = _invoke(str(broken), str(GOOD / "ruleset.toml"))
    assert code == 2
    assert err.splitlines()[0] == f"{broken}: cannot load the ruleset"
    assert f"{broken}:6 [ruleset.colour]: error: unknown key 'colour'" in err
    assert out.splitlines()[-1] == "2 passed, 0 failed, 1 not loaded"


def test_summary_counts() -> None:
    outcomes = run_examples(load_ruleset(GOOD / "ruleset.toml"))
    assert [o.passed for o in outcomes] == [True, True]
    assert summary(outcomes) == "2 passed, 0 failed"


def test_a_check_that_raises_fails_its_example_and_the_rest_still_run() -> None:
    ruleset = load_ruleset(GOOD / "ruleset.toml")
    real = engine_checker(ruleset)

    def check(example: Example) -> Report:
        if example.source.startswith("the quillon"):
            raise RecordError("too many tokens", line=1)
        return real(example)

    outcomes = run_examples(ruleset, check)
    assert [o.passed for o in outcomes] == [False, True]
    assert format_outcome(outcomes[0])[1:] == ["      check failed: <input>:1: too many tokens"]
