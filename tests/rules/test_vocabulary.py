"""A domain vocabulary (the words of a team's own documents, `[vocabulary]` in a ruleset)
as evidence for `real-word`.

The Zipf values the cases rely on are checked against wordfreq (the reference library the
lexicon is built from); the edit distances against jellyfish, which the rule does not
call. The words are everyday Unix command names and English words (common practice, no
source).
"""

from __future__ import annotations

from pathlib import Path

import jellyfish
import pytest
import wordfreq

from guard.api import Guard, load_ruleset
from guard.errors import RulesetError
from guard.records import Action, Report

BASE_GAIN = 2.5  # rulesets/base: real-word.min-gain
BASE_FLOOR = 2.5  # rulesets/base: real-word.vocabulary-min-zipf


def real_word(report: Report) -> set[Action]:
    return {f.action for f in report.findings if f.rule == "real-word"}


def with_vocabulary(tmp_path: Path, words: list[str], tag: str = "en") -> Guard:
    tmp_path.mkdir(parents=True, exist_ok=True)
    (tmp_path / "vocabulary.txt").write_text(
        "# the team's words\n" + "".join(f"{w}  # count=1\n" for w in words), encoding="utf-8"
    )
    ruleset = tmp_path / "ruleset.toml"
    ruleset.write_text(
        f'[ruleset]\nname = "team"\nextends = ["base"]\n\n[vocabulary]\n{tag} = "vocabulary.txt"\n',
        encoding="utf-8",
    )
    return Guard(load_ruleset(ruleset))


def test_the_cases_sit_where_the_rule_looks() -> None:
    # "vim" is a listed word of middling frequency, "him" far more common, one edit away:
    # the frequent-misspelling exemption of real-word lets the change through by default.
    assert BASE_FLOOR <= wordfreq.zipf_frequency("vim", "en") < 3.0
    assert wordfreq.zipf_frequency("him", "en") - wordfreq.zipf_frequency("vim", "en") >= BASE_GAIN
    assert jellyfish.damerau_levenshtein_distance("vim", "him") == 1
    # "teh" is a frequent misspelling, listed above the floor too.
    assert wordfreq.zipf_frequency("teh", "en") >= BASE_FLOOR
    # "awk" is listed below the floor; "ask" one substitution away.
    assert wordfreq.zipf_frequency("awk", "en") < BASE_FLOOR
    assert wordfreq.zipf_frequency("ask", "en") - wordfreq.zipf_frequency("awk", "en") >= BASE_GAIN
    assert jellyfish.damerau_levenshtein_distance("awk", "ask") == 1


def test_without_a_vocabulary_the_exemption_holds() -> None:
    base = Guard(load_ruleset("base"))
    assert real_word(base.check("edit it in vim", "edit it in him", lang="en")) == set()
    assert real_word(base.check("run awk on it", "run ask on it", lang="en")) == set()


def test_a_middling_word_moved_onto_a_word_the_team_never_writes(tmp_path: Path) -> None:
    guard = with_vocabulary(tmp_path, ["edit", "it", "in", "the", "see", "docs"])
    report = guard.check("edit it in vim", "edit it in him", lang="en")
    assert real_word(report) == {Action.VETO}
    assert "not a word of the domain's own documents" in report.findings[0].message


def test_a_misspelling_fixed_toward_a_word_the_team_writes(tmp_path: Path) -> None:
    guard = with_vocabulary(tmp_path, ["edit", "it", "in", "him", "the", "see", "docs"])
    assert real_word(guard.check("see teh docs", "see the docs", lang="en")) == set()
    assert real_word(guard.check("edit it in vim", "edit it in him", lang="en")) == set()


def test_a_vocabulary_word_is_real_whatever_its_frequency(tmp_path: Path) -> None:
    guard = with_vocabulary(tmp_path, ["awk", "ask"])
    assert real_word(guard.check("run awk on it", "run ask on it", lang="en")) == {Action.VETO}
    # by its changed part inside a hyphenated word, and whatever the letter case
    assert real_word(guard.check("the awk-script", "the ask-script", lang="en")) == {Action.VETO}
    assert real_word(guard.check("Awk runs", "Ask runs", lang="en")) == {Action.VETO}


def test_the_vocabulary_belongs_to_its_language(tmp_path: Path) -> None:
    english = with_vocabulary(tmp_path / "en", ["awk"], tag="en")
    assert real_word(english.check("run awk on it", "run ask on it", lang="en-GB")) == {Action.VETO}
    german = with_vocabulary(tmp_path / "de", ["awk"], tag="de")
    assert real_word(german.check("run awk on it", "run ask on it", lang="en")) == set()


def test_a_vocabulary_needs_a_language_tag(tmp_path: Path) -> None:
    (tmp_path / "v.txt").write_text("awk\n", encoding="utf-8")
    ruleset = tmp_path / "ruleset.toml"
    ruleset.write_text(
        '[ruleset]\nname = "bad"\nextends = ["base"]\n\n[vocabulary]\n"not a tag" = "v.txt"\n',
        encoding="utf-8",
    )
    with pytest.raises(RulesetError, match="not a language tag"):
        load_ruleset(ruleset)


