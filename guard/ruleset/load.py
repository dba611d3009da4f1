"""Read rulesets: TOML settings, term/pair/critical lists, `extends`, all checked in one run.

The loader parses (never executes) each ruleset file, follows its ``extends`` chain,
reads the plain-text lists beside it, checks everything against the schema and the rule
registry, and layers the settings: the registry's defaults, then every ruleset of the
chain (parents first), then the rulesets named, in order, then command-line overrides.
Every problem is collected with its file, line (where one exists) and key path; if any is
an error, one ``RulesetError`` carries them all. Lint warnings (things that load but are
probably wrong) are returned beside the result, never raised.

Safety: nothing here runs code from a ruleset (TOML is data; regexes are compiled, not
evaluated); list paths and relative ``extends`` may not leave the ruleset's folder unless
the caller allows it; chains are at most ``Limits.max_depth`` deep; files are bounded in
size before they are read. Large parsed term lists are kept in the user's private cache
folder as plain, hash-checked data (``_TermListCache``), never as pickles.
"""

from __future__ import annotations

import contextlib
import difflib
import hashlib
import importlib
import os
import re
import stat
import sys
import tomllib
import unicodedata
from array import array
from collections.abc import Callable, Iterator, Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from types import MappingProxyType
from typing import TYPE_CHECKING, Any, cast

import regex

from guard.errors import Problem, RulesetError
from guard.records import Action, Origin
from guard.ruleset.bundled import (
    bundled_names,
    bundled_path,
    is_bundled_base,
    is_bundled_name,
    resolve_ref,
)
from guard.ruleset.model import (
    CasePolicy,
    Example,
    PairEntry,
    PatternEntry,
    RuleSettings,
    Settings,
    TermEntry,
    WordCounts,
    add_count,
    merge_counts,
)
from guard.ruleset.terms import TermTable, collapse_spaces, first_pieces
from guard.text.normalize import NormalizedText, hidden_characters, normalize_key

if TYPE_CHECKING:
    from guard.rules.base import OptionSpec, Rule

OVERRIDE_FILE = "<override>"
"""The origin file of settings given on the command line (``overrides``)."""

COMMON_WORD_ZIPF = 5.0
"""Lint: a protected term this common in a ruleset language blocks ordinary corrections.
Zipf 5 is a frequency of 100 per million words (the scale is log10 of frequency per
billion words); the cut itself is a judgement (common practice, no source)."""

_VERDICTS = ("accept", "flag", "veto")
_ACTIONS = {"veto": Action.VETO, "flag": Action.FLAG, "off": None}
_NAME_RE = re.compile(r"[A-Za-z0-9]+(?:-[A-Za-z0-9]+)*\Z")
_KIND_RE = re.compile(r"[^\s]+\Z")
# BCP 47 (RFC 5646) tags as rulesets use them: language, optional script, region and
# variants. Extended language subtags, extensions and private use are not accepted.
_LANG_RE = re.compile(
    r"(?P<lang>[A-Za-z]{2,3})(?:-(?P<script>[A-Za-z]{4}))?(?:-(?P<region>[A-Za-z]{2}|\d{3}))?"
    r"(?P<rest>(?:-(?:[A-Za-z0-9]{5,8}|\d[A-Za-z0-9]{3}))*)\Z"
)
_TOML_AT = re.compile(r"\s*\(at line (\d+), column (\d+)\)\Z")
_TOML_AT_END = re.compile(r"\s*\(at end of document\)\Z")
_EMPTY_PROBES = ("", " ", "a", "a b", "-", "0")


@dataclass(frozen=True, slots=True, kw_only=True)
class Limits:
    """Bounds that keep a hostile or mistaken ruleset from exhausting the machine."""

    max_depth: int = 16  # rulesets in one extends chain
    max_list_lines: int = 2_000_000  # lines in one term, pair or critical list
    max_term_chars: int = 512  # characters in one term or one side of a pair
    max_toml_bytes: int = 8_000_000  # size of one ruleset TOML file
    max_list_bytes: int = 256_000_000  # size of one list file
    max_patterns: int = 10_000


@dataclass(frozen=True, slots=True, kw_only=True)
class ResolvedRuleset:
    """A ruleset after ``extends`` and layering, checked, not yet compiled for matching.

    ``examples`` are the examples of the rulesets named (what `rules test` runs);
    ``parent_examples`` those of the rulesets they extend. ``meta`` holds the ruleset-level
    settings (name, description, languages, other-languages) with where each was set.
    """

    name: str
    description: str
    files: tuple[str, ...]  # every file read: ruleset TOML files and lists, chain order
    chain: tuple[str, ...]  # the ruleset TOML files applied, parents first
    languages: tuple[str, ...]
    other_languages: tuple[str, ...]
    rules: Mapping[str, RuleSettings]
    terms: TermTable  # a Sequence[TermEntry] whose entries are made when asked for
    patterns: tuple[PatternEntry, ...]
    blocked: tuple[PairEntry, ...]
    allowed: tuple[PairEntry, ...]
    critical: tuple[TermEntry, ...]
    vocabulary: Mapping[str, WordCounts]  # language -> folded words of its documents
    examples: tuple[Example, ...]
    parent_examples: tuple[Example, ...]
    meta: Mapping[str, Settings]
    warnings: tuple[Problem, ...] = ()


# ------------------------------------------------------------------ problems and lines


class _Problems:
    """Collects errors and warnings; never stops at the first."""

    def __init__(self) -> None:
        self.errors: list[Problem] = []
        self.warnings: list[Problem] = []

    def error(
        self, file: str, message: str, line: int | None = None, key: str | None = None
    ) -> None:
        self.errors.append(Problem(file=file, message=message, line=line, key=key))

    def warn(
        self, file: str, message: str, line: int | None = None, key: str | None = None
    ) -> None:
        self.warnings.append(
            Problem(file=file, message=message, line=line, key=key, severity="warning")
        )


_HEADER_ARRAY = re.compile(r"\[\[\s*([^\]]+?)\s*\]\]")
_HEADER_TABLE = re.compile(r"\[\s*([^\[\]]+?)\s*\]")
_KEY_LINE = re.compile(
    r"((?:[A-Za-z0-9_-]+|\"[^\"]*\"|'[^']*')(?:\s*\.\s*(?:[A-Za-z0-9_-]+|\"[^\"]*\"|'[^']*'))*)\s*="
)
_KEY_PART = re.compile(r"\s*(\"[^\"]*\"|'[^']*'|[A-Za-z0-9_-]+)\s*(?:\.|\Z)")


def _split_key(dotted: str) -> list[str]:
    return [p.strip("\"'") for p in _KEY_PART.findall(dotted)]


