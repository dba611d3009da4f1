"""Harvest candidate protected terms from a corpus, with the evidence for each.

A team starting a ruleset has documents, not term lists. This module reads the documents
once and proposes what a speller should leave alone, each candidate with its counts, its
keyness against the language at large (Dunning's G², see :mod:`guard.vocab.keyness`), its
Zipf frequency and two places it was seen, so that a person can review the list quickly:

- ``acronym``: words written in capitals (two or more letters), ``QSP``;
- ``code``: letters mixed with digits, ``QM-4410``, ``v2.3.1``;
- ``identifier``: ``snake_case``, ``dotted.names``, ``name()``, ``--flags``, paths;
- ``name``: words capitalised inside sentences most times they occur, CamelCase brands,
  and two capitalised words that recur together (``Orla Brennick``);
- ``term``: lowercase words that are rare in the language (Zipf at most ``max_zipf``)
  and key in the corpus (G² at least ``min_g2``).

What is never proposed: numbers alone, single letters, URLs, e-mail addresses, handles
and tags (the ``literal-token`` rule protects those already), and words more common than
``max_zipf`` (default 4.5, about 30 occurrences per million words, where wordfreq's lists
hold roughly the everyday vocabulary of a language: a protected common word would veto
ordinary corrections of it, and a speller changing a common word is the ``real-word``
rule's business). The Zipf check applies to words; codes and identifiers are kept
whatever wordfreq says of their parts.

Shape evidence is read with care: a capitalised word at the start of a sentence, a line
or a list item says nothing about names; a line of three or more Title-Case words is a
heading, and a run of three or more capitalised words is shouting, so neither counts as
evidence of a name or an acronym (their words are still counted).

The result is a draft for review. A typo repeated in the corpus can rank high as a
``term``; a harvested list is never complete. For medical, legal or safety text a
harvested list reduces risk but does not remove it: local rules and licensed
professionals decide what must be protected.

``vocabulary`` lists every word the documents use, common ones too, with its count; a
ruleset names that list under ``[vocabulary]`` (per language) as evidence of what the
domain writes: the ``real-word`` rule then treats a listed word (or the long listed word a
word begins with) as real in the domain and lets a frequent-misspelling fix land only on
a word the documents use. Unlike a
protected term, a vocabulary word is never protected by itself.

``rank_attacked`` reorders candidates by how often a speller actually changed them in a
batch of proposals; ``write_drafts`` writes term lists in the format of
docs/rulesets.md. Nothing here prints; reading files is limited to ``read_corpus`` and
writing to ``write_drafts``.
"""

from __future__ import annotations

import enum
import functools
import json
import math
import os
from collections import Counter
from collections.abc import Callable, Iterable, Iterator, Sequence
from dataclasses import dataclass, field, replace
from pathlib import Path

import regex
import wordfreq

from guard.align import align
from guard.errors import GuardError, RecordError
from guard.records import Token, TokenKind
from guard.text.shape import Shape, has_digit, shape_of
from guard.text.tokenize import tokenize
from guard.vocab.keyness import NOMINAL_REFERENCE_TOKENS, keyness

__all__ = [
    "CORPUS_SUFFIXES",
    "Candidate",
    "Kind",
    "draft_line",
    "harvest",
    "rank_attacked",
    "read_corpus",
    "vocabulary",
    "wordfreq_lang",
    "write_drafts",
    "write_vocabulary",
]

DEFAULT_MAX_ZIPF = 4.5
DEFAULT_MIN_COUNT = 2
DEFAULT_MIN_G2 = 10.83  # chi-square, 1 degree of freedom, p < 0.001
DEFAULT_VOCABULARY_MIN_COUNT = 1
VOCABULARY_FILE = "vocabulary.txt"
CONTEXT_CHARS = 40
CORPUS_SUFFIXES: tuple[str, ...] = (".txt", ".md", ".rst", ".jsonl")


class Kind(enum.StrEnum):
    """The kind of a candidate; also the name of its draft list (terms/<kind>.txt)."""

    ACRONYM = "acronym"
    CODE = "code"
    IDENTIFIER = "identifier"
    NAME = "name"
    TERM = "term"


