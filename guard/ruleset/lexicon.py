"""Word frequencies of a language, on the Zipf scale, for the evidence rules.

A ``Lexicon`` answers "how common is this word in this language?" from wordfreq's data,
precomputed into one dict so that a lookup is a case fold and a dict access. Zipf values
are computed exactly as ``wordfreq.zipf_frequency`` computes them for a single token
(frequency quantised to centibels, rounded to three significant digits, then
``log10(freq) + 9`` rounded to two decimals), so our numbers and wordfreq's agree.

Reading wordfreq's compressed lists costs about half a second for English and more for
German, so the first load writes a compact text copy (one line per frequency band, no
code, no pickle) into the user's private cache folder, and later loads read that. The
cache is keyed by wordfreq's version, the language and a hash of wordfreq's data file,
is checked by a hash of its own body, and is used only in a folder the user owns that
nobody else can write. When any check fails, the lexicon is built from wordfreq directly.

Limits, said plainly: Chinese and Japanese words are looked up whole (wordfreq's own
segmenters are optional packages we do not call), so a lookup must be one dictionary
word; Traditional Chinese is mapped to Simplified with wordfreq's own character map, as
wordfreq does. Numbers are not smashed to digit shapes as wordfreq does.
"""

from __future__ import annotations

import functools
import hashlib
import math
import os
import stat
import sys
import tempfile
from array import array
from bisect import bisect_left
from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING

from guard.ruleset.memo import Memo

if TYPE_CHECKING:
    from langcodes import Language

_FORMAT = "guard-lexicon 2"
_NONASCII_FOLD_LANGS = frozenset({"tr", "az"})  # their I/i fold differently, even in ASCII
_MEMO_SIZE = 16_384  # words remembered per lexicon (about a megabyte)
_MAX_CB = 1000  # wordfreq's bands run from 0 to about 900 cB below frequency 1


class Lexicon:
    """Zipf frequencies of one language's words. Read-only after construction.

    Words are kept in one sorted list with a parallel array of their bands (centibels
    below frequency 1), looked up by bisection: loading is a split of one string, with
    no hashing of hundreds of thousands of keys, and a lookup is about twenty string
    comparisons in C.

    >>> lex = Lexicon.from_words("xx", {"word": 450})
    >>> lex.zipf("Word"), lex.zipf("nope"), lex.known("WORD")
    (4.5, 0.0, True)
    """

    __slots__ = ("_ascii_lower", "_bands", "_language", "_memo", "_words", "lang", "zipf")

    zipf: Callable[[str], float]
    """Zipf frequency of a word (case folded as wordfreq folds); 0.0 when unknown.

    The rules ask this for every token of every rewrite, so it is a dict lookup in C
    (a memo's ``__getitem__``), with Python only for words not yet asked."""

    def __init__(self, lang: str, words: list[str], bands: array[int]) -> None:
        if len(words) != len(bands):
            raise ValueError("words and bands differ in length")
        self.lang = lang
        self._ascii_lower = lang not in _NONASCII_FOLD_LANGS  # ASCII folds by lower()
        self._language = _language(lang)
        # sorted, unique; a tuple of strings, which the garbage collector stops tracking,
        # so that no collection walks its 300k items again
        self._words = tuple(words)
        self._bands = bands
        # Words looked up lately: real traffic repeats its words, and a dict hit costs a
        # tenth of a folded bisection. Bounded; any thread may clear it, none may need it.
        self._memo = Memo(self._zipf, _MEMO_SIZE)
        self.zipf = self._memo.__getitem__

    @classmethod
    def from_words(cls, lang: str, band_by_word: dict[str, int]) -> Lexicon:
        """A lexicon from word -> band (centibels below frequency 1)."""
        words = sorted(band_by_word)
        return cls(lang, words, array("H", map(band_by_word.__getitem__, words)))

    def __len__(self) -> int:
        return len(self._words)

    def _key(self, word: str) -> str:
        if word.isascii() and self._ascii_lower:
            return word.lower()
        from wordfreq.preprocess import preprocess_text

        key = str(preprocess_text(word, self._language))
        if self.lang == "zh":
            key = key.translate(_simplified_map())
        return key

    def _band(self, word: str) -> int | None:
        key = self._key(word)
        i = bisect_left(self._words, key)
        if i < len(self._words) and self._words[i] == key:
            return self._bands[i]
        return None

    def _zipf(self, word: str) -> float:
        # _band's steps in one frame, with _key's ASCII case inline: this runs for every
        # word the memo has not seen, a typo most often
        key = word.lower() if word.isascii() and self._ascii_lower else self._key(word)
        words = self._words
        i = bisect_left(words, key)
        if i < len(words) and words[i] == key:
            return _ZIPF_OF_BAND[self._bands[i]]
        return 0.0

    def known(self, word: str) -> bool:
        """True when wordfreq lists ``word`` in this language at all."""
        return self._band(word) is not None


