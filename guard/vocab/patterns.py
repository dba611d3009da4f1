r"""Safety checks for the regular expressions of ruleset patterns.

A ruleset pattern runs over every source text guard checks. One that backtracks badly
can take seconds or hours on an unlucky text, so ``guard rules lint`` and the ruleset
loader ask three questions of each pattern:

- ``static_risks``: does its structure allow catastrophic backtracking? Three shapes are
  looked for: a quantified item inside another quantifier that can hand the same
  characters to the next round (``(a+)+``, ``(\w+\s?)+``, ``(.*a){12}``); alternatives
  that can match the same text under a quantifier (``(a|aa)+``, ``(\w|\d)+``); and two
  quantified items in a row that can match the same characters (``\w+\w+``, ``.*.*``).
- ``probe``: does it actually run out of time on adversarial inputs built from its own
  characters? This is the ground truth for the engine in use (the ``regex`` module, whose
  guards make some statically risky shapes harmless and leave others exponential).
- ``matches_empty``: can it match the empty string? Such a pattern "protects" zero-width
  spans everywhere, which is never what a ruleset author meant.

The structural check parses the pattern with a small parser of its own rather than the
standard library's ``re._parser``: that parser rejects syntax rulesets need (``\p{L}``,
``\X``, ``(?<name>...)``) and folds alternations before anyone can see them (``(\w|\d)``
becomes one character set, ``(a|a)`` becomes ``a`` followed by two empty branches), while
the ``regex`` module runs them as written. What the parser cannot read (recursion, verbs,
version-1 nested sets) is reported as not analysed, and probing still applies.

Characters are compared by sampling: two character classes overlap when one sample
character matches both. The samples are printable ASCII, every character written in the
pattern, and a few letters, digits and spaces of other scripts. The checks are heuristics
(common practice, no source): they may flag a pattern the engine happens to run fast,
which is why probing exists, and they never prove a pattern safe.

Nothing here reads files. Functions take the pattern text and return plain values.
"""

from __future__ import annotations

import functools
import itertools
import string
from collections.abc import Callable, Iterator
from dataclasses import dataclass

import regex

__all__ = ["Risk", "matches_empty", "probe", "risks", "static_risks"]

PROBE_LENGTHS: tuple[int, ...] = (30, 300, 1000)
r"""Repetition counts for probe inputs. Exponential blow-ups show at 30; cubic ones
(``\w+\w+\s``: about 2 s at 1000 characters, measured with ``regex`` 2024 on the 2-core
machine this project is built on) by 1000. The longest input stays at 1000 because a
search retries at every start, which makes even an ordinary ``\w+\s`` quadratic on a long
run of letters: 0.014 s at 1000 characters, 0.3 s at 5000. Probing at 5000 would flag
such everyday patterns; at 1000 a 0.05 s limit leaves them a margin of about three."""

_ANY = "(?s:.)"
_EXTRA_SAMPLES = "éßİıЖж中あ٣½\u00a0\u2003\t\n\x00_-./:@#"


@dataclass(frozen=True, slots=True, kw_only=True)
class Risk:
    """One risky shape found in a pattern.

    ``shape`` is ``nested-quantifier`` or ``overlapping-alternatives`` (each round of a
    loop can be split several ways: exponential in backtracking engines),
    ``adjacent-quantifiers`` (polynomial: n² or n³ on a failing input) or
    ``not-analysed`` (the parser could not read the pattern; probing still applies).
    ``severity`` is "error" for the exponential shapes and "warning" for the others, so a
    loader can refuse the first and only report the second.
    """

    shape: str
    message: str

    @property
    def severity(self) -> str:
        return "error" if self.shape in _EXPONENTIAL else "warning"


_EXPONENTIAL = frozenset({"nested-quantifier", "overlapping-alternatives"})


class _Unsupported(Exception):
    """The pattern uses syntax this parser does not analyse."""


# --- syntax tree ----------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class _Char:
    """One character matched by ``src`` (a literal, a class, an escape or the dot)."""

    src: str


