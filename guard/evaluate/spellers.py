"""Adapters that run real spellers over text, as an application would wire them in.

The guard is measured against what real spellers do, so these adapters try to be the
ordinary integration a developer writes, neither smarter nor clumsier:

* the text is split into words with one plain pattern: a run of letters (with internal
  apostrophes) that does not touch a digit or an underscore. Dots, slashes and hyphens
  end a word, so ``tern.conf`` is the two words ``tern`` and ``conf``, ``--verbose`` is
  ``verbose`` and ``XR-220`` gives ``XR``. The adapters know nothing of the guard's
  tokenizer on purpose: what a speller does to such pieces is what the guard is for;
* each word is looked up in lower case (both spellers keep lower-case dictionaries) and a
  word the speller leaves alone keeps its original spelling exactly;
* a replaced word gets the original's case back: ALLCAPS stays ALLCAPS, a capitalised
  word stays capitalised;
* punctuation and spacing between words are never touched.

Names (``get_speller``):

==================== ==============================================================
pyspellchecker       pyspellchecker, edit distance 2 (its default)
pyspellchecker-d1    pyspellchecker, edit distance 1
pyspellchecker-d2    the same as ``pyspellchecker``
symspell-word        symspellpy ``lookup`` word by word, ``Verbosity.TOP``, distance 2
symspell-compound    symspellpy ``lookup_compound`` over each run of words between
                     punctuation (it may split and join words), distance 2
module:function      any callable taking the text and returning the corrected text
==================== ==============================================================

Dictionaries. pyspellchecker ships word-frequency lists for en, es, fr, pt, de, it, ru,
ar, lv, eu, nl and fa (listed from its installed ``resources`` folder at run time).
symspellpy ships an English frequency dictionary (and English bigrams) only. For every
other language the symspell adapters build their dictionary from pyspellchecker's list
for that language: a design choice, so that both spellers run in all five evaluation
languages with a dictionary that came with a speller, and not from wordfreq, which is the
guard's own lexicon (a speller drawing on the guard's lexicon would flatter the guard).
Outside English, ``symspell-compound`` has no bigram list and splits or joins by word
frequency alone.

Both libraries are the optional extra ``guard[spellers]``; they are imported only when an
adapter is first built, with a clear error when they are missing.

An adapter is also what the Python API's speller wrapper takes:

>>> from guard.api import Guard
>>> fix = get_speller("pyspellchecker", "en")
>>> fix("Check the speling of the USB port")
'Check the spelling of the US port'
>>> Guard("base").wrap(fix, lang="en")("Check the speling of the USB port")
'Check the spelling of the USB port'
"""

from __future__ import annotations

import gzip
import importlib
import importlib.resources
import json
import unicodedata
from collections.abc import Callable, Iterable, Iterator, Mapping
from functools import cache
from typing import Any

import regex

from guard.errors import GuardError
from guard.evaluate.jsonl import BadLine, Numbered

Speller = Callable[[str], str]
"""A speller: text in, corrected text out."""

WORD = regex.compile(r"(?<![\w])\p{L}+(?:['’]\p{L}+)*(?![\w])")
"""A word as the adapters see it: letters with internal apostrophes, not touching digits
or underscores. Deliberately plain: see the module docstring."""

RUN = regex.compile(r"(?<![\w])\p{L}+(?:['’]\p{L}+)*(?: \p{L}+(?:['’]\p{L}+)*)*(?![\w])")
"""A run of words separated by single spaces, for ``symspell-compound``."""

BUILT_IN: tuple[str, ...] = (
    "pyspellchecker",
    "pyspellchecker-d1",
    "pyspellchecker-d2",
    "symspell-word",
    "symspell-compound",
)


class SpellerError(GuardError):
    """A speller could not be built: unknown name, missing library, unsupported language."""


def recase(original: str, corrected: str) -> str:
    """Give ``corrected`` (lower case, from a dictionary) the case pattern of ``original``.

    >>> recase("Loger", "logger"), recase("USB", "us"), recase("loger", "logger")
    ('Logger', 'US', 'logger')
    >>> recase("iPhone", "phone")
    'phone'
    """
    if corrected.lower() == original.lower():
        return original
    if len(original) > 1 and original.isupper():
        return corrected.upper()
    if original[:1].isupper():
        return corrected[:1].upper() + corrected[1:]
    return corrected


def _primary(lang: str) -> str:
    return lang.split("-", 1)[0].lower()


