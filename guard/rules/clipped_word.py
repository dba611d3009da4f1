"""clipped-word: the speller cut letters off one end of a word and kept the rest as it was.

A speller that does not know a prefixed or compound word ("reindex", "opcode",
"nocontrol") often clips it to the part it knows ("index", "code", "control"), and the
meaning goes with the clipped part. A typing slip seldom adds two letters at one end of
a word: most misspellings are a single wrong, missing, extra or swapped letter (Damerau
1964, the basis of the typo mix in guard.evaluate.typos), so a fix that does nothing
but drop ``min-cut`` or more letters from the start or the end is far more likely a clip
than a repair. Letter case is ignored; the rule looks at one word changed into one word.

Accepts: "recieve" -> "receive"; "thhe" -> "the" (one letter).
Vetoes: "reindex" -> "index"; "nocontrol" -> "control".
"""

from __future__ import annotations

from guard.records import Action, Finding, Rewrite, Tier, TokenKind
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.rules.words import content_tokens
from guard.ruleset.model import RuleSettings

NAME = "clipped-word"


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    old_tokens = content_tokens(rw.old_tokens)
    new_tokens = content_tokens(rw.new_tokens)
    if len(old_tokens) != 1 or len(new_tokens) != 1:
        return None
    if old_tokens[0].kind is not TokenKind.WORD or new_tokens[0].kind is not TokenKind.WORD:
        return None
    old, new = old_tokens[0].text.casefold(), new_tokens[0].text.casefold()
    min_cut = settings.options["min-cut"]
    assert isinstance(min_cut, int)
    cut = len(old) - len(new)
    if not new or cut < max(min_cut, 1):
        return None
    if old.startswith(new):
        end, piece = "end", old[len(new) :]
    elif old.endswith(new):
        end, piece = "start", old[:cut]
    else:
        return None
    return finding(
        NAME,
        Tier.EVIDENCE,
        settings,
        "'{old}' -> '{new}' only cuts '{piece}' off its {end}: a clipped word, not a typo fix",
        rewrite=rw.index,
        old=old_tokens[0].text,
        new=new_tokens[0].text,
        piece=piece,
        end=end,
    )


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    local=True,
    tier=Tier.EVIDENCE,
    default_action=Action.VETO,
    options={
        "min-cut": OptionSpec(
            default=2,
            type=int,
            doc="fewest letters cut off one end for the rewrite to count as a clip",
            per_lang=True,
        ),
    },
    check=check,
    doc=__doc__ or "",
)
