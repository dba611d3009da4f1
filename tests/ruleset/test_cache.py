"""Large parsed term lists are kept in the private cache folder and read back unchanged."""

from __future__ import annotations

import hashlib
import os
from collections.abc import Callable, Mapping
from pathlib import Path

import pytest

from guard.errors import RulesetError
from guard.rules.base import Rule
from guard.ruleset.load import ResolvedRuleset, _TermListCache, load_sources
from guard.ruleset.terms import TermMatcher

Write = Callable[[dict[str, str | bytes]], Path]

TOML = '[ruleset]\nname = "big"\nextends = []\n[[terms]]\nfile = "t.txt"\ncase = "fold"\n'


def _big_list(n: int) -> str:
    words = ["Straße", "İstanbul", "ﬁle", "bilge  pump", "C#", "Kettlewick"]
    lines = [f"{words[i % len(words)]}{i}  # note {i}" if i % 7 else "" for i in range(n)]
    return "# a large list\n" + "\n".join(lines) + "\n"


def _cache_files(cache: Path) -> list[Path]:
    return sorted(cache.glob("guard/terms-*.txt"))


def _load_cached(
    write: Write, registry: Mapping[str, Rule], cache: Path
) -> tuple[Path, ResolvedRuleset, Path]:
    """(folder, ruleset, its one cache file) of a large list loaded once."""
    root = write({"r/ruleset.toml": TOML, "r/t.txt": _big_list(6000)})
    first = load_sources([root / "r"], registry=registry)
    (cached,) = _cache_files(cache)
    return root, first, cached


def test_a_large_list_is_cached_and_reads_back_the_same(
    write: Write, registry: Mapping[str, Rule], private_cache: Path
) -> None:
    root, first, cached = _load_cached(write, registry, private_cache)
    again = load_sources([root / "r"], registry=registry)
    assert list(again.terms) == list(first.terms)
    assert len(first.terms) == 6000 - len(range(0, 6000, 7))
    entry = first.terms[0]
    assert (entry.term, entry.key, entry.origin.line) == ("İstanbul1", "i̇stanbul1", 3)
    uncached = load_sources([root / "r"], registry=registry, use_cache=False)
    assert list(uncached.terms) == list(first.terms)
    # the first pieces kept with the list find what the uncached list finds
    text = "bilge pump3 and C#4, İSTANBUL1 STRASSE6 bilge  pump9 bilge pump7"
    found = TermMatcher(again.terms).find(text)
    assert found == TermMatcher(uncached.terms).find(text)
    expected = ["bilge pump3", "C#4", "İSTANBUL1", "STRASSE6", "bilge  pump9"]  # 7: blank
    assert [text[h.start : h.end] for h in found] == expected
    # a changed cache file is not trusted: the list is parsed again and the file rewritten
    cached.write_bytes(cached.read_bytes()[:-3] + b"zzz")
    assert list(load_sources([root / "r"], registry=registry).terms) == list(first.terms)
    assert cached.read_bytes()[-3:] != b"zzz"


def test_a_list_with_a_problem_is_never_cached(
    write: Write, registry: Mapping[str, Rule], private_cache: Path
) -> None:
    root = write({"r/ruleset.toml": TOML, "r/t.txt": _big_list(6000) + "x" * 600 + "\n"})
    with pytest.raises(RulesetError):
        load_sources([root / "r"], registry=registry)
    assert _cache_files(private_cache) == []


def test_no_cache_env_turns_it_off(
    write: Write,
    registry: Mapping[str, Rule],
    private_cache: Path,
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    monkeypatch.setenv("GUARD_NO_CACHE", "1")
    root = write({"r/ruleset.toml": TOML, "r/t.txt": _big_list(6000)})
    load_sources([root / "r"], registry=registry)
    assert _cache_files(private_cache) == []


def test_a_cache_file_that_says_more_than_it_holds_is_not_used(
    write: Write, registry: Mapping[str, Rule], private_cache: Path
) -> None:
    root, first, cached = _load_cached(write, registry, private_cache)
    head, _, body = cached.read_bytes().partition(b"\n")
    fields = head.split(b" ")
    # a short body under a header whose counts and hash are otherwise consistent
    short = body[:10]
    fields[2] = b"999999"  # rows
    fields[-1] = hashlib.sha256(short).hexdigest().encode()
    cached.write_bytes(b" ".join(fields) + b"\n" + short)
    assert list(load_sources([root / "r"], registry=registry).terms) == list(first.terms)


def test_old_list_files_are_pruned_to_the_most_recently_used(
    write: Write, registry: Mapping[str, Rule], private_cache: Path
) -> None:
    # Each edit of a large list makes a new cache file; the folder must not grow forever
    # (common practice for caches, no source). Files of lists since edited, and one of
    # an older format, are made older than the live list's own file.
    root, _, live = _load_cached(write, registry, private_cache)
    keep = _TermListCache.KEEP
    old = [live.with_name(f"terms-{i:032x}.txt") for i in range(keep + 3)]
    for i, f in enumerate(old):
        f.write_bytes(b"guard-terms 1 0 0\n")
        os.utime(f, (1_000_000 + i, 1_000_000 + i))
    os.utime(live, (900_000, 900_000))  # older than every stale file...
    load_sources([root / "r"], registry=registry)  # ...until this load reads it
    # a second large list is written: pruning keeps the newest KEEP files
    other = write({"s/ruleset.toml": TOML, "s/t.txt": _big_list(6001)})
    load_sources([other / "s"], registry=registry)
    left = _cache_files(private_cache)
    assert len(left) == keep
    assert live in left  # used lately, so kept
    assert old[0] not in left and old[-1] in left  # the oldest went first
