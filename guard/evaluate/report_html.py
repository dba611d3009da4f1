"""The score as one self-contained HTML page with inline SVG charts.

No scripts, no external fonts, styles or images: the page opens offline and can be
attached to a review. Every piece of text that came from data (ids, tokens, rule names,
file names) goes through ``html.escape``.
"""

from __future__ import annotations

from collections.abc import Sequence
from html import escape

from guard.evaluate.render import (
    OUTCOME_LABELS,
    SWEEP_HEADER,
    ScoreReport,
    pct,
    sweep_rows,
)
from guard.evaluate.score import GroupTally, Summary, TokenEvent

SPELLER = "#8a8f98"
GUARDED = "#2f6fb3"
GOOD = "#2e8b57"
BAD = "#c0392b"

_STYLE = """
body{font:14px/1.45 system-ui,sans-serif;margin:2em auto;max-width:980px;color:#222}
h1{font-size:1.4em}h2{font-size:1.1em;margin-top:2em;border-bottom:1px solid #ddd}
table{border-collapse:collapse;margin:.5em 0}td,th{padding:2px 10px;text-align:right}
td:first-child,th:first-child{text-align:left}th{border-bottom:1px solid #999}
.big{display:inline-block;margin:0 2em 0 0}.big b{font-size:2em;display:block}
code{background:#f4f4f4;padding:0 3px}.muted{color:#777}
"""


def _svg(width: int, height: int, body: list[str], label: str) -> str:
    return (
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
        f'viewBox="0 0 {width} {height}" role="img" aria-label="{escape(label)}">'
        + "".join(body)
        + "</svg>"
    )


def _text(x: float, y: float, s: str, *, anchor: str = "start", size: int = 12) -> str:
    return (
        f'<text x="{x:.1f}" y="{y:.1f}" font-size="{size}" text-anchor="{anchor}" '
        f'font-family="sans-serif">{escape(s)}</text>'
    )


def bar_chart(
    rows: Sequence[tuple[str, Sequence[int]]],
    series: Sequence[tuple[str, str]],
    *,
    label: str,
) -> str:
    """Horizontal grouped bars: one group per row, one bar per series (name, colour)."""
    left, right, bar, gap = 220, 60, 14, 10
    width = 760
    group_h = bar * len(series) + gap
    height = 30 + group_h * max(len(rows), 1)
    top = max([1, *(v for _, values in rows for v in values)])
    scale = (width - left - right) / top
    body: list[str] = []
    for k, (name, colour) in enumerate(series):
        body.append(f'<rect x="{left + k * 170}" y="4" width="12" height="12" fill="{colour}"/>')
        body.append(_text(left + k * 170 + 16, 14, name))
    for i, (row_label, values) in enumerate(rows):
        y0 = 26 + i * group_h
        body.append(_text(left - 8, y0 + group_h / 2, row_label, anchor="end"))
        for k, value in enumerate(values):
            y = y0 + k * bar
            w = value * scale
            body.append(
                f'<rect x="{left}" y="{y}" width="{w:.1f}" height="{bar - 2}" '
                f'fill="{series[k][1]}"/>'
            )
            body.append(_text(left + w + 4, y + bar - 4, str(value), size=11))
    return _svg(width, height, body, label)


def line_chart(
    xs: Sequence[float],
    lines: Sequence[tuple[str, str, Sequence[float | None]]],
    *,
    x_label: str,
    label: str,
) -> str:
    """Percent lines over the swept values: (name, colour, shares in 0..1 or None)."""
    width, height = 760, 320
    left, right, top, bottom = 60, 30, 30, 50
    lo, hi = (min(xs), max(xs)) if xs else (0.0, 1.0)
    span = (hi - lo) or 1.0
    finite = [v for _, _, ys in lines for v in ys if v is not None]
    y_lo = min([*finite, 1.0]) if finite else 0.0
    y_lo = max(0.0, (int(y_lo * 20) / 20) - 0.05)

    def px(x: float) -> float:
        return left + (x - lo) / span * (width - left - right)

    def py(y: float) -> float:
        return top + (1.0 - (y - y_lo) / (1.0 - y_lo or 1.0)) * (height - top - bottom)

    body: list[str] = [
        f'<line x1="{left}" y1="{py(y_lo):.1f}" x2="{width - right}" y2="{py(y_lo):.1f}" '
        'stroke="#999"/>',
        f'<line x1="{left}" y1="{top}" x2="{left}" y2="{py(y_lo):.1f}" stroke="#999"/>',
    ]
    steps = 5
    for k in range(steps + 1):
        yv = y_lo + (1.0 - y_lo) * k / steps
        body.append(_text(left - 6, py(yv) + 4, pct(yv), anchor="end", size=10))
        body.append(
            f'<line x1="{left}" y1="{py(yv):.1f}" x2="{width - right}" y2="{py(yv):.1f}" '
            'stroke="#eee"/>'
        )
    for x in xs:
        body.append(_text(px(x), height - bottom + 16, f"{x:g}", anchor="middle", size=10))
    body.append(_text((left + width - right) / 2, height - 12, x_label, anchor="middle"))
    for k, (name, colour, ys) in enumerate(lines):
        pts = [(px(x), py(y)) for x, y in zip(xs, ys, strict=True) if y is not None]
        if pts:
            path = " ".join(f"{x:.1f},{y:.1f}" for x, y in pts)
            body.append(
                f'<polyline points="{path}" fill="none" stroke="{colour}" stroke-width="2"/>'
            )
            body += [f'<circle cx="{x:.1f}" cy="{y:.1f}" r="3" fill="{colour}"/>' for x, y in pts]
        body.append(
            f'<rect x="{left + 10 + k * 200}" y="8" width="12" height="12" fill="{colour}"/>'
        )
        body.append(_text(left + 26 + k * 200, 18, name))
    return _svg(width, height, body, label)