@dataclass(frozen=True, slots=True)
class _Empty:
    """Matches no character: anchors, word boundaries, empty groups."""


@dataclass(frozen=True, slots=True)
class _Seq:
    items: tuple[_Node, ...]


@dataclass(frozen=True, slots=True)
class _Alt:
    options: tuple[_Node, ...]


@dataclass(frozen=True, slots=True)
class _Repeat:
    body: _Node
    lo: int
    hi: int | None  # None: unbounded
    possessive: bool
    text: str  # the quantified item as written, for messages

    @property
    def variable(self) -> bool:
        return self.hi is None or self.hi > self.lo

    @property
    def repeats(self) -> bool:
        return self.hi is None or self.hi > 1


@dataclass(frozen=True, slots=True)
class _Atomic:
    body: _Node


@dataclass(frozen=True, slots=True)
class _Look:
    body: _Node


@dataclass(frozen=True, slots=True)
class _Backref:
    """A back reference: any text, possibly empty."""


_Node = _Char | _Empty | _Seq | _Alt | _Repeat | _Atomic | _Look | _Backref

_QUANT = regex.compile(r"\{(\d*)(?:(,)(\d*))?\}")
_FLAG_LETTERS = frozenset("abefiLmprsuwxV01")
_ESCAPE = regex.compile(
    r"\\(?:[pPNx]\{[^}]*\}|[pP]\w|x[0-9a-fA-F]{2}|u[0-9a-fA-F]{4}|U[0-9a-fA-F]{8}"
    r"|0[0-7]{0,2}|[gk]<[^>]*>|g\{[^}]*\}|[1-9]\d?|.)",
    regex.DOTALL,
)
_NAMED_GROUP = regex.compile(r"(?:P?<(?![=!])|')\w+[>']")
_NAMED_REF = regex.compile(r"P=\w+\)")
_INLINE_FLAGS = regex.compile(r"([a-zA-Z0-9]*)(?:-([a-zA-Z]*))?([:)])")


