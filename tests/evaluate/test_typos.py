"""Synthetic misspellings: the documented mix, determinism, what is left alone."""

from __future__ import annotations

import math
import random
from collections import Counter
from pathlib import Path

import pytest

from guard.cli.typos import command
from guard.evaluate.jsonl import CleanText
from guard.evaluate.keyboards import LAYOUTS, neighbours
from guard.evaluate.typos import (
    DEFAULT_MIX,
    EditKind,
    TypoOptions,
    damage_text,
    misspell,
    record_rng,
    typo_records,
)
from guard.records import LITERAL_KINDS
from guard.text.tokenize import tokenize

TEXTS = [
    "Set --verbose in /etc/tern/tern.conf before the TX-40 logger starts recording.",
    "The logger writes one file per day to the memory card.",
    "Battery voltage is checked every hour; see https://tern.example/docs for details.",
    "Use log_level and sample.rate_hz to change how often readings are stored.",
    "Replace the desiccant pouch when the indicator turns pink.",
] * 40


def _within(count: int, n: int, p: float, sigmas: float = 4.0) -> bool:
    """Is ``count`` of ``n`` draws within ``sigmas`` standard deviations of ``n * p``?"""
    sd = math.sqrt(n * p * (1 - p))
    return abs(count - n * p) <= sigmas * sd


@pytest.mark.parametrize("layout", sorted(LAYOUTS))
def test_neighbour_maps_are_symmetric(layout: str) -> None:
    # Touching is a symmetric relation: if a touches b, b touches a.
    near = neighbours(layout)
    for key, others in near.items():
        for other in others:
            assert key in near[other], (layout, key, other)


@pytest.mark.parametrize(
    ("layout", "key", "expected"),
    [
        # Read off the printed key caps of each layout: common practice, no source.
        pytest.param("qwerty", "g", set("tyfhvb"), id="qwerty-g"),
        pytest.param("qwertz", "y", set("asx"), id="qwertz-y-bottom-left"),
        pytest.param("azerty", "m", set("plù"), id="azerty-m-home-row"),
        pytest.param("azerty", "w", set("qsx"), id="azerty-w-bottom-left"),
    ],
)
def test_neighbours_follow_the_key_caps(layout: str, key: str, expected: set[str]) -> None:
    assert set(neighbours(layout)[key]) == expected


def test_single_edit_share_follows_the_mix() -> None:
    # DEFAULT_MIX: 80% of misspelt words get one edit (Damerau 1964, see typos.py).
    rng = random.Random(11)
    n = 4000
    counts = Counter(len(misspell("temperature", rng, layout="qwerty")[1]) for _ in range(n))
    assert set(counts) == {1, 2}
    assert _within(counts[1], n, DEFAULT_MIX.edits_per_word[1])


def test_edit_kinds_follow_the_mix() -> None:
    # "address" admits every kind, so single edits are drawn with the documented weights.
    rng = random.Random(5)
    kinds: Counter[EditKind] = Counter()
    n = 0
    while n < 5000:
        _, edits = misspell("address", rng, layout="qwerty")
        if len(edits) == 1:
            kinds[edits[0]] += 1
            n += 1
    total = sum(DEFAULT_MIX.kinds.values())
    for kind, weight in DEFAULT_MIX.kinds.items():
        assert _within(kinds[kind], n, weight / total), (kind, kinds[kind])


def test_substitutions_are_mostly_keyboard_neighbours() -> None:
    rng = random.Random(3)
    near = neighbours("qwerty")
    hits = 0
    n = 0
    for _ in range(20000):
        word, edits = misspell("ggggg", rng, layout="qwerty")
        if edits == (EditKind.SUBSTITUTE,):
            n += 1
            new = next(ch for ch in word if ch != "g")
            hits += new in near["g"]
    # 80% neighbours by design, plus the random 20% that land on a neighbour by chance
    # (6 of the 25 other letters).
    p = DEFAULT_MIX.neighbour_share + (1 - DEFAULT_MIX.neighbour_share) * 6 / 26
    assert _within(hits, n, p)


