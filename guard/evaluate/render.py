"""Rendering a score: plain text and JSONL here, HTML in report_html; chosen by name.

Renderers get a finished ``ScoreReport`` and return a string; they know nothing of rules
or of how the numbers were made, and never print.
"""

from __future__ import annotations

import json
from collections.abc import Callable, Mapping
from dataclasses import dataclass

from guard.evaluate.score import PRF, GroupTally, Outcome, Summary, TokenEvent
from guard.evaluate.sweep import SweepPoint


@dataclass(frozen=True, slots=True, kw_only=True)
class ScoreReport:
    """What `guard score` shows: the score, where it came from, and a sweep if one ran."""

    input: str
    rulesets: tuple[str, ...]
    undo_flagged: bool
    summary: Summary
    bad_lines: tuple[str, ...] = ()
    sweep_setting: str | None = None
    sweep: tuple[SweepPoint, ...] = ()


def pct(value: float | None) -> str:
    """A share as a percentage with one decimal, or a dash when undefined.

    >>> pct(0.8542), pct(None)
    ('85.4%', '-')
    """
    return "-" if value is None else f"{100 * value:.1f}%"


OUTCOME_LABELS: Mapping[Outcome, str] = {
    Outcome.OVERCORRECTION: "overcorrections",
    Outcome.GOOD: "good corrections",
    Outcome.BAD: "bad corrections",
    Outcome.MISS: "misses",
}


def _table(header: list[str], rows: list[list[str]]) -> list[str]:
    widths = [max(len(r[i]) for r in [header, *rows]) for i in range(len(header))]

    def line(cells: list[str]) -> str:
        first = cells[0].ljust(widths[0])
        rest = [c.rjust(w) for c, w in zip(cells[1:], widths[1:], strict=True)]
        return "  ".join([first, *rest]).rstrip()

    return [line(header), *(line(r) for r in rows)]


def _prf_rows(s: Summary) -> list[list[str]]:
    rows: list[list[str]] = []
    for name, m in (("no correction", s.prf_none), ("speller", s.prf_speller),
                    ("speller+guard", s.prf_guarded)):  # fmt: skip
        rows.append([name, f"{m.precision:.3f}", f"{m.recall:.3f}", f"{m.f05:.3f}"])
    return rows


def _group_rows(groups: tuple[GroupTally, ...]) -> list[list[str]]:
    return [
        [
            g.group,
            str(g.overcorrections),
            f"{g.prevented} ({pct(g.prevented_share)})",
            str(g.good),
            f"{g.kept} ({pct(g.kept_share)})",
        ]
        for g in groups
    ]


def _event_line(e: TokenEvent) -> str:
    rules = f"  [{', '.join(e.rules)}]" if e.rules else ""
    return f"  {e.id} ({e.lang}): {e.source!r} -> {e.proposal!r}, gold {e.gold!r}{rules}"


def headline(s: Summary) -> list[str]:
    """The two numbers that matter, as two lines."""
    return [
        f"overcorrections prevented  {s.prevented} of {s.overcorrections}  "
        f"{pct(s.prevented_share)}",
        f"good corrections kept      {s.kept} of {s.good}  {pct(s.kept_share)}",
    ]


def sweep_rows(points: tuple[SweepPoint, ...]) -> list[list[str]]:
    return [
        [
            f"{p.value:g}",
            pct(p.summary.prevented_share),
            pct(p.summary.kept_share),
            f"{p.summary.prf_guarded.precision:.3f}",
            f"{p.summary.prf_guarded.recall:.3f}",
            f"{p.summary.prf_guarded.f05:.3f}",
        ]
        for p in points
    ]


SWEEP_HEADER = ["value", "prevented", "kept", "P", "R", "F0.5"]


