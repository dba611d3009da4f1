"""Scoring a speller, and the speller with the guard, against gold text.

Each record holds ``source`` (text with errors), ``proposal`` (the speller's correction)
and ``gold`` (the right text). The guard turns the proposal into ``guarded`` text (the
source with the rewrites it accepted). Everything here is measured on tokens: the
non-space tokens of guard's tokenizer, aligned by Levenshtein distance over token lists.

Edits
-----
An *edit* replaces source tokens ``[start, end)`` by some tokens (``start == end`` is an
insertion, no tokens a deletion). ``edits(a, b)`` aligns two token lists and merges
adjacent changes. A change of n tokens into n is cut into n one-token edits. A change of
n tokens into m stays one edit ("note book" -> "notebook", or a path the speller broke
into pieces), unless cutting it into one edit per token (pairing tokens from the left,
the rest one insertion or one deletion per token) matches more gold edits: the M2
scorer's way of choosing the system's edits that agree best with the gold.

Outcomes per source token
-------------------------
Against the gold edits G and a system's edits S (the speller's, or the guarded text's):

=============== =========================================================================
overcorrection  the token is right (no gold edit covers it) and the system changed it; a
                system insertion where the gold has none counts as one overcorrection
good            the token is wrong and the system's edit covering it is the gold edit
bad             the token is wrong and the system changed it to something else
miss            the token is wrong and the system left it alone
=============== =========================================================================

*Overcorrections prevented* = speller overcorrections the guarded text no longer has,
divided by all speller overcorrections. *Good corrections kept* = speller good corrections
still good in the guarded text, divided by all speller good corrections.

Precision, recall, F0.5
-----------------------
As in the CoNLL-2014 shared task on grammatical error correction (Ng et al. 2014, "The
CoNLL-2014 Shared Task on Grammatical Error Correction", CoNLL; scored with the M2 scorer
of Dahlmeier and Ng 2012, "Better Evaluation for Grammatical Error Correction", NAACL):
with e the system's edits and g the gold edits, summed over all records,
P = |e ∩ g| / |e|, R = |e ∩ g| / |g|, F0.5 = (1 + 0.5²)·P·R / (0.5²·P + R).
An edit counts as correct only when span and replacement both match a gold edit. With
one gold annotation per record there is no choice among annotators to make. When nothing
is proposed P is 1, when there is nothing to correct R is 1, and F is 0 when P + R is 0
(the convention of the GEC scorers, e.g. ERRANT's compare_m2; from reading its source).

Rule attribution
----------------
When the guard undoes a speller's change to a token, the rewrite covering that token got
a veto (or a flag, when flagged rewrites are undone too). The rules *credited* are those
whose findings on that rewrite asked for exactly that verdict: they set it. When no
rewrite finding did, the pair-level findings that asked for it are credited. Several rules
can set one verdict, so each is credited, and the ``alone`` columns count the tokens where
a rule was the only one: remove a rule credited alone and that outcome changes.

This module never prints and never reads files; the CLI and evaluation scripts do that.
"""

from __future__ import annotations

import enum
from collections import Counter
from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass, field

from rapidfuzz.distance import Levenshtein

from guard.evaluate.jsonl import BadLine, Numbered
from guard.records import Report, RewriteVerdict, Token, TokenKind, Verdict
from guard.text.shape import shape_of
from guard.text.tokenize import tokenize


@dataclass(frozen=True, slots=True, kw_only=True, order=True)
class Edit:
    """Source tokens ``[start, end)`` replaced by ``new`` (token texts).

    ``at`` is the index of the first new token in the target, for showing the new text as
    it was written; it takes no part in comparisons.
    """

    start: int
    end: int
    new: tuple[str, ...]
    at: int = field(default=-1, compare=False, repr=False)


def _squash(tokens: Sequence[str]) -> str:
    return "".join(tokens)


def _split(s1: int, s2: int, d1: int, new: tuple[str, ...]) -> list[Edit]:
    """A change of source tokens [s1, s2) into ``new``, one edit per source token where it
    can: pair tokens up from the left, the rest one insertion or one deletion per token."""
    n, m = s2 - s1, len(new)
    pairs = min(n, m)
    out = [Edit(start=s1 + k, end=s1 + k + 1, new=(new[k],), at=d1 + k) for k in range(pairs)]
    if m > n:
        out.append(Edit(start=s1 + n, end=s1 + n, new=new[pairs:], at=d1 + pairs))
    out += [Edit(start=s1 + k, end=s1 + k + 1, new=(), at=d1 + m) for k in range(pairs, n)]
    return out


