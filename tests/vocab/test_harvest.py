"""Harvesting candidate protected terms from a corpus.

The corpus is invented (the product "Quillmate", its dock QM-4410, its protocol QSP, its
maintainer Orla Brennick): it is demo data that exercises the shapes, never a source of
check values. Check values come from outside: word frequencies from wordfreq, keyness
from scipy, the term-list comment rule from docs/rulesets.md as the ruleset loader reads
it (guard.ruleset.load.strip_comment).
"""

from __future__ import annotations

import json
import math
import re
from pathlib import Path

import pytest
import wordfreq
from scipy.stats import chi2_contingency  # type: ignore[import-untyped]

from guard.cli.main import main
from guard.errors import GuardError, RecordError
from guard.ruleset.load import load_sources, strip_comment
from guard.vocab.harvest import (
    DEFAULT_MAX_ZIPF,
    Candidate,
    Kind,
    draft_line,
    harvest,
    rank_attacked,
    read_corpus,
    vocabulary,
    write_drafts,
)

QUILLMATE = [
    (
        "setup.md",
        "# Quillmate Setup Guide\n\n"
        "Quillmate pairs with the dock over QSP. Before the first sync, set sync_window\n"
        "to 30 in quillmate.toml and run qm --dry-run. The QM-4410 dock needs firmware\n"
        "v2.3.1 or later.\n\n"
        "Orla Brennick maintains the QSP stack. If the handshake stalls, ask Orla Brennick.\n",
    ),
    (
        "trouble.md",
        "# Troubleshooting\n\n"
        "When QSP times out, check sync_window first. A QM-4410 with old firmware drops\n"
        "the handshake; the quillmate daemon logs a resync after each drop. Run\n"
        "qm --dry-run again.\n",
    ),
    (
        "notes.md",
        "Every QM-4410 ships with QSP enabled. The resync interval follows sync_window.\n"
        "CONTACT YOUR SUPPORT TEAM IF THE DOCK STAYS OFFLINE.\n",
    ),
]


@pytest.fixture(scope="module")
def found() -> dict[str, Candidate]:
    return {c.term: c for c in harvest(QUILLMATE, lang="en")}


@pytest.mark.parametrize(
    ("term", "kind"),
    [
        pytest.param("QSP", Kind.ACRONYM, id="acronym"),
        pytest.param("QM-4410", Kind.CODE, id="code"),
        pytest.param("sync_window", Kind.IDENTIFIER, id="snake-case"),
        pytest.param("--dry-run", Kind.IDENTIFIER, id="flag"),
        pytest.param("Orla Brennick", Kind.NAME, id="two-word-name"),
        pytest.param("resync", Kind.TERM, id="rare-term"),
    ],
)
def test_finds_the_domain_vocabulary(found: dict[str, Candidate], term: str, kind: Kind) -> None:
    assert term in found, sorted(found)
    assert found[term].kind is kind


def test_counts_and_contexts(found: dict[str, Candidate]) -> None:
    qsp = found["QSP"]
    assert (qsp.count, qsp.documents) == (4, 3)
    assert len(qsp.contexts) == 2
    assert all("QSP" in context for context in qsp.contexts)
    # Contexts come from two different documents when there are two.
    assert "pairs with the dock" in qsp.contexts[0]
    assert "times out" in qsp.contexts[1]


def test_skips_common_words_and_numbers(found: dict[str, Candidate]) -> None:
    terms = {t.casefold() for t in found}
    for common in ("the", "with", "first", "check", "before", "when", "every", "30"):
        assert common not in terms
    for c in found.values():
        if c.kind in (Kind.ACRONYM, Kind.NAME, Kind.TERM):
            # Reference: wordfreq's own Zipf value, at most the default threshold of 4.5.
            assert wordfreq.zipf_frequency(c.term, "en") <= 4.5, c


def test_shouting_and_headings_are_no_evidence(found: dict[str, Candidate]) -> None:
    # "CONTACT YOUR SUPPORT TEAM..." is shouting, not a row of acronyms.
    assert not any(c.kind is Kind.ACRONYM and c.term != "QSP" for c in found.values())
    # "Quillmate Setup Guide" is a heading, not a two-word name.
    assert "Quillmate Setup" not in found
    assert "Setup Guide" not in found