@dataclass(frozen=True, slots=True, kw_only=True)
class Candidate:
    """A proposed protected term and the evidence for it.

    ``count`` is occurrences in the corpus, ``documents`` how many documents hold it,
    ``zipf`` wordfreq's Zipf frequency in the corpus language (0.0 when unknown), ``g2``
    its signed keyness, ``contexts`` up to two places it was seen (about 40 characters
    either side), ``score`` what the list is ranked by (G² from ``harvest``, attacks
    times log count from ``rank_attacked``), ``attacks`` how many times a speller changed
    it (0 unless ranked against proposals).
    """

    term: str
    kind: Kind
    count: int
    documents: int
    zipf: float
    g2: float
    contexts: tuple[str, ...]
    score: float
    attacks: int = 0


# --- reading a corpus -----------------------------------------------------------------


def _corpus_files(path: Path) -> Iterator[Path]:
    if path.is_dir():
        found = [
            Path(root) / name
            for root, _, names in os.walk(path)
            for name in names
            if name.lower().endswith(CORPUS_SUFFIXES)
        ]
        yield from sorted(found)
    else:
        yield path


def read_corpus(
    paths: Iterable[str | os.PathLike[str]],
    *,
    field: str = "text",
    errors: list[RecordError],
) -> Iterator[tuple[str, str]]:
    """Yield ``(doc_id, text)`` for each document under ``paths``.

    A folder is searched recursively for ``*.txt``, ``*.md``, ``*.rst`` and ``*.jsonl``
    (in name order); a file named directly is read whatever its name. A text file is one
    document (id: its path). A ``.jsonl`` file holds one document per line, its text in
    ``field`` (id: ``path:line``); blank lines are skipped. Whatever cannot be read is
    appended to ``errors`` as a :class:`RecordError` naming the file and line, and
    reading goes on, so that every problem is reported in one run.
    """
    for root in paths:
        root_path = Path(root)
        if not root_path.exists():
            errors.append(RecordError("no such file or folder", file=str(root_path)))
            continue
        for path in _corpus_files(root_path):
            yield from _read_file(path, field, errors)


def _read_file(path: Path, field: str, errors: list[RecordError]) -> Iterator[tuple[str, str]]:
    name = str(path)
    try:
        data = path.read_bytes()
    except OSError as e:
        errors.append(RecordError(f"cannot read: {e.strerror or e}", file=name))
        return
    if not name.lower().endswith(".jsonl"):
        try:
            text = data.decode("utf-8-sig")
        except UnicodeDecodeError as e:
            line = data.count(b"\n", 0, e.start) + 1
            errors.append(RecordError(f"not valid UTF-8 (byte {e.start})", file=name, line=line))
            return
        yield name, text
        return
    for number, raw in enumerate(data.split(b"\n"), 1):
        if not raw.strip():
            continue
        try:
            record = json.loads(raw.decode("utf-8-sig" if number == 1 else "utf-8"))
        except UnicodeDecodeError:
            errors.append(RecordError("not valid UTF-8", file=name, line=number))
            continue
        except json.JSONDecodeError as e:
            errors.append(RecordError(f"not JSON: {e.msg}", file=name, line=number))
            continue
        if not isinstance(record, dict):
            errors.append(RecordError("not a JSON object", file=name, line=number))
            continue
        value = record.get(field)
        if not isinstance(value, str):
            got = "missing" if value is None else f"a {type(value).__name__}, not a string"
            errors.append(RecordError(f"field {field!r} is {got}", file=name, line=number))
            continue
        yield f"{name}:{number}", value


# --- counting -------------------------------------------------------------------------

_NOT_TOKENS = frozenset({TokenKind.SPACE, TokenKind.PUNCT, TokenKind.SYMBOL})
_SENTENCE_END = frozenset(".!?…:;。！？")
_OPENERS = frozenset("\"'“‘«‹([{¿¡*-–—•·#>|")
_LETTER = regex.compile(r"\p{L}")
_WHITESPACE = regex.compile(r"\s+")
_CAPITALISED = frozenset({Shape.TITLE, Shape.INTERNAL_CAP})
_UPPER_SHAPES = frozenset({Shape.TITLE, Shape.INTERNAL_CAP, Shape.ALLCAPS})
_NAME_SHARE = 0.8  # of mid-sentence occurrences capitalised, for a word to count as a name
NOUNS_CAPITALISED = frozenset({"de"})
"""Languages that capitalise every noun (German: "Substantive schreibt man groß", the
official spelling rules, §55, from memory), where a capital inside a sentence is no
evidence of a name for a word the language's lexicon lists."""
_HEADING_MIN_WORDS = 3
_HEADING_SHARE = 0.75