def edits(
    source: Sequence[str], target: Sequence[str], *, prefer: frozenset[Edit] = frozenset()
) -> frozenset[Edit]:
    """The edits that turn token list ``source`` into ``target`` (see the module docstring).

    A change of n tokens into m (n != m) is one edit, or one edit per token when that
    matches more of the ``prefer`` edits (the gold): like the M2 scorer, the system's
    edits are cut the way that agrees best with the gold.

    >>> def show(es):
    ...     for e in sorted(es):
    ...         print(e)
    >>> show(edits("The cat sat at mat .".split(), "A cat sat on the mat .".split()))
    Edit(start=0, end=1, new=('A',))
    Edit(start=3, end=4, new=('on', 'the'))
    >>> gold = frozenset({Edit(start=3, end=4, new=("on",)), Edit(start=4, end=4, new=("the",))})
    >>> show(edits("The cat sat at mat .".split(), "A cat sat on the mat .".split(), prefer=gold))
    Edit(start=0, end=1, new=('A',))
    Edit(start=3, end=4, new=('on',))
    Edit(start=4, end=4, new=('the',))
    """
    blocks: list[list[int]] = []
    for op in Levenshtein.opcodes(list(source), list(target)):
        if op.tag == "equal":
            continue
        if blocks and blocks[-1][1] == op.src_start and blocks[-1][3] == op.dest_start:
            blocks[-1][1] = op.src_end
            blocks[-1][3] = op.dest_end
        else:
            blocks.append([op.src_start, op.src_end, op.dest_start, op.dest_end])
    out: set[Edit] = set()
    for s1, s2, d1, d2 in blocks:
        new = tuple(target[d1:d2])
        split = _split(s1, s2, d1, new)
        if s2 - s1 == d2 - d1:
            out.update(split)
            continue
        whole = Edit(start=s1, end=s2, new=new, at=d1)
        if sum(e in prefer for e in split) > (whole in prefer):
            out.update(split)
        else:
            out.add(whole)
    return frozenset(out)


@dataclass(frozen=True, slots=True, kw_only=True)
class PRF:
    """Counts of correct, proposed and gold edits, and the CoNLL-2014 measures from them.

    >>> PRF(correct=4, proposed=5, gold=5).f05
    0.8
    """

    correct: int
    proposed: int
    gold: int

    @property
    def precision(self) -> float:
        return self.correct / self.proposed if self.proposed else 1.0

    @property
    def recall(self) -> float:
        return self.correct / self.gold if self.gold else 1.0

    def f(self, beta: float) -> float:
        p, r = self.precision, self.recall
        if p + r == 0:
            return 0.0
        return (1 + beta**2) * p * r / (beta**2 * p + r)

    @property
    def f05(self) -> float:
        return self.f(0.5)

    def __add__(self, other: PRF) -> PRF:
        return PRF(
            correct=self.correct + other.correct,
            proposed=self.proposed + other.proposed,
            gold=self.gold + other.gold,
        )


def prf(system: frozenset[Edit], gold: frozenset[Edit]) -> PRF:
    """Edit-level counts of one record: matched edits, system edits, gold edits."""
    return PRF(correct=len(system & gold), proposed=len(system), gold=len(gold))


class Outcome(enum.StrEnum):
    """What a system did to one source token, judged against the gold."""

    OVERCORRECTION = "overcorrection"
    GOOD = "good"
    BAD = "bad"
    MISS = "miss"


def _covering(edit_set: frozenset[Edit], n: int) -> tuple[list[Edit | None], list[Edit]]:
    """For each of n source tokens the edit covering it, and the insertions apart."""
    at: list[Edit | None] = [None] * n
    inserts: list[Edit] = []
    for e in edit_set:
        if e.start == e.end:
            inserts.append(e)
        for i in range(e.start, e.end):
            at[i] = e
    return at, inserts


@dataclass(frozen=True, slots=True, kw_only=True)
class Judged:
    """The outcome of one source token (``index``), or of an insertion before it."""

    index: int
    insertion: bool
    outcome: Outcome
    edit: Edit | None  # the system's edit covering the token (None for a miss)


