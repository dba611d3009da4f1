"""compound-word: a word no lexicon lists, made of two listed words, moved two edits or more.

German and Dutch write compounds as one word ("Schriftliste", "kolomnaam") and program
text joins words the same way in every language ("userlist", "taskname"); no word list
holds them all, so a general speller takes an unlisted compound for a typo and moves it
onto a listed word ("userlist" -> "setlist"). A misspelling that needs two edits to undo
is seldom that tidy: its letters no longer fall apart into two words of at least
``min-part-letters`` letters that the lexicon lists at Zipf ``min-part-zipf`` or more.
So an unknown word (Zipf under ``unknown-below``) that does, changed by ``min-distance``
edits or more (optimal string alignment, case folded), is a compound the speller did not
know. One-edit fixes are left to the other rules: a slip of one letter ("taskname" ->
"taskgame") can still read as two words. Hyphenated compounds are judged by the part
that changed ("CSV-userlist" -> "CSV-setlist").

Accepts: "recieve" -> "receive". Vetoes: "userlist" -> "setlist" (user + list).
"""

from __future__ import annotations

from guard.records import Action, Finding, Rewrite, Tier, TokenKind
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.rules.words import changed_parts, compound_parts, content_tokens, within_edits
from guard.ruleset.model import RuleSettings

NAME = "compound-word"


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    lex = ctx.lexicon
    old_tokens = content_tokens(rw.old_tokens)
    new_tokens = content_tokens(rw.new_tokens)
    if lex is None or len(old_tokens) != 1 or len(new_tokens) != 1:
        return None
    if old_tokens[0].kind is not TokenKind.WORD or new_tokens[0].kind is not TokenKind.WORD:
        return None
    least = settings.options["min-part-letters"]
    floor = settings.options["min-part-zipf"]
    below = settings.options["unknown-below"]
    reach = settings.options["min-distance"]
    assert isinstance(least, int) and isinstance(reach, int)
    assert isinstance(floor, float) and isinstance(below, float)
    for old, new in changed_parts(old_tokens[0].text, new_tokens[0].text):
        if len(old) < 2 * least or within_edits(old, new, reach - 1):
            continue
        if lex.zipf(old) >= below:
            continue
        parts = compound_parts(lex, old, least, floor)
        if parts is None:
            continue
        return finding(
            NAME,
            Tier.EVIDENCE,
            settings,
            "'{old}' reads as '{head}' + '{tail}', a compound the lexicon does not list; "
            "'{new}' is {reach} or more edits away: not a typo fix",
            rewrite=rw.index,
            old=old,
            new=new,
            head=parts[0],
            tail=parts[1],
            reach=reach,
        )
    return None


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    local=True,
    tier=Tier.EVIDENCE,
    default_action=Action.VETO,
    options={
        "min-part-letters": OptionSpec(
            default=3,
            type=int,
            doc="fewest letters of each of the two words a compound is read as",
            per_lang=True,
        ),
        "min-part-zipf": OptionSpec(
            default=3.0,
            type=float,
            doc="Zipf each of the two words must reach in the lexicon",
            per_lang=True,
        ),
        "unknown-below": OptionSpec(
            default=1.0,
            type=float,
            doc="a word rarer than this Zipf is not listed (listed words are real-word's business)",
            per_lang=True,
        ),
        "min-distance": OptionSpec(
            default=2,
            type=int,
            doc="fewest edits (optimal string alignment) between old and new for the rule "
            "to object",
            per_lang=True,
        ),
    },
    check=check,
    doc=__doc__ or "",
)
