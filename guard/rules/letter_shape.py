"""letter-shape: ALLCAPS and internal-capital tokens (acronyms, brands) are vetoed; a
capitalised word inside a sentence (a likely name) is flagged (``title-action``).

Both yield to direction evidence: when no lexicon and no term list knows the source token
and the speller moves it onto a protected term, or onto a word the lexicon knows that has
the same letter shape and lies within ``max-fix-distance`` edits, the speller is fixing a
typo ("HTTTP" -> "HTTP"), not erasing a deliberate token. Where ``compound-part-letters``
is set, a word that reads as two listed words counts as known, unless the source reads so
too: German writes compound nouns as one word and no list holds them all ("Ordnerinhlat"
-> "Ordnerinhalt", Ordner + Inhalt). Capitals of at most
``acronym-max-letters`` letters get that exemption only toward a protected term: so short
a capitalised token is an acronym ("UID", "LTS"), and one changed letter makes it
another acronym or a common word in capitals ("UND"), never a fixed typo of one. With
``hyphen-part-acronyms``, so is a part in capitals of a hyphenated word that has lower
case too ("SVGZ-Bild", "USB-Stick"), whatever its length: German and Dutch join an
abbreviation to a word with a hyphen.

A capitalised word whose only change is to lose its capital ("Commence" -> "commence",
at a sentence start too) gets ``lowered-action``: a typo changes letters, not the case a
writer chose, so this is a speller imposing the case its dictionary lists (some spellers
lower the whole run of words they rejoin).

Accepts: "HTTTP server" -> "HTTP server"; "teh" -> "the".
Vetoes: "NASA" -> "Nasa"; "JSON" -> "Jason". Flags: "met Mrs Kowalczyk" -> "met Mrs Kowalski".
"""

from __future__ import annotations

from guard.records import Action, Finding, Refinement, Rewrite, Tier, Token, TokenKind
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.rules.words import (
    UNKNOWN_BELOW,
    changed_parts,
    compound_parts,
    content_tokens,
    domain_known,
    protected,
    within_edits,
    zipf,
)
from guard.ruleset.model import RuleSettings
from guard.text.shape import Shape, shape_of

NAME = "letter-shape"
_SENTENCE_END = frozenset(".!?:;\n…。！？")


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    new_tokens = content_tokens(rw.new_tokens)
    new_texts = {t.text for t in new_tokens}
    for tok in content_tokens(rw.old_tokens):
        if tok.kind is not TokenKind.WORD or tok.text.islower() or tok.text in new_texts:
            continue  # islower: no capital, so no shape this rule protects
        shape = shape_of(tok.text)
        lowered = settings.options["lowered-action"]
        if (
            lowered in ("flag", "veto")
            and shape is Shape.TITLE
            and rw.refinement is Refinement.CASE
            and tok.text.lower() in new_texts
        ):
            return finding(
                NAME,
                Tier.DOMAIN,
                settings,
                "the rewrite only lowers the capital of '{token}': a typo changes letters, "
                "not the case a writer chose",
                rewrite=rw.index,
                action=Action(str(lowered)),
                token=tok.text,
                shape=shape.value,
            )
        if shape in (Shape.ALLCAPS, Shape.INTERNAL_CAP) and sum(c.isalpha() for c in tok.text) >= 2:
            action = None
        elif shape is Shape.TITLE and not _sentence_start(ctx, tok):
            title = settings.options["title-action"]
            if title not in ("flag", "veto"):
                continue  # "off"
            action = Action(str(title))
        else:
            continue
        if _is_typo_fix(ctx, tok.text, shape, rw, settings):
            continue
        return finding(
            NAME,
            Tier.DOMAIN,
            settings,
            "the rewrite changes '{token}', whose letter shape ({shape}) marks it as deliberate",
            rewrite=rw.index,
            action=action,
            token=tok.text,
            shape=shape.value,
        )
    return None


def _sentence_start(ctx: PairContext, tok: Token) -> bool:
    before = ctx.source[: tok.start].rstrip(" \t\"'“‘«(")
    return not before or before[-1] in _SENTENCE_END