class _Parser:
    """Recursive descent over the pattern text; keeps the flags that change matching."""

    def __init__(self, pattern: str) -> None:
        self.p = pattern
        self.i = 0
        self.verbose = [False]
        self.flags = 0

    def parse(self) -> _Node:
        node = self._alt()
        if self.i < len(self.p):
            raise _Unsupported(f"unbalanced ')' at position {self.i}")
        return node

    def _peek(self, k: int = 0) -> str:
        j = self.i + k
        return self.p[j] if j < len(self.p) else ""

    def _alt(self) -> _Node:
        options = [self._seq()]
        while self._peek() == "|":
            self.i += 1
            options.append(self._seq())
        return options[0] if len(options) == 1 else _Alt(tuple(options))

    def _seq(self) -> _Node:
        items: list[_Node] = []
        while self.i < len(self.p) and self._peek() not in "|)":
            start = self.i
            atom = self._atom()
            if atom is None:
                continue
            items.append(self._quantified(atom, start))
        if len(items) == 1:
            return items[0]
        return _Seq(tuple(items)) if items else _Empty()

    def _quantified(self, atom: _Node, start: int) -> _Node:
        c = self._peek()
        lo: int
        hi: int | None
        if c == "*":
            lo, hi, self.i = 0, None, self.i + 1
        elif c == "+":
            lo, hi, self.i = 1, None, self.i + 1
        elif c == "?":
            lo, hi, self.i = 0, 1, self.i + 1
        elif c == "{":
            m = _QUANT.match(self.p, self.i)
            if m is None or (m.group(1) == "" and m.group(3) in (None, "")):
                return atom  # a literal brace, as the engines read it
            lo = int(m.group(1) or 0)
            hi = lo
            if m.group(2) is not None:  # {m,} or {m,n}
                hi = int(m.group(3)) if m.group(3) else None
            self.i = m.end()
        else:
            return atom
        possessive = False
        if self._peek() == "?":
            self.i += 1
        elif self._peek() == "+":
            self.i += 1
            possessive = True
        if self._peek() in ("*", "+", "?") or (
            self._peek() == "{" and _QUANT.match(self.p, self.i) is not None
        ):
            raise _Unsupported(f"multiple repeat at position {self.i}")
        if isinstance(atom, _Empty | _Look):
            return atom  # a quantified assertion still matches no character
        return _Repeat(atom, lo, hi, possessive, self.p[start : self.i])

    def _atom(self) -> _Node | None:
        c = self.p[self.i]
        if self.verbose[-1] and c in string.whitespace:
            self.i += 1
            return None
        if self.verbose[-1] and c == "#":
            end = self.p.find("\n", self.i)
            self.i = len(self.p) if end < 0 else end + 1
            return None
        if c == "(":
            return self._group()
        if c == "[":
            return self._set()
        if c == "\\":
            return self._escape()
        self.i += 1
        if c == ".":
            return _Char(".")
        if c in "^$":
            return _Empty()
        if c in "*+?":
            raise _Unsupported(f"nothing to repeat at position {self.i - 1}")
        return _Char(regex.escape(c))

    def _group(self) -> _Node | None:
        p, i = self.p, self.i
        if p.startswith("(*", i):
            raise _Unsupported(f"backtracking verb at position {i}")
        if not p.startswith("(?", i):
            self.i += 1
            return self._group_body()
        rest = p[i + 2 :]
        if rest.startswith("#"):
            end = p.find(")", i)
            if end < 0:
                raise _Unsupported("unterminated comment")
            self.i = end + 1
            return None
        for prefix in ("=", "!", "<=", "<!"):
            if rest.startswith(prefix):
                self.i = i + 2 + len(prefix)
                return self._group_body(_Look)
        if rest.startswith(">"):
            self.i = i + 3
            return self._group_body(_Atomic)
        if rest.startswith((":", "|")):
            self.i = i + 3
            return self._group_body()
        named = _NAMED_GROUP.match(rest)
        if named is not None:
            self.i = i + 2 + named.end()
            return self._group_body()
        ref = _NAMED_REF.match(rest)
        if ref is not None:
            self.i = i + 2 + ref.end()
            return _Backref()
        if rest.startswith("("):
            end = p.find(")", i + 3)
            if end < 0:
                raise _Unsupported("unterminated condition")
            self.i = end + 1
            return self._group_body()
        flags = _INLINE_FLAGS.match(rest)
        if flags is None or not set(flags.group(1) + (flags.group(2) or "")) <= _FLAG_LETTERS:
            raise _Unsupported(f"group syntax at position {i} (recursion or an extension)")
        on = flags.group(1)
        self.i = i + 2 + flags.end()
        if flags.group(3) == ")":
            # A global flag: applies to the whole pattern.
            self._note_flags(on)
            if "x" in on:
                self.verbose[-1] = True
            return None
        self.verbose.append("x" in on or (self.verbose[-1] and "x" not in (flags.group(2) or "")))
        self._note_flags(on)
        try:
            return self._group_body()
        finally:
            self.verbose.pop()

    def _note_flags(self, letters: str) -> None:
        for letter, flag in (
            ("i", regex.IGNORECASE),
            ("s", regex.DOTALL),
            ("a", regex.ASCII),
            ("V1", regex.V1),
        ):
            if letter in letters:
                self.flags |= flag

    def _group_body(self, wrap: Callable[[_Node], _Node] = lambda body: body) -> _Node:
        body = self._alt()
        if self._peek() != ")":
            raise _Unsupported("missing ')'")
        self.i += 1
        return wrap(body)

    def _set(self) -> _Node:
        p, start = self.p, self.i
        j = start + 1
        if j < len(p) and p[j] == "^":
            j += 1
        if j < len(p) and p[j] == "]":
            j += 1
        depth = 0  # nested sets exist only in version 1 syntax: [[a-z]--[aeiou]]
        while j < len(p) and (p[j] != "]" or depth > 0):
            if p[j] == "\\":
                j = self._escape_end(j)
            elif p.startswith("[:", j):
                end = p.find(":]", j + 2)
                if end < 0:
                    raise _Unsupported("unterminated POSIX class")
                j = end + 2
            else:
                if self.flags & regex.V1 and p[j] in "[]":
                    depth += 1 if p[j] == "[" else -1
                j += 1
        if j >= len(p):
            raise _Unsupported("unterminated character set")
        self.i = j + 1
        return _Char(p[start : self.i])

    def _escape_end(self, j: int) -> int:
        """The index after the escape that starts at ``j`` (a backslash)."""
        m = _ESCAPE.match(self.p, j)
        if m is None:
            raise _Unsupported("pattern ends with a backslash")
        return m.end()

    def _escape(self) -> _Node:
        start = self.i
        self.i = self._escape_end(start)
        text = self.p[start : self.i]
        kind = text[1]
        if kind in "bBAZzGmMK":
            return _Empty()
        if (kind.isdigit() and kind != "0") or kind in "gk":
            return _Backref()
        return _Char(text)


