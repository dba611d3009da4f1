"""One self-contained HTML page for a release review: charts, then the rewrites to look at.

The page needs no network: its CSS and its small script are inline, the charts are inline
SVG drawn here, and a Content-Security-Policy with ``default-src 'none'`` and hashes of the
one style and the one script forbids everything else, so even text that slipped past
escaping could neither load nor run anything. All record text is escaped with
``html.escape(quote=True)``.

Shown: the tally, bar charts (findings by rule and action, most-hit protected terms, pair
verdicts by language), then every flagged and vetoed rewrite with its changed span marked,
filterable by rule and verdict. The filter can be preset from the address:
``report.html#rule=protected-term&verdict=veto``. Records that could not be checked are
listed at the end. Rows are spooled to a temporary file while the batch runs, so memory
does not grow with the batch.
"""

from __future__ import annotations

import base64
import hashlib
import html
import tempfile
from collections import Counter
from collections.abc import Sequence

from guard.batch import Outcome, Summary
from guard.io.read import InputRecord
from guard.records import Finding, Verdict
from guard.report.base import Reporter, context, visible

_CSS = """
body{font:15px/1.45 system-ui,sans-serif;margin:2rem auto;max-width:72rem;padding:0 1rem;
color:#1d1d1f}
h1{font-size:1.5rem}h2{font-size:1.15rem;margin-top:2rem}
table{border-collapse:collapse;width:100%}
th,td{text-align:left;padding:.3rem .5rem;vertical-align:top;border-bottom:1px solid #ddd}
.tally{width:auto}.tally td{border:none;padding:.1rem .8rem .1rem 0}
.charts{display:flex;flex-wrap:wrap;gap:1.5rem}.charts figure{margin:0}
figcaption{font-weight:600;margin-bottom:.3rem}
del{background:#fde2e1;text-decoration:line-through}ins{background:#dcf5dc;text-decoration:none}
.verdict-veto{color:#b3261e;font-weight:600}.verdict-flag{color:#8a5a00;font-weight:600}
.controls{margin:.5rem 0 1rem}.controls label{margin-right:1rem}
ul.findings{margin:0;padding-left:1.1rem}.where{color:#666;font-size:.9em}
.empty{color:#666}
""".strip()

_JS = """
(function () {
  var rule = document.getElementById("f-rule");
  var verdict = document.getElementById("f-verdict");
  var shown = document.getElementById("shown");
  var rows = Array.prototype.slice.call(document.querySelectorAll("#rewrites tbody tr"));
  function pick(select, value) {
    for (var i = 0; i < select.options.length; i++) {
      if (select.options[i].value === value) { select.value = value; }
    }
  }
  location.hash.replace(/^#/, "").split("&").forEach(function (part) {
    var kv = part.split("=");
    var value = decodeURIComponent(kv[1] || "");
    if (kv[0] === "rule") { pick(rule, value); }
    if (kv[0] === "verdict") { pick(verdict, value); }
  });
  function apply() {
    var r = rule.value, v = verdict.value, n = 0;
    rows.forEach(function (tr) {
      var rules = tr.getAttribute("data-rules").split(" ");
      var ok = (!r || rules.indexOf(r) >= 0) && (!v || tr.getAttribute("data-verdict") === v);
      tr.hidden = !ok;
      if (ok) { n++; }
    });
    shown.textContent = n + " of " + rows.length + " shown";
    document.body.setAttribute("data-filter", "rule=" + r + "&verdict=" + v);
  }
  rule.addEventListener("change", apply);
  verdict.addEventListener("change", apply);
  apply();
})();
""".strip()

CAVEAT = (
    "guard lowers the risk that a speller's rewrite changes what a text means; it does not "
    "remove it. Term lists are never complete. For medical, legal or safety text, local rules "
    "and licensed professionals decide."
)

_COLOURS = {"veto": "#b3261e", "flag": "#d99a00", "accept": "#3a8a3a", "hits": "#44679e"}


def _esc(text: str) -> str:
    return html.escape(visible(text), quote=True)


def _csp_hash(text: str) -> str:
    return "'sha256-" + base64.b64encode(hashlib.sha256(text.encode()).digest()).decode() + "'"


