"""The checking pipeline for one pair: tokenize -> align -> rules -> decide -> guarded text.

A Guard holds one compiled ruleset and the list of active rules with their settings; both
are read-only, so one Guard serves any number of threads. The one thing that changes is
a memo of findings, which any thread may fill or empty (single dict operations) without
changing an answer. Nothing here does I/O.
"""

from __future__ import annotations

from dataclasses import dataclass

from guard.align import align, apply
from guard.decide import decide, pair_verdict
from guard.records import Finding, Report, Rewrite, RewriteVerdict, Verdict, unchanged_report
from guard.rules import REGISTRY, PairContext, Rule, Scope
from guard.rules.base import CheckFn
from guard.rules.words import PATTERN_TIMEOUT_S
from guard.ruleset.model import CompiledRuleset, PatternHit, PatternTimeout, RuleSettings


@dataclass(frozen=True, slots=True)
class _Active:
    rule: Rule
    settings: RuleSettings


_Bound = tuple[CheckFn, RuleSettings]  # a rule's check with its settings for one language


@dataclass(frozen=True, slots=True)
class _LangRules:
    """The active rules' checks with their settings resolved for one language."""

    local: tuple[_Bound, ...]  # rewrite rules whose findings the memo may keep
    placed: tuple[_Bound, ...]  # rewrite rules that read the rest of the pair
    pair: tuple[_Bound, ...]


MEMO_SIZE = 1 << 14
"""Rewrites whose local findings an engine keeps; it forgets them all when full."""

_RuleMemo = dict[tuple[object, ...], tuple[Finding, ...]]


class Engine:
    """Checks pairs against one compiled ruleset.

    A speller makes the same fix again and again ("teh" -> "the"), so the findings of
    the rules marked ``local`` are kept per rewrite (texts, token kinds, index, language)
    and reused; ``memo_size=0`` turns that off.
    """

    __slots__ = (
        "_by_lang",
        "_memo",
        "_memo_size",
        "_order",
        "_pair_rules",
        "_rewrite_rules",
        "ruleset",
    )

    def __init__(self, ruleset: CompiledRuleset, *, memo_size: int = MEMO_SIZE) -> None:
        self.ruleset = ruleset
        active = [
            _Active(rule, ruleset.rules[name])
            for name, rule in REGISTRY.items()
            if name in ruleset.rules and ruleset.rules[name].action is not None
        ]
        self._rewrite_rules = tuple(a for a in active if a.rule.scope is Scope.REWRITE)
        self._pair_rules = tuple(a for a in active if a.rule.scope is Scope.PAIR)
        self._by_lang: dict[str, _LangRules] = {}
        self._order = {name: i for i, name in enumerate(REGISTRY)}
        self._memo: _RuleMemo = {}
        self._memo_size = memo_size

    def _rules_for(self, lang: str) -> _LangRules:
        """The active rules for ``lang`` (built once per language; a racing thread at
        worst builds the same tuple twice)."""
        got = self._by_lang.get(lang)
        if got is None:

            def bound(actives: tuple[_Active, ...]) -> tuple[_Bound, ...]:
                return tuple((a.rule.check, a.settings.for_lang(lang)) for a in actives)

            got = _LangRules(
                local=bound(tuple(a for a in self._rewrite_rules if a.rule.local)),
                placed=bound(tuple(a for a in self._rewrite_rules if not a.rule.local)),
                pair=bound(self._pair_rules),
            )
            self._by_lang[lang] = got
        return got

    def _rewrite_findings(self, rw: Rewrite, ctx: PairContext, rules: _LangRules) -> list[Finding]:
        """Every rewrite rule's findings on ``rw``, in registry order."""
        memo = self._memo
        key = _memo_key(ctx.lang, rw) if self._memo_size else None
        local = memo.get(key) if key is not None else None
        if local is None:
            local = tuple(_findings(rules.local, rw, ctx))
            if key is not None:
                if len(memo) >= self._memo_size:
                    memo.clear()
                memo[key] = local
        placed = _findings(rules.placed, rw, ctx)
        if not placed:
            return list(local)
        if not local:
            return placed
        order = self._order
        return sorted((*local, *placed), key=lambda f: order[f.rule])

    def check(
        self, source: str, proposal: str, *, lang: str | None = None, score: float | None = None
    ) -> Report:
        """Judge every rewrite that turns ``source`` into ``proposal``.

        >>> from guard.api import load_ruleset
        >>> r = Engine(load_ruleset("base")).check("teh cat", "the cat", lang="en")
        >>> r.verdict, r.guarded
        (<Verdict.ACCEPT: 'accept'>, 'the cat')
        """
        rs = self.ruleset
        lang = lang or rs.default_language
        if source == proposal:
            return unchanged_report(source, lang, rs.name)
        rewrites = align(source, proposal)
        hits, timeouts = _pattern_hits(rs, source)
        ctx = PairContext(
            source=source,
            proposal=proposal,
            lang=lang,
            score=score,
            source_words=len(source.split()),
            rewrites=rewrites,
            term_hits=rs.find_terms(source) if rs.terms else (),
            pattern_hits=hits,
            pattern_timeouts=timeouts,
            ruleset=rs,
            lexicon=rs.lexicon(lang),
        )
        rules = self._rules_for(lang)
        per_rewrite = {rw.index: self._rewrite_findings(rw, ctx, rules) for rw in rewrites}
        pair_findings = _findings(rules.pair, None, ctx)
        verdicts = decide(rewrites, per_rewrite, pair_findings, rs)
        verdict = pair_verdict(verdicts)
        if verdict is Verdict.ACCEPT:  # every rewrite stands: both guarded texts are the proposal
            guarded = guarded_strict = proposal
        else:
            guarded = _guarded(source, proposal, verdicts, keep=_ACCEPT_OR_FLAG)
            guarded_strict = (
                guarded
                if all(v.verdict is not Verdict.FLAG for v in verdicts)
                else _guarded(source, proposal, verdicts, keep=_ACCEPT_ONLY)
            )
        return Report(
            source=source,
            proposal=proposal,
            lang=lang,
            verdict=verdict,
            rewrites=verdicts,
            pair_findings=tuple(pair_findings),
            guarded=guarded,
            guarded_strict=guarded_strict,
            ruleset=rs.name,
        )