# --- character classes --------------------------------------------------------------


@functools.lru_cache(maxsize=4096)
def _matcher(src: str, flags: int) -> regex.Pattern[str]:
    try:
        return regex.compile(src, flags)
    except regex.error as e:
        raise _Unsupported(f"character class {src!r}: {e}") from e


def _samples(pattern: str) -> str:
    return "".join(sorted(set(string.printable + _EXTRA_SAMPLES + pattern)))


First = frozenset[tuple[str, bool]]  # (class source, comes from a variable repeat)


@dataclass(frozen=True, slots=True)
class _Context:
    samples: str
    flags: int

    def members(self, src: str) -> frozenset[str]:
        m = _matcher(src, self.flags)
        return frozenset(ch for ch in self.samples if m.fullmatch(ch))

    def overlap(self, a: First, b: First) -> bool:
        left: set[str] = set()
        for src, _ in a:
            left |= self.members(src)
        return any(self.members(src) & left for src, _ in b)


def _nullable(n: _Node) -> bool:
    match n:
        case _Char():
            return False
        case _Seq(items):
            return all(_nullable(x) for x in items)
        case _Alt(options):
            return any(_nullable(x) for x in options)
        case _Repeat(body, lo, hi, _, _):
            return lo == 0 or hi == 0 or _nullable(body)
        case _Atomic(body):
            return _nullable(body)
        case _:
            return True  # _Empty, _Look, _Backref


def _first(n: _Node) -> First:
    """What can come first in a match of ``n``, each marked when a variable repeat gives it."""
    match n:
        case _Char(src):
            return frozenset({(src, False)})
        case _Seq(items):
            out: set[tuple[str, bool]] = set()
            for x in items:
                out |= _first(x)
                if not _nullable(x):
                    break
            return frozenset(out)
        case _Alt(options):
            return frozenset().union(*(_first(x) for x in options))
        case _Repeat(body, _, hi, _, _) as r:
            if hi == 0:
                return frozenset()
            inner = _first(body)
            return frozenset((src, True) for src, _ in inner) if r.variable else inner
        case _Atomic(body):
            return _first(body)
        case _Backref():
            return frozenset({(_ANY, True)})
        case _:
            return frozenset()


def _prefix(n: _Node, limit: int = 12) -> tuple[list[First], bool]:
    """The leading single characters of every match of ``n``, and whether that is all of it."""
    match n:
        case _Char(src):
            return [frozenset({(src, False)})], True
        case _Seq(items):
            out: list[First] = []
            for x in items:
                part, whole = _prefix(x, limit - len(out))
                out.extend(part)
                if not whole or len(out) >= limit:
                    return out, False
            return out, True
        case _Repeat(body, lo, hi, _, _) if hi == lo:
            part, whole = _prefix(body, limit)
            if not whole:
                return part, False
            return (part * lo)[:limit], len(part) * lo <= limit
        case _Atomic(body):
            return _prefix(body, limit)
        case _Empty() | _Look():
            return [], True
        case _:
            return [], False