class KeyLines:
    """Where each key path of a TOML file is written: a line scan, good enough for errors.

    Array-of-tables entries are numbered as the loader names them (``terms[1].file``).
    A key not found falls back to its nearest written parent.

    >>> k = KeyLines('[ruleset]\\nname = "x"\\n\\n[[terms]]\\nfile = "a"\\n'
    ...              '[[terms]]\\nfile = "b"\\n')
    >>> k.line_of("ruleset.name"), k.line_of("terms[1].file"), k.line_of("terms[1].kind")
    (2, 7, 6)
    """

    def __init__(self, text: str) -> None:
        self._lines: dict[str, int] = {}
        prefix: list[str] = []
        counters: dict[str, int] = {}
        multiline: str | None = None
        for n, raw in enumerate(text.splitlines(), 1):
            if multiline is not None:
                if raw.count(multiline) % 2 == 1:
                    multiline = None
                continue
            line = raw.strip()
            if not line or line.startswith("#"):
                continue
            m = _HEADER_ARRAY.match(line)
            if m:
                parts = _split_key(m.group(1))
                base = ".".join(parts)
                index = counters.get(base, -1) + 1
                counters[base] = index
                prefix = [*parts[:-1], f"{parts[-1]}[{index}]"]
                self._note(prefix, n)
                continue
            m = _HEADER_TABLE.match(line)
            if m:
                prefix = _split_key(m.group(1))
                self._note(prefix, n)
                continue
            m = _KEY_LINE.match(line)
            if m:
                self._note([*prefix, *_split_key(m.group(1))], n)
                rest = line[m.end() :]
                for quote in ('"""', "'''"):
                    if rest.count(quote) % 2 == 1:
                        multiline = quote
                        break

    def _note(self, parts: list[str], n: int) -> None:
        for i in range(1, len(parts) + 1):
            self._lines.setdefault(".".join(parts[:i]), n)
        self._lines[".".join(parts)] = n

    def line_of(self, key: str) -> int | None:
        """The line of ``key`` or of its nearest parent written in the file."""
        while key:
            got = self._lines.get(key)
            if got is not None:
                return got
            cut = max(key.rfind("."), key.rfind("["))
            if cut <= 0:
                return None
            key = key[:cut]
        return None


# ------------------------------------------------------------------ one file


@dataclass(slots=True)
class _Layer:
    """What one ruleset file says, checked, before layering."""

    path: Path
    name: str = ""
    description: str | None = None
    extends: list[tuple[str, str]] = field(default_factory=list)  # (ref, key path)
    languages: tuple[str, ...] | None = None
    other_languages: tuple[str, ...] | None = None
    meta_origin: dict[str, Origin] = field(default_factory=dict)
    terms: list[TermTable] = field(default_factory=list)
    patterns: list[PatternEntry] = field(default_factory=list)
    blocked: list[PairEntry] = field(default_factory=list)
    allowed: list[PairEntry] = field(default_factory=list)
    critical: list[TermEntry] = field(default_factory=list)
    vocabulary: dict[str, dict[str, int]] = field(default_factory=dict)
    examples: list[Example] = field(default_factory=list)
    rules: dict[str, dict[str, tuple[object, Origin]]] = field(default_factory=dict)
    files: list[str] = field(default_factory=list)
    lines: KeyLines | None = None


def canonical_lang(tag: str) -> str | None:
    """A BCP 47 tag in its usual letter case, or None when it is not one.

    >>> canonical_lang("de-ch"), canonical_lang("zh-hant-tw"), canonical_lang("english")
    ('de-CH', 'zh-Hant-TW', None)
    """
    m = _LANG_RE.match(tag)
    if m is None:
        return None
    out = m.group("lang").lower()
    if m.group("script"):
        out += "-" + m.group("script").title()
    if m.group("region"):
        out += "-" + m.group("region").upper()
    return out + m.group("rest").lower()