def judge(system: frozenset[Edit], gold: frozenset[Edit], n: int) -> dict[tuple[int, bool], Judged]:
    """Each changed or wrong source token's outcome, keyed by (index, is-insertion)."""
    sys_at, sys_ins = _covering(system, n)
    gold_at, gold_ins = _covering(gold, n)
    out: dict[tuple[int, bool], Judged] = {}
    for i in range(n):
        s, g = sys_at[i], gold_at[i]
        if g is None and s is None:
            continue
        if g is None:
            outcome = Outcome.OVERCORRECTION
        elif s is None:
            outcome = Outcome.MISS
        else:
            outcome = Outcome.GOOD if s == g else Outcome.BAD
        out[(i, False)] = Judged(index=i, insertion=False, outcome=outcome, edit=s)
    gold_ins_set = set(gold_ins)
    for e in sys_ins:
        outcome = Outcome.GOOD if e in gold_ins_set else Outcome.OVERCORRECTION
        out[(e.start, True)] = Judged(index=e.start, insertion=True, outcome=outcome, edit=e)
    sys_ins_set = set(sys_ins)
    for e in gold_ins:
        if e not in sys_ins_set and (e.start, True) not in out:
            out[(e.start, True)] = Judged(
                index=e.start, insertion=True, outcome=Outcome.MISS, edit=None
            )
    return out


def words_of(text: str) -> tuple[Token, ...]:
    """The tokens scoring looks at: every token but spaces."""
    return tuple(t for t in tokenize(text) if t.kind is not TokenKind.SPACE)


def _undone(verdict: Verdict, undo_flagged: bool) -> bool:
    return verdict is Verdict.VETO or (undo_flagged and verdict is Verdict.FLAG)


def setting_rules(report: Report, rv: RewriteVerdict) -> tuple[str, ...]:
    """The rules whose findings set ``rv``'s verdict (see Rule attribution above)."""
    own = sorted({f.rule for f in rv.findings if Verdict.of(f.action) is rv.verdict})
    if own:
        return tuple(own)
    pair = sorted({f.rule for f in report.pair_findings if Verdict.of(f.action) is rv.verdict})
    return tuple(pair) if pair else ("(unattributed)",)


def _rewrite_at(report: Report, start: int, end: int) -> RewriteVerdict | None:
    """The rewrite overlapping source characters [start, end) (touching, for an insertion)."""
    for rv in report.rewrites:
        r = rv.rewrite
        if start == end:
            if r.start <= start <= r.end:
                return rv
        elif r.start < end and start < r.end:
            return rv
    return None


@dataclass(frozen=True, slots=True, kw_only=True)
class TokenEvent:
    """One speller overcorrection or good correction and what the guard did with it."""

    id: str
    lang: str
    outcome: Outcome  # the speller's: OVERCORRECTION or GOOD
    source: str  # the source token ("" for an insertion)
    proposal: str  # what the speller made of it
    gold: str
    undone: bool  # the guard undid it (prevented / blocked)
    verdict: Verdict | None  # the verdict on the covering rewrite, if one was found
    rules: tuple[str, ...]  # rules that set that verdict (when undone)
    shape: str
    kind: str


@dataclass(frozen=True, slots=True, kw_only=True)
class RecordScore:
    """Everything scoring learns from one record."""

    id: str
    lang: str
    speller: Counter[Outcome]
    guarded: Counter[Outcome]
    prf_none: PRF
    prf_speller: PRF
    prf_guarded: PRF
    events: tuple[TokenEvent, ...]
    verdicts: Counter[Verdict]


def _written(edit: Edit, text: str, tokens: Sequence[Token]) -> str:
    """The new tokens of ``edit`` as written in ``text`` (with their spaces)."""
    if not edit.new:
        return ""
    if edit.at >= 0 and edit.at + len(edit.new) <= len(tokens):
        return text[tokens[edit.at].start : tokens[edit.at + len(edit.new) - 1].end]
    return " ".join(edit.new)