@functools.cache
def _simplified_map() -> dict[int, str]:
    """wordfreq's Traditional -> Simplified Chinese character map, read from its data file.

    wordfreq looks Chinese words up in simplified form, but its own module for this
    imports an optional segmenter (jieba); the map itself is plain data. Empty when the
    file cannot be read, so that lookups fall back to the text as given.
    """
    import gzip

    import msgpack  # type: ignore[import-untyped]  # ships no type information
    from wordfreq.util import data_path

    try:
        with gzip.open(data_path("_chinese_mapping.msgpack.gz")) as fh:
            loaded = msgpack.load(fh, raw=False, strict_map_key=False)
    except (OSError, ValueError, TypeError):
        return {}
    return {int(k): str(v) for k, v in loaded.items()} if isinstance(loaded, dict) else {}


def _language(lang: str) -> Language:
    from langcodes import Language

    return Language.get(lang)


def wordfreq_language(lang: str) -> str | None:
    """The wordfreq language for a BCP 47 tag: the tag itself, else its primary subtag.

    >>> wordfreq_language("de-CH"), wordfreq_language("en"), wordfreq_language("tlh")
    ('de', 'en', None)
    """
    from wordfreq import available_languages

    have = available_languages()
    tag = lang.strip().replace("_", "-").lower()
    if tag in have:
        return tag
    primary = tag.split("-", 1)[0]
    return primary if primary in have else None


def band_zipf(centibels_below: int) -> float:
    """The Zipf value wordfreq reports for a word in band ``-centibels_below`` cB.

    wordfreq stores words in bands of 1 cB; ``word_frequency`` rounds the band's
    frequency to three significant digits and ``zipf_frequency`` rounds log10 + 9 to two
    decimals. Doing the same here keeps our values identical to wordfreq's.

    >>> band_zipf(127)  # wordfreq 3.1.1 puts 'the' (en) in this band: zipf_frequency 7.73
    7.73
    """
    freq = 10 ** (-centibels_below / 100)
    leading_zeroes = math.floor(-math.log10(freq))
    rounded = round(freq, leading_zeroes + 3)
    return round(math.log10(rounded) + 9, 2)


_ZIPF_OF_BAND = tuple(band_zipf(i) for i in range(_MAX_CB))


def _from_wordfreq(wf_lang: str) -> Lexicon:
    from wordfreq import get_frequency_list

    listed = get_frequency_list(wf_lang, "best")[:_MAX_CB]
    band_by_word: dict[str, int] = {}
    # Rarest band first, so that a word listed twice keeps its more frequent band.
    for index in range(len(listed) - 1, -1, -1):
        band_by_word.update(dict.fromkeys(listed[index], index))
    band_by_word.pop("", None)
    for odd in [w for w in band_by_word if "\n" in w]:  # cannot be stored one per line
        del band_by_word[odd]
    return Lexicon.from_words(wf_lang, band_by_word)


# ---------------------------------------------------------------- private cache


def default_cache_dir() -> Path:
    """``$XDG_CACHE_HOME/guard`` (when absolute), else ``~/.cache/guard``."""
    xdg = os.environ.get("XDG_CACHE_HOME", "")
    base = Path(xdg) if xdg and os.path.isabs(xdg) else Path.home() / ".cache"
    return base / "guard"


def private_dir(path: Path) -> Path | None:
    """``path``, created 0700 if missing, or None when it is not safe to use.

    Safe means: a real folder (not a symlink), owned by the current user, and not
    writable by group or others, so that nobody else can plant or change a cache file.
    """
    try:
        path.mkdir(mode=0o700, parents=True, exist_ok=True)
        st = os.lstat(path)
    except OSError:
        return None
    if not stat.S_ISDIR(st.st_mode) or st.st_uid != os.getuid():
        return None
    if st.st_mode & (stat.S_IWGRP | stat.S_IWOTH):
        return None
    return path


def _data_hash(wf_lang: str) -> str | None:
    from wordfreq import available_languages

    data = available_languages("best").get(wf_lang)
    if data is None:
        return None
    try:
        return hashlib.sha256(Path(data).read_bytes()).hexdigest()[:16]
    except OSError:
        return None


