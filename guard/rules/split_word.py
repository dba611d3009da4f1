"""split-word: the speller cut one word into several and changed its letters as well.

A typist who drops a space writes two words as one ("thereport"), and the repair puts
the space back and nothing else. A speller that does not know a word ("nodelist") often
does more: it cuts the word where two words it knows almost fit and bends letters to make
them fit ("node lost"), sometimes pulling in the words around. Two mistakes in one place,
a lost space and a wrong letter beside it, are far rarer than one (most misspellings are
a single wrong, missing, extra or swapped letter: Damerau 1964, the basis of the typo mix
in guard.evaluate.typos), so a split whose letters differ from the word's is objected
to. A split that only adds spaces (or drops joiners: "e-mail" -> "e mail") is left to
``real-word``, which knows whether the word is listed. Nor is a rewrite in which one of
the new words is the old one within ``fix-reach`` edits: a typo fixed and a word put
beside it, which the aligner may join to the rewrite ("fiel" -> "file a"), is no cut.
Letter case is ignored.

Accepts: "thereport" -> "the report". Vetoes: "nodelist" -> "node lost".
"""

from __future__ import annotations

from guard.records import Action, Finding, Rewrite, Tier
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.rules.words import content_tokens, within_edits
from guard.ruleset.model import RuleSettings

NAME = "split-word"


def _letters(text: str) -> str:
    return "".join(c for c in text.casefold() if c.isalnum())


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    new_tokens = content_tokens(rw.new_tokens)
    if len(new_tokens) < 2:
        return None
    old_tokens = content_tokens(rw.old_tokens)
    if len(old_tokens) != 1:
        return None
    old = old_tokens[0].text
    if _letters(old) == "".join(_letters(t.text) for t in new_tokens):
        return None
    reach = settings.options["fix-reach"]
    assert isinstance(reach, int)
    if reach >= 0 and any(within_edits(old, t.text, reach) for t in new_tokens):
        return None
    return finding(
        NAME,
        Tier.EVIDENCE,
        settings,
        "'{old}' -> '{new}' cuts one word into {parts} and changes its letters too: "
        "a lost space is repaired by a space alone",
        rewrite=rw.index,
        old=old,
        new=rw.new.strip(),
        parts=len(new_tokens),
    )


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    local=True,
    tier=Tier.EVIDENCE,
    default_action=Action.VETO,
    options={
        "fix-reach": OptionSpec(
            default=2,
            type=int,
            doc="a new word within this many edits of the old one is that word fixed, not "
            "a part cut from it (-1: every new word counts as a part)",
            per_lang=True,
        ),
    },
    check=check,
    doc=__doc__ or "",
)