class _FileReader:
    """Checks one ruleset TOML file and reads the lists it names."""

    def __init__(
        self,
        path: Path,
        problems: _Problems,
        registry: Mapping[str, Rule],
        limits: Limits,
        allow_outside: bool,
        lint: bool,
        use_cache: bool = False,
    ) -> None:
        self.path = path
        self.file = str(path)
        self.folder = path.parent
        self.p = problems
        self.registry = registry
        self.limits = limits
        self.allow_outside = allow_outside
        self.lint = lint
        self.use_cache = use_cache
        self.layer = _Layer(path=path)
        self.lines = KeyLines("")

    # -- helpers

    def err(self, key: str, message: str) -> None:
        self.p.error(self.file, message, self.lines.line_of(key), key)

    def origin(self, key: str) -> Origin:
        return Origin(file=self.file, line=self.lines.line_of(key), key=key)

    def want(self, key: str, value: object, kind: type | tuple[type, ...], what: str) -> bool:
        if isinstance(value, kind) and not (isinstance(value, bool) and bool not in _tuple(kind)):
            return True
        self.err(key, f"expected {what}, got {_describe(value)}")
        return False

    def str_list(self, key: str, value: object, *, allow_str: bool = False) -> list[str] | None:
        if allow_str and isinstance(value, str):
            return [value]
        if not isinstance(value, list) or not all(isinstance(v, str) for v in value):
            self.err(key, f"expected a list of strings, got {_describe(value)}")
            return None
        return list(value)

    def unknown_keys(self, key: str, table: Mapping[str, object], known: Sequence[str]) -> None:
        for k in table:
            if k not in known:
                full = f"{key}.{k}" if key else k
                self.err(
                    full,
                    f"unknown key '{k}'{_suggest(k, known)}; expected one of: {', '.join(known)}",
                )

    def contained(self, key: str, rel: str) -> Path | None:
        """``rel`` resolved against the ruleset's folder, refused if it leaves the folder."""
        try:
            target = (self.folder / rel).resolve()
        except (ValueError, RuntimeError, OSError) as e:  # a NUL in it; a symlink loop
            self.err(key, f"path {rel!r} cannot be resolved: {e}")
            return None
        if not self.allow_outside and not target.is_relative_to(self.folder.resolve()):
            self.err(
                key,
                f"path '{rel}' leaves the ruleset's folder ({self.folder}); "
                "paths in a ruleset must stay inside it",
            )
            return None
        return target

    # -- the file

    def read(self) -> _Layer | None:
        data = _read_bounded(self.path, self.limits.max_toml_bytes)
        if isinstance(data, str):
            self.p.error(self.file, f"ruleset file {data}")
            return None
        self.layer.files.append(self.file)
        try:
            text = data.decode("utf-8")
        except UnicodeDecodeError as e:
            line, col = _byte_position(data, e.start)
            self.p.error(
                self.file, f"not valid UTF-8: byte 0x{data[e.start]:02x} at column {col}", line
            )
            return None
        try:
            doc = tomllib.loads(text)
        except tomllib.TOMLDecodeError as e:
            message, at = _toml_error(str(e), text)
            self.p.error(self.file, f"TOML syntax: {message}", at)
            return None
        except RecursionError:
            self.p.error(self.file, "TOML nested too deeply to read")
            return None
        self.lines = KeyLines(text)
        self.layer.lines = self.lines
        self.check(doc)
        return self.layer

    def check(self, doc: dict[str, Any]) -> None:
        sections: dict[str, Callable[[object], None]] = {
            "ruleset": self.ruleset_table,
            "terms": self.terms,
            "patterns": self.patterns,
            "pairs": self.pairs,
            "critical": self.critical,
            "vocabulary": self.vocabulary,
            "rules": self.rules,
            "examples": self.examples,
        }
        self.unknown_keys("", doc, list(sections))
        if "ruleset" not in doc:
            self.p.error(
                self.file, "missing [ruleset] table (it needs at least a name)", 1, "ruleset"
            )
        for key, value in doc.items():
            handler = sections.get(key)
            if handler is not None:
                handler(value)
        table = doc.get("ruleset")
        if not isinstance(table, dict) or "extends" not in table:
            self.default_extends()

    def default_extends(self) -> None:
        if not is_bundled_base(self.path):
            self.layer.extends.append(("base", "ruleset.extends"))

    def ruleset_table(self, value: object) -> None:
        if not self.want("ruleset", value, dict, "a table"):
            return
        assert isinstance(value, dict)
        self.unknown_keys(
            "ruleset", value, ["name", "description", "extends", "languages", "other-languages"]
        )
        name = value.get("name")
        if name is None:
            self.err("ruleset", "missing key 'name'")
        elif self.want("ruleset.name", name, str, "a string"):
            assert isinstance(name, str)
            if not _NAME_RE.match(name):
                self.err("ruleset.name", f"name '{name}' may hold only letters, digits and '-'")
            self.layer.name = name
            self.layer.meta_origin["name"] = self.origin("ruleset.name")
        if "description" in value and self.want(
            "ruleset.description", value["description"], str, "a string"
        ):
            self.layer.description = value["description"]
            self.layer.meta_origin["description"] = self.origin("ruleset.description")
        if "extends" in value:
            refs = self.str_list("ruleset.extends", value["extends"], allow_str=True)
            for i, ref in enumerate(refs or []):
                self.layer.extends.append((ref, f"ruleset.extends[{i}]"))
        for key, attr in (("languages", "languages"), ("other-languages", "other_languages")):
            if key not in value:
                continue
            tags = self.str_list(f"ruleset.{key}", value[key])
            if tags is None:
                continue
            good: list[str] = []
            for i, tag in enumerate(tags):
                canon = canonical_lang(tag)
                if canon is None:
                    self.err(f"ruleset.{key}[{i}]", f"'{tag}' is not a BCP 47 language tag")
                else:
                    good.append(canon)
            setattr(self.layer, attr, tuple(good))
            self.layer.meta_origin[key] = self.origin(f"ruleset.{key}")

    # -- lists

    def table_array(self, key: str, value: object) -> list[dict[str, Any]]:
        if not isinstance(value, list):
            self.err(key, f"expected an array of tables ([[{key}]]), got {_describe(value)}")
            return []
        out: list[dict[str, Any]] = []
        for i, item in enumerate(value):
            if self.want(f"{key}[{i}]", item, dict, "a table"):
                out.append(item)
            else:
                out.append({})
        return out

    def terms(self, value: object) -> None:
        for i, item in enumerate(self.table_array("terms", value)):
            key = f"terms[{i}]"
            self.unknown_keys(key, item, ["file", "kind", "case"])
            kind = item.get("kind", "term")
            if self.want(f"{key}.kind", kind, str, "a string") and not _KIND_RE.match(kind):
                self.err(f"{key}.kind", f"kind '{kind}' must be one word")
                kind = "term"
            if not isinstance(kind, str):
                kind = "term"
            case_value = item.get("case", CasePolicy.EXACT.value)
            case = CasePolicy.EXACT
            if self.want(f"{key}.case", case_value, str, "a string"):
                try:
                    case = CasePolicy(case_value)
                except ValueError:
                    self.err(f"{key}.case", f"case must be 'exact' or 'fold', not '{case_value}'")
            rel = item.get("file")
            if rel is None:
                self.err(key, "missing key 'file' (the term list, relative to this ruleset)")
                continue
            if not self.want(f"{key}.file", rel, str, "a string"):
                continue
            path = self.contained(f"{key}.file", rel)
            if path is None:
                continue
            self.layer.terms.append(self.read_terms(path, f"{key}.file", kind, case))

    def read_terms(self, path: Path, key: str, kind: str, case: CasePolicy) -> TermTable:
        fold = case is CasePolicy.FOLD
        file = str(path)
        data = self.read_list(path, key)
        if data is None:
            return TermTable([], [], array("L"), [])
        cache = _TermListCache(data, fold, self.limits) if self.use_cache else None
        if cache is not None:
            got = cache.read()
            if got is not None:
                terms, keys, lines, heads = got
                return TermTable(terms, keys, lines, [(0, file, kind, case)], [heads])
        limit = self.limits.max_term_chars
        errors_before = len(self.p.errors)
        terms = []
        keys = []
        lines = array("L")
        for n, text in self.list_lines(file, data):
            if len(text) > limit:
                self.p.error(file, f"term longer than {limit} characters", n)
                continue
            if not text.isascii() or "  " in text or "\t" in text:
                text = collapse_spaces(text)
            terms.append(text)
            keys.append(normalize_key(text, fold=fold))
            lines.append(n)
        if cache is None or cache.folder is None or len(self.p.errors) > errors_before:
            return TermTable(terms, keys, lines, [(0, file, kind, case)])
        heads = first_pieces(keys)
        cache.write(terms, keys, lines, heads)
        return TermTable(terms, keys, lines, [(0, file, kind, case)], [heads])

    def read_list(self, path: Path, key: str) -> bytes | None:
        """The bytes of a list file, or None after reporting why they cannot be used."""
        data = _read_bounded(path, self.limits.max_list_bytes)
        if isinstance(data, str):
            shown = path.relative_to(self.folder) if path.is_relative_to(self.folder) else path
            self.err(key, f"list file '{shown}' {data}")
            return None
        self.layer.files.append(str(path))
        if data.count(b"\n") >= self.limits.max_list_lines:
            self.p.error(
                str(path), f"list has more than {self.limits.max_list_lines} lines (the limit)"
            )
            return None
        return data

    def list_lines(self, file: str, data: bytes) -> Iterator[tuple[int, str]]:
        """(line number, content) of every non-blank, non-comment line of a list file."""
        for n, content, _ in self.noted_lines(file, data):
            yield n, content

    def noted_lines(self, file: str, data: bytes) -> Iterator[tuple[int, str, str]]:
        """(line number, content, its comment) of every non-blank, non-comment line."""
        try:
            text = data.decode("utf-8")
        except UnicodeDecodeError as e:
            line, col = _byte_position(data, e.start)
            self.p.error(file, f"not valid UTF-8: byte 0x{data[e.start]:02x} at column {col}", line)
            return
        if text.startswith("\ufeff"):
            text = text[1:]
        # Lines end at LF (CR LF too); Unicode's other line breaks (U+2028...) are kept
        # inside a line, so that line numbers agree with editors and with the UTF-8 check.
        for n, raw in enumerate(text.split("\n"), 1):
            content = strip_comment(raw) if "#" in raw else raw.strip()
            if content:
                yield n, content, raw.strip()[len(content) :] if "#" in raw else ""

    def list_file(self, path: Path, key: str) -> Iterator[tuple[int, str]]:
        data = self.read_list(path, key)
        if data is not None:
            yield from self.list_lines(str(path), data)

    def pairs(self, value: object) -> None:
        if not self.want("pairs", value, dict, "a table"):
            return
        assert isinstance(value, dict)
        self.unknown_keys("pairs", value, ["blocked", "allowed"])
        for which in ("blocked", "allowed"):
            if which not in value:
                continue
            key = f"pairs.{which}"
            files = self.str_list(key, value[which], allow_str=True)
            for i, rel in enumerate(files or []):
                item_key = key if isinstance(value[which], str) else f"{key}[{i}]"
                path = self.contained(item_key, rel)
                if path is not None:
                    target = self.layer.blocked if which == "blocked" else self.layer.allowed
                    target.extend(self.read_pairs(path, item_key))

    def read_pairs(self, path: Path, key: str) -> Iterator[PairEntry]:
        file = str(path)
        for n, text in self.list_file(path, key):
            parts = text.split("=>")
            if len(parts) != 2 or not parts[0].strip() or not parts[1].strip():
                self.p.error(file, f"expected one pair 'old => new', got '{text}'", n)
                continue
            old, new = collapse_spaces(parts[0]), collapse_spaces(parts[1])
            if max(len(old), len(new)) > self.limits.max_term_chars:
                self.p.error(
                    file, f"pair side longer than {self.limits.max_term_chars} characters", n
                )
                continue
            yield PairEntry(
                old=old,
                new=new,
                old_key=normalize_key(old, fold=True),
                new_key=normalize_key(new, fold=True),
                origin=Origin(file=file, line=n),
            )

    def critical(self, value: object) -> None:
        if not self.want("critical", value, dict, "a table"):
            return
        assert isinstance(value, dict)
        self.unknown_keys("critical", value, ["files"])
        if "files" not in value:
            return
        files = self.str_list("critical.files", value["files"], allow_str=True)
        for i, rel in enumerate(files or []):
            key = "critical.files" if isinstance(value["files"], str) else f"critical.files[{i}]"
            path = self.contained(key, rel)
            if path is None:
                continue
            file = str(path)
            for n, text in self.list_file(path, key):
                word = collapse_spaces(text)
                self.layer.critical.append(
                    TermEntry(
                        term=word,
                        key=normalize_key(word, fold=True),
                        kind="critical",
                        case=CasePolicy.FOLD,
                        origin=Origin(file=file, line=n),
                    )
                )

    def vocabulary(self, value: object) -> None:
        """``[vocabulary]``: per language, word lists of the team's own documents (what
        `guard harvest --out` writes as vocabulary.txt). Not protected terms: evidence that
        a word belongs to the domain, read by the frequency rules. A line may give the
        word's count in the documents in its comment, ``word  # count=12``, as the harvest
        writes it: a word the documents use rarely next to one they use all the time may
        be their own typo (see real-word)."""
        if not self.want("vocabulary", value, dict, "a table"):
            return
        assert isinstance(value, dict)
        for tag, files_value in value.items():
            key = f"vocabulary.{tag}"
            lang = canonical_lang(tag)
            if lang is None:
                self.err(key, f"'{tag}' is not a language tag (BCP 47, e.g. en or de-CH)")
                continue
            files = self.str_list(key, files_value, allow_str=True)
            words = self.layer.vocabulary.setdefault(lang, {})
            for i, rel in enumerate(files or []):
                item_key = key if isinstance(files_value, str) else f"{key}[{i}]"
                path = self.contained(item_key, rel)
                if path is None:
                    continue
                data = self.read_list(path, item_key)
                if data is None:
                    continue
                for _, text, note in self.noted_lines(str(path), data):
                    got = _COUNT_NOTE.search(note)
                    word = normalize_key(collapse_spaces(text), fold=True)
                    add_count(words, word, int(got.group(1)) if got else 0)

    # -- patterns

    def patterns(self, value: object) -> None:
        items = self.table_array("patterns", value)
        if len(items) > self.limits.max_patterns:
            self.err("patterns", f"more than {self.limits.max_patterns} patterns (the limit)")
            return
        seen: dict[str, str] = {}
        for i, item in enumerate(items):
            key = f"patterns[{i}]"
            self.unknown_keys(key, item, ["name", "regex", "kind"])
            name, source = item.get("name"), item.get("regex")
            kind = item.get("kind", "pattern")
            ok = True
            for k, v in (("name", name), ("regex", source)):
                if v is None:
                    self.err(key, f"missing key '{k}'")
                    ok = False
                elif not self.want(f"{key}.{k}", v, str, "a string"):
                    ok = False
            if not self.want(f"{key}.kind", kind, str, "a string"):
                ok = False
            if not ok:
                continue
            assert isinstance(name, str) and isinstance(source, str) and isinstance(kind, str)
            if name in seen:
                self.err(f"{key}.name", f"pattern name '{name}' is used twice (also {seen[name]})")
                continue
            seen[name] = key
            compiled = self.compile_pattern(f"{key}.regex", source)
            if compiled is None:
                continue
            entry = PatternEntry(
                name=name, source=source, compiled=compiled, kind=kind, origin=self.origin(key)
            )
            self.layer.patterns.append(entry)
            if self.lint and _matches_empty(source, compiled):
                self.p.warn(
                    self.file,
                    f"pattern '{name}' matches the empty string: it protects nothing visible "
                    "and may mark every position",
                    self.lines.line_of(f"{key}.regex"),
                    f"{key}.regex",
                )

    def compile_pattern(self, key: str, source: str) -> regex.Pattern[str] | None:
        if not source:
            self.err(key, "empty regex")
            return None
        try:
            compiled = regex.compile(source)
        except (regex.error, OverflowError, RecursionError) as e:
            self.err(key, f"invalid regex: {e}")
            return None
        checks = _pattern_checks()
        if checks is not None:
            for risk in checks.static_risks(source):
                if risk.startswith("not analysed"):
                    continue  # the structure is unknown, not risky: probing decides (lint)
                self.err(key, f"regex can backtrack catastrophically: {risk}")
            if self.lint:
                slow = checks.probe(compiled)
                if slow:
                    self.err(key, f"regex is too slow on an adversarial input: {slow}")
        return compiled

    # -- rules

    def rules(self, value: object) -> None:
        if not self.want("rules", value, dict, "a table"):
            return
        assert isinstance(value, dict)
        for rule_name, table in value.items():
            key = f"rules.{rule_name}"
            rule = self.registry.get(rule_name)
            if rule is None:
                self.err(
                    key, f"unknown rule '{rule_name}'{_suggest(rule_name, list(self.registry))}"
                )
                continue
            if not self.want(key, table, dict, "a table"):
                continue
            settings = self.layer.rules.setdefault(rule_name, {})
            for opt, v in table.items():
                okey = f"{key}.{opt}"
                if opt == "action":
                    if not isinstance(v, str) or v not in _ACTIONS:
                        self.err(okey, f"action must be one of veto, flag, off; got {_describe(v)}")
                    else:
                        settings["action"] = (_ACTIONS[v], self.origin(okey))
                elif opt == "lang":
                    self.rule_langs(rule, okey, v, settings)
                else:
                    spec = rule.options.get(opt)
                    if spec is None:
                        self.err(okey, _unknown_option(rule, opt))
                        continue
                    ok, coerced, why = coerce_option(v, spec)
                    if not ok:
                        self.err(okey, why)
                    else:
                        settings[opt] = (coerced, self.origin(okey))

    def rule_langs(
        self, rule: Rule, key: str, value: object, settings: dict[str, tuple[object, Origin]]
    ) -> None:
        if not self.want(key, value, dict, "a table of language tags"):
            return
        assert isinstance(value, dict)
        for tag, table in value.items():
            tkey = f"{key}.{tag}"
            canon = canonical_lang(tag)
            if canon is None:
                self.err(tkey, f"'{tag}' is not a BCP 47 language tag")
                continue
            if not self.want(tkey, table, dict, "a table"):
                continue
            for opt, v in table.items():
                okey = f"{tkey}.{opt}"
                spec = rule.options.get(opt)
                if spec is None:
                    self.err(okey, _unknown_option(rule, opt))
                    continue
                if not spec.per_lang:
                    self.err(
                        okey, f"option '{opt}' of rule '{rule.name}' cannot be set per language"
                    )
                    continue
                ok, coerced, why = coerce_option(v, spec)
                if not ok:
                    self.err(okey, why)
                else:
                    settings[f"lang.{canon}.{opt}"] = (coerced, self.origin(okey))

    # -- examples

    def examples(self, value: object) -> None:
        for i, item in enumerate(self.table_array("examples", value)):
            key = f"examples[{i}]"
            self.unknown_keys(key, item, ["source", "proposal", "lang", "expect", "rewrites"])
            ok = True
            texts: dict[str, str] = {}
            for k in ("source", "proposal", "expect"):
                v = item.get(k)
                if v is None:
                    self.err(key, f"missing key '{k}'")
                    ok = False
                elif self.want(f"{key}.{k}", v, str, "a string"):
                    texts[k] = v
                else:
                    ok = False
            expect = texts.get("expect")
            if expect is not None and expect not in _VERDICTS:
                self.err(
                    f"{key}.expect", f"expect must be one of {', '.join(_VERDICTS)}; got '{expect}'"
                )
                ok = False
            lang: str | None = None
            if "lang" in item and self.want(f"{key}.lang", item["lang"], str, "a string"):
                lang = canonical_lang(item["lang"])
                if lang is None:
                    self.err(f"{key}.lang", f"'{item['lang']}' is not a BCP 47 language tag")
                    ok = False
            elif "lang" in item:
                ok = False
            rewrites: tuple[str, ...] | None = None
            if "rewrites" in item:
                got = self.str_list(f"{key}.rewrites", item["rewrites"])
                if got is None:
                    ok = False
                else:
                    for j, v in enumerate(got):
                        if v not in _VERDICTS:
                            self.err(
                                f"{key}.rewrites[{j}]",
                                f"a rewrite's verdict is one of {', '.join(_VERDICTS)}; got '{v}'",
                            )
                            ok = False
                    rewrites = tuple(got)
            if ok:
                self.layer.examples.append(
                    Example(
                        source=texts["source"],
                        proposal=texts["proposal"],
                        lang=lang,
                        expect=texts["expect"],
                        rewrites=rewrites,
                        origin=self.origin(key),
                    )
                )