def render_text(r: ScoreReport, *, examples: int = 10) -> str:
    """A plain-text report for a terminal."""
    s = r.summary
    flagged = "flagged rewrites undone too" if r.undo_flagged else "flagged rewrites kept"
    out = [
        f"guard score: {r.input}",
        f"ruleset {' + '.join(r.rulesets)}; {flagged}",
        f"records {s.records} scored, {s.errors} unreadable",
        "",
    ]
    out += _table(
        ["token outcomes", "speller", "speller+guard"],
        [[label, str(s.speller.get(o, 0)), str(s.guarded.get(o, 0))]
         for o, label in OUTCOME_LABELS.items()],
    )  # fmt: skip
    out += ["", *headline(s), ""]
    out += _table(["edits (CoNLL-2014)", "P", "R", "F0.5"], _prf_rows(s))
    if s.rules:
        out.append("")
        out += _table(
            ["rule", "overcorrections stopped", "alone", "good corrections blocked", "alone"],
            [[t.rule, str(t.stopped), str(t.stopped_alone), str(t.blocked), str(t.blocked_alone)]
             for t in s.rules],
        )  # fmt: skip
    for title, groups in (("token shape", s.by_shape), ("token kind", s.by_kind)):
        if groups:
            out.append("")
            out += _table(
                [title, "overcorrections", "prevented", "good", "kept"], _group_rows(groups)
            )
    if r.sweep:
        out += ["", f"sweep of {r.sweep_setting}"]
        out += _table(SWEEP_HEADER, sweep_rows(r.sweep))
    if examples and s.missed_overcorrections:
        out += ["", "overcorrections the guard let through:"]
        out += [_event_line(e) for e in s.missed_overcorrections[:examples]]
    if examples and s.blocked_corrections:
        out += ["", "good corrections the guard blocked:"]
        out += [_event_line(e) for e in s.blocked_corrections[:examples]]
    if r.bad_lines:
        out += ["", "unreadable records:", *(f"  {b}" for b in r.bad_lines)]
    return "\n".join(out) + "\n"


def _prf_json(m: PRF) -> dict[str, object]:
    return {
        "correct": m.correct,
        "proposed": m.proposed,
        "gold": m.gold,
        "precision": m.precision,
        "recall": m.recall,
        "f0.5": m.f05,
    }


def _event_json(kind: str, e: TokenEvent) -> dict[str, object]:
    return {
        "type": kind,
        "id": e.id,
        "lang": e.lang,
        "source": e.source,
        "proposal": e.proposal,
        "gold": e.gold,
        "verdict": None if e.verdict is None else str(e.verdict),
        "rules": list(e.rules),
        "shape": e.shape,
        "kind": e.kind,
    }


def summary_json(s: Summary) -> dict[str, object]:
    """The headline of a summary as one JSON object."""
    return {
        "records": s.records,
        "errors": s.errors,
        "speller": {str(o): s.speller.get(o, 0) for o in Outcome},
        "guarded": {str(o): s.guarded.get(o, 0) for o in Outcome},
        "prevented": s.prevented,
        "kept": s.kept,
        "prevented_share": s.prevented_share,
        "kept_share": s.kept_share,
        "no_correction": _prf_json(s.prf_none),
        "speller_prf": _prf_json(s.prf_speller),
        "guarded_prf": _prf_json(s.prf_guarded),
        "verdicts": {str(v): n for v, n in s.verdicts.items()},
    }


def render_jsonl(r: ScoreReport) -> str:
    """One JSON object a line: the summary, then rules, groups, examples, sweep points."""
    s = r.summary
    lines: list[dict[str, object]] = [
        {
            "type": "summary",
            "input": r.input,
            "rulesets": list(r.rulesets),
            "undo_flagged": r.undo_flagged,
            **summary_json(s),
        }
    ]
    lines += [
        {"type": "rule", "rule": t.rule, "stopped": t.stopped, "stopped_alone": t.stopped_alone,
         "blocked": t.blocked, "blocked_alone": t.blocked_alone}
        for t in s.rules
    ]  # fmt: skip
    for kind, groups in (("shape", s.by_shape), ("kind", s.by_kind)):
        lines += [
            {"type": kind, "group": g.group, "overcorrections": g.overcorrections,
             "prevented": g.prevented, "good": g.good, "kept": g.kept}
            for g in groups
        ]  # fmt: skip
    lines += [_event_json("overcorrection-let-through", e) for e in s.missed_overcorrections]
    lines += [_event_json("good-correction-blocked", e) for e in s.blocked_corrections]
    lines += [{"type": "unreadable", "where": b} for b in r.bad_lines]
    lines += [
        {"type": "sweep", "setting": r.sweep_setting, "value": p.value, **summary_json(p.summary)}
        for p in r.sweep
    ]
    return "".join(json.dumps(line, ensure_ascii=False) + "\n" for line in lines)


def _html(r: ScoreReport) -> str:
    from guard.evaluate.report_html import render_html

    return render_html(r)


FORMATS: Mapping[str, Callable[[ScoreReport], str]] = {
    "text": render_text,
    "jsonl": render_jsonl,
    "html": _html,
}
"""Renderers by format name."""