def _require(module: str) -> Any:
    try:
        return importlib.import_module(module)
    except ImportError as e:
        raise SpellerError(
            f"the {module} package is not installed; "
            "install the extra: pip install 'guard[spellers]'"
        ) from e


def pyspellchecker_languages() -> tuple[str, ...]:
    """The languages pyspellchecker ships a dictionary for, as installed here."""
    _require("spellchecker")
    folder = importlib.resources.files("spellchecker") / "resources"
    names = [p.name for p in folder.iterdir() if p.name.endswith(".json.gz")]
    return tuple(sorted(n.removesuffix(".json.gz") for n in names))


@cache
def _pyspellchecker(lang: str, distance: int) -> Any:
    module = _require("spellchecker")
    if lang not in pyspellchecker_languages():
        known = ", ".join(pyspellchecker_languages())
        raise SpellerError(f"pyspellchecker has no dictionary for {lang!r} (it has: {known})")
    return module.SpellChecker(language=lang, distance=distance)


def _pyspellchecker_frequencies(lang: str) -> Mapping[str, int]:
    folder = importlib.resources.files("spellchecker") / "resources"
    with (folder / f"{lang}.json.gz").open("rb") as fh:
        data: dict[str, int] = json.loads(gzip.decompress(fh.read()).decode("utf-8"))
    return data


@cache
def _symspell(lang: str) -> Any:
    module = _require("symspellpy")
    sym = module.SymSpell(max_dictionary_edit_distance=2, prefix_length=7)
    if lang == "en":
        folder = importlib.resources.files("symspellpy")
        with importlib.resources.as_file(folder / "frequency_dictionary_en_82_765.txt") as p:
            sym.load_dictionary(str(p), term_index=0, count_index=1, encoding="utf-8")
        with importlib.resources.as_file(folder / "frequency_bigramdictionary_en_243_342.txt") as p:
            sym.load_bigram_dictionary(str(p), term_index=0, count_index=2, encoding="utf-8")
        return sym
    _require("spellchecker")
    if lang not in pyspellchecker_languages():
        raise SpellerError(
            f"symspellpy has no dictionary for {lang!r}: it ships English only, and "
            f"pyspellchecker (whose lists the adapter borrows) has none for {lang!r} either"
        )
    for word, count in _pyspellchecker_frequencies(lang).items():
        if " " not in word and count > 0:
            sym.create_dictionary_entry(word, count)
    return sym


def _each_word(text: str, fix: Callable[[str], str | None]) -> str:
    """Replace every word of ``text`` by ``fix(word)`` (None or same: leave it)."""
    parts: list[str] = []
    at = 0
    for m in WORD.finditer(text):
        word = m.group()
        got = fix(word)
        if got is not None and got != word:
            parts.append(text[at : m.start()])
            parts.append(got)
            at = m.end()
    parts.append(text[at:])
    return "".join(parts)


class _Cached:
    """A word-by-word speller with a per-instance cache (the same word, the same answer)."""

    __slots__ = ("_cache", "_lookup", "name")

    def __init__(self, name: str, lookup: Callable[[str], str | None]) -> None:
        self.name = name
        self._lookup = lookup
        self._cache: dict[str, str | None] = {}

    def _fix(self, word: str) -> str | None:
        key = word.lower()
        if key not in self._cache:
            self._cache[key] = self._lookup(key)
        got = self._cache[key]
        return None if got is None else recase(word, got)

    def __call__(self, text: str) -> str:
        return _each_word(text, self._fix)


def _plain(word: str) -> str:
    """``word`` without combining marks (NFKD), as pyspellchecker compares accents."""
    return "".join(c for c in unicodedata.normalize("NFKD", word) if not unicodedata.combining(c))


def _pyspellchecker_speller(lang: str, distance: int) -> Speller:
    checker = _pyspellchecker(lang, distance)

    def lookup(word: str) -> str | None:
        """pyspellchecker's own ``correction``, made reproducible.

        ``correction`` takes the most frequent candidate (preferring those that differ
        only in accents) with ``max`` over a set, so between candidates of equal frequency
        the winner depends on string hashing, which changes from process to process. The
        choice here is the same except that such ties go to the alphabetically first.
        """
        candidates = checker.candidates(word)
        if not candidates:
            return None
        pool = [c for c in candidates if _plain(c) == _plain(word)] or list(candidates)
        return max(sorted(pool), key=lambda c: checker[c])  # type: ignore[no-any-return]

    return _Cached(f"pyspellchecker-d{distance}", lookup)