def test_ranked_best_first(found: dict[str, Candidate]) -> None:
    ranked = harvest(QUILLMATE, lang="en")
    assert [c.score for c in ranked] == sorted((c.score for c in ranked), reverse=True)
    assert all(c.score == c.g2 for c in ranked)


def test_sentence_starts_are_not_names() -> None:
    docs = [
        ("a", "Gaskets wear out. Check the gaskets yearly. Gaskets crack in frost."),
        ("b", "Fit new gaskets. Ask Brennick first; Brennick keeps the gaskets."),
    ]
    kinds = {c.term: c.kind for c in harvest(docs, lang="en")}
    assert kinds["gaskets"] is Kind.TERM
    assert kinds["Brennick"] is Kind.NAME


def test_min_count_and_top() -> None:
    everything = harvest(QUILLMATE, lang="en", min_count=1)
    assert "v2.3.1" in {c.term for c in everything}  # seen once
    assert "v2.3.1" not in {c.term for c in harvest(QUILLMATE, lang="en")}
    assert harvest(QUILLMATE, lang="en", top=3) == harvest(QUILLMATE, lang="en")[:3]


def test_max_zipf_option() -> None:
    # "firmware" has a Zipf frequency between 3 and 4.5 (wordfreq): kept by default,
    # dropped when the threshold goes below it.
    zipf = wordfreq.zipf_frequency("firmware", "en")
    assert 3 < zipf <= 4.5
    assert "firmware" in {c.term for c in harvest(QUILLMATE, lang="en")}
    assert "firmware" not in {c.term for c in harvest(QUILLMATE, lang="en", max_zipf=3)}


def test_g2_matches_scipy() -> None:
    # Plain words only, so the corpus size is the number of words: 2 docs, 12 words.
    docs = [("a", "zorbic plates need zorbic bolts"), ("b", "zorbic plates fit seven old hulls")]
    total = sum(len(text.split()) for _, text in docs)
    [cand] = [c for c in harvest(docs, lang="en", min_count=3)]
    reference = wordfreq.word_frequency("zorbic", "en") * 1e9
    # Reference library: scipy's G-test of the 2x2 table, without Yates' correction.
    table = [[3, reference], [total - 3, 1e9 - reference]]
    expected = chi2_contingency(table, lambda_="log-likelihood", correction=False)[0]
    assert cand.term == "zorbic"
    assert cand.g2 == pytest.approx(float(expected), rel=1e-9)


def test_other_language_uses_its_own_frequencies() -> None:
    # "und" is among the commonest German words (wordfreq) and unknown in English.
    docs = [("a", "Pumpe und Filter und Schlauch und Ventil")] * 2
    assert "und" not in {c.term for c in harvest(docs, lang="de")}
    assert "und" in {c.term for c in harvest(docs, lang="en")}


def test_unknown_language_is_an_error() -> None:
    with pytest.raises(GuardError, match="no word frequencies for language 'xx'"):
        harvest(QUILLMATE, lang="xx")


# --- attacks ---------------------------------------------------------------------------


def _made(
    term: str,
    kind: Kind,
    *,
    count: int,
    documents: int = 1,
    zipf: float = 0.0,
    g2: float,
    attacks: int = 0,
) -> Candidate:
    """A candidate built by hand, scored by its G² as harvest scores it."""
    return Candidate(
        term=term,
        kind=kind,
        count=count,
        documents=documents,
        zipf=zipf,
        g2=g2,
        contexts=(),
        score=g2,
        attacks=attacks,
    )


