"""Scoring: the CoNLL-2014 measures on the M2 scorer's example, outcomes, rule credit."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from click.testing import CliRunner

from guard.align import align, apply
from guard.cli.score import command
from guard.evaluate.score import (
    PRF,
    Edit,
    Outcome,
    RecordScore,
    Summary,
    edits,
    prf,
    score_record,
    summarize,
)
from guard.evaluate.sweep import parse_sweep
from guard.records import Action, Finding, Report, RewriteVerdict, Tier, Verdict


def test_m2_scorer_example_gives_point_eight() -> None:
    # The example shipped with the M2 scorer (nusnlp/m2scorer, example/source_gold and
    # example/system; Dahlmeier and Ng 2012), scored as the CoNLL-2014 shared task does:
    # P = R = F0.5 = 0.8. Gold edits are written here from its M2 lines ("A start end|||
    # type|||correction"). For each sentence the scorer keeps the annotator that scores
    # best; for sentence 2 that is annotator 1, whose only annotation is "noop" (no edit).
    sentences = [
        (
            "The cat sat at mat .",
            "A cat sat on the mat .",
            {Edit(start=3, end=4, new=("on",)), Edit(start=4, end=4, new=("the",))},
        ),
        ("The dog .", "The dog .", set()),
        (
            "Giant otters is an apex predator .",
            "Giant otters are apex predator .",
            {
                Edit(start=2, end=3, new=("are",)),
                Edit(start=3, end=4, new=()),
                Edit(start=5, end=6, new=("predators",)),
            },
        ),
    ]
    total = PRF(correct=0, proposed=0, gold=0)
    for source, system, gold in sentences:
        g = frozenset(gold)
        total = total + prf(edits(source.split(), system.split(), prefer=g), g)
    # correct 2 + 0 + 2 = 4, proposed 3 + 0 + 2 = 5, gold 2 + 0 + 3 = 5
    assert (total.correct, total.proposed, total.gold) == (4, 5, 5)
    assert total.precision == pytest.approx(0.8)
    assert total.recall == pytest.approx(0.8)
    assert total.f05 == pytest.approx(0.8)


@pytest.mark.parametrize(
    ("correct", "proposed", "gold", "p", "r", "f05"),
    [
        # Hand-computed: P = 1/2, R = 1/1, F0.5 = 1.25 * 0.5 * 1 / (0.25 * 0.5 + 1) = 5/9.
        pytest.param(1, 2, 1, 0.5, 1.0, 5 / 9, id="precise-half"),
        # P = 1, R = 1/2, F0.5 = 1.25 * 0.5 / (0.25 + 0.5) = 5/6.
        pytest.param(1, 1, 2, 1.0, 0.5, 5 / 6, id="recall-half"),
        # Nothing proposed: P is 1 by convention, R = 0, so F0.5 = 0.
        pytest.param(0, 0, 3, 1.0, 0.0, 0.0, id="no-correction"),
        # Nothing to correct and nothing proposed: P = R = F0.5 = 1.
        pytest.param(0, 0, 0, 1.0, 1.0, 1.0, id="nothing-to-do"),
        # All wrong: P = R = 0, F0.5 = 0 (not a division by zero).
        pytest.param(0, 2, 2, 0.0, 0.0, 0.0, id="all-wrong"),
    ],
)
def test_prf_by_hand(
    correct: int, proposed: int, gold: int, p: float, r: float, f05: float
) -> None:
    m = PRF(correct=correct, proposed=proposed, gold=gold)
    assert (m.precision, m.recall, m.f05) == pytest.approx((p, r, f05))


def _finding(rule: str, action: Action, rewrite: int | None) -> Finding:
    return Finding(
        rule=rule,
        tier=Tier.EVIDENCE,
        action=action,
        template=rule,
        evidence={},
        rewrite=rewrite,
    )


def _report(source: str, proposal: str, decisions: list[tuple[Verdict, list[Finding]]]) -> Report:
    rewrites = align(source, proposal)
    assert len(rewrites) == len(decisions)
    rvs = tuple(
        RewriteVerdict(rewrite=rw, verdict=v, findings=tuple(fs))
        for rw, (v, fs) in zip(rewrites, decisions, strict=True)
    )
    keep = [rv.rewrite for rv in rvs if rv.verdict is not Verdict.VETO]
    strict = [rv.rewrite for rv in rvs if rv.verdict is Verdict.ACCEPT]
    return Report(
        source=source,
        proposal=proposal,
        lang="en",
        verdict=Verdict.worst(rv.verdict for rv in rvs),
        rewrites=rvs,
        pair_findings=(),
        guarded=apply(source, keep),
        guarded_strict=apply(source, strict),
        ruleset="test",
    )


SOURCE = "Teh logger stores data in tern.conf evry day"
GOLD = "The logger stores data in tern.conf every day"
PROPOSAL = "The longer stores data in tern.con every day"
# The speller makes two good corrections (Teh, evry) and two overcorrections (logger,
# tern.conf). The verdicts below: accept, veto by real-word, veto by literal-token and
# letter-shape together, flag by edit-budget.
DECISIONS = [
    (Verdict.ACCEPT, []),
    (
        Verdict.VETO,
        [_finding("real-word", Action.VETO, 1), _finding("edit-budget", Action.FLAG, 1)],
    ),
    (
        Verdict.VETO,
        [_finding("literal-token", Action.VETO, 2), _finding("letter-shape", Action.VETO, 2)],
    ),
    (Verdict.FLAG, [_finding("edit-budget", Action.FLAG, 3)]),
]


def _score(undo_flagged: bool) -> tuple[RecordScore, Summary]:
    rec = score_record(
        id="r1",
        lang="en",
        source=SOURCE,
        gold=GOLD,
        proposal=PROPOSAL,
        report=_report(SOURCE, PROPOSAL, DECISIONS),
        undo_flagged=undo_flagged,
    )
    return rec, summarize([rec])


def test_outcomes_prevented_kept_and_prf_by_hand() -> None:
    _, s = _score(undo_flagged=False)
    assert s.speller == {Outcome.GOOD: 2, Outcome.OVERCORRECTION: 2}
    assert s.guarded == {Outcome.GOOD: 2}
    assert (s.prevented, s.overcorrections, s.kept, s.good) == (2, 2, 2, 2)
    # Speller: 4 edits, 2 right, 2 gold: P = 0.5, R = 1, F0.5 = 5/9 (see test_prf_by_hand).
    assert (s.prf_speller.precision, s.prf_speller.recall) == (0.5, 1.0)
    assert s.prf_speller.f05 == pytest.approx(5 / 9)
    assert (s.prf_guarded.precision, s.prf_guarded.recall, s.prf_guarded.f05) == (1.0, 1.0, 1.0)
    assert (s.prf_none.precision, s.prf_none.recall, s.prf_none.f05) == (1.0, 0.0, 0.0)


def test_rule_credit_and_undo_flagged() -> None:
    _, s = _score(undo_flagged=False)
    credit = {t.rule: (t.stopped, t.stopped_alone, t.blocked, t.blocked_alone) for t in s.rules}
    # edit-budget flagged "logger", but the veto came from real-word: only real-word set it.
    assert credit == {
        "real-word": (1, 1, 0, 0),
        "literal-token": (1, 0, 0, 0),
        "letter-shape": (1, 0, 0, 0),
    }
    _, strict = _score(undo_flagged=True)
    # Undoing flagged rewrites too blocks the good "evry" -> "every": kept 1 of 2, and
    # R = 1/2, P = 1, F0.5 = 5/6.
    assert (strict.kept, strict.good) == (1, 2)
    assert strict.prf_guarded.f05 == pytest.approx(5 / 6)
    blocked = {t.rule: (t.blocked, t.blocked_alone) for t in strict.rules if t.blocked}
    assert blocked == {"edit-budget": (1, 1)}
    assert [(e.source, e.proposal, e.gold) for e in strict.blocked_corrections] == [
        ("evry", "every", "every")
    ]


def test_groups_by_shape_and_kind() -> None:
    _, s = _score(undo_flagged=False)
    shapes = {g.group: (g.overcorrections, g.prevented, g.good, g.kept) for g in s.by_shape}
    assert shapes == {"lower": (2, 2, 1, 1), "title": (0, 0, 1, 1)}
    kinds = {g.group: (g.overcorrections, g.good) for g in s.by_kind}
    assert kinds == {"word": (1, 2), "identifier": (1, 0)}


@pytest.mark.parametrize(
    ("spec", "message"),
    [
        pytest.param("rules.real-word.min-zipf", "expected SETTING", id="no-range"),
        pytest.param("x=1:2", "expected SETTING", id="two-parts"),
        pytest.param("x=a:2:1", "must be numbers", id="not-numbers"),
        pytest.param("x=1:2:0", "STEP must be positive", id="zero-step"),
        pytest.param("x=3:2:1", "STOP is below START", id="backwards"),
        pytest.param("x=0:1000:1", "at most 200", id="too-many"),
    ],
)
def test_bad_sweep_specs(spec: str, message: str) -> None:
    with pytest.raises(ValueError, match=message):
        parse_sweep(spec)


def test_sweep_values_are_exact() -> None:
    assert parse_sweep("a.b=0.1:0.3:0.1").values == (0.1, 0.2, 0.3)


def _records(tmp_path: Path) -> Path:
    path = tmp_path / "scored.jsonl"
    rows = [
        {"id": "<b>1</b>", "source": SOURCE, "gold": GOLD, "proposal": PROPOSAL, "lang": "en"},
        {"id": "2", "source": "clean text", "gold": "clean text"},
    ]
    path.write_text("\n".join(json.dumps(r) for r in rows) + "\n", encoding="utf-8")
    return path


def test_cli_counts_a_record_without_proposal_as_unreadable(tmp_path: Path) -> None:
    path = _records(tmp_path)
    result = CliRunner().invoke(command, [str(path), "--rules", "base"], standalone_mode=False)
    assert result.exception is None
    assert result.return_value == 1
    assert result.stderr == f"{path}:2: no string field 'proposal'\n"
    assert "records 1 scored, 1 unreadable" in result.stdout


def test_cli_html_is_self_contained_and_escaped(tmp_path: Path) -> None:
    path = _records(tmp_path)
    out = tmp_path / "score.html"
    result = CliRunner().invoke(
        command,
        [str(path), "--rules", "base", "--format", "html", "--output", str(out),
         "--sweep", "rules.real-word.min-zipf=2:4:1", "--undo-flagged"],
        standalone_mode=False,
    )  # fmt: skip
    assert result.exception is None
    page = out.read_text(encoding="utf-8")
    assert page.startswith("<!DOCTYPE html>")
    assert (
        "<svg" in page
        and "<script" not in page
        and "http://" not in page.replace('xmlns="http://www.w3.org/2000/svg"', "")
    )
    assert "<b>1</b>" not in page


def test_cli_jsonl_has_a_summary_and_sweep_points(tmp_path: Path) -> None:
    path = _records(tmp_path)
    result = CliRunner().invoke(
        command,
        [str(path), "--rules", "base", "--format", "jsonl",
         "--sweep", "rules.real-word.min-zipf=2:4:1"],
        standalone_mode=False,
    )  # fmt: skip
    lines = [json.loads(line) for line in result.stdout.splitlines()]
    assert lines[0]["type"] == "summary" and lines[0]["records"] == 1
    assert [p["value"] for p in lines if p["type"] == "sweep"] == [2, 3, 4]


def test_cli_bad_sweep_is_a_usage_error(tmp_path: Path) -> None:
    path = _records(tmp_path)
    result = CliRunner().invoke(command, [str(path), "--sweep", "x=1:2"])
    assert result.exit_code == 2
    assert "expected SETTING=START:STOP:STEP" in result.stderr


@pytest.mark.parametrize(
    ("options", "code"),
    [
        pytest.param([], 0, id="no-target"),
        pytest.param(["--min-prevented", "100"], 0, id="prevented-met"),
        pytest.param(["--min-kept", "97"], 0, id="no-good-corrections-to-keep"),
    ],
)  # fmt: skip
def test_cli_targets(tmp_path: Path, options: list[str], code: int) -> None:
    # One clean record the speller damages: "JSON" -> "Jason" (the API's own example of a
    # vetoed rewrite, guard/api.py).
    path = tmp_path / "one.jsonl"
    record = {"source": "Send the JSON file", "gold": "Send the JSON file",
              "proposal": "Send the Jason file", "lang": "en"}  # fmt: skip
    path.write_text(json.dumps(record) + "\n", encoding="utf-8")
    result = CliRunner().invoke(
        command, [str(path), "--rules", "base", *options], standalone_mode=False
    )
    assert result.exception is None
    assert result.return_value == code


def test_cli_target_missed_exits_one(tmp_path: Path) -> None:
    from guard.rules import REGISTRY

    path = tmp_path / "one.jsonl"
    record = {"source": "Send the JSON file", "gold": "Send the JSON file",
              "proposal": "Send the Jason file", "lang": "en"}  # fmt: skip
    path.write_text(json.dumps(record) + "\n", encoding="utf-8")
    # Every rule off: the guard accepts the rewrite, so 0% of overcorrections is prevented.
    off = [arg for name in REGISTRY for arg in ("--set", f"rules.{name}.action=off")]
    result = CliRunner().invoke(
        command,
        [str(path), "--rules", "base", *off, "--min-prevented", "50"],
        standalone_mode=False,
    )
    assert result.exception is None
    assert "overcorrections prevented  0 of 1  0.0%" in result.stdout
    assert result.return_value == 1