@dataclass(slots=True)
class _Tally:
    """What is known of one candidate key while the corpus is read."""

    literal_kind: Kind | None  # set for literal tokens and two-word names, None for words
    forms: Counter[str] = field(default_factory=Counter)
    count: int = 0
    documents: int = 0
    last_doc: int = -1
    allcaps: int = 0  # occurrences in capitals, outside headings and shouting
    internal: int = 0  # occurrences with a capital inside: "QuillMate"
    evidence: int = 0  # occurrences whose shape counts as evidence
    mid: int = 0  # evidence occurrences inside a sentence
    mid_capitalised: int = 0
    contexts: list[tuple[int, str]] = field(default_factory=list)
    spare_context: str | None = None

    def add(self, form: str, doc: int, context: Callable[[], str]) -> None:
        """Count one occurrence; ``context`` is called only when a context is still wanted."""
        self.count += 1
        self.forms[form] += 1
        if doc != self.last_doc:
            self.documents += 1
            self.last_doc = doc
        if not self.contexts:
            self.contexts.append((doc, context()))
        elif len(self.contexts) == 1:
            if self.contexts[0][0] != doc:
                self.contexts.append((doc, context()))
            elif self.spare_context is None:
                self.spare_context = context()

    def context_tuple(self) -> tuple[str, ...]:
        found = [text for _, text in self.contexts]
        if len(found) == 1 and self.spare_context is not None:
            found.append(self.spare_context)
        return tuple(found)


def _context(text: str, start: int, end: int, width: int) -> str:
    left = max(0, start - width)
    right = min(len(text), end + width)
    body = _WHITESPACE.sub(" ", text[left:right]).strip()
    return ("…" if left > 0 else "") + body + ("…" if right < len(text) else "")


def _sentence_initial(tokens: Sequence[Token], i: int) -> bool:
    """Whether token ``i`` starts a sentence, a line or a list item."""
    j = i - 1
    while j >= 0:
        tok = tokens[j]
        if tok.kind is TokenKind.SPACE:
            if "\n" in tok.text or "\r" in tok.text:
                return True
        elif tok.text in _SENTENCE_END:
            return True
        elif not (tok.kind in (TokenKind.PUNCT, TokenKind.SYMBOL) and tok.text in _OPENERS):
            return False
        j -= 1
    return True


def _lines(tokens: Sequence[Token]) -> Iterator[list[int]]:
    """Indexes of the word and literal tokens of each line."""
    line: list[int] = []
    for i, tok in enumerate(tokens):
        if tok.kind is TokenKind.SPACE and ("\n" in tok.text or "\r" in tok.text):
            yield line
            line = []
        elif tok.kind not in _NOT_TOKENS:
            line.append(i)
    yield line


def _no_evidence(tokens: Sequence[Token], shapes: dict[int, Shape]) -> set[int]:
    """Word tokens whose case says nothing: those of headings and of shouted runs."""
    out: set[int] = set()
    for line in _lines(tokens):
        words = [i for i in line if tokens[i].kind is TokenKind.WORD and i in shapes]
        if len(words) >= _HEADING_MIN_WORDS:
            # Short words stay lowercase in Title Case headings: "Guide to the Dock".
            long_words = [i for i in words if _letters(tokens[i].text) > 3] or words
            capitalised = sum(1 for i in long_words if shapes[i] in _UPPER_SHAPES)
            if capitalised >= _HEADING_SHARE * len(long_words):
                out.update(words)
                continue
        run: list[int] = []
        for i in [*line, -1]:
            if i >= 0 and i in shapes and shapes[i] is Shape.ALLCAPS:
                run.append(i)
                continue
            if len(run) >= _HEADING_MIN_WORDS:
                out.update(run)
            run = []
    return out


def _letters(text: str) -> int:
    return len(_LETTER.findall(text))


@dataclass(frozen=True, slots=True, kw_only=True)
class _Options:
    lang: str
    max_zipf: float
    context_chars: int


