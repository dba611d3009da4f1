"""The records that flow through the pipeline: tokens, rewrites, findings, verdicts, reports.

Every record is a frozen, slotted dataclass that is complete when created: nothing is
stamped on afterwards, and every field takes part in equality. Reporters, the CLI and the
Python API only ever see these records; none of them may reach back into rules.
"""

from __future__ import annotations

import dataclasses
import enum
import operator
import os
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass, field
from typing import Any, TypeVar, Union

EvidenceValue = Union[str, int, float, bool, None, tuple["EvidenceValue", ...]]  # noqa: UP007 (a recursive alias needs Union)
"""A value a machine can read from a finding: plain scalars and tuples of them."""


_C = TypeVar("_C", bound=type[Any])
_T = TypeVar("_T")


def quick_init(cls: _C) -> _C:
    """Give a frozen, slotted, keyword-only dataclass a faster ``__init__`` of the same
    signature.

    The ``__init__`` that ``dataclass(frozen=True)`` writes calls ``object.__setattr__``
    through a global name once per field. This one turns the new instance into a
    *twin*, a plain class with the record's slots in the same order (so the same memory
    layout, between which CPython allows ``__class__`` assignment), stores the fields as
    plain attributes and turns it back: one call instead of one per field. A check builds
    a dozen records, and building them was a tenth of its cost. Pickling goes field by
    field through the slot descriptors (field values in order): batch workers send
    reports to the main process, and the default protocol for slotted frozen records
    cost more than the check itself. Frozenness, equality, hashing and repr stay as
    ``dataclass`` made them.
    """
    params: list[str] = []
    stores: list[str] = []
    sets: list[str] = []
    twin = _TWINS[cls] = type(f"_{cls.__name__}Draft", (), {"__slots__": cls.__slots__})
    scope: dict[str, object] = {"cls": cls, "twin": twin, "become": object.__setattr__}
    for i, f in enumerate(dataclasses.fields(cls)):
        if not f.init or f.default_factory is not dataclasses.MISSING:
            raise TypeError(f"{cls.__name__}.{f.name}: quick_init takes plain fields only")
        scope[f"set{i}"] = getattr(cls, f.name).__set__
        if f.default is dataclasses.MISSING:
            params.append(f.name)
        else:
            scope[f"default{i}"] = f.default
            params.append(f"{f.name}=default{i}")
        stores.append(f"        self.{f.name} = {f.name}")
        sets.append(f"        set{i}(self, {f.name})")
    source = (
        f"def __init__(self, *, {', '.join(params)}):\n"
        "    if type(self) is cls:\n"
        "        become(self, '__class__', twin)\n"
        + "\n".join(stores)
        + "\n        self.__class__ = cls\n"
        "    else:  # a subclass: its own layout\n" + "\n".join(sets) + "\n"
    )
    exec(source, scope)  # built from the field names of a dataclass, nothing else
    init: Callable[..., None] = scope["__init__"]  # type: ignore[assignment]
    init.__qualname__ = f"{cls.__qualname__}.__init__"
    cls.__init__ = init
    names = [f.name for f in dataclasses.fields(cls)]
    values = operator.attrgetter(*names) if len(names) > 1 else None
    _SETTERS[cls] = tuple(getattr(cls, n).__set__ for n in names)

    def __reduce__(self: object) -> tuple[object, ...]:
        got = values(self) if values is not None else (getattr(self, names[0]),)
        return (_restore, (type(self), got))

    cls.__reduce__ = __reduce__  # type: ignore[assignment]
    return cls


_SETTERS: dict[type, tuple[Callable[[object, object], None], ...]] = {}
_TWINS: dict[type, Any] = {}  # each quick_init record's plain class of the same layout


def _restore(cls: type[_T], values: tuple[object, ...]) -> _T:
    """A record of ``cls`` from its field values in order (what ``__reduce__`` gave)."""
    obj = object.__new__(cls)
    for set_field, value in zip(_SETTERS[cls], values, strict=True):
        set_field(obj, value)
    return obj