def tradeoff_chart(points: Sequence[tuple[str, float, float]], *, label: str) -> str:
    """Each swept value as a point: good corrections kept (x) against overcorrections
    prevented (y), both shares in 0..1; up and to the right is better."""
    width, height = 760, 360
    left, right, top, bottom = 60, 30, 20, 50
    xs = [x for _, x, _ in points] or [1.0]
    ys = [y for _, _, y in points] or [1.0]
    x_lo = max(0.0, min(xs) - 0.02)
    y_lo = max(0.0, min(ys) - 0.05)

    def px(x: float) -> float:
        return left + (x - x_lo) / ((1.0 - x_lo) or 1.0) * (width - left - right)

    def py(y: float) -> float:
        return top + (1.0 - (y - y_lo) / ((1.0 - y_lo) or 1.0)) * (height - top - bottom)

    body: list[str] = [
        f'<line x1="{left}" y1="{py(y_lo):.1f}" x2="{width - right}" y2="{py(y_lo):.1f}" '
        'stroke="#999"/>',
        f'<line x1="{left}" y1="{top}" x2="{left}" y2="{py(y_lo):.1f}" stroke="#999"/>',
    ]
    for k in range(6):
        xv = x_lo + (1.0 - x_lo) * k / 5
        yv = y_lo + (1.0 - y_lo) * k / 5
        body.append(_text(px(xv), height - bottom + 16, pct(xv), anchor="middle", size=10))
        body.append(_text(left - 6, py(yv) + 4, pct(yv), anchor="end", size=10))
    body.append(
        _text((left + width - right) / 2, height - 12, "good corrections kept", anchor="middle")
    )
    body.append(_text(left + 6, top + 10, "overcorrections prevented", size=11))
    path = " ".join(f"{px(x):.1f},{py(y):.1f}" for _, x, y in points)
    if points:
        body.append(f'<polyline points="{path}" fill="none" stroke="#bbb" stroke-width="1"/>')
    for name, x, y in points:
        body.append(f'<circle cx="{px(x):.1f}" cy="{py(y):.1f}" r="4" fill="{GUARDED}"/>')
        body.append(_text(px(x) + 6, py(y) - 6, name, size=10))
    return _svg(width, height, body, label)


def _table(header: Sequence[str], rows: Sequence[Sequence[str]]) -> str:
    head = "".join(f"<th>{escape(h)}</th>" for h in header)
    body = "".join("<tr>" + "".join(f"<td>{escape(c)}</td>" for c in row) + "</tr>" for row in rows)
    return f"<table><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table>"


def _groups(title: str, groups: tuple[GroupTally, ...]) -> str:
    if not groups:
        return ""
    rows = [
        [g.group, str(g.overcorrections), str(g.prevented), str(g.good), str(g.kept)]
        for g in groups
    ]
    chart = bar_chart(
        [(g.group, (g.overcorrections - g.prevented, g.good - g.kept)) for g in groups],
        [("overcorrections let through", BAD), ("good corrections blocked", SPELLER)],
        label=f"guard mistakes by {title}",
    )
    return (
        f"<h2>By {escape(title)}</h2>"
        + _table([title, "overcorrections", "prevented", "good", "kept"], rows)
        + chart
    )