def bar_chart(
    title: str, rows: Sequence[tuple[str, Sequence[tuple[str, int]]]], *, width: int = 520
) -> str:
    """An inline SVG chart of horizontal stacked bars, one row per label.

    ``rows`` is ``[(label, [(series, count), ...]), ...]``; series names pick the colour.

    >>> svg = bar_chart("t", [("x<y", [("veto", 2), ("flag", 1)])])
    >>> "x&lt;y" in svg and svg.count("<rect") == 2
    True
    """
    label_w, row_h, pad = 170, 22, 4
    bar_w = width - label_w - 50
    biggest = max((sum(n for _, n in series) for _, series in rows), default=0) or 1
    height = max(1, len(rows)) * row_h + pad
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
        f'role="img" aria-label="{html.escape(title, quote=True)}">'
        f"<title>{html.escape(title)}</title>"
    ]
    for i, (name, series) in enumerate(rows):
        y = i * row_h + pad
        short = name if len(name) <= 24 else name[:23] + "…"
        parts.append(
            f'<text x="{label_w - 6}" y="{y + 14}" text-anchor="end" font-size="12">'
            f"{_esc(short)}</text>"
        )
        x = float(label_w)
        total = 0
        for kind, count in series:
            if count <= 0:
                continue
            w = bar_w * count / biggest
            parts.append(
                f'<rect x="{x:.1f}" y="{y}" width="{w:.1f}" height="{row_h - 6}" '
                f'fill="{_COLOURS.get(kind, "#888")}"><title>{_esc(name)}: {html.escape(kind)}'
                f" {count}</title></rect>"
            )
            x += w
            total += count
        parts.append(f'<text x="{x + 4:.1f}" y="{y + 14}" font-size="12">{total}</text>')
    parts.append("</svg>")
    return "".join(parts)