class _Harvester:
    """Counts over a whole corpus; one instance per call of :func:`harvest`."""

    def __init__(self, options: _Options) -> None:
        self.o = options
        self.tallies: dict[tuple[str, str], _Tally] = {}
        self.total = 0  # word and literal tokens: the corpus size for G²
        self._zipf: dict[str, float] = {}
        self._shape: dict[str, Shape] = {}

    def zipf(self, text: str) -> float:
        got = self._zipf.get(text)
        if got is None:
            got = self._zipf[text] = float(wordfreq.zipf_frequency(text, self.o.lang))
        return got

    def shape(self, text: str) -> Shape:
        got = self._shape.get(text)
        if got is None:
            got = self._shape[text] = shape_of(text)
        return got

    def tally(self, key: tuple[str, str], literal: Kind | None) -> _Tally:
        got = self.tallies.get(key)
        if got is None:
            got = self.tallies[key] = _Tally(literal_kind=literal)
        return got

    def read(self, doc: int, text: str) -> None:
        tokens = tokenize(text)
        shapes = {
            i: self.shape(t.text)
            for i, t in enumerate(tokens)
            if t.kind in (TokenKind.WORD, TokenKind.IDENTIFIER)
        }
        mute = _no_evidence(tokens, shapes)
        width = self.o.context_chars
        previous: int | None = None  # the last word token, for two-word names
        for i, tok in enumerate(tokens):
            if tok.kind in _NOT_TOKENS:
                if tok.kind is not TokenKind.SPACE or "\n" in tok.text:
                    previous = None
                continue
            self.total += 1
            context = functools.partial(_context, text, tok.start, tok.end, width)
            literal = self._literal_kind(tok, shapes.get(i))
            if literal is not None:
                self.tally(("literal", tok.text), literal).add(tok.text, doc, context)
                previous = i if literal is Kind.NAME else None
                continue
            if tok.kind is not TokenKind.WORD or _letters(tok.text) < 2:
                previous = None
                continue
            tally = self.tally(("word", tok.text.casefold()), None)
            tally.add(tok.text, doc, context)
            shape = shapes[i]
            if shape is Shape.INTERNAL_CAP:
                tally.internal += 1
            initial = _sentence_initial(tokens, i)
            if i not in mute:
                tally.evidence += 1
                if shape is Shape.ALLCAPS:
                    tally.allcaps += 1
                elif not initial:
                    tally.mid += 1
                    if shape in _CAPITALISED:
                        tally.mid_capitalised += 1
            if previous is not None and i not in mute and previous not in mute:
                self._pair(tokens, text, previous, i, shapes, doc)
            previous = i if shape in _CAPITALISED else None

    def _literal_kind(self, tok: Token, shape: Shape | None) -> Kind | None:
        if tok.kind is TokenKind.CODE:
            return Kind.CODE
        if tok.kind in (TokenKind.FLAG, TokenKind.PATH):
            return Kind.IDENTIFIER
        if tok.kind is TokenKind.IDENTIFIER:
            # CamelCase without joiners is a brand more than code: "QuillMate".
            if shape is Shape.INTERNAL_CAP and tok.text.isalpha():
                return Kind.NAME
            return Kind.IDENTIFIER
        if tok.kind is TokenKind.WORD and has_digit(tok.text) and _letters(tok.text) > 0:
            return Kind.CODE
        return None

    def _pair(
        self,
        tokens: Sequence[Token],
        text: str,
        first: int,
        second: int,
        shapes: dict[int, Shape],
        doc: int,
    ) -> None:
        """Count two capitalised words in a row, unless the pair is only a sentence start."""
        a, b = tokens[first], tokens[second]
        if shapes.get(first) not in _CAPITALISED or shapes.get(second) not in _CAPITALISED:
            return
        if text[a.end : b.start] != " ":
            return
        a_common = self.zipf(a.text) > self.o.max_zipf
        if a_common and (_sentence_initial(tokens, first) or self.zipf(b.text) > self.o.max_zipf):
            return  # "The Quillmate", "Getting Started"
        phrase = f"{a.text} {b.text}"
        context = functools.partial(_context, text, a.start, b.end, self.o.context_chars)
        self.tally(("pair", phrase), Kind.NAME).add(phrase, doc, context)

    def candidates(
        self, *, min_count: int, min_g2: float, reference_tokens: float
    ) -> list[Candidate]:
        out: list[Candidate] = []
        for (space, _), t in self.tallies.items():
            if t.count < min_count:
                continue
            kind, term = self._classify(t)
            if kind is Kind.NAME and t.literal_kind is None and self._common_noun(term):
                kind = Kind.TERM  # keeps its capital: German writes it so
            zipf = self.zipf(term)
            if space != "literal" and zipf > self.o.max_zipf:
                continue
            g2 = keyness(
                term,
                t.count,
                max(self.total, t.count),
                self.o.lang,
                reference_tokens=reference_tokens,
            )
            if kind is Kind.TERM and g2 < min_g2:
                continue
            out.append(
                Candidate(
                    term=term,
                    kind=kind,
                    count=t.count,
                    documents=t.documents,
                    zipf=zipf,
                    g2=g2,
                    contexts=t.context_tuple(),
                    score=g2,
                )
            )
        out.sort(key=lambda c: (-c.score, -c.count, c.term))
        return out

    def _common_noun(self, word: str) -> bool:
        """A capitalised word that the lexicon lists, in a language that capitalises
        every noun: an ordinary noun ("Datei", "Block"), judged as a lowercase term."""
        return self.o.lang in NOUNS_CAPITALISED and " " not in word and self.zipf(word) > 0.0

    @staticmethod
    def _classify(t: _Tally) -> tuple[Kind, str]:
        if t.literal_kind is not None:
            return t.literal_kind, t.forms.most_common(1)[0][0]
        forms = t.forms.most_common()
        if t.evidence and t.allcaps * 2 >= t.evidence:
            return Kind.ACRONYM, _most_common(forms, lambda f: shape_of(f) is Shape.ALLCAPS)
        if t.internal * 2 >= t.count:
            return Kind.NAME, _most_common(forms, lambda f: shape_of(f) is Shape.INTERNAL_CAP)
        if t.mid and t.mid_capitalised >= _NAME_SHARE * t.mid:
            return Kind.NAME, _most_common(forms, lambda f: shape_of(f) in _CAPITALISED)
        term = _most_common(forms, lambda f: shape_of(f) is Shape.LOWER)
        # Seen only capitalised (sentence starts, headings, shouting): the word itself.
        return Kind.TERM, term if shape_of(term) is Shape.LOWER else term.lower()