def score_record(
    *,
    id: str,
    lang: str,
    source: str,
    gold: str,
    proposal: str,
    report: Report,
    undo_flagged: bool,
) -> RecordScore:
    """Score one record: the speller's proposal and the guard's text, against the gold."""
    guarded = report.guarded_text(undo_flagged=undo_flagged)
    src = words_of(source)
    src_texts = [t.text for t in src]
    gold_tokens = words_of(gold)
    proposal_tokens = words_of(proposal)
    gold_edits = edits(src_texts, [t.text for t in gold_tokens])
    sp_edits = edits(src_texts, [t.text for t in proposal_tokens], prefer=gold_edits)
    gu_edits = (
        sp_edits
        if guarded == proposal
        else edits(src_texts, [t.text for t in words_of(guarded)], prefer=gold_edits)
    )
    n = len(src)
    sp = judge(sp_edits, gold_edits, n)
    gu = judge(gu_edits, gold_edits, n)
    gold_at, _ = _covering(gold_edits, n)
    events: list[TokenEvent] = []
    for key, j in sorted(sp.items()):
        if j.outcome not in (Outcome.OVERCORRECTION, Outcome.GOOD):
            continue
        after = gu.get(key)
        if j.outcome is Outcome.OVERCORRECTION:
            undone = after is None or after.outcome is not Outcome.OVERCORRECTION
        else:
            undone = after is None or after.outcome is not Outcome.GOOD
        if j.insertion:
            pos = src[j.index].start if j.index < n else len(source)
            start = end = pos
            token_text, shape, kind = "", "(insertion)", "(insertion)"
        else:
            tok = src[j.index]
            start, end = tok.start, tok.end
            token_text, shape, kind = tok.text, str(shape_of(tok.text)), str(tok.kind)
        rv = _rewrite_at(report, start, end)
        rules = setting_rules(report, rv) if (undone and rv is not None) else ()
        if undone and rv is None:
            rules = ("(unattributed)",)
        g = gold_at[j.index] if (not j.insertion and j.index < n) else None
        said = _written(j.edit, proposal, proposal_tokens) if j.edit is not None else token_text
        if j.outcome is Outcome.OVERCORRECTION:
            gold_text = token_text
        else:
            gold_text = _written(g, gold, gold_tokens) if g is not None else said
        events.append(
            TokenEvent(
                id=id,
                lang=lang,
                outcome=j.outcome,
                source=token_text,
                proposal=said,
                gold=gold_text,
                undone=undone,
                verdict=rv.verdict if rv is not None else None,
                rules=rules,
                shape=shape,
                kind=kind,
            )
        )
    return RecordScore(
        id=id,
        lang=lang,
        speller=Counter(j.outcome for j in sp.values()),
        guarded=Counter(j.outcome for j in gu.values()),
        prf_none=prf(frozenset(), gold_edits),
        prf_speller=prf(sp_edits, gold_edits),
        prf_guarded=prf(gu_edits, gold_edits),
        events=tuple(events),
        verdicts=Counter(rv.verdict for rv in report.rewrites),
    )


@dataclass(frozen=True, slots=True, kw_only=True)
class RuleTally:
    """What one rule did: speller overcorrections it stopped, good corrections it blocked."""

    rule: str
    stopped: int = 0
    stopped_alone: int = 0
    blocked: int = 0
    blocked_alone: int = 0


@dataclass(frozen=True, slots=True, kw_only=True)
class GroupTally:
    """Speller overcorrections and good corrections of one group (a shape, a kind)."""

    group: str
    overcorrections: int = 0
    prevented: int = 0
    good: int = 0
    kept: int = 0

    @property
    def prevented_share(self) -> float | None:
        return _share(self.prevented, self.overcorrections)

    @property
    def kept_share(self) -> float | None:
        return _share(self.kept, self.good)


def _share(part: int, whole: int) -> float | None:
    return part / whole if whole else None


@dataclass(frozen=True, slots=True, kw_only=True)
class Summary:
    """The score of a batch: counts, the two headline shares, P/R/F0.5, rules, groups."""

    records: int
    errors: int
    speller: Mapping[Outcome, int]
    guarded: Mapping[Outcome, int]
    prevented: int
    kept: int
    prf_none: PRF
    prf_speller: PRF
    prf_guarded: PRF
    rules: tuple[RuleTally, ...]
    by_shape: tuple[GroupTally, ...]
    by_kind: tuple[GroupTally, ...]
    verdicts: Mapping[Verdict, int]
    missed_overcorrections: tuple[TokenEvent, ...] = field(default=())
    blocked_corrections: tuple[TokenEvent, ...] = field(default=())

    @property
    def overcorrections(self) -> int:
        return self.speller.get(Outcome.OVERCORRECTION, 0)

    @property
    def good(self) -> int:
        return self.speller.get(Outcome.GOOD, 0)

    @property
    def prevented_share(self) -> float | None:
        """Overcorrections prevented: the share of speller overcorrections the guard undid."""
        return _share(self.prevented, self.overcorrections)

    @property
    def kept_share(self) -> float | None:
        """Good corrections kept: the share of speller good corrections the guard let through."""
        return _share(self.kept, self.good)