class HtmlReporter(Reporter):
    name = "html"
    description = "one self-contained page: charts, then flagged and vetoed rewrites"

    def start(self) -> None:
        # closed in finish(); an interrupted run leaves them to the garbage collector
        self._rows = tempfile.SpooledTemporaryFile(  # noqa: SIM115
            max_size=4 << 20, mode="w+", encoding="utf-8"
        )
        self._errors = tempfile.SpooledTemporaryFile(  # noqa: SIM115
            max_size=1 << 20, mode="w+", encoding="utf-8"
        )
        self._row_count = 0
        self._rules_seen: Counter[str] = Counter()

    def record(self, outcome: Outcome) -> None:
        report = outcome.report
        if report is None:
            rec = outcome.record
            self._errors.write(
                f"<tr><td>{_esc(rec.file)}</td><td>{rec.line or ''}</td>"
                f"<td>{_esc(outcome.error or '')}</td></tr>\n"
            )
            return
        rec = outcome.record
        rid = rec.id if isinstance(rec, InputRecord) and rec.id is not None else ""
        common = f"<td>{_esc(rec.where)}</td><td>{_esc(rid)}</td><td>{_esc(report.lang)}</td>"
        for rv in report.rewrites:
            if rv.verdict is Verdict.ACCEPT:
                continue
            rw = rv.rewrite
            before, old, after = context(report.source, rw.start, rw.end, width=50)
            change = f"{_esc(before)}<del>{_esc(old)}</del><ins>{_esc(rw.new)}</ins>{_esc(after)}"
            self._row(rv.verdict, rv.findings, common, change)
        for f in report.pair_findings:
            self._row(Verdict.of(f.action), (f,), common, '<span class="empty">whole pair</span>')

    def _row(self, verdict: Verdict, findings: Sequence[Finding], common: str, change: str) -> None:
        rules = list(dict.fromkeys(f.rule for f in findings))
        self._rules_seen.update(rules)
        items = "".join(
            f"<li><b>{_esc(f.rule)}</b> ({f.action.value}): {_esc(f.message)}"
            + (f' <span class="where">{_esc(f.origin.shown())}</span>' if f.origin else "")
            + "</li>"
            for f in findings
        )
        self._rows.write(
            f'<tr data-verdict="{verdict.value}" data-rules="{_esc(" ".join(rules))}">'
            f'{common}<td class="verdict-{verdict.value}">{verdict.value}</td>'
            f'<td>{change}</td><td><ul class="findings">{items}</ul></td></tr>\n'
        )
        self._row_count += 1

    def finish(self, summary: Summary) -> None:
        w = self.stream.write
        title = _esc(self.options.title)
        csp = (
            f"default-src 'none'; style-src {_csp_hash(_CSS)}; script-src {_csp_hash(_JS)}; "
            "img-src data:; base-uri 'none'; form-action 'none'"
        )
        w('<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n')
        w(f'<meta http-equiv="Content-Security-Policy" content="{html.escape(csp, quote=True)}">\n')
        w('<meta name="viewport" content="width=device-width, initial-scale=1">\n')
        w(f"<title>{title}</title>\n<style>{_CSS}</style>\n</head>\n<body>\n")
        w(f"<h1>{title}</h1>\n")
        version = f" {_esc(self.options.tool_version)}" if self.options.tool_version else ""
        w(f"<p>Written by guard{version}.</p>\n")
        w('<section id="summary"><h2>Summary</h2>\n<table class="tally">\n')
        for name, value in (
            ("records read", summary.read),
            ("written", summary.written),
            ("checked", summary.checked),
            ("errors", summary.errors),
        ):
            w(f"<tr><td>{name}</td><td>{value}</td></tr>\n")
        for v in Verdict:
            w(
                f'<tr><td>pairs {v.value}</td><td id="count-{v.value}">'
                f"{summary.verdicts[v.value]}</td></tr>\n"
            )
        w("</table>\n")
        w('<div class="charts">\n')
        rules = sorted({r for r, _ in summary.rules})
        by_rule = [(r, [(a, summary.rules[(r, a)]) for a in ("veto", "flag")]) for r in rules]
        by_rule.sort(key=lambda row: -sum(n for _, n in row[1]))
        top = summary.terms.most_common(self.options.top_terms)
        langs = sorted({lang for lang, _ in summary.languages})
        by_lang = [
            (lang, [(v, summary.languages[(lang, v)]) for v in ("veto", "flag", "accept")])
            for lang in langs
        ]
        for fig_id, caption, rows in (
            ("chart-rules", "Findings by rule (veto, flag)", by_rule),
            ("chart-terms", "Most-hit protected terms", [(t, [("hits", n)]) for t, n in top]),
            ("chart-languages", "Pair verdicts by language", by_lang),
        ):
            w(f'<figure id="{fig_id}"><figcaption>{caption}</figcaption>')
            w(bar_chart(caption, rows) if rows else '<p class="empty">nothing to show</p>')
            w("</figure>\n")
        w("</div>\n</section>\n")
        w('<section id="review"><h2>Rewrites to review</h2>\n<div class="controls">\n')
        w('<label>Rule <select id="f-rule"><option value="">all rules</option>')
        for r in sorted(self._rules_seen):
            w(f'<option value="{_esc(r)}">{_esc(r)}</option>')
        w("</select></label>\n")
        w('<label>Verdict <select id="f-verdict"><option value="">veto and flag</option>')
        w('<option value="veto">veto</option><option value="flag">flag</option></select></label>')
        w(f'\n<span id="shown">{self._row_count} of {self._row_count} shown</span>\n</div>\n')
        w('<table id="rewrites"><thead><tr><th>record</th><th>id</th><th>lang</th>')
        w("<th>verdict</th><th>change</th><th>findings</th></tr></thead>\n<tbody>\n")
        self._rows.seek(0)
        for line in self._rows:
            w(line)
        w("</tbody></table>\n")
        if not self._row_count:
            w('<p class="empty">No rewrite was flagged or vetoed.</p>\n')
        w("</section>\n")
        if summary.errors:
            w('<section id="errors"><h2>Records not checked</h2>\n<table><thead><tr>')
            w("<th>file</th><th>line</th><th>reason</th></tr></thead>\n<tbody>\n")
            self._errors.seek(0)
            for line in self._errors:
                w(line)
            w("</tbody></table>\n</section>\n")
        w(f'<footer><p class="empty">{_esc(CAVEAT)}</p></footer>\n')
        w(f"<script>{_JS}</script>\n</body>\n</html>\n")
        self._rows.close()
        self._errors.close()