def _most_common(forms: list[tuple[str, int]], wanted: Callable[[str], bool]) -> str:
    """The most frequent surface form that passes ``wanted``, else the most frequent."""
    for form, _ in forms:
        if wanted(form):
            return form
    return forms[0][0]


def harvest(
    docs: Iterable[tuple[str, str]],
    *,
    lang: str,
    min_count: int = DEFAULT_MIN_COUNT,
    max_zipf: float = DEFAULT_MAX_ZIPF,
    min_g2: float = DEFAULT_MIN_G2,
    top: int | None = None,
    context_chars: int = CONTEXT_CHARS,
    reference_tokens: float = NOMINAL_REFERENCE_TOKENS,
) -> list[Candidate]:
    """Candidate protected terms of ``docs`` (``(doc_id, text)`` pairs), best first.

    ``lang`` is the corpus language (wordfreq code: "en", "de"...); ``min_count`` the
    fewest occurrences a candidate needs (default 2: once is no pattern); ``max_zipf``
    the Zipf frequency above which a word counts as common and is skipped; ``min_g2``
    the keyness a lowercase ``term`` needs (default 10.83, p < 0.001); ``top`` keeps
    only the best so many. Ranked by G², then count, then the term.

    >>> docs = [("a", "Pair the QSP first. The QSP light blinks."), ("b", "Reset QSP now.")]
    >>> [(c.term, c.kind.value, c.count, c.documents) for c in harvest(docs, lang="en")]
    [('QSP', 'acronym', 3, 2)]
    """
    if min_count < 1:
        raise ValueError("min_count must be at least 1")
    harvester = _Harvester(
        _Options(lang=wordfreq_lang(lang), max_zipf=max_zipf, context_chars=context_chars)
    )
    for index, (_, text) in enumerate(docs):
        harvester.read(index, text)
    found = harvester.candidates(
        min_count=min_count, min_g2=min_g2, reference_tokens=reference_tokens
    )
    return found if top is None else found[:top]