def test_same_seed_same_typos_and_chunks_agree() -> None:
    options = TypoOptions(seed=42)
    texts = [CleanText(text=t) for t in TEXTS]
    whole = list(typo_records(texts, lang="en", options=options))
    again = list(typo_records(texts, lang="en", options=options))
    assert whole == again
    chunked = list(typo_records(texts[:70], lang="en", options=options)) + list(
        typo_records(texts[70:], lang="en", options=options, start=70)
    )
    assert chunked == whole
    other = list(typo_records(texts, lang="en", options=TypoOptions(seed=43)))
    assert [r["source"] for r in other] != [r["source"] for r in whole]


def test_seeds_do_not_collide_by_shifting() -> None:
    # seed 1 / record 0 must not be seed 0 / record 1 (a plain seed + index would be).
    assert record_rng(1, 0).random() != record_rng(0, 1).random()


def test_clean_share_and_at_least_one_typo_otherwise() -> None:
    options = TypoOptions(seed=7, clean_share=0.2)
    records = list(typo_records([CleanText(text=t) for t in TEXTS], lang="en", options=options))
    clean = [r for r in records if r["source"] == r["gold"]]
    assert _within(len(clean), len(records), 0.2)
    assert all(r["typos"] for r in records if r["source"] != r["gold"])
    assert all(not r["typos"] for r in clean)


def test_literals_are_left_alone_and_tokens_keep_their_kind() -> None:
    options = TypoOptions(seed=1, rate=0.6, clean_share=0.0)
    for i, text in enumerate(TEXTS[:5] * 20):
        damaged = damage_text(text, record_rng(1, i), lang="en", options=options)
        gold_tokens = tokenize(damaged.gold)
        source_tokens = tokenize(damaged.source)
        assert [t.kind for t in source_tokens] == [t.kind for t in gold_tokens]
        for g, s in zip(gold_tokens, source_tokens, strict=True):
            if g.kind in LITERAL_KINDS:
                assert g.text == s.text


def test_include_literals_damages_literals() -> None:
    options = TypoOptions(seed=1, rate=1.0, clean_share=0.0, include_literals=True)
    damaged = damage_text(
        "Edit /etc/tern/tern.conf now.", record_rng(1, 0), lang="en", options=options
    )
    assert "/etc/tern/tern.conf" not in damaged.source
    assert any(t.gold == "/etc/tern/tern.conf" for t in damaged.typos)


def test_title_and_allcaps_keep_their_case() -> None:
    rng = random.Random(9)
    for _ in range(300):
        title, _ = misspell("Logger", rng, layout="qwerty")
        caps, _ = misspell("SENSOR", rng, layout="qwerty")
        assert title[0].isupper() and title[1:] == title[1:].lower()
        assert caps.isupper()


def test_cli_writes_one_record_per_line_and_errors_for_bad_lines(tmp_path: Path) -> None:
    from click.testing import CliRunner

    src = tmp_path / "clean.jsonl"
    src.write_text(
        '{"id": "a", "text": "The logger writes one file per day."}\n'
        "not json\n"
        '{"id": "c", "lang": "de", "text": "Der Logger schreibt jeden Tag eine Datei."}\n',
        encoding="utf-8",
    )
    out = tmp_path / "typos.jsonl"
    result = CliRunner().invoke(
        command, [str(src), "--seed", "3", "--output", str(out)], standalone_mode=False
    )
    assert result.exception is None
    assert result.return_value == 1
    lines = out.read_text(encoding="utf-8").splitlines()
    assert len(lines) == 3
    assert '"error"' in lines[1] and f'"file": "{src}"' in lines[1] and '"line": 2' in lines[1]
    assert '"lang": "de"' in lines[2]