# ------------------------------------------------------------------ helpers


_COUNT_NOTE = re.compile(r"\bcount=(\d+)")  # a vocabulary line's count, as harvest writes it


def strip_comment(raw: str) -> str:
    """A list line without its comment and surrounding whitespace.

    ``#`` starts a comment at the start of a line or after whitespace; elsewhere it is
    part of the term (``C#``, ``F#``).

    >>> strip_comment("C#  # a language"), strip_comment("# note"), strip_comment(" x ")
    ('C#', '', 'x')
    """
    if "#" not in raw:
        return raw.strip()
    text = raw.strip()
    if text.startswith("#"):
        return ""
    m = re.search(r"\s#", text)
    return (text[: m.start()] if m else text).strip()


def coerce_option(value: object, spec: OptionSpec) -> tuple[bool, object, str]:
    """(ok, value, why-not) for a rule option: TOML ints pass as floats, lists as tuples.

    A bool never passes for a number, though Python counts it as an int.
    """
    kinds = _tuple(spec.type)
    if isinstance(value, bool) and bool not in kinds:
        return False, value, f"expected {_type_names(kinds)}, got {_describe(value)}"
    if float in kinds and type(value) is int:
        return True, float(value), ""
    if tuple in kinds and isinstance(value, list) and list not in kinds:
        return True, tuple(value), ""
    if isinstance(value, kinds):
        if spec.choices is not None and value not in spec.choices:
            allowed = ", ".join(repr(c) for c in spec.choices)
            return False, value, f"expected one of {allowed}, got {value!r}"
        return True, value, ""
    return False, value, f"expected {_type_names(kinds)}, got {_describe(value)}"


