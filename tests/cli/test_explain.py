"""`guard explain`: one pair in sentences."""

from __future__ import annotations

from click.testing import CliRunner

from guard.cli.explain import command, explain_lines
from guard.records import (
    Action,
    Finding,
    Origin,
    Refinement,
    Report,
    Rewrite,
    RewriteKind,
    RewriteVerdict,
    Tier,
    Verdict,
)

from .conftest import VETO


def test_explain_a_vetoed_pair(ruleset: str) -> None:
    result = CliRunner().invoke(command, [VETO["source"], VETO["proposal"], "--rules", ruleset])
    assert result.exit_code == 0
    lines = result.stdout.splitlines()
    assert lines[:4] == [
        '"check the valve" → "check the value" (language en, ruleset cli-test).',
        "The proposal makes 1 rewrite.",
        "",
        'Rewrite 1 replaces "valve" with "value" (characters 10 to 15 of the source). '
        "Verdict: veto.",
    ]
    assert (
        "  - blocked-pair asks to refuse it (hard rule): 'valve => value' is a blocked pair."
        in lines
    )
    blocked = lines.index(
        "  - blocked-pair asks to refuse it (hard rule): 'valve => value' is a blocked pair."
    )
    assert lines[blocked + 2].startswith("    This comes from ") and lines[blocked + 2].endswith(
        "blocked.txt:1."
    )
    assert lines[-2:] == [
        "The pair's verdict is veto: rewrite 1 got it "
        "(a pair's verdict is the worst of its parts).",
        'Guarded text: "check the valve"',
    ]
    assert result.stderr == ""


def test_explain_with_a_bad_ruleset_exits_2(tmp_path: object) -> None:
    result = CliRunner().invoke(command, ["a", "b", "--rules", "/nonexistent/ruleset.toml"])
    assert result.exit_code == 2
    assert result.stdout == "" and "/nonexistent/ruleset.toml" in result.stderr


def _report() -> Report:
    source, proposal = "use 5 mg daily", "use 50 mg\u200b daily"
    rw = Rewrite(
        index=0,
        start=4,
        end=5,
        old="5",
        new="50",
        new_start=4,
        new_end=6,
        kind=RewriteKind.REPLACE,
        refinement=None,
        old_tokens=(),
        new_tokens=(),
    )
    ins = Rewrite(
        index=1,
        start=9,
        end=9,
        old="",
        new="\u200b",
        new_start=10,
        new_end=11,
        kind=RewriteKind.INSERT,
        refinement=Refinement.SPACING,
        old_tokens=(),
        new_tokens=(),
    )
    number = Finding(
        rule="literal-token",
        tier=Tier.DOMAIN,
        action=Action.VETO,
        template="the number {old} becomes {new}",
        evidence={"old": "5", "new": "50"},
        rewrite=0,
        origin=Origin(file="rules/ruleset.toml", line=12, key="rules.literal-token.action"),
    )
    budget = Finding(
        rule="edit-budget",
        tier=Tier.EVIDENCE,
        action=Action.FLAG,
        template="{distance} edits",
        evidence={"distance": 1.5},
        rewrite=0,
        origin=None,
    )
    hidden = Finding(
        rule="hidden-character",
        tier=Tier.HARD,
        action=Action.VETO,
        template="brings in {chars}",
        evidence={"chars": ("U+200B",)},
        rewrite=1,
        origin=None,
    )
    return Report(
        source=source,
        proposal=proposal,
        lang="en",
        verdict=Verdict.VETO,
        rewrites=(
            RewriteVerdict(
                rewrite=rw,
                verdict=Verdict.VETO,
                findings=(number,),
                overridden=(budget,),
                allowed_by=Origin(file="pairs.txt", line=3),
            ),
            RewriteVerdict(rewrite=ins, verdict=Verdict.VETO, findings=(hidden,)),
        ),
        pair_findings=(),
        guarded=source,
        guarded_strict=source,
        ruleset="demo",
    )


def test_explain_lines_tell_evidence_origin_and_what_was_set_aside() -> None:
    # invented example input; the expected sentences are this module's own wording
    assert list(explain_lines(_report())) == [
        '"use 5 mg daily" → "use 50 mg<U+200B> daily" (language en, ruleset demo).',
        "The proposal makes 2 rewrites.",
        "",
        'Rewrite 1 replaces "5" with "50" (characters 4 to 5 of the source). Verdict: veto.',
        "  - literal-token asks to refuse it (domain rule): the number 5 becomes 50.",
        '    Evidence: old = "5"; new = "50".',
        "    This comes from rules/ruleset.toml:12 [rules.literal-token.action].",
        "  - edit-budget would flag it (1.5 edits), but the allowed pair at pairs.txt:3 sets "
        "that aside.",
        "",
        'Rewrite 2 inserts "<U+200B>" at character 9, a change of spacing only. Verdict: veto.',
        "  - hidden-character asks to refuse it (hard rule): brings in ('U+200B',).",
        '    Evidence: chars = ("U+200B").',
        "",
        "The pair's verdict is veto: rewrites 1, 2 got it (a pair's verdict is the worst of "
        "its parts).",
        'Guarded text: "use 5 mg daily"',
    ]