def _cache_name(wf_lang: str) -> str | None:
    from importlib.metadata import version

    digest = _data_hash(wf_lang)
    if digest is None:
        return None
    return f"lexicon-{wf_lang}-wordfreq{version('wordfreq')}-{digest}.txt"


def read_private(file: Path, fmt: str) -> tuple[list[str], bytes] | None:
    """The header fields after ``fmt`` and the body of a cache file, or None.

    None unless the file is a regular file (not a link) owned by the user, not writable
    by others, starts with ``fmt``, and its body has the SHA-256 its header names (the
    last header field): a cache file is data, checked before use, never code.
    """
    try:
        fd = os.open(file, os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0))
    except OSError:
        return None
    with os.fdopen(fd, "rb") as fh:
        st = os.fstat(fh.fileno())
        if not stat.S_ISREG(st.st_mode) or st.st_uid != os.getuid():
            return None
        if st.st_mode & (stat.S_IWGRP | stat.S_IWOTH):
            return None
        data = fh.read()
    head, _, body = data.partition(b"\n")
    text = head.decode("ascii", "replace")
    if not text.startswith(fmt + " "):
        return None
    fields = text[len(fmt) + 1 :].split(" ")
    if hashlib.sha256(body).hexdigest() != fields[-1]:
        return None
    return fields[:-1], body


def write_private(file: Path, fmt: str, fields: list[str], body: bytes) -> None:
    """Write a cache file atomically (a temporary file renamed into place); errors are
    ignored, as a cache that cannot be written only costs time."""
    head = " ".join([fmt, *fields, hashlib.sha256(body).hexdigest()]) + "\n"
    try:
        fd, tmp = tempfile.mkstemp(dir=file.parent, prefix=".guard-", suffix=".tmp")
    except OSError:
        return
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(head.encode("ascii") + body)
        os.replace(tmp, file)
    except OSError:
        Path(tmp).unlink(missing_ok=True)


def cache_dir() -> Path | None:
    """The private cache folder to use, or None (cache off by ``GUARD_NO_CACHE=1``, or
    the folder is not safe)."""
    if os.environ.get("GUARD_NO_CACHE", "") not in {"", "0"}:
        return None
    return private_dir(default_cache_dir())


def _read_cache(file: Path, wf_lang: str) -> Lexicon | None:
    got = read_private(file, _FORMAT)
    if got is None:
        return None
    fields, body = got
    if len(fields) != 1 or not fields[0].isdigit():
        return None
    n = int(fields[0])
    bands = array("H")
    bands.frombytes(body[: 2 * n])
    if sys.byteorder != "little":
        bands.byteswap()
    try:
        words = body[2 * n :].decode("utf-8").split("\n") if n else []
        return Lexicon(wf_lang, words, bands)
    except ValueError:
        return None


def _write_cache(file: Path, lex: Lexicon) -> None:
    bands = array("H", lex._bands)
    if sys.byteorder != "little":
        bands.byteswap()
    body = bands.tobytes() + "\n".join(lex._words).encode("utf-8")
    write_private(file, _FORMAT, [str(len(lex))], body)


def load_lexicon(lang: str, *, cache_dir: Path | None = None) -> Lexicon | None:
    """Build the lexicon of ``lang`` (uncached in memory; see ``get_lexicon``).

    With ``cache_dir``, read the compact copy there when it is valid, else build from
    wordfreq and write it. None when wordfreq has no list for the language.
    """
    wf_lang = wordfreq_language(lang)
    if wf_lang is None:
        return None
    safe = private_dir(cache_dir) if cache_dir is not None else None
    name = _cache_name(wf_lang) if safe is not None else None
    if safe is not None and name is not None:
        cached = _read_cache(safe / name, wf_lang)
        if cached is not None:
            return cached
    lex = _from_wordfreq(wf_lang)
    if safe is not None and name is not None:
        _write_cache(safe / name, lex)
    return lex


@functools.cache
def get_lexicon(lang: str) -> Lexicon | None:
    """The lexicon of ``lang`` (a BCP 47 tag; 'de-CH' falls back to 'de'), loaded once.

    None when wordfreq has no word list for the language. Uses the private cache folder
    (``default_cache_dir``); ``GUARD_NO_CACHE=1`` turns the cache off.
    """
    wf_lang = wordfreq_language(lang)
    if wf_lang is None:
        return None
    if wf_lang != lang:
        return get_lexicon(wf_lang)
    return load_lexicon(wf_lang, cache_dir=cache_dir())