def test_rank_attacked() -> None:
    corpus = harvest(QUILLMATE, lang="en")
    pairs = [
        ("Pair it over QSP first.", "Pair it over QSO first."),
        ("QSP failed on the QM-4410.", "QSO failed on the QM-4410."),
        ("Set sync_window now.", "Set sync window now."),
        ("Ask Orla Brennick.", "Ask Orla Brannick."),
        ("Teh dock is fine.", "The dock is fine."),  # a real typo: not a candidate
        ("Nothing changes here.", "Nothing changes here."),
    ]
    ranked = rank_attacked(pairs, corpus)
    by_term = {c.term: c for c in ranked}
    assert by_term["QSP"].attacks == 2
    assert by_term["sync_window"].attacks == 1
    assert by_term["Orla Brennick"].attacks == 1
    assert by_term["Brennick"].attacks == 1
    assert "QM-4410" not in by_term  # present but untouched
    assert "Teh" not in by_term and "teh" not in by_term
    qsp = by_term["QSP"]
    assert qsp.score == pytest.approx(2 * math.log(qsp.count))
    assert ranked[0].term == "QSP"
    assert [c.score for c in ranked] == sorted((c.score for c in ranked), reverse=True)


def test_insertion_at_a_term_edge_is_no_attack() -> None:
    corpus = [_made("QSP", Kind.ACRONYM, count=5, documents=2, zipf=1.2, g2=50.0)]
    assert rank_attacked([("use QSP now", "use the QSP now")], corpus) == []


def test_attacks_match_whole_tokens() -> None:
    corpus = [
        _made("qm", Kind.TERM, count=4, g2=20.0),
        _made("QM-4410", Kind.CODE, count=3, g2=30.0),
        _made("Orla Brennick", Kind.NAME, count=2, g2=25.0),
    ]
    pairs = [
        ("Fit the QM-4410 now.", "Fit the QM-4411 now."),
        # The name across a line break is still the name; a comma between is not.
        ("Ask Orla\nBrennick.", "Ask Orla\nBrannick."),
        ("Ask Orla, Brennick said.", "Ask Orla, Brannick said."),
    ]
    ranked = rank_attacked(pairs, corpus)
    assert [(c.term, c.attacks) for c in ranked] == [("QM-4410", 1), ("Orla Brennick", 1)]


def test_title_case_headings_with_short_words() -> None:
    text = "Guide to the Quillmate Dock\n\nThe dock hums when the quillmate syncs.\n"
    found = {c.term for c in harvest([("a", text), ("b", text)], lang="en")}
    assert "Quillmate Dock" not in found
    assert "quillmate" in found


# --- draft lists -----------------------------------------------------------------------


def test_drafts_follow_the_term_list_format(tmp_path: Path) -> None:
    candidates = harvest(QUILLMATE, lang="en")
    written = write_drafts(candidates, tmp_path)
    assert [p.name for p in written] == sorted(
        f"{k.value}.txt" for k in {c.kind for c in candidates}
    )
    assert all(p.parent == tmp_path / "terms" for p in written)
    codes = (tmp_path / "terms" / "code.txt").read_text(encoding="utf-8").splitlines()
    entries = [line for line in codes if not line.startswith("#")]
    assert entries[0].startswith("QM-4410  # count=3 docs=3 zipf=")
    # The loader's reading of docs/rulesets.md ("#" after a space starts a comment)
    # gives each term back, and header lines are comments.
    for path in written:
        for line in path.read_text(encoding="utf-8").splitlines():
            content = strip_comment(line)
            assert content == "" or content in {c.term for c in candidates}, line


def test_draft_line_keeps_hash_inside_terms() -> None:
    line = draft_line(_made("C#", Kind.NAME, count=4, documents=2, zipf=2.5, g2=12.25, attacks=3))
    assert line == "C#  # count=4 docs=2 zipf=2.50 G2=12.2 attacks=3"
    assert strip_comment(line) == "C#"


def test_unwritable_terms_become_comments(tmp_path: Path) -> None:
    [path] = write_drafts([_made("#tag", Kind.IDENTIFIER, count=2, g2=30.0)], tmp_path)
    assert path.read_text(encoding="utf-8").splitlines()[-1] == (
        "# cannot be a term line as written: '#tag'"
    )


def test_drafts_refuse_to_overwrite(tmp_path: Path) -> None:
    candidates = harvest(QUILLMATE, lang="en", top=2)
    write_drafts(candidates, tmp_path)
    with pytest.raises(GuardError, match="draft lists exist already"):
        write_drafts(candidates, tmp_path)
    write_drafts(candidates, tmp_path, overwrite=True)


# --- reading ---------------------------------------------------------------------------