class TokenKind(enum.StrEnum):
    """What a token is. Literal kinds are kept whole by the tokenizer."""

    WORD = "word"
    NUMBER = (
        "number"  # digits, with decimal marks and an optional unit: 12, 3.5mm, 10 kg is two tokens
    )
    URL = "url"
    EMAIL = "email"
    PATH = "path"
    HANDLE = "handle"  # @name
    HASHTAG = "hashtag"  # #name
    IDENTIFIER = "identifier"  # snake_case, camelCase, dotted.name, name()
    FLAG = "flag"  # -v, --color=auto
    CODE = "code"  # letters mixed with digits: XR-220, A4, H2O
    PLACEHOLDER = "placeholder"  # %s, %1$d, %(name)s, {0}, {name}, $HOME, ${name}
    PUNCT = "punct"
    SYMBOL = "symbol"
    SPACE = "space"


LITERAL_KINDS: frozenset[TokenKind] = frozenset(
    {
        TokenKind.NUMBER,
        TokenKind.URL,
        TokenKind.EMAIL,
        TokenKind.PATH,
        TokenKind.HANDLE,
        TokenKind.HASHTAG,
        TokenKind.IDENTIFIER,
        TokenKind.FLAG,
        TokenKind.CODE,
        TokenKind.PLACEHOLDER,
    }
)


@quick_init
@dataclass(frozen=True, slots=True, kw_only=True)
class Token:
    """A span of a text. ``start``/``end`` are character offsets into the text it came from."""

    text: str
    start: int
    end: int
    kind: TokenKind


class RewriteKind(enum.StrEnum):
    """How many tokens a rewrite turns into how many."""

    REPLACE = "replace"  # n tokens to m tokens, not one of the cases below
    SPLIT = "split"  # 1 token to n, same letters: "notebook" -> "note book"
    JOIN = "join"  # n tokens to 1, same letters: "note book" -> "notebook"
    INSERT = "insert"
    DELETE = "delete"


class Refinement(enum.StrEnum):
    """The finer nature of a change, when it is only one of these."""

    CASE = "case"  # letter case only
    ACCENTS = "accents"  # diacritics only
    SPACING = "spacing"  # whitespace only
    PUNCTUATION = "punctuation"  # punctuation only


@quick_init
@dataclass(frozen=True, slots=True, kw_only=True)
class Rewrite:
    """One aligned change between source and proposal.

    ``start``/``end`` are offsets into the source, ``new_start``/``new_end`` into the
    proposal. Applying a rewrite replaces ``source[start:end]`` (== ``old``) by ``new``.
    """

    index: int
    start: int
    end: int
    old: str
    new: str
    new_start: int
    new_end: int
    kind: RewriteKind
    refinement: Refinement | None
    old_tokens: tuple[Token, ...]
    new_tokens: tuple[Token, ...]


class Action(enum.StrEnum):
    """What a finding asks for. A NOTE informs and never changes a verdict."""

    NOTE = "note"
    FLAG = "flag"
    VETO = "veto"


class Verdict(enum.StrEnum):
    """The decision on a rewrite or a pair. Ordered: accept < flag < veto."""

    ACCEPT = "accept"
    FLAG = "flag"
    VETO = "veto"

    @property
    def rank(self) -> int:
        return _VERDICT_RANK[self]

    @classmethod
    def of(cls, action: Action) -> Verdict:
        return cls.ACCEPT if action is Action.NOTE else cls(action.value)

    @classmethod
    def worst(cls, verdicts: Iterable[Verdict]) -> Verdict:
        """The worst of some verdicts; ``ACCEPT`` when there are none."""
        best = cls.ACCEPT
        for v in verdicts:
            if _VERDICT_RANK[v] > _VERDICT_RANK[best]:
                best = v
        return best


_VERDICT_RANK = {Verdict.ACCEPT: 0, Verdict.FLAG: 1, Verdict.VETO: 2}


class Tier(enum.StrEnum):
    """Where a rule stands in precedence (see guard.decide)."""

    HARD = "hard"  # nothing overrides
    DOMAIN = "domain"  # an allowed pair overrides
    EVIDENCE = "evidence"  # an allowed pair overrides