def _events(title: str, events: tuple[TokenEvent, ...]) -> str:
    if not events:
        return ""
    rows = [[e.id, e.lang, e.source, e.proposal, e.gold, ", ".join(e.rules) or "-"] for e in events]
    return f"<h2>{escape(title)}</h2>" + _table(
        ["id", "lang", "source", "speller", "gold", "rules"], rows
    )


def _summary_html(s: Summary) -> str:
    outcomes = bar_chart(
        [
            (label, (s.speller.get(o, 0), s.guarded.get(o, 0)))
            for o, label in OUTCOME_LABELS.items()
        ],
        [("speller", SPELLER), ("speller + guard", GUARDED)],
        label="token outcomes, speller and speller with guard",
    )
    prf_rows = [
        [name, f"{m.precision:.3f}", f"{m.recall:.3f}", f"{m.f05:.3f}"]
        for name, m in (
            ("no correction", s.prf_none),
            ("speller", s.prf_speller),
            ("speller + guard", s.prf_guarded),
        )
    ]
    return (
        f'<p><span class="big"><b>{pct(s.prevented_share)}</b>overcorrections prevented '
        f"({s.prevented} of {s.overcorrections})</span>"
        f'<span class="big"><b>{pct(s.kept_share)}</b>good corrections kept '
        f"({s.kept} of {s.good})</span></p>"
        "<h2>Token outcomes</h2>" + outcomes + "<h2>Edits: precision, recall, F0.5</h2>"
        '<p class="muted">Edit-level, as defined for the CoNLL-2014 shared task '
        "(Ng et al. 2014; M2 scorer, Dahlmeier and Ng 2012).</p>"
        + _table(["system", "P", "R", "F0.5"], prf_rows)
    )


def _rules_html(s: Summary) -> str:
    if not s.rules:
        return ""
    rows = [
        [t.rule, str(t.stopped), str(t.stopped_alone), str(t.blocked), str(t.blocked_alone)]
        for t in s.rules
    ]
    chart = bar_chart(
        [(t.rule, (t.stopped, t.blocked)) for t in s.rules],
        [("overcorrections stopped", GOOD), ("good corrections blocked", BAD)],
        label="per rule: overcorrections stopped and good corrections blocked",
    )
    return (
        "<h2>Per rule</h2>"
        '<p class="muted">A rule is credited when its findings set the verdict that undid '
        "the speller's change; <i>alone</i>: it was the only such rule.</p>"
        + _table(
            ["rule", "overcorrections stopped", "alone", "good corrections blocked", "alone"],
            rows,
        )
        + chart
    )


def _sweep_html(r: ScoreReport) -> str:
    if not r.sweep:
        return ""
    setting = r.sweep_setting or "setting"
    xs = [float(p.value) for p in r.sweep]
    chart = line_chart(
        xs,
        [
            ("overcorrections prevented", GOOD, [p.summary.prevented_share for p in r.sweep]),
            ("good corrections kept", GUARDED, [p.summary.kept_share for p in r.sweep]),
        ],
        x_label=setting,
        label=f"sweep of {setting}: prevented and kept",
    )
    trade = tradeoff_chart(
        [
            (f"{p.value:g}", p.summary.kept_share, p.summary.prevented_share)
            for p in r.sweep
            if p.summary.kept_share is not None and p.summary.prevented_share is not None
        ],
        label=f"sweep of {setting}: prevented against kept",
    )
    return (
        f"<h2>Sweep of <code>{escape(setting)}</code></h2>"
        + chart
        + trade
        + _table(SWEEP_HEADER, sweep_rows(r.sweep))
    )


def render_html(r: ScoreReport) -> str:
    """The whole page."""
    s = r.summary
    flagged = "flagged rewrites undone too" if r.undo_flagged else "flagged rewrites kept"
    bad = ""
    if r.bad_lines:
        items = "".join(f"<li>{escape(b)}</li>" for b in r.bad_lines)
        bad = f"<h2>Unreadable records</h2><ul>{items}</ul>"
    return (
        "<!DOCTYPE html>\n"
        '<html lang="en"><head><meta charset="utf-8">'
        f"<title>guard score: {escape(r.input)}</title><style>{_STYLE}</style></head><body>"
        f"<h1>guard score: {escape(r.input)}</h1>"
        f'<p class="muted">ruleset {escape(" + ".join(r.rulesets))}; {flagged}; '
        f"{s.records} records scored, {s.errors} unreadable</p>"
        + _summary_html(s)
        + _rules_html(s)
        + _sweep_html(r)
        + _groups("token shape", s.by_shape)
        + _groups("token kind", s.by_kind)
        + _events("Overcorrections the guard let through", s.missed_overcorrections)
        + _events("Good corrections the guard blocked", s.blocked_corrections)
        + bad
        + "</body></html>\n"
    )