def _alternatives_overlap(ctx: _Context, x: _Node, y: _Node) -> bool:
    if _nullable(x) and _nullable(y):
        return True
    px, _ = _prefix(x)
    py, _ = _prefix(y)
    if not px or not py:
        return ctx.overlap(_first(x), _first(y))
    return all(ctx.overlap(a, b) for a, b in zip(px, py, strict=False))


def _walk(ctx: _Context, n: _Node, follow: First, loop: _Repeat | None) -> Iterator[Risk]:
    """Yield each risky shape in ``n``.

    ``follow`` is what can come right after ``n``; ``loop`` the nearest enclosing
    quantifier that repeats, if any.
    """
    match n:
        case _Seq(items):
            for k, x in enumerate(items):
                rest = _Seq(items[k + 1 :])
                after = _first(rest) | (follow if _nullable(rest) else frozenset())
                yield from _walk(ctx, x, after, loop)
        case _Alt(options):
            if loop is not None:
                for x, y in itertools.combinations(options, 2):
                    if _alternatives_overlap(ctx, x, y):
                        yield Risk(
                            shape="overlapping-alternatives",
                            message=(
                                f"overlapping alternatives under a quantifier: in"
                                f" {loop.text!r} two alternatives can match the same text,"
                                " so each round can be split two ways"
                            ),
                        )
                        break
            for x in options:
                yield from _walk(ctx, x, follow, loop)
        case _Repeat(body, _, _, possessive, text) as r:
            if r.variable and not possessive and ctx.overlap(_first(body), follow):
                if loop is not None:
                    yield Risk(
                        shape="nested-quantifier",
                        message=(
                            f"nested quantifier: {text!r} inside {loop.text!r} can give the"
                            " same characters to the next round of the outer repeat"
                        ),
                    )
                elif ctx.overlap(_first(body), frozenset(f for f in follow if f[1])):
                    yield Risk(
                        shape="adjacent-quantifiers",
                        message=(
                            f"adjacent quantifiers: {text!r} and the quantified item after"
                            " it can match the same characters"
                        ),
                    )
            inner_follow = _first(body) | follow if r.repeats else follow
            yield from _walk(ctx, body, inner_follow, r if r.repeats else loop)
        case _Atomic(body):
            yield from _walk(ctx, body, follow, loop)
        case _Look(body):
            yield from _walk(ctx, body, frozenset(), None)
        case _:
            return


def _parse(pattern: str) -> tuple[_Node, _Context]:
    parser = _Parser(pattern)
    tree = parser.parse()
    return tree, _Context(_samples(pattern), parser.flags)


def risks(pattern: str) -> list[Risk]:
    r"""The risky shapes of ``pattern``, each once, in the order they occur.

    >>> [(r.shape, r.severity) for r in risks(r"(\w+\s?)+!\d+\d+")]
    [('nested-quantifier', 'error'), ('adjacent-quantifiers', 'warning')]
    """
    try:
        regex.compile(pattern)
    except regex.error as e:
        return [
            Risk(
                shape="not-analysed",
                message=f"not analysed: the pattern does not compile ({e})",
            )
        ]
    try:
        tree, ctx = _parse(pattern)
        return list(dict.fromkeys(_walk(ctx, tree, frozenset(), None)))
    except _Unsupported as e:
        return [Risk(shape="not-analysed", message=f"not analysed: {e}; rely on probing")]


def static_risks(pattern: str) -> list[str]:
    r"""Messages naming the shapes of ``pattern`` that can backtrack badly.

    An empty list means none of the known shapes was found, not that the pattern is safe.
    A pattern that does not compile, or that this parser cannot read, gets one message
    starting "not analysed:" (probe it instead). :func:`risks` gives the same findings
    with their shape and severity.

    >>> static_risks(r"\b[A-Z]{2}-\d{4}\b")
    []
    >>> static_risks(r"^(a+)+$")  # doctest: +ELLIPSIS
    ["nested quantifier: 'a+' inside '(a+)+' can give the same characters ..."]
    """
    return [risk.message for risk in risks(pattern)]