def _is_typo_fix(
    ctx: PairContext, old: str, shape: Shape, rw: Rewrite, settings: RuleSettings
) -> bool:
    below = settings.options["unknown-below"]
    assert isinstance(below, float)
    if protected(ctx, old) or zipf(ctx, old) >= below:
        return False
    new = rw.new.strip()
    if not new:
        return False
    if domain_known(ctx, new):
        return True
    acronym = settings.options["acronym-max-letters"]
    assert isinstance(acronym, int)
    if shape is Shape.ALLCAPS and sum(c.isalpha() for c in old) <= acronym:
        return False
    if shape is Shape.INTERNAL_CAP and _acronym_part_changed(old, new, settings):
        return False
    max_fix = settings.options["max-fix-distance"]
    min_target = settings.options["min-target-zipf"]
    assert isinstance(max_fix, int) and isinstance(min_target, float)
    if shape_of(new) is not shape or not within_edits(old, new, max_fix):
        return False
    if zipf(ctx, new) >= min_target:
        return True
    # a compound moved onto another ("Tastenfolgen" -> "Tastenfolien") is no typo fixed
    return _compound(ctx, new, settings) and not _compound(ctx, old, settings)


def _acronym_part_changed(old: str, new: str, settings: RuleSettings) -> bool:
    """A part in capitals of a hyphenated compound changed ("SVGZ-Bild" -> "SVG-Bild"):
    joined by a hyphen to a word in lower case, capitals are an acronym, whatever their
    length, and one changed letter makes them another."""
    if not settings.options["hyphen-part-acronyms"]:
        return False
    return any(shape_of(part) is Shape.ALLCAPS for part, _ in changed_parts(old, new))


def _compound(ctx: PairContext, word: str, settings: RuleSettings) -> bool:
    """``word`` reads as two listed words: a compound no word list holds ("Ordnerinhalt")."""
    least = settings.options["compound-part-letters"]
    floor = settings.options["compound-part-zipf"]
    assert isinstance(least, int) and isinstance(floor, float)
    return ctx.lexicon is not None and compound_parts(ctx.lexicon, word, least, floor) is not None


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    tier=Tier.DOMAIN,
    default_action=Action.VETO,
    options={
        "unknown-below": UNKNOWN_BELOW,
        "title-action": OptionSpec(
            default="flag",
            type=str,
            doc="what a change to a capitalised word inside a sentence gets: flag, veto or "
            "off (veto suits languages that capitalise nouns)",
            per_lang=True,
            choices=("flag", "veto", "off"),
        ),
        "lowered-action": OptionSpec(
            default="off",
            type=str,
            doc="what a rewrite that only lowers a capitalised word's capital gets, at a "
            "sentence start too: flag, veto or off",
            per_lang=True,
            choices=("flag", "veto", "off"),
        ),
        "min-target-zipf": OptionSpec(
            default=3.0,
            type=float,
            doc="a typo fix must land on a word at least this common",
            per_lang=True,
        ),
        "acronym-max-letters": OptionSpec(
            default=0,
            type=int,
            doc="capitals this short are acronyms: moved onto anything but a protected "
            "term, they are never a typo fix (0: no such length)",
            per_lang=True,
        ),
        "hyphen-part-acronyms": OptionSpec(
            default=True,
            type=bool,
            doc='a part in capitals of a hyphenated word with lower-case letters ("USB-Stick") '
            "is an acronym of any length: moved onto anything but a protected term, it is "
            "never a typo fix",
            per_lang=True,
        ),
        "compound-part-letters": OptionSpec(
            default=0,
            type=int,
            doc="a typo fix may also land on an unlisted word that reads as two listed words "
            "of at least this many letters (a compound; 0: never)",
            per_lang=True,
        ),
        "compound-part-zipf": OptionSpec(
            default=3.0,
            type=float,
            doc="Zipf each of those two words must reach",
            per_lang=True,
        ),
        "max-fix-distance": OptionSpec(
            default=2,
            type=int,
            doc="largest edit distance at which an unknown token moved onto a known word "
            "of the same shape counts as a typo fix",
            per_lang=True,
        ),
    },
    check=check,
    doc=__doc__ or "",
)