def _groups(
    events: Sequence[TokenEvent], key: Callable[[TokenEvent], str]
) -> tuple[GroupTally, ...]:
    tallies: dict[str, list[int]] = {}
    for ev in events:
        t = tallies.setdefault(key(ev), [0, 0, 0, 0])
        if ev.outcome is Outcome.OVERCORRECTION:
            t[0] += 1
            t[1] += ev.undone
        else:
            t[2] += 1
            t[3] += not ev.undone
    return tuple(
        GroupTally(group=g, overcorrections=a, prevented=b, good=c, kept=d)
        for g, (a, b, c, d) in sorted(tallies.items(), key=lambda kv: (-kv[1][0] - kv[1][2], kv[0]))
    )


def summarize(scores: Iterable[RecordScore], *, errors: int = 0, examples: int = 50) -> Summary:
    """Add up record scores; keep up to ``examples`` of each kind of guard mistake."""
    speller: Counter[Outcome] = Counter()
    guarded: Counter[Outcome] = Counter()
    verdicts: Counter[Verdict] = Counter()
    none = sp = gu = PRF(correct=0, proposed=0, gold=0)
    events: list[TokenEvent] = []
    records = 0
    for s in scores:
        records += 1
        speller.update(s.speller)
        guarded.update(s.guarded)
        verdicts.update(s.verdicts)
        none, sp, gu = none + s.prf_none, sp + s.prf_speller, gu + s.prf_guarded
        events.extend(s.events)
    rule_counts: dict[str, list[int]] = {}
    for ev in events:
        if not ev.undone:
            continue
        for rule in ev.rules:
            c = rule_counts.setdefault(rule, [0, 0, 0, 0])
            base = 0 if ev.outcome is Outcome.OVERCORRECTION else 2
            c[base] += 1
            c[base + 1] += len(ev.rules) == 1
    rules = tuple(
        RuleTally(rule=r, stopped=a, stopped_alone=b, blocked=c, blocked_alone=d)
        for r, (a, b, c, d) in sorted(rule_counts.items(), key=lambda kv: (-kv[1][0], kv[0]))
    )
    over = [e for e in events if e.outcome is Outcome.OVERCORRECTION]
    good = [e for e in events if e.outcome is Outcome.GOOD]
    return Summary(
        records=records,
        errors=errors,
        speller=dict(speller),
        guarded=dict(guarded),
        prevented=sum(e.undone for e in over),
        kept=sum(not e.undone for e in good),
        prf_none=none,
        prf_speller=sp,
        prf_guarded=gu,
        rules=rules,
        by_shape=_groups(events, lambda e: e.shape),
        by_kind=_groups(events, lambda e: e.kind),
        verdicts=dict(verdicts),
        missed_overcorrections=tuple(e for e in over if not e.undone)[:examples],
        blocked_corrections=tuple(e for e in good if e.undone)[:examples],
    )


@dataclass(frozen=True, slots=True, kw_only=True)
class ScoreInput:
    """One record ready to score."""

    id: str
    lang: str
    source: str
    gold: str
    proposal: str
    score: float | None = None


def read_inputs(
    items: Iterable[Numbered | BadLine], *, lang: str
) -> tuple[list[ScoreInput], list[BadLine]]:
    """Records with string ``source``, ``proposal`` and ``gold``; the rest as bad lines."""
    good: list[ScoreInput] = []
    bad: list[BadLine] = []
    for item in items:
        if isinstance(item, BadLine):
            bad.append(item)
            continue
        d = item.data
        missing = [k for k in ("source", "proposal", "gold") if not isinstance(d.get(k), str)]
        if missing:
            reason = "no string field " + ", ".join(repr(k) for k in missing)
            bad.append(BadLine(file=item.file, line=item.line, reason=reason))
            continue
        record_lang = d.get("lang")
        speller_score = d.get("score")
        good.append(
            ScoreInput(
                id=str(d.get("id", f"{item.file}:{item.line}")),
                lang=record_lang if isinstance(record_lang, str) and record_lang else lang,
                source=str(d["source"]),
                gold=str(d["gold"]),
                proposal=str(d["proposal"]),
                score=float(speller_score) if isinstance(speller_score, int | float) else None,
            )
        )
    return good, bad


def score_inputs(
    inputs: Iterable[ScoreInput],
    check: Callable[[str, str, str, float | None], Report],
    *,
    undo_flagged: bool = False,
    errors: int = 0,
    examples: int = 50,
) -> Summary:
    """Check every record with ``check(source, proposal, lang, score)`` and score it."""
    return summarize(
        (
            score_record(
                id=r.id,
                lang=r.lang,
                source=r.source,
                gold=r.gold,
                proposal=r.proposal,
                report=check(r.source, r.proposal, r.lang, r.score),
                undo_flagged=undo_flagged,
            )
            for r in inputs
        ),
        errors=errors,
        examples=examples,
    )