def _probe_pieces(pattern: str) -> tuple[list[str], list[str]]:
    """Characters to repeat (one per class the pattern uses) and suffixes that break a match."""
    try:
        tree, ctx = _parse(pattern)
    except _Unsupported:
        chars = [ch for ch in dict.fromkeys(pattern) if ch.isalnum()] or ["a"]
        return chars[:8], ["!", "\n"]
    classes: list[str] = []

    def collect(n: _Node) -> None:
        match n:
            case _Char(src):
                classes.append(src)
            case _Seq(items) | _Alt(items):
                for x in items:
                    collect(x)
            case _Repeat(body, _, _, _, _) | _Atomic(body) | _Look(body):
                collect(body)
            case _:
                return

    collect(tree)
    pieces: list[str] = []
    matched: set[str] = set()
    for src in dict.fromkeys(classes):
        members = ctx.members(src)
        matched |= members
        pick = sorted(members, key=lambda ch: (ch not in pattern, not ch.isalnum(), ch))
        pieces.extend(ch for ch in pick[:1] if ch not in pieces)
    suffixes = [ch for ch in "!\n\x00~ " if ch not in matched][:1] or ["\n", "\x00"]
    return pieces[:8] or ["a"], suffixes


def probe(
    compiled: regex.Pattern[str],
    timeout_s: float = 0.05,
    lengths: tuple[int, ...] = PROBE_LENGTHS,
) -> str | None:
    r"""Run ``compiled`` on adversarial inputs; a message if one runs out of time, else None.

    The inputs repeat characters the pattern itself matches (one from each literal and
    class), alone and in pairs, ``n`` times for each ``n`` in ``lengths``, then add a
    character the pattern does not use, so that the match fails late. Each search gets
    ``timeout_s`` seconds through the ``regex`` module's own ``timeout``. Worst case the
    probe takes ``timeout_s`` times the number of inputs tried before the first timeout.

    >>> probe(regex.compile(r"\b[A-Z]{2}-\d{4}\b")) is None
    True
    """
    pieces, suffixes = _probe_pieces(compiled.pattern)
    units = pieces + [a + b for a, b in itertools.combinations(pieces[:4], 2)]
    for n in lengths:
        for unit in units:
            for suffix in suffixes:
                text = unit * max(1, n // len(unit)) + suffix
                try:
                    compiled.search(text, timeout=timeout_s)
                except (MemoryError, RecursionError) as e:  # (?R) on some inputs
                    return f"failed with {type(e).__name__} on {text[:12]!r}..."
                except TimeoutError:
                    shown = (unit * 3)[:12]
                    return (
                        f"ran out of time ({timeout_s} s) on {shown!r} repeated to"
                        f" {len(text) - len(suffix)} characters followed by {suffix!r}"
                    )
    return None


def matches_empty(pattern: str) -> bool:
    r"""Whether ``pattern`` can match the empty string (somewhere, with its anchors ignored).

    Read from the pattern's structure; a pattern this module cannot parse is tried on a
    few short texts instead. A pattern that does not compile raises ``regex.error``.

    >>> matches_empty(r"\d*"), matches_empty(r"\d+"), matches_empty(r"\b")
    (True, False, True)
    """
    try:
        tree, _ = _parse(pattern)
    except _Unsupported:
        compiled = regex.compile(pattern)
        try:
            return any(
                m.start() == m.end()
                for text in ("", " ", "a", "A1 -x.", "\n")
                for m in compiled.finditer(text, timeout=0.05)
            )
        except (TimeoutError, MemoryError, RecursionError):
            return False  # it cannot be run on these texts at all: probe() will say so
    return _nullable(tree)