def _tuple(kind: type | tuple[type, ...]) -> tuple[type, ...]:
    return kind if isinstance(kind, tuple) else (kind,)


def _type_names(kinds: tuple[type, ...]) -> str:
    names = {
        bool: "true or false",
        int: "an integer",
        float: "a number",
        str: "a string",
        list: "a list",
        tuple: "a list",
        dict: "a table",
    }
    return " or ".join(dict.fromkeys(names.get(k, k.__name__) for k in kinds))


def _describe(value: object) -> str:
    kind = {
        bool: "a boolean",
        int: "an integer",
        float: "a number",
        str: "a string",
        list: "a list",
        dict: "a table",
    }.get(type(value), type(value).__name__)
    shown = repr(value)
    return f"{kind} ({shown})" if len(shown) <= 40 and not isinstance(value, dict) else kind


def _suggest(word: str, choices: Sequence[str]) -> str:
    close = difflib.get_close_matches(word, list(choices), n=1)
    return f" (did you mean '{close[0]}'?)" if close else ""


def _unknown_option(rule: Rule, opt: str) -> str:
    known = ", ".join(["action", *rule.options])
    hint = _suggest(opt, list(rule.options))
    return f"rule '{rule.name}' has no option '{opt}'{hint}; it has: {known}"


def _read_bounded(path: Path, limit: int) -> bytes | str:
    """The bytes of ``path``, or what is wrong ("not found", "is larger than ...")."""
    try:
        mode = path.stat().st_mode
    except FileNotFoundError:
        return "not found"
    except OSError as e:
        return f"cannot be read: {e.strerror or e}"
    if not (stat.S_ISREG(mode) or stat.S_ISDIR(mode)):
        # a pipe would block the open until someone writes; a device may never end
        return "is not a regular file"
    try:
        with path.open("rb") as fh:
            size = os.fstat(fh.fileno()).st_size
            if size > limit:
                return f"is larger than {limit} bytes (the limit)"
            data = fh.read(limit + 1)
    except FileNotFoundError:
        return "not found"
    except OSError as e:
        return f"cannot be read: {e.strerror or e}"
    if len(data) > limit:
        return f"is larger than {limit} bytes (the limit)"
    return data


def _byte_position(data: bytes, offset: int) -> tuple[int, int]:
    line = data.count(b"\n", 0, offset) + 1
    col = offset - (data.rfind(b"\n", 0, offset) + 1) + 1
    return line, col


def _toml_error(message: str, text: str) -> tuple[str, int | None]:
    m = _TOML_AT.search(message)
    if m:
        return message[: m.start()], int(m.group(1))
    m = _TOML_AT_END.search(message)
    if m:
        return message[: m.start()] + " (at the end of the file)", max(1, len(text.splitlines()))
    return message, None


def _matches_empty(source: str, compiled: regex.Pattern[str]) -> bool:
    checks = _pattern_checks()
    if checks is not None:
        return checks.matches_empty(source)
    try:
        return any(
            m.start() == m.end()
            for probe in _EMPTY_PROBES
            for m in compiled.finditer(probe, timeout=0.05)
        )
    except (TimeoutError, MemoryError, RecursionError):
        return False


class _PatternChecks:
    """The interface of guard.vocab.patterns this loader uses."""

    static_risks: Callable[[str], list[str]]
    probe: Callable[[regex.Pattern[str]], str | None]
    matches_empty: Callable[[str], bool]