@quick_init
@dataclass(frozen=True, slots=True, kw_only=True)
class Origin:
    """Where a setting, a term or a pattern came from: a ruleset file, its line, its key."""

    file: str
    line: int | None = None
    key: str | None = None

    def __str__(self) -> str:
        where = self.file if self.line is None else f"{self.file}:{self.line}"
        return where if self.key is None else f"{where} [{self.key}]"

    def shown(self) -> str:
        """``file:line [key]`` for people: the file relative to the current folder when it
        lies inside it (machine-readable outputs keep ``file`` as it is)."""
        shown = self.file
        if os.path.isabs(shown):
            try:
                rel = os.path.relpath(shown)
            except ValueError:  # another drive
                rel = shown
            if not rel.startswith(".."):
                shown = rel
        where = shown if self.line is None else f"{shown}:{self.line}"
        return where if self.key is None else f"{where} [{self.key}]"


@quick_init
@dataclass(frozen=True, slots=True, kw_only=True)
class Finding:
    """What one rule saw about one rewrite (``rewrite`` = its index) or the pair (``None``).

    ``message`` is ``template`` filled in from ``evidence``; a machine reads the evidence,
    a person the message. ``origin`` names the ruleset file/line of the term, pattern or
    setting that triggered it.
    """

    rule: str
    tier: Tier
    action: Action
    template: str
    evidence: Mapping[str, EvidenceValue] = field(hash=False)
    rewrite: int | None
    origin: Origin | None = None

    @property
    def message(self) -> str:
        try:
            return self.template.format(**self.evidence)
        except (KeyError, IndexError, ValueError):
            return self.template


@quick_init
@dataclass(frozen=True, slots=True, kw_only=True)
class RewriteVerdict:
    """A rewrite, the verdict on it, and every finding that bears on it.

    ``findings`` holds the rewrite's own findings and the pair-level ones that count for it.
    ``overridden`` holds findings an allowed pair set aside (kept, so that an explanation
    can say so); ``allowed_by`` names that pair's origin.
    """

    rewrite: Rewrite
    verdict: Verdict
    findings: tuple[Finding, ...]
    overridden: tuple[Finding, ...] = ()
    allowed_by: Origin | None = None


@quick_init
@dataclass(frozen=True, slots=True, kw_only=True)
class Report:
    """The whole judgement on one pair."""

    source: str
    proposal: str
    lang: str
    verdict: Verdict
    rewrites: tuple[RewriteVerdict, ...]
    pair_findings: tuple[Finding, ...]
    guarded: str  # source with accepted and flagged rewrites applied (vetoed undone)
    guarded_strict: str  # source with only accepted rewrites applied (flagged undone too)
    ruleset: str

    def guarded_text(self, *, undo_flagged: bool = False) -> str:
        return self.guarded_strict if undo_flagged else self.guarded

    @property
    def findings(self) -> tuple[Finding, ...]:
        """Every finding once: the pair's, then each rewrite's own."""
        out: list[Finding] = list(self.pair_findings)
        for rv in self.rewrites:
            out.extend(f for f in rv.findings if f.rewrite is not None)
        return tuple(out)


def _unchanged_maker() -> Callable[[str, str, str], Report]:
    draft, accept = _TWINS[Report], Verdict.ACCEPT

    def unchanged_report(source: str, lang: str, ruleset: str) -> Report:
        """The report on a pair whose proposal is its source: most of a speller's traffic.
        Its fields are set on Report's twin (see :func:`quick_init`), which then becomes
        a Report, without the keyword call: a quarter of the cost of the slot
        descriptors' setters, which took most of this path's time. What comes out is an
        ordinary frozen Report."""
        report = draft()
        report.source = report.proposal = report.guarded = report.guarded_strict = source
        report.lang = lang
        report.verdict = accept
        report.rewrites = report.pair_findings = ()
        report.ruleset = ruleset
        report.__class__ = Report
        return report  # type: ignore[no-any-return]

    return unchanged_report


unchanged_report = _unchanged_maker()
