"""protected-term: the rewrite touches a protected term found in the source.

Terms come from the ruleset's term lists, each with a kind (acronym, code, name, term...)
and a case policy. For a case-insensitive term, a change of letter case only leaves the
term intact and is not this rule's business (letter-shape judges it). Nor is a rewrite
that changes only letters apart from the term, with at least one character kept between
(a typo fixed in another part of a compound: with "Block" protected, "Patchg-Block" ->
"Patch-Block"): the rewrite's changed characters are what it touches.

A ruleset may also hold for review a rewrite that lands on a term of some kinds from a
word that is not one (``flag-toward-kinds = ["drug"]``): in clinical text even a right fix
toward a drug name deserves a second look.

Accepts: with "Quillmate" protected, "Quillmate sycn" -> "Quillmate sync".
Vetoes: with "Quillmate" protected, "Quillmate" -> "Quill mate", naming the term list
file and line.
"""

from __future__ import annotations

from rapidfuzz.distance import Postfix, Prefix

from guard.records import Action, Finding, Rewrite, Tier
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.ruleset.model import CasePolicy, RuleSettings
from guard.text.normalize import normalize_key

NAME = "protected-term"


def _changed_span(rw: Rewrite) -> tuple[int, int]:
    """Source offsets of the characters the rewrite changes: its span less the longest
    common prefix and suffix of old and new text (empty for a pure insertion)."""
    old, new = rw.old, rw.new
    prefix = Prefix.similarity(old, new)
    suffix = min(Postfix.similarity(old, new), min(len(old), len(new)) - prefix)
    return rw.start + prefix, rw.end - suffix


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    for hit in ctx.term_hits:
        inside = rw.start == rw.end and hit.start < rw.start < hit.end  # an insertion
        if (hit.end <= rw.start or hit.start >= rw.end) and not inside:
            continue
        first, last = _changed_span(rw)
        if last < hit.start or first > hit.end:
            continue  # only characters apart from the term change, one kept between
        entry = hit.entry
        if entry.case is CasePolicy.FOLD and normalize_key(rw.old, fold=True) == normalize_key(
            rw.new, fold=True
        ):
            continue
        return finding(
            NAME,
            Tier.DOMAIN,
            settings,
            "the rewrite changes protected {kind} '{term}'",
            rewrite=rw.index,
            origin=entry.origin,
            term=entry.term,
            kind=entry.kind,
            found=ctx.source[hit.start : hit.end],
        )
    kinds = settings.options["flag-toward-kinds"]
    assert isinstance(kinds, tuple)
    if kinds:
        target = ctx.ruleset.lookup_term(rw.new.strip())
        same = target is not None and ctx.ruleset.lookup_term(rw.old.strip()) == target
        if target is not None and target.kind in kinds and not same:
            return finding(
                NAME,
                Tier.DOMAIN,
                settings,
                "the rewrite turns '{old}' into protected {kind} '{term}'; held for review",
                rewrite=rw.index,
                origin=target.origin,
                action=Action.FLAG,
                old=rw.old,
                term=target.term,
                kind=target.kind,
            )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    tier=Tier.DOMAIN,
    default_action=Action.VETO,
    options={
        "flag-toward-kinds": OptionSpec(
            default=(),
            type=tuple,
            doc="term kinds a rewrite may not land on without review (flagged)",
            per_lang=True,
        ),
    },
    check=check,
    doc=__doc__ or "",
)