def wordfreq_lang(tag: str) -> str:
    """The wordfreq language for a BCP 47 tag: its primary subtag, if wordfreq has it.

    >>> wordfreq_lang("en-GB")
    'en'
    >>> wordfreq_lang("xx")
    Traceback (most recent call last):
    ...
    guard.errors.GuardError: no word frequencies for language 'xx' (wordfreq has ar, bg, ...)
    """
    primary = tag.split("-", 1)[0].lower()
    known = wordfreq.available_languages()
    if primary not in known:
        shown = ", ".join(sorted(known)[:2])
        raise GuardError(f"no word frequencies for language {tag!r} (wordfreq has {shown}, ...)")
    return primary


# --- the domain vocabulary -----------------------------------------------------------

_PART_SPLIT = regex.compile(r"[\-‐‑'’]")


def vocabulary(
    docs: Iterable[tuple[str, str]], *, min_count: int = DEFAULT_VOCABULARY_MIN_COUNT
) -> list[tuple[str, int]]:
    """Every word of ``docs`` with its count, most frequent first: the domain's vocabulary.

    A word is a word token of two letters or more, case folded; a hyphenated or elided
    word counts as its parts too ("NULL-Zeiger" adds "null" and "zeiger"), since the
    rules judge a hyphenated word by its changed part. Literal tokens (codes, paths,
    flags) are left to the term lists. ``min_count`` is the fewest occurrences a word
    needs: 1 by default, since the documents are the team's own, taken as written.

    >>> vocabulary([("a", "Reset the QSP-Panel. The panel blinks.")])
    [('panel', 2), ('the', 2), ('blinks', 1), ('qsp', 1), ('qsp-panel', 1), ('reset', 1)]
    """
    if min_count < 1:
        raise ValueError("min_count must be at least 1")
    counts: Counter[str] = Counter()
    for _, text in docs:
        for tok in tokenize(text):
            if tok.kind is not TokenKind.WORD or _letters(tok.text) < 2:
                continue
            word = tok.text.casefold()
            counts[word] += 1
            if _PART_SPLIT.search(word):
                for part in _PART_SPLIT.split(word):
                    if _letters(part) >= 2:
                        counts[part] += 1
    found = [(w, n) for w, n in counts.items() if n >= min_count and _expressible(w)]
    found.sort(key=lambda item: (-item[1], item[0]))
    return found


def write_vocabulary(
    words: Iterable[tuple[str, int]], out_dir: str | os.PathLike[str], *, overwrite: bool = False
) -> Path:
    """Write ``out_dir/vocabulary.txt``: one word a line, its count as a comment.
    An existing file is refused unless ``overwrite``."""
    path = Path(out_dir) / VOCABULARY_FILE
    if path.exists() and not overwrite:
        raise GuardError(f"draft lists exist already: {path}")
    path.parent.mkdir(parents=True, exist_ok=True)
    lines = [
        "# Domain vocabulary written by `guard harvest`: every word of the corpus, most\n"
        "# frequent first, with its count. Name it under [vocabulary] in a ruleset. It\n"
        "# holds whatever typos the corpus holds: keep the counts, by which real-word\n"
        "# reads a rare word one slip from a far commoner one as such a typo.\n"
    ]
    lines += [f"{w}  # count={n}\n" for w, n in words]
    path.write_text("".join(lines), encoding="utf-8")
    return path


# --- ranking by attacks ---------------------------------------------------------------