def test_a_word_that_begins_with_a_vocabulary_word(tmp_path: Path) -> None:
    # "printerless" is unlisted (wordfreq), so only its head says it is a domain word
    assert wordfreq.zipf_frequency("printerless", "en") == 0.0
    base = Guard(load_ruleset("base"))
    pair = ("a printerless setup", "a pointerless setup")
    assert real_word(base.check(*pair, lang="en")) == set()
    guard = with_vocabulary(tmp_path, ["printer", "setup"])
    report = guard.check(*pair, lang="en")
    assert real_word(report) == {Action.VETO}
    assert "begins with 'printer'" in report.findings[0].message
    # a typo fixed further on leaves the head whole: nothing for the vocabulary to say
    assert real_word(guard.check("a printerlss setup", "a printerless setup", lang="en")) == set()


def with_counted_vocabulary(tmp_path: Path, *lists: dict[str, int | None]) -> Guard:
    """A ruleset naming one vocabulary file per dict (word -> count, None: no count)."""
    tmp_path.mkdir(parents=True, exist_ok=True)
    names = []
    for i, words in enumerate(lists):
        name = f"vocabulary{i}.txt"
        lines = [w if n is None else f"{w}  # count={n}" for w, n in words.items()]
        (tmp_path / name).write_text("\n".join(lines) + "\n", encoding="utf-8")
        names.append(f'"{name}"')
    ruleset = tmp_path / "ruleset.toml"
    ruleset.write_text(
        '[ruleset]\nname = "team"\nextends = ["base"]\n\n'
        f"[vocabulary]\nen = [{', '.join(names)}]\n",
        encoding="utf-8",
    )
    return Guard(load_ruleset(ruleset))


BASE_TYPO_GAIN = 1.75  # rulesets/base: real-word.vocabulary-typo-gain, a factor of 10**1.75 = 56.2


def test_the_base_typo_gain_is_the_one_these_cases_assume() -> None:
    assert load_ruleset("base").rules["real-word"].options["vocabulary-typo-gain"] == BASE_TYPO_GAIN


def test_the_counts_of_a_vocabulary_are_read_and_merged(tmp_path: Path) -> None:
    guard = with_counted_vocabulary(
        tmp_path, {"awk": 3, "ask": 40, "sed": None}, {"awk": 2, "sed": 7, "grep": 1}
    )
    # two lists add up; a word one list gives without a count stays uncounted (0)
    assert dict(guard.ruleset.vocabulary["en"]) == {"awk": 5, "ask": 40, "sed": 0, "grep": 1}


def test_a_rare_neighbour_of_a_word_the_documents_use_all_the_time(tmp_path: Path) -> None:
    # awk -> ask is one edit (jellyfish, above) and the documents write "ask" 500 times,
    # "awk" once: 500 >= 1 * 10**1.75, so "awk" reads as their own typo and the
    # frequent-misspelling exemption of the base ruleset decides (it lets the fix pass:
    # "awk" is below the floor, "ask" 2.5 Zipf more common, see the first test).
    assert 1 * 10**BASE_TYPO_GAIN <= 500
    guard = with_counted_vocabulary(tmp_path, {"awk": 1, "ask": 500, "run": 800})
    assert real_word(guard.check("run awk on it", "run ask on it", lang="en")) == set()


def test_a_domain_word_the_documents_use_often_enough_stays_real(tmp_path: Path) -> None:
    # 30 < 1 * 10**1.75 (56.2): not rare enough beside "ask" to be read as a typo
    assert 10**BASE_TYPO_GAIN > 30
    guard = with_counted_vocabulary(tmp_path, {"awk": 1, "ask": 30})
    assert real_word(guard.check("run awk on it", "run ask on it", lang="en")) == {Action.VETO}


def test_an_uncounted_word_is_trusted_whole(tmp_path: Path) -> None:
    guard = with_counted_vocabulary(tmp_path, {"awk": None, "ask": 500})
    assert real_word(guard.check("run awk on it", "run ask on it", lang="en")) == {Action.VETO}
    guard = with_counted_vocabulary(tmp_path / "two", {"awk": 1, "ask": 500}, {"awk": None})
    assert real_word(guard.check("run awk on it", "run ask on it", lang="en")) == {Action.VETO}


def test_a_rare_word_two_edits_from_a_common_one_is_no_typo_of_it(tmp_path: Path) -> None:
    # grep -> group: two edits (jellyfish), beyond the base gain-max-distance of 1
    assert jellyfish.damerau_levenshtein_distance("grep", "group") == 2
    guard = with_counted_vocabulary(tmp_path, {"grep": 1, "group": 5000})
    report = guard.check("use grep here", "use group here", lang="en")
    assert real_word(report) == {Action.VETO}
    said = [f.message for f in report.findings if f.rule == "real-word"]
    assert said == [
        "'grep' is a word of the domain's own documents (en vocabulary); "
        "a speller that changes it does not know it"
    ]