def _findings(bound: tuple[_Bound, ...], rw: Rewrite | None, ctx: PairContext) -> list[Finding]:
    """What the rules say about ``rw`` (None: the pair), in order. A plain loop: the
    engine's innermost one, where a generator expression costs half again as much."""
    out: list[Finding] = []
    for check, settings in bound:
        f = check(rw, ctx, settings)
        if f is not None:
            out.append(f)
    return out


def _pattern_hits(
    rs: CompiledRuleset, text: str
) -> tuple[tuple[PatternHit, ...], tuple[PatternTimeout, ...]]:
    hits: list[PatternHit] = []
    timeouts: list[PatternTimeout] = []
    for entry in rs.patterns:
        try:
            for m in entry.compiled.finditer(text, timeout=PATTERN_TIMEOUT_S):
                if m.end() > m.start():
                    hits.append(PatternHit(start=m.start(), end=m.end(), entry=entry))
        except TimeoutError:
            timeouts.append(PatternTimeout(entry=entry))
    return tuple(hits), tuple(timeouts)


def _memo_key(lang: str, rw: Rewrite) -> tuple[object, ...]:
    """What a local rule may read of a rewrite: its texts, kinds, token cut and index."""
    old, new = rw.old_tokens, rw.new_tokens
    if len(old) == 1 and len(new) == 1:
        return (lang, rw.index, rw.old, rw.new, rw.kind, rw.refinement, old[0].kind, new[0].kind)
    return (
        lang,
        rw.index,
        rw.old,
        rw.new,
        rw.kind,
        rw.refinement,
        tuple((t.text, t.kind) for t in old),
        tuple((t.text, t.kind) for t in new),
    )


_ACCEPT_OR_FLAG = frozenset({Verdict.ACCEPT, Verdict.FLAG})
_ACCEPT_ONLY = frozenset({Verdict.ACCEPT})


def _guarded(
    source: str, proposal: str, verdicts: tuple[RewriteVerdict, ...], keep: frozenset[Verdict]
) -> str:
    kept = [v.rewrite for v in verdicts if v.verdict in keep]
    if len(kept) == len(verdicts):
        return proposal  # all rewrites applied give the proposal (alignment's invariant)
    return apply(source, kept) if kept else source
