"""Speller adapters, on real misspellings, with the dictionaries the spellers ship."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from click.testing import CliRunner

from guard.cli.propose import command
from guard.evaluate.spellers import (
    SpellerError,
    get_speller,
    pyspellchecker_languages,
    recase,
    words,
)


@pytest.mark.parametrize(
    ("speller", "text", "expected"),
    [
        # pyspellchecker's own README quick start corrects "hapenning" to "happening"
        # (from memory); with its bundled English list.
        pytest.param("pyspellchecker", "hapenning", "happening", id="pyspell-readme"),
        # The library's own behaviour with its bundled English list: distance-1 typos.
        pytest.param("pyspellchecker", "speling", "spelling", id="pyspell-speling"),
        pytest.param("pyspellchecker-d1", "recieve", "receive", id="pyspell-d1-transposition"),
        # symspellpy's README lookup example corrects "memebers" to "members" (from memory).
        pytest.param("symspell-word", "memebers", "members", id="symspell-readme-lookup"),
        # The SymSpell ports' own unit tests look up "hous" and expect "house" (seen in the
        # symspell_rs crate's src/test.rs, ported from the original project's tests).
        pytest.param("symspell-word", "hous", "house", id="symspell-port-test"),
        # symspellpy's documented lookup_compound example sentence, with its bundled English
        # unigram and bigram dictionaries: splits, joins and fixes in one pass. The expected
        # line is what symspellpy's docs print for it ("six grade", not "sixth"; from memory).
        pytest.param(
            "symspell-compound",
            "whereis th elove hehad dated forImuch of thepast who couqdn'tread in sixtgrade"
            " and ins pired him",
            "where is the love he had dated for much of the past who couldn't read in six"
            " grade and inspired him",
            id="symspell-readme-compound",
        ),
    ],
)
def test_adapters_fix_real_misspellings(speller: str, text: str, expected: str) -> None:
    assert get_speller(speller, "en")(text) == expected


@pytest.mark.parametrize(
    ("speller", "lang", "text", "expected"),
    [
        # Each correction below is the library's own answer with its bundled list for the
        # language (pyspellchecker's lists also feed symspellpy outside English).
        pytest.param("pyspellchecker", "de", "Die Tempratur", "Die Temperatur", id="de"),
        pytest.param("pyspellchecker", "fr", "la tempréature", "la température", id="fr"),
        pytest.param("symspell-word", "es", "la temperatrua", "la temperatura", id="es"),
        pytest.param("pyspellchecker-d1", "nl", "de temperatur", "de temperatuur", id="nl"),
    ],
)
def test_adapters_in_other_languages(speller: str, lang: str, text: str, expected: str) -> None:
    assert get_speller(speller, lang)(text) == expected


@pytest.mark.parametrize(
    "speller", ["pyspellchecker", "pyspellchecker-d1", "symspell-word", "symspell-compound"]
)
def test_case_punctuation_and_spacing_are_kept(speller: str) -> None:
    fix = get_speller(speller, "en")
    assert fix("Speling,  SPELING;\tspeling.") == "Spelling,  SPELLING;\tspelling."


def test_a_word_left_alone_keeps_its_spelling() -> None:
    assert get_speller("pyspellchecker", "en")("The Spelling of iPhone") == (
        "The Spelling of iPhone"
    )


def test_words_break_at_dots_slashes_and_hyphens() -> None:
    assert list(words("Set --verbose in /etc/tern.conf; XR-220 isn't 3.5mm or log_level.")) == [
        "Set", "verbose", "in", "etc", "tern", "conf", "XR", "isn't", "or",
    ]  # fmt: skip


@pytest.mark.parametrize(
    ("original", "corrected", "expected"),
    [
        pytest.param("Loger", "logger", "Logger", id="title"),
        pytest.param("LOGER", "logger", "LOGGER", id="allcaps"),
        pytest.param("loger", "logger", "logger", id="lower"),
        pytest.param("A", "an", "An", id="single-capital-is-title"),
        pytest.param("TERN", "tern", "TERN", id="unchanged-keeps-original"),
    ],
)
def test_recase(original: str, corrected: str, expected: str) -> None:
    assert recase(original, corrected) == expected


def test_pyspellchecker_languages_include_the_evaluation_languages() -> None:
    assert {"en", "de", "fr", "es", "nl"} <= set(pyspellchecker_languages())


def test_module_function_speller() -> None:
    assert get_speller("string:capwords", "en")("tern labs logger") == "Tern Labs Logger"


@pytest.mark.parametrize(
    ("name", "lang", "message"),
    [
        pytest.param("hunch", "en", "unknown speller 'hunch'", id="unknown-name"),
        pytest.param("pyspellchecker", "xx", "no dictionary for 'xx'", id="unknown-language"),
        pytest.param("string:nothing_here", "en", "has no callable", id="missing-callable"),
        pytest.param("no_such_module_x:f", "en", "cannot import", id="missing-module"),
    ],
)
def test_bad_speller_names(name: str, lang: str, message: str) -> None:
    with pytest.raises(SpellerError, match=message):
        get_speller(name, lang)


def test_propose_cli_fills_proposal_and_keeps_fields(tmp_path: Path) -> None:
    src = tmp_path / "in.jsonl"
    src.write_text(
        '{"id": "1", "source": "The speling", "gold": "The spelling", "extra": 5}\n'
        '{"id": "2", "gold": "no source here"}\n'
        '{"id": "3", "lang": "de", "source": "Die Tempratur"}\n',
        encoding="utf-8",
    )
    out = tmp_path / "out.jsonl"
    result = CliRunner().invoke(
        command,
        [str(src), "--speller", "pyspellchecker", "--output", str(out)],
        standalone_mode=False,
    )
    assert result.exception is None
    assert result.return_value == 1
    records = [json.loads(line) for line in out.read_text(encoding="utf-8").splitlines()]
    assert records[0] == {
        "id": "1", "source": "The speling", "gold": "The spelling", "extra": 5,
        "proposal": "The spelling",
    }  # fmt: skip
    assert records[1] == {"error": "no string field 'source'", "file": str(src), "line": 2}
    assert records[2]["proposal"] == "Die Temperatur"