def test_read_corpus_walks_folders(tmp_path: Path) -> None:
    (tmp_path / "docs" / "deep").mkdir(parents=True)
    (tmp_path / "docs" / "a.md").write_text("alpha", encoding="utf-8")
    (tmp_path / "docs" / "deep" / "b.rst").write_text("beta", encoding="utf-8")
    (tmp_path / "docs" / "deep" / "c.py").write_text("skipped", encoding="utf-8")
    (tmp_path / "docs" / "d.jsonl").write_text(
        '{"body": "gamma"}\n\n{"body": "delta"}\n', encoding="utf-8"
    )
    errors: list[RecordError] = []
    docs = list(read_corpus([tmp_path / "docs"], field="body", errors=errors))
    base = tmp_path / "docs"
    assert docs == [
        (str(base / "a.md"), "alpha"),
        (f"{base / 'd.jsonl'}:1", "gamma"),
        (f"{base / 'd.jsonl'}:3", "delta"),
        (str(base / "deep" / "b.rst"), "beta"),
    ]
    assert errors == []


def test_read_corpus_names_bad_lines(tmp_path: Path) -> None:
    path = tmp_path / "c.jsonl"
    path.write_text('{"text": "ok"}\n{"text": 3}\nnot json\n[1]\n{"other": "x"}\n', "utf-8")
    bad = tmp_path / "bad.txt"
    bad.write_bytes(b"fine\n\xff\n")
    errors: list[RecordError] = []
    docs = list(read_corpus([path, bad, tmp_path / "missing.md"], errors=errors))
    assert docs == [(f"{path}:1", "ok")]
    assert [str(e) for e in errors] == [
        f"{path}:2: field 'text' is a int, not a string",
        f"{path}:3: not JSON: Expecting value",
        f"{path}:4: not a JSON object",
        f"{path}:5: field 'text' is missing",
        f"{bad}:2: not valid UTF-8 (byte 5)",
        f"{tmp_path / 'missing.md'}: no such file or folder",
    ]


# --- command line ----------------------------------------------------------------------


def _corpus(tmp_path: Path) -> Path:
    folder = tmp_path / "corpus"
    folder.mkdir()
    for name, text in QUILLMATE:
        (folder / name).write_text(text, encoding="utf-8")
    return folder


