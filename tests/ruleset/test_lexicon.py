"""The lexicon agrees with wordfreq's own zipf_frequency, and its cache is private.

The reference values are wordfreq's own answers (wordfreq.zipf_frequency, the function a
user of wordfreq would call), computed in the test; our Lexicon reads wordfreq's raw word
lists and its own cache file, not zipf_frequency.
"""

from __future__ import annotations

import os
from pathlib import Path

import pytest
import wordfreq

from guard.ruleset.lexicon import (
    Lexicon,
    default_cache_dir,
    get_lexicon,
    load_lexicon,
    private_dir,
    wordfreq_language,
)

WORDS = {
    "en": ["the", "The", "of", "bilge", "definately", "colour", "naïve", "xqzvbk"],
    "de": ["der", "Straße", "STRASSE", "Grüße", "nicht", "xqzvbk"],
    "tr": ["bir", "İstanbul", "ISTANBUL", "ılık", "xqzvbk"],  # Turkish dotted/dotless i
}


@pytest.mark.parametrize(
    ("lang", "word"),
    [pytest.param(lang, w, id=f"{lang}-{w}") for lang, ws in WORDS.items() for w in ws],
)
def test_zipf_agrees_with_wordfreq(lang: str, word: str) -> None:
    lex = get_lexicon(lang)
    assert lex is not None
    # reference: wordfreq's own zipf_frequency for the same word and language
    assert lex.zipf(word) == wordfreq.zipf_frequency(word, lang)
    assert lex.known(word) == (wordfreq.zipf_frequency(word, lang) > 0)


def test_a_few_values_as_wordfreq_reports_them() -> None:
    lex = get_lexicon("en")
    assert lex is not None
    # wordfreq 3.1.1's own zipf_frequency('the', 'en') is 7.73 (checked when written;
    # it moves only with wordfreq's data, so compare with the live value too)
    assert lex.zipf("the") == wordfreq.zipf_frequency("the", "en")
    assert lex.zipf("the") > 7.0
    # a frequent misspelling has a real frequency in web-derived lists (wordfreq 3.1.1: 2.87)
    assert 0.0 < lex.zipf("definately") < lex.zipf("definitely")


def test_region_tags_fall_back_to_the_language() -> None:
    assert wordfreq_language("de-CH") == "de"
    assert wordfreq_language("pt-BR") == "pt"
    assert wordfreq_language("tlh") is None
    assert get_lexicon("de-CH") is get_lexicon("de")
    assert get_lexicon("tlh") is None


def test_the_cache_round_trips_and_agrees(tmp_path: Path) -> None:
    cache = tmp_path / "c"
    built = load_lexicon("is", cache_dir=cache)
    files = list(cache.iterdir())
    assert len(files) == 1 and files[0].name.startswith("lexicon-is-wordfreq")
    assert cache.stat().st_mode & 0o777 == 0o700
    cached = load_lexicon("is", cache_dir=cache)
    assert built is not None and cached is not None
    assert len(cached) == len(built) > 1000
    assert load_lexicon("is") is not None  # no cache folder: built from wordfreq alone
    for word in [*wordfreq.top_n_list("is", 500)[::25], "xqzvbk"]:
        assert cached.zipf(word) == built.zipf(word) == wordfreq.zipf_frequency(word, "is")


def test_a_tampered_cache_file_is_not_used(tmp_path: Path) -> None:
    cache = tmp_path / "c"
    load_lexicon("is", cache_dir=cache)
    (file,) = cache.iterdir()
    data = bytearray(file.read_bytes())
    data[-2:] = b"zz"
    file.write_bytes(bytes(data))
    again = load_lexicon("is", cache_dir=cache)
    assert again is not None and again.zipf("og") == wordfreq.zipf_frequency("og", "is")
    assert file.read_bytes() != bytes(data)  # rebuilt and rewritten


@pytest.mark.skipif(not hasattr(os, "getuid"), reason="POSIX permissions")
def test_a_folder_others_can_write_is_refused(tmp_path: Path) -> None:
    shared = tmp_path / "shared"
    shared.mkdir(mode=0o777)
    shared.chmod(0o777)
    assert private_dir(shared) is None
    lex = load_lexicon("is", cache_dir=shared)
    assert lex is not None and list(shared.iterdir()) == []  # built, nothing written there
    link = tmp_path / "link"
    link.symlink_to(tmp_path / "c", target_is_directory=True)
    (tmp_path / "c").mkdir(mode=0o700)
    assert private_dir(link) is None


def test_default_cache_dir_follows_xdg(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    assert default_cache_dir() == tmp_path / "guard"
    monkeypatch.setenv("XDG_CACHE_HOME", "relative/path")  # not absolute: ignored (XDG spec)
    assert default_cache_dir() == Path.home() / ".cache" / "guard"


def test_a_lexicon_is_read_only_data() -> None:
    lex = Lexicon.from_words("en", {"alpha": 400, "beta": 500})
    assert (lex.zipf("ALPHA"), lex.zipf("beta"), lex.zipf("gamma")) == (5.0, 4.0, 0.0)
    with pytest.raises(AttributeError):
        lex.extra = 1  # type: ignore[attr-defined]


def test_traditional_chinese_is_looked_up_in_simplified_form() -> None:
    # wordfreq's chinese.simplify_chinese docstring: Chinese is converted character by
    # character to Simplified "for the purpose of looking up word frequencies"
    zh = get_lexicon("zh-Hant")
    assert zh is not None and zh.lang == "zh"
    assert zh.zipf("電腦") == zh.zipf("电脑") > 0.0