def rank_attacked(
    pairs: Iterable[tuple[str, str]], candidates: Sequence[Candidate]
) -> list[Candidate]:
    """Candidates a speller changed in ``pairs`` (``(source, proposal)``), most at risk first.

    The source is tokenized as harvesting tokenizes a corpus; a candidate occurs where
    its words are whole tokens in a row, separated by whitespace only, compared with case
    folded. It is attacked once for each rewrite (see :func:`guard.align.align`) that
    changes text inside one of its occurrences. Its score is ``attacks * ln(count)``: a
    term the speller keeps changing and the corpus uses often is the one to protect
    first, while a word seen once in the corpus scores 0 (a typo there is more likely
    than a term). Source tokens that are not among ``candidates`` (common words, or below
    the count threshold) are left out.

    >>> corpus = [Candidate(term="QSP", kind=Kind.ACRONYM, count=9, documents=3,
    ...                     zipf=1.2, g2=80.0, contexts=(), score=80.0)]
    >>> [(c.term, c.attacks) for c in rank_attacked([("QSP ok", "QSO ok")], corpus)]
    [('QSP', 1)]
    """
    index: dict[tuple[str, ...], int] = {}
    for i, c in enumerate(candidates):
        index.setdefault(tuple(w.casefold() for w in c.term.split()), i)
    longest = max((len(key) for key in index), default=0)
    attacks: Counter[int] = Counter()
    for source, proposal in pairs:
        spans = [(r.start, r.end) for r in align(source, proposal)]
        if not spans:
            continue
        words = [t for t in tokenize(source) if t.kind is not TokenKind.SPACE]
        for first in range(len(words)):
            key: tuple[str, ...] = ()
            for last in range(first, min(first + longest, len(words))):
                if last > first and not source[words[last - 1].end : words[last].start].isspace():
                    break
                key = (*key, words[last].text.casefold())
                found = index.get(key)
                if found is None:
                    continue
                lo, hi = words[first].start, words[last].end
                attacks[found] += sum(1 for s, e in spans if _touches(s, e, lo, hi))
    ranked = [
        replace(c, attacks=attacks[i], score=attacks[i] * math.log(c.count))
        for i, c in enumerate(candidates)
        if attacks[i]
    ]
    ranked.sort(key=lambda c: (-c.score, -c.attacks, -c.count, c.term))
    return ranked


def _touches(start: int, end: int, lo: int, hi: int) -> bool:
    """Whether a rewrite of [start, end) changes text inside [lo, hi)."""
    if start == end:  # an insertion: inside the term, not at its edge
        return lo < start < hi
    return start < hi and end > lo


# --- draft lists ----------------------------------------------------------------------

_HEADER = (
    "# Draft {kind} list written by `guard harvest`: best candidates first.\n"
    "# Review every line before use. A harvested list holds false candidates\n"
    "# and is never complete. Evidence after '#': corpus count, documents,\n"
    "# Zipf frequency in the language, keyness G2 (and speller attacks).\n"
)


def _expressible(term: str) -> bool:
    """Whether a term list line can hold ``term`` (docs/rulesets.md: '#' after a space)."""
    return bool(term.strip()) and not term.startswith("#") and regex.search(r"\s#", term) is None


def draft_line(c: Candidate) -> str:
    """One line of a draft list: the term, two spaces, then the evidence as a comment.

    >>> draft_line(Candidate(term="QM-4410", kind=Kind.CODE, count=12, documents=3,
    ...                      zipf=1.56, g2=143.27, contexts=(), score=143.27))
    'QM-4410  # count=12 docs=3 zipf=1.56 G2=143.3'
    """
    line = f"{c.term}  # count={c.count} docs={c.documents} zipf={c.zipf:.2f} G2={c.g2:.1f}"
    return line + (f" attacks={c.attacks}" if c.attacks else "")


def write_drafts(
    candidates: Iterable[Candidate], out_dir: str | os.PathLike[str], *, overwrite: bool = False
) -> list[Path]:
    """Write ``out_dir/terms/<kind>.txt`` for each kind present, in the given order.

    Each list starts with a comment saying it is a draft. Terms that a term list cannot
    hold (starting with '#', or with '#' after a space) are written as comments to be
    fixed by hand. Existing files are refused unless ``overwrite``; the error names them
    all. Returns the files written, in kind order.
    """
    by_kind: dict[Kind, list[Candidate]] = {}
    for c in candidates:
        by_kind.setdefault(c.kind, []).append(c)
    folder = Path(out_dir) / "terms"
    targets = {kind: folder / f"{kind.value}.txt" for kind in sorted(by_kind)}
    existing = [str(p) for p in targets.values() if p.exists()]
    if existing and not overwrite:
        raise GuardError(f"draft lists exist already: {', '.join(existing)}")
    folder.mkdir(parents=True, exist_ok=True)
    for kind, path in targets.items():
        lines = [_HEADER.format(kind=kind.value)]
        for c in by_kind[kind]:
            if _expressible(c.term) and "\n" not in c.term:
                lines.append(draft_line(c) + "\n")
            else:
                lines.append(f"# cannot be a term line as written: {c.term!r}\n")
        path.write_text("".join(lines), encoding="utf-8")
    return list(targets.values())