def _symspell_word_speller(lang: str) -> Speller:
    sym = _symspell(lang)
    verbosity = _require("symspellpy").Verbosity.TOP

    def lookup(word: str) -> str | None:
        found = sym.lookup(word, verbosity, max_edit_distance=2, include_unknown=True)
        return str(found[0].term) if found else None

    return _Cached("symspell-word", lookup)


def _recase_run(original: str, corrected: str) -> str:
    """Carry the case of a run of words over to its correction, word by word if they pair up."""
    old = original.split(" ")
    new = corrected.split(" ")
    if len(old) == len(new):
        return " ".join(recase(o, n) for o, n in zip(old, new, strict=True))
    if original.isupper():
        return corrected.upper()
    if original[:1].isupper():
        return corrected[:1].upper() + corrected[1:]
    return corrected


def _symspell_compound_speller(lang: str) -> Speller:
    sym = _symspell(lang)
    cache: dict[str, str] = {}

    def run(text: str) -> str:
        key = text.lower()
        if key not in cache:
            found = sym.lookup_compound(key, max_edit_distance=2)
            cache[key] = str(found[0].term) if found else key
        got = cache[key]
        return text if got == key else _recase_run(text, got)

    def speller(text: str) -> str:
        parts: list[str] = []
        at = 0
        for m in RUN.finditer(text):
            parts.append(text[at : m.start()])
            parts.append(run(m.group()))
            at = m.end()
        parts.append(text[at:])
        return "".join(parts)

    return speller


def _from_path(name: str) -> Speller:
    module_name, _, attr = name.partition(":")
    try:
        module = importlib.import_module(module_name)
    except ImportError as e:
        raise SpellerError(f"cannot import {module_name!r} for speller {name!r}: {e}") from e
    fn = getattr(module, attr, None)
    if fn is None or not callable(fn):
        raise SpellerError(f"{module_name!r} has no callable {attr!r} (speller {name!r})")

    def speller(text: str) -> str:
        got = fn(text)
        if not isinstance(got, str):
            raise SpellerError(f"speller {name!r} returned {type(got).__name__}, not a string")
        return got

    return speller


def get_speller(name: str, lang: str) -> Speller:
    """The speller called ``name`` for language ``lang`` (a BCP 47 tag; its primary subtag
    picks the dictionary).

    >>> fix = get_speller("pyspellchecker", "en")
    >>> fix("Check the speling in /var/log/tern.")
    'Check the spelling in /var/log/tern.'
    """
    if ":" in name:
        return _from_path(name)
    primary = _primary(lang)
    if name in ("pyspellchecker", "pyspellchecker-d2"):
        return _pyspellchecker_speller(primary, 2)
    if name == "pyspellchecker-d1":
        return _pyspellchecker_speller(primary, 1)
    if name == "symspell-word":
        return _symspell_word_speller(primary)
    if name == "symspell-compound":
        return _symspell_compound_speller(primary)
    raise SpellerError(
        f"unknown speller {name!r}: use one of {', '.join(BUILT_IN)} or module:function"
    )


def words(text: str) -> Iterator[str]:
    """The words a speller adapter looks at, in order.

    >>> list(words("Set --verbose in /etc/tern.conf; XR-220 isn't 3.5mm."))
    ['Set', 'verbose', 'in', 'etc', 'tern', 'conf', 'XR', "isn't"]
    """
    for m in WORD.finditer(text):
        yield m.group()


def propose_records(
    items: Iterable[Numbered | BadLine], *, speller: str, lang: str
) -> Iterator[dict[str, object]]:
    """Fill ``proposal`` in each record by running ``speller`` over its ``source``.

    Every input item gives one output record: an unreadable line, or a record without a
    string ``source``, gives an error record naming the file and line. Each record's own
    ``lang`` picks the dictionary; ``lang`` is for records without one.
    """
    built: dict[str, Speller] = {}
    for item in items:
        if isinstance(item, BadLine):
            yield item.record()
            continue
        source = item.data.get("source")
        if not isinstance(source, str):
            yield BadLine(
                file=item.file, line=item.line, reason="no string field 'source'"
            ).record()
            continue
        record_lang = item.data.get("lang")
        use = record_lang if isinstance(record_lang, str) and record_lang else lang
        if use not in built:
            built[use] = get_speller(speller, use)
        yield {**item.data, "proposal": built[use](source)}