def test_cli_table(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    folder = _corpus(tmp_path)
    code = main(["harvest", str(folder), "--lang", "en", "--top", "3"])
    out, err = capsys.readouterr()
    assert code == 0
    lines = out.splitlines()
    assert lines[0].split() == ["term", "kind", "count", "docs", "zipf", "G²", "context"]
    top3 = harvest([(str(folder / n), t) for n, t in sorted(QUILLMATE)], lang="en", top=3)
    assert [line.split()[0] for line in lines[1:]] == [c.term for c in top3]
    assert err == "guard harvest: 3 documents, {} candidates, 3 shown\n".format(
        len(harvest(QUILLMATE, lang="en"))
    )


def test_cli_jsonl_proposals_and_drafts(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    folder = _corpus(tmp_path)
    proposals = tmp_path / "pairs.jsonl"
    proposals.write_text(
        json.dumps({"source": "QSP is up", "proposal": "QSO is up"})
        + "\n"
        + json.dumps({"source": "use sync_window", "proposal": "use sync window"})
        + "\n",
        encoding="utf-8",
    )
    out_dir = tmp_path / "drafts"
    code = main(
        [
            "harvest",
            str(folder),
            "--lang",
            "en",
            "--format",
            "jsonl",
            "--proposals",
            str(proposals),
            "--out",
            str(out_dir),
        ]
    )
    out, err = capsys.readouterr()
    assert code == 0
    rows = [json.loads(line) for line in out.splitlines()]
    assert [(r["term"], r["attacks"]) for r in rows] == [("QSP", 1), ("sync_window", 1)]
    assert err.splitlines() == [
        f"guard harvest: wrote {out_dir / 'terms' / 'acronym.txt'}",
        f"guard harvest: wrote {out_dir / 'terms' / 'identifier.txt'}",
        f"guard harvest: wrote {out_dir / 'vocabulary.txt'}",
        "guard harvest: 3 documents, 2 candidates, 2 shown",
    ]


def test_cli_reports_every_bad_input(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    corpus = tmp_path / "c.jsonl"
    corpus.write_text('{"text": "QSP"}\nbroken\n', encoding="utf-8")
    proposals = tmp_path / "p.jsonl"
    proposals.write_text('{"source": "a"}\n', encoding="utf-8")
    code = main(["harvest", str(corpus), "--lang", "en", "--proposals", str(proposals)])
    out, err = capsys.readouterr()
    assert code == 2
    assert out == ""
    lines = err.splitlines()
    assert lines[0] == f"guard harvest: {corpus}:2: not JSON: Expecting value"
    assert lines[1].startswith(f"guard harvest: {proposals}:1: ")
    assert len(lines) == 2


def test_cli_bad_language(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    code = main(["harvest", str(_corpus(tmp_path)), "--lang", "xx"])
    out, err = capsys.readouterr()
    assert code == 2
    assert out == ""
    assert "no word frequencies for language 'xx'" in err


def test_german_nouns_are_terms_not_names() -> None:
    # German capitalises every noun (official spelling rules, §55, from memory): "Datei"
    # and "Verzeichnis" (both listed by wordfreq for German) are capitalised inside every
    # sentence yet are no names; "Quillmate", which no lexicon lists, still is one. The
    # same capitalised word in English text is evidence of a name.
    docs = [
        ("a", "es fehlt die Datei, die in dem Verzeichnis liegt, und so bricht Quillmate ab"),
        ("b", "jetzt wird die Datei in das Verzeichnis kopiert, wie Quillmate es verlangt"),
    ]
    kinds = {c.term: c.kind.value for c in harvest(docs, lang="de", min_g2=0.0)}
    assert kinds["Quillmate"] == "name"
    assert kinds["Datei"] == "term"
    assert kinds["Verzeichnis"] == "term"
    english = [
        ("a", "we open the Datei when the server starts"),
        ("b", "then you save the Datei before the server stops"),
    ]
    assert {c.term: c.kind.value for c in harvest(english, lang="en")}["Datei"] == "name"


def test_vocabulary_counts_every_word_common_ones_too() -> None:
    words = dict(vocabulary(QUILLMATE))
    text = " ".join(t for _, t in QUILLMATE)
    # The count a plain whole-word search gives (common practice, no source); "the" is
    # among the commonest English words (wordfreq), which the term lists never hold.
    assert words["the"] == len(re.findall(r"\bthe\b", text, flags=re.IGNORECASE))
    assert wordfreq.zipf_frequency("the", "en") > DEFAULT_MAX_ZIPF
    assert words["dock"] == len(re.findall(r"\bdock\b", text, flags=re.IGNORECASE))
    # literal tokens are the term lists' business
    assert "qm-4410" not in words and "sync_window" not in words


def test_vocabulary_counts_hyphenated_words_and_their_parts() -> None:
    words = dict(vocabulary([("a", "Der NULL-Zeiger und der Zeiger.")]))
    assert words["null-zeiger"] == 1 and words["null"] == 1 and words["zeiger"] == 2
    assert dict(vocabulary([("a", "Der NULL-Zeiger und der Zeiger.")], min_count=2)) == {
        "der": 2,
        "zeiger": 2,
    }
    with pytest.raises(ValueError):
        vocabulary([], min_count=0)


def test_cli_vocabulary_reads_back_as_a_ruleset(tmp_path: Path) -> None:
    out_dir = tmp_path / "drafts"
    corpus = _corpus(tmp_path)
    assert main(["harvest", str(corpus), "--lang", "en", "--out", str(out_dir)]) == 0
    ruleset = out_dir / "ruleset.toml"
    ruleset.write_text(
        '[ruleset]\nname = "q"\nextends = ["base"]\n\n[vocabulary]\nen = "vocabulary.txt"\n',
        encoding="utf-8",
    )
    loaded = load_sources([ruleset])
    assert set(loaded.vocabulary["en"]) == {w for w, _ in vocabulary(QUILLMATE)}
    bare = tmp_path / "bare"
    assert (
        main(["harvest", str(corpus), "--lang", "en", "--out", str(bare), "--no-vocabulary"]) == 0
    )
    assert not (bare / "vocabulary.txt").exists()
