"""The compiled ruleset: tables keyed by folded text, terms found, lexicons on demand,
and the same answers from many threads at once."""

from __future__ import annotations

from collections.abc import Callable, Mapping
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import wordfreq

from guard.rules.base import Rule
from guard.ruleset.compile import compile_ruleset
from guard.ruleset.load import load_sources
from guard.ruleset.model import CompiledRuleset
from guard.text.normalize import normalize_key

Write = Callable[[dict[str, str | bytes]], Path]

TOML = """\
[ruleset]
name = "clinic-demo"
extends = []
languages = ["en", "de"]
other-languages = ["fr"]

[[terms]]
file = "terms.txt"
case = "fold"
kind = "name"

[[patterns]]
name = "lot"
regex = '\\bLOT-\\d{4}\\b'
kind = "code"

[pairs]
blocked = "blocked.txt"
allowed = ["allowed.txt"]

[critical]
files = ["critical.txt"]
"""


def _compiled(write: Write, registry: Mapping[str, Rule]) -> CompiledRuleset:
    root = write(
        {
            "r/ruleset.toml": TOML,
            "r/terms.txt": "Dr. Ilse Straßmann\nVelorin\n",
            "r/blocked.txt": "Velorin => Valorin\n",
            "r/allowed.txt": "recieve => receive\n",
            "r/critical.txt": "not\nMAẞ\n",
        }
    )
    return compile_ruleset(load_sources([root / "r"], registry=registry))


def test_tables_are_keyed_by_folded_text(write: Write, registry: Mapping[str, Rule]) -> None:
    rs = _compiled(write, registry)
    assert rs.name == "clinic-demo"
    assert (rs.languages, rs.other_languages, rs.default_language) == (("en", "de"), ("fr",), "en")
    key = (normalize_key("VELORIN", fold=True), normalize_key("valorin", fold=True))
    assert rs.blocked[key].old == "Velorin"
    assert rs.blocked[key].origin.line == 1
    assert ("recieve", "receive") in rs.allowed
    assert set(rs.critical) == {"not", "mass"}  # CaseFolding.txt: U+1E9E ẞ folds to "ss"
    assert [p.name for p in rs.patterns] == ["lot"]


def test_terms_and_lexicons(write: Write, registry: Mapping[str, Rule]) -> None:
    rs = _compiled(write, registry)
    text = "Seen by DR. ILSE STRASSMANN; Velorin 5 mg."
    hits = rs.find_terms(text)
    assert [text[h.start : h.end] for h in hits] == ["DR. ILSE STRASSMANN", "Velorin"]
    assert rs.lookup_term("velorin") is not None
    lex = rs.lexicon("de-AT")
    assert lex is not None and lex.zipf("nicht") == wordfreq.zipf_frequency("nicht", "de")
    assert rs.lexicon("tlh") is None


def test_one_compiled_ruleset_serves_many_threads(
    write: Write, registry: Mapping[str, Rule]
) -> None:
    rs = _compiled(write, registry)
    texts = [f"{i} velorin, dr. ilse straßmann {'x' * i} Velorin" for i in range(200)]
    alone = [rs.find_terms(t) for t in texts]
    with ThreadPoolExecutor(max_workers=8) as pool:
        together = list(pool.map(rs.find_terms, texts))
    assert together == alone
    assert all(len(hits) == 3 for hits in alone)