def _pattern_checks() -> _PatternChecks | None:
    try:
        mod: Any = importlib.import_module("guard.vocab.patterns")
    except ModuleNotFoundError as e:
        if e.name in {"guard.vocab.patterns", "guard.vocab"}:
            return None
        raise
    if not all(hasattr(mod, f) for f in ("static_risks", "probe", "matches_empty")):
        return None
    checks: _PatternChecks = mod
    return checks


class _TermListCache:
    """A parsed term list kept in the private cache folder, keyed by the list's bytes.

    Parsing a large list (comments, spaces, NFC and case folding of every line, cutting
    keys into pieces) is most of the cost of loading a big ruleset; a list that parsed
    without a problem is stored as columns (line numbers, terms, keys unless they are the
    terms themselves, and the keys' first pieces with their counts) and read back with a
    few splits. The key holds everything the columns depend on: the list's SHA-256, the
    case policy, the term length limit and the Unicode version of the normalization.
    Small lists are not worth a file.
    """

    MIN_LINES = 5_000
    FORMAT = "guard-terms 2"
    KEEP = 16
    """Term-list files kept in the cache folder: each edit of a large list makes a new
    one, so writing one deletes all but the most recently used ``KEEP``."""

    def __init__(self, data: bytes, fold: bool, limits: Limits) -> None:
        from guard.ruleset.lexicon import cache_dir

        self.folder = cache_dir() if data.count(b"\n") >= self.MIN_LINES else None
        digest = hashlib.sha256(data)
        digest.update(f"|{fold}|{limits.max_term_chars}|{unicodedata.unidata_version}".encode())
        self.name = f"terms-{digest.hexdigest()[:32]}.txt"

    def read(
        self,
    ) -> tuple[list[str], list[NormalizedText], array[int], dict[str, int]] | None:
        """(terms, keys, lines, first pieces) as written, or None."""
        from guard.ruleset.lexicon import read_private

        if self.folder is None:
            return None
        file = self.folder / self.name
        got = read_private(file, self.FORMAT)
        if got is None:
            return None
        with contextlib.suppress(OSError):
            os.utime(file)  # used now: the last file pruning would delete
        fields, body = got
        if len(fields) != 5 or not all(f.isdigit() for f in fields):
            return None
        n, n_heads, terms_size, keys_size, heads_size = map(int, fields)
        lines, counts = array("L"), array("H")
        at = lines.itemsize * n + counts.itemsize * n_heads
        if len(body) < at:  # a file that says more than it holds is not used
            return None
        lines.frombytes(body[: lines.itemsize * n])
        counts.frombytes(body[lines.itemsize * n : at])
        if sys.byteorder != "little":
            lines.byteswap()
            counts.byteswap()
        try:
            text = body[at:].decode("utf-8")
        except UnicodeDecodeError:
            return None
        if len(text) != terms_size + keys_size + heads_size:
            return None
        terms = text[:terms_size].split("\n") if n else []
        # keys were made by normalize_key when the list was parsed; the body's hash and
        # the cache key (which holds the Unicode version) vouch that they still are its.
        # No keys stored: each key is its term (exact NFC terms, most lists).
        keys = text[terms_size + 1 : terms_size + keys_size].split("\n") if keys_size else terms
        heads = text[terms_size + keys_size + 1 :].split("\n") if n_heads else []
        if not len(terms) == len(keys) == len(lines) == n or len(heads) != n_heads:
            return None
        return terms, cast(list[NormalizedText], keys), lines, dict(zip(heads, counts, strict=True))

    def write(
        self,
        terms: list[str],
        keys: list[NormalizedText],
        lines: array[int],
        heads: Mapping[str, int],
    ) -> None:
        from guard.ruleset.lexicon import write_private

        if self.folder is None or not terms:
            return
        column = array("L", lines)
        counts = array("H", heads.values())
        if sys.byteorder != "little":
            column.byteswap()
            counts.byteswap()
        text_terms = "\n".join(terms)
        # "\n" leads the keys (and heads) section, so an empty section is an empty string
        text_keys = "" if keys == terms else "\n" + "\n".join(keys)
        text_heads = "\n" + "\n".join(heads) if heads else ""
        body = column.tobytes() + counts.tobytes()
        body += (text_terms + text_keys + text_heads).encode("utf-8")
        fields = [len(terms), len(heads), len(text_terms), len(text_keys), len(text_heads)]
        write_private(self.folder / self.name, self.FORMAT, [str(f) for f in fields], body)
        _prune(self.folder, "terms-*.txt", self.KEEP)


def _prune(folder: Path, pattern: str, keep: int) -> None:
    """Delete all but the ``keep`` most recently used (modified) files of ``pattern`` in
    ``folder``: term-list files of lists since edited, or of an older format, are never read
    again. Errors are ignored, as a cache that cannot be pruned only costs disk."""
    dated: list[tuple[float, Path]] = []
    for file in folder.glob(pattern):
        with contextlib.suppress(OSError):
            dated.append((file.lstat().st_mtime, file))
    dated.sort(reverse=True)
    for _, file in dated[keep:]:
        with contextlib.suppress(OSError):
            file.unlink()


# ------------------------------------------------------------------ the chain


class _Resolver:
    def __init__(
        self,
        registry: Mapping[str, Rule],
        limits: Limits,
        allow_outside: bool,
        lint: bool,
        use_cache: bool,
    ) -> None:
        self.registry = registry
        self.limits = limits
        self.allow_outside = allow_outside
        self.lint = lint
        self.use_cache = use_cache
        self.p = _Problems()
        self.parsed: dict[Path, _Layer | None] = {}
        self.order: list[_Layer] = []
        self.done: set[Path] = set()

    def layer(self, path: Path) -> _Layer | None:
        if path not in self.parsed:
            reader = _FileReader(
                path,
                self.p,
                self.registry,
                self.limits,
                self.allow_outside,
                self.lint,
                use_cache=self.use_cache,
            )
            self.parsed[path] = reader.read()
        return self.parsed[path]

    def visit(self, path: Path, stack: list[Path]) -> None:
        if path in self.done:
            return
        if len(stack) >= self.limits.max_depth:
            self.p.error(
                str(path),
                f"extends chain deeper than {self.limits.max_depth} rulesets: "
                + " -> ".join(str(p) for p in [*stack, path]),
            )
            return
        layer = self.layer(path)
        if layer is None:
            return
        stack = [*stack, path]
        for ref, key in layer.extends:
            target = self.extends_target(layer, ref, key)
            if target is None:
                continue
            if target in stack:
                chain = [*stack[stack.index(target) :], target]
                self.p.error(
                    str(layer.path),
                    "extends cycle: " + " -> ".join(str(p) for p in chain),
                    _line(layer, key),
                    key,
                )
                continue
            self.visit(target, stack)
        if path not in self.done:
            self.done.add(path)
            self.order.append(layer)

    def extends_target(self, layer: _Layer, ref: str, key: str) -> Path | None:
        file = str(layer.path)
        if is_bundled_name(ref):
            target = bundled_path(ref)
            if not target.is_file():
                known = ", ".join(bundled_names()) or "none"
                self.p.error(
                    file,
                    f"no bundled ruleset named '{ref}' (bundled: {known})",
                    _line(layer, key),
                    key,
                )
                return None
            return target.resolve()
        try:
            target = resolve_ref(ref, layer.path.parent)
        except (ValueError, RuntimeError, OSError) as e:  # a NUL in it; a symlink loop
            self.p.error(
                file, f"extends path {ref!r} cannot be resolved: {e}", _line(layer, key), key
            )
            return None
        folder = layer.path.parent.resolve()
        if not self.allow_outside and not target.is_relative_to(folder):
            self.p.error(
                file,
                f"extends path '{ref}' leaves the ruleset's folder ({folder}); "
                "name a bundled ruleset or a file inside the folder",
                _line(layer, key),
                key,
            )
            return None
        if not target.is_file():
            self.p.error(file, f"extended ruleset not found: {target}", _line(layer, key), key)
            return None
        return target

    def root(self, refs: Sequence[str | Path]) -> list[_Layer]:
        """Visit the rulesets named; return their layers (what `rules test` tests)."""
        named: list[_Layer] = []
        for ref in refs:
            target = self.ref_target(ref)
            if target is None:
                continue
            self.visit(target, [])
            got = self.parsed.get(target)
            if got is not None and all(got is not n for n in named):
                named.append(got)
        return named

    def ref_target(self, ref: str | Path) -> Path | None:
        if is_bundled_name(ref):
            target = bundled_path(str(ref))
            if not target.is_file():
                known = ", ".join(bundled_names()) or "none"
                self.p.error(str(ref), f"no bundled ruleset named '{ref}' (bundled: {known})")
                return None
            return target.resolve()
        try:
            target = resolve_ref(ref, None)
        except (ValueError, RuntimeError, OSError) as e:  # a NUL in it; a symlink loop
            self.p.error(str(ref), f"ruleset path cannot be resolved: {e}")
            return None
        if not target.is_file():
            self.p.error(str(target), "ruleset file not found")
            return None
        return target


