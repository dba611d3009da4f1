"""`guard explain SOURCE PROPOSAL`: one pair, in sentences a person reads.

For each rewrite: what changed and where, its verdict, and every finding with its evidence
and the ruleset file and line (or setting) it came from; findings an allowed pair set aside
are told too. Then the pair's verdict and the guarded text. Exit 0; 1 when the engine
fails on the pair; 2 for a usage or ruleset error.
"""

from __future__ import annotations

from collections.abc import Iterator, Mapping

import click

from guard.batch import Job
from guard.cli import common
from guard.records import EvidenceValue, Finding, Report, RewriteVerdict, Verdict
from guard.report.base import visible

_ASKS = {"veto": "asks to refuse it", "flag": "asks to hold it for review"}
_KIND_WORDS = {
    "replace": ("replaces", "with"),
    "split": ("splits", "into"),
    "join": ("joins", "into"),
}


@click.command("explain")
@click.argument("source")
@click.argument("proposal")
@common.rules_option
@common.lang_option
@click.option("--score", type=float, default=None, help="The speller's confidence, if known.")
@click.pass_context
def command(
    ctx: click.Context,
    source: str,
    proposal: str,
    rules: tuple[str, ...],
    settings: tuple[str, ...],
    lang: str | None,
    score: float | None,
) -> None:
    """Explain, in words, the verdict on turning SOURCE into PROPOSAL."""
    refs = rules or common.default_rules()
    checker = common.load_checker(refs, common.parse_settings(settings))
    try:
        report = checker(Job(source=source, proposal=proposal, lang=lang, score=score))
    except Exception as e:  # the pair could not be judged: say why, do not show a traceback
        click.echo(f"guard explain: the engine failed: {type(e).__name__}: {e}", err=True)
        ctx.exit(common.EXIT_FAIL)
    for line in explain_lines(report):
        click.echo(line)
    ctx.exit(common.EXIT_OK)


def explain_lines(report: Report) -> Iterator[str]:
    """The explanation of a report, line by line (pure: the CLI only prints it)."""
    yield (
        f'"{visible(report.source)}" → "{visible(report.proposal)}" '
        f"(language {report.lang}, ruleset {report.ruleset})."
    )
    if not report.rewrites:
        yield "The proposal is the same as the source: there is nothing to judge."
    n = len(report.rewrites)
    if n:
        yield f"The proposal makes {n} rewrite{'s' if n != 1 else ''}."
    for rv in report.rewrites:
        yield ""
        yield from _rewrite_lines(rv)
    if report.pair_findings:
        yield ""
        yield "About the pair as a whole:"
        for f in report.pair_findings:
            yield from _finding_lines(f)
    yield ""
    yield f"The pair's verdict is {report.verdict.value}: {_why_pair(report)}"
    yield f'Guarded text: "{visible(report.guarded)}"'
    if report.guarded_strict != report.guarded:
        yield f'With flagged rewrites undone too: "{visible(report.guarded_strict)}"'


def _rewrite_lines(rv: RewriteVerdict) -> Iterator[str]:
    rw = rv.rewrite
    kind = rw.kind.value
    if kind == "insert":
        what = f'inserts "{visible(rw.new)}" at character {rw.start}'
    elif kind == "delete":
        what = f'deletes "{visible(rw.old)}" (characters {rw.start} to {rw.end})'
    else:
        verb, link = _KIND_WORDS.get(kind, ("changes", "into"))
        what = (
            f'{verb} "{visible(rw.old)}" {link} "{visible(rw.new)}" '
            f"(characters {rw.start} to {rw.end} of the source)"
        )
    finer = f", a change of {rw.refinement.value} only" if rw.refinement is not None else ""
    yield f"Rewrite {rw.index + 1} {what}{finer}. Verdict: {rv.verdict.value}."
    if not rv.findings and not rv.overridden:
        yield "  No rule objects to it."
    for f in rv.findings:
        yield from _finding_lines(f)
    for f in rv.overridden:
        by = f" at {rv.allowed_by}" if rv.allowed_by is not None else ""
        yield (
            f"  - {f.rule} would {f.action.value} it ({visible(f.message)}), but the allowed "
            f"pair{by} sets that aside."
        )


def _finding_lines(f: Finding) -> Iterator[str]:
    yield f"  - {f.rule} {_ASKS[f.action.value]} ({f.tier.value} rule): {visible(f.message)}."
    if f.evidence:
        yield f"    Evidence: {_evidence(f.evidence)}."
    if f.origin is not None:
        yield f"    This comes from {f.origin.shown()}."


def _evidence(evidence: Mapping[str, EvidenceValue]) -> str:
    def show(v: EvidenceValue) -> str:
        if isinstance(v, tuple):
            return "(" + ", ".join(show(x) for x in v) + ")"
        if isinstance(v, str):
            return f'"{visible(v)}"'
        if isinstance(v, float):
            return f"{v:.2f}"
        return str(v)

    return "; ".join(f"{k} = {show(v)}" for k, v in evidence.items())


def _why_pair(report: Report) -> str:
    if report.verdict is Verdict.ACCEPT:
        return "no rewrite was flagged or vetoed."
    worst = [rv.rewrite.index + 1 for rv in report.rewrites if rv.verdict is report.verdict]
    parts = []
    if worst:
        which = ", ".join(str(i) for i in worst)
        parts.append(f"rewrite{'s' if len(worst) > 1 else ''} {which} got it")
    if any(Verdict.of(f.action) is report.verdict for f in report.pair_findings):
        parts.append("a finding about the whole pair asks for it")
    return " and ".join(parts) + " (a pair's verdict is the worst of its parts)."