def _line(layer: _Layer, key: str) -> int | None:
    return layer.lines.line_of(key) if layer.lines is not None else None


# ------------------------------------------------------------------ layering


def _defaults(registry: Mapping[str, Rule]) -> dict[str, dict[str, tuple[object, Origin | None]]]:
    out: dict[str, dict[str, tuple[object, Origin | None]]] = {}
    for name, rule in registry.items():
        table: dict[str, tuple[object, Origin | None]] = {"action": (rule.default_action, None)}
        for opt, spec in rule.options.items():
            table[opt] = (spec.default, None)
        out[name] = table
    return out


def _apply_overrides(
    overrides: Mapping[str, object],
    registry: Mapping[str, Rule],
    merged: dict[str, dict[str, tuple[object, Origin | None]]],
    p: _Problems,
) -> None:
    for key, raw in overrides.items():
        parts = key.split(".")
        origin = Origin(file=OVERRIDE_FILE, key=key)
        if (
            len(parts) not in (3, 5)
            or parts[0] != "rules"
            or (len(parts) == 5 and parts[2] != "lang")
        ):
            p.error(
                OVERRIDE_FILE,
                "override keys look like rules.<rule>.<option>, rules.<rule>.action or "
                "rules.<rule>.lang.<tag>.<option>",
                key=key,
            )
            continue
        rule = registry.get(parts[1])
        if rule is None:
            p.error(
                OVERRIDE_FILE,
                f"unknown rule '{parts[1]}'{_suggest(parts[1], list(registry))}",
                key=key,
            )
            continue
        opt = parts[-1]
        if len(parts) == 3 and opt == "action":
            if not isinstance(raw, str) or raw not in _ACTIONS:
                p.error(
                    OVERRIDE_FILE,
                    f"action must be one of veto, flag, off; got {_describe(raw)}",
                    key=key,
                )
            else:
                merged[rule.name]["action"] = (_ACTIONS[raw], origin)
            continue
        spec = rule.options.get(opt)
        if spec is None:
            p.error(OVERRIDE_FILE, _unknown_option(rule, opt), key=key)
            continue
        slot = opt
        if len(parts) == 5:
            canon = canonical_lang(parts[3])
            if canon is None:
                p.error(OVERRIDE_FILE, f"'{parts[3]}' is not a BCP 47 language tag", key=key)
                continue
            if not spec.per_lang:
                p.error(
                    OVERRIDE_FILE,
                    f"option '{opt}' of rule '{rule.name}' cannot be set per language",
                    key=key,
                )
                continue
            slot = f"lang.{canon}.{opt}"
        value = _parse_override(raw, spec)
        ok, coerced, why = coerce_option(value, spec)
        if not ok:
            p.error(OVERRIDE_FILE, why, key=key)
        else:
            merged[rule.name][slot] = (coerced, origin)


def _parse_override(raw: object, spec: OptionSpec) -> object:
    """A command-line string read as a TOML value when the option is not a string."""
    if not isinstance(raw, str) or str in _tuple(spec.type):
        return raw
    try:
        return tomllib.loads(f"v = {raw}")["v"]
    except tomllib.TOMLDecodeError:
        return raw


def _settings(
    registry: Mapping[str, Rule], merged: dict[str, dict[str, tuple[object, Origin | None]]]
) -> dict[str, RuleSettings]:
    out: dict[str, RuleSettings] = {}
    for name, table in merged.items():
        options: dict[str, object] = {}
        per_lang: dict[str, dict[str, object]] = {}
        origins: dict[str, Origin] = {}
        action: Action | None = None
        for key, (value, origin) in table.items():
            if origin is not None:
                origins[key] = origin
            if key == "action":
                action = value if isinstance(value, Action) else None
            elif key.startswith("lang."):
                _, tag, opt = key.split(".", 2)
                per_lang.setdefault(tag, {})[opt] = value
            else:
                options[key] = value
        assert set(options) >= set(registry[name].options)
        out[name] = RuleSettings(
            name=name,
            action=action,
            options=MappingProxyType(options),
            per_lang=MappingProxyType({t: MappingProxyType(d) for t, d in per_lang.items()}),
            origins=MappingProxyType(origins),
        )
    return out


# ------------------------------------------------------------------ lint across the chain


def _lint(resolved: ResolvedRuleset, p: _Problems) -> None:
    from guard.text.shape import is_mixed_script

    seen: dict[tuple[CasePolicy, str], TermEntry] = {}
    for e in resolved.terms:
        first = seen.setdefault((e.case, e.key), e)
        if first is not e:
            p.warn(
                e.origin.file,
                f"duplicate term '{e.term}' (first at {first.origin})",
                e.origin.line,
            )
        if not e.term.isascii():
            hidden = hidden_characters(e.term)
            if hidden:
                names = ", ".join(
                    f"U+{ord(ch):04X} {unicodedata.name(ch, '?')}" for _, ch in hidden
                )
                p.warn(
                    e.origin.file,
                    f"term '{e.term}' holds invisible characters: {names}",
                    e.origin.line,
                )
            if is_mixed_script(e.term):
                p.warn(
                    e.origin.file,
                    f"term '{e.term}' mixes scripts (look-alike letters?)",
                    e.origin.line,
                )
    critical: dict[tuple[str, str], TermEntry] = {}
    for e in resolved.critical:
        # Across lists a word may rightly repeat (a negation in two languages' lists).
        first = critical.setdefault((e.origin.file, e.key), e)
        if first is not e:
            p.warn(
                e.origin.file,
                f"duplicate critical word '{e.term}' (first at {first.origin})",
                e.origin.line,
            )
    blocked = {(b.old_key, b.new_key): b for b in resolved.blocked}
    exact: dict[str, TermEntry] = {}
    fold: dict[str, TermEntry] = {}
    for e in resolved.terms:
        (exact if e.case is CasePolicy.EXACT else fold).setdefault(e.key, e)
    for a in resolved.allowed:
        also = blocked.get((a.old_key, a.new_key))
        if also is not None:
            p.warn(
                a.origin.file,
                f"pair '{a.old} => {a.new}' is both allowed and blocked "
                f"(blocked at {also.origin}); the block wins",
                a.origin.line,
            )
        term = exact.get(normalize_key(a.old, fold=False)) or fold.get(a.old_key)
        if term is not None:
            p.warn(
                a.origin.file,
                f"allowed pair rewrites protected term '{term.term}' ({term.origin}): "
                "the pair would let the term be changed",
                a.origin.line,
            )
    _lint_common_words(resolved, p)


def _lint_common_words(resolved: ResolvedRuleset, p: _Problems) -> None:
    from guard.ruleset.lexicon import get_lexicon

    langs = resolved.languages or ("en",)
    lexicons = [
        lex for lex in (get_lexicon(lang) for lang in dict.fromkeys(langs)) if lex is not None
    ]
    if not lexicons:
        return
    for e in resolved.terms:
        if " " in e.key or (e.case is CasePolicy.EXACT and e.term != e.term.lower()):
            continue  # an exact-case capitalised term only guards that spelling
        for lex in lexicons:
            z = lex.zipf(e.term)
            if z >= COMMON_WORD_ZIPF:
                p.warn(
                    e.origin.file,
                    f"protected term '{e.term}' is a very common word in {lex.lang} "
                    f"(Zipf {z:.2f}, wordfreq): protecting it blocks ordinary corrections",
                    e.origin.line,
                )
                break


# ------------------------------------------------------------------ entry points


def resolve(
    refs: Sequence[str | Path],
    *,
    overrides: Mapping[str, object] | None = None,
    registry: Mapping[str, Rule] | None = None,
    allow_outside: bool = False,
    lint: bool = False,
    limits: Limits | None = None,
    use_cache: bool = True,
) -> tuple[ResolvedRuleset | None, list[Problem], list[Problem]]:
    """(resolved ruleset or None, errors, warnings): never raises for a ruleset's faults.

    ``use_cache`` keeps large parsed term lists in the private cache folder (see
    ``_TermListCache``; ``GUARD_NO_CACHE=1`` also turns it off)."""
    if registry is None:
        from guard.rules import REGISTRY

        registry = REGISTRY
    res = _Resolver(registry, limits or Limits(), allow_outside, lint, use_cache)
    if not refs:
        res.p.error("<rulesets>", "no ruleset named")
        return None, res.p.errors, res.p.warnings
    named = res.root(refs)
    merged = _defaults(registry)
    meta: dict[str, Settings] = {}
    languages: tuple[str, ...] = ()
    other: tuple[str, ...] = ()
    terms: list[TermTable] = []
    patterns: dict[str, PatternEntry] = {}
    blocked: list[PairEntry] = []
    allowed: list[PairEntry] = []
    critical: list[TermEntry] = []
    vocabulary: dict[str, dict[str, int]] = {}
    examples: list[Example] = []
    parent_examples: list[Example] = []
    files: list[str] = []
    for layer in res.order:
        files.extend(layer.files)
        for rule_name, table in layer.rules.items():
            for key, (value, origin) in table.items():
                merged[rule_name][key] = (value, origin)
        if layer.languages is not None:
            languages = layer.languages
            meta["languages"] = Settings(value=languages, origin=layer.meta_origin["languages"])
        if layer.other_languages is not None:
            other = layer.other_languages
            meta["other-languages"] = Settings(
                value=other, origin=layer.meta_origin["other-languages"]
            )
        terms.extend(layer.terms)
        for pat in layer.patterns:
            patterns.pop(pat.name, None)  # a child's pattern of the same name replaces the parent's
            patterns[pat.name] = pat
        blocked.extend(layer.blocked)
        allowed.extend(layer.allowed)
        critical.extend(layer.critical)
        for lang, counted in layer.vocabulary.items():
            merge_counts(vocabulary.setdefault(lang, {}), counted)
        is_named = any(layer is n for n in named)
        (examples if is_named else parent_examples).extend(layer.examples)
    if overrides:
        _apply_overrides(overrides, registry, merged, res.p)
    names = [layer.name for layer in named]
    descriptions = [layer.description for layer in named if layer.description]
    for layer in named:
        if "name" in layer.meta_origin:
            meta.setdefault(
                "name", Settings(value="+".join(names), origin=layer.meta_origin["name"])
            )
        if "description" in layer.meta_origin:
            meta["description"] = Settings(
                value="; ".join(descriptions), origin=layer.meta_origin["description"]
            )
    resolved = ResolvedRuleset(
        name="+".join(names),
        description="; ".join(descriptions),
        files=tuple(dict.fromkeys(files)),
        chain=tuple(str(layer.path) for layer in res.order),
        languages=languages,
        other_languages=other,
        rules=MappingProxyType(_settings(registry, merged)),
        terms=TermTable.join(terms),
        patterns=tuple(patterns.values()),
        blocked=tuple(blocked),
        allowed=tuple(allowed),
        critical=tuple(critical),
        vocabulary=MappingProxyType({k: MappingProxyType(v) for k, v in vocabulary.items()}),
        examples=tuple(examples),
        parent_examples=tuple(parent_examples),
        meta=MappingProxyType(meta),
    )
    if lint:
        _lint(resolved, res.p)
        for lang in (*languages, *other):
            from guard.ruleset.lexicon import wordfreq_language

            if wordfreq_language(lang) is None:
                origin = meta["languages" if lang in languages else "other-languages"].origin
                res.p.warn(
                    origin.file,
                    f"wordfreq has no word list for '{lang}': rules that need word "
                    "frequencies have no evidence in it",
                    origin.line,
                    origin.key,
                )
    errors, warnings = _ordered(res.p.errors), _ordered(res.p.warnings)
    if errors:
        return None, errors, warnings
    final = ResolvedRuleset(**{**_fields(resolved), "warnings": tuple(warnings)})
    return final, errors, warnings


def _ordered(problems: list[Problem]) -> list[Problem]:
    """By file, then line: a reader fixes a file top to bottom."""
    return sorted(problems, key=lambda p: (p.file, p.line or 0))


def _fields(r: ResolvedRuleset) -> dict[str, Any]:
    return {name: getattr(r, name) for name in ResolvedRuleset.__dataclass_fields__}


def load_sources(
    refs: Sequence[str | Path],
    *,
    overrides: Mapping[str, object] | None = None,
    registry: Mapping[str, Rule] | None = None,
    allow_outside: bool = False,
    lint: bool = False,
    limits: Limits | None = None,
    use_cache: bool = True,
) -> ResolvedRuleset:
    """Read, check and layer rulesets named by bundled name or path (several act as one).

    Raises RulesetError carrying every error found; lint warnings (only computed with
    ``lint=True``, as some need word frequencies) ride on the result's ``warnings``.
    """
    resolved, errors, _ = resolve(
        refs,
        overrides=overrides,
        registry=registry,
        allow_outside=allow_outside,
        lint=lint,
        limits=limits,
        use_cache=use_cache,
    )
    if resolved is None:
        raise RulesetError(errors)
    return resolved
