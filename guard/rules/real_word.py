"""real-word: the source word is itself a common word of the pair's language.

A real-word correction ("form" -> "from") needs context the speller may not have; and a
correct but rare-to-the-speller word is exactly what a general speller overcorrects. The
rule objects when the source word's Zipf frequency (wordfreq) is at least ``min-zipf``,
unless the new word is at least ``min-gain`` Zipf more common: web-derived frequency lists
hold frequent misspellings too ("teh" has a real Zipf value), and a fix toward a far more
common word is the speller doing its job. That exemption holds only for a fix at most
``gain-max-distance`` edits away (optimal string alignment over case-folded words): a
frequent misspelling is one slip from its word ("teh"), while a listed word two edits from
a commoner one ("udp" -> "up" is one, "sed" -> "se" one, "heap" -> "ha" two) is far more
often another word the speller does not know than a double typo that happens to land on
a listed word. Case- and spacing-only changes are not this rule's business;
punctuation-only ones are ("doesn’t" -> "doesn't" gains nothing).

A split of a word the lexicon knows ("Fehlgeformter" -> "Fehl geformter") is objected to
as well: a typo does not glue words into one the language already has.

With a domain vocabulary (the ruleset's ``[vocabulary]``: the words of the team's own
documents, as `guard harvest` lists them) two more objections hold. A word of that
vocabulary is real in the domain whatever its Zipf ("cwd", "tar"), so changing it (or a
changed part of a hyphenated word) is objected to. And the exemption for frequent
misspellings needs the new word to be one the documents use once the source is at least
``vocabulary-min-zipf`` common: misspellings sit low in the lists and land on the
commonest words, which any team's documents hold ("teh" -> "the"), while a listed word
of middling frequency moved onto a word the team never writes ("sed" -> "bed") is
another word the speller does not know. A source word that begins with a vocabulary word
of ``vocabulary-part-letters`` letters or more, which the rewrite changes
("versionierten" -> "pensionierten" takes "version" apart), is a domain word changed
too: the head of a derived or compound word the team writes; a typo seldom makes a long
domain word of a word's start, and a fix of a typo further on leaves the head whole.
Documents hold typos too: a vocabulary word the documents use ``vocabulary-typo-gain``
powers of ten less often than the word a one-slip fix writes ("fpr", 7 times, beside
"für", thousands) is read as their own misspelling, not a domain word.

Accepts: "teh" -> "the" (Zipf gain above min-gain). Vetoes: "kernel" -> "kennel".
"""

from __future__ import annotations

from guard.records import Action, Finding, Refinement, Rewrite, RewriteKind, Tier
from guard.rules.base import OptionSpec, PairContext, Rule, Scope, finding
from guard.rules.words import (
    changed_parts,
    content_tokens,
    domain_vocabulary,
    phrase_zipf,
    within_edits,
    zipf,
)
from guard.ruleset.model import RuleSettings, WordCounts
from guard.text.normalize import normalize_key

NAME = "real-word"
SKIP = frozenset({Refinement.CASE, Refinement.SPACING})


def _split_of_known_word(rw: Rewrite, ctx: PairContext, settings: RuleSettings) -> float | None:
    """The Zipf of the word a split cuts apart (letters may change a little, as when a
    compound's linking s is dropped), when that word is at least ``split-min-zipf``."""
    old = content_tokens(rw.old_tokens)
    if len(old) != 1 or len(content_tokens(rw.new_tokens)) < 2:
        return None
    z = zipf(ctx, old[0].text)
    floor = settings.options["split-min-zipf"]
    assert isinstance(floor, float)
    return z if z >= floor else None


def _near(old: str, new: str, settings: RuleSettings) -> bool:
    """``old`` and ``new`` are within ``gain-max-distance`` edits (case-folded, optimal
    string alignment), the reach of a frequent misspelling."""
    most = settings.options["gain-max-distance"]
    assert isinstance(most, int)
    if most < 0:
        return True  # no limit
    return within_edits(old, new, most)


def _vocabulary_word(rw: Rewrite, vocab: WordCounts, settings: RuleSettings) -> str | None:
    """The changed word (or changed part of a hyphenated word) of the source that the
    domain vocabulary lists, if any; the whole word when the speller splits it. Not a
    word the documents themselves seem to misspell (see :func:`_documents_typo`)."""
    old = content_tokens(rw.old_tokens)
    new = content_tokens(rw.new_tokens)
    if len(old) != 1 or not new:
        return None
    if len(new) > 1:
        word = old[0].text
        return word if normalize_key(word, fold=True) in vocab else None
    for part, replaced in changed_parts(old[0].text, new[0].text):
        if normalize_key(part, fold=True) in vocab and not _documents_typo(
            part, replaced, vocab, settings
        ):
            return part
    return None


def _documents_typo(part: str, replaced: str, vocab: WordCounts, settings: RuleSettings) -> bool:
    """Whether the documents' own counts say ``part`` is their misspelling of ``replaced``:
    a slip away (``gain-max-distance``) and ``vocabulary-typo-gain`` powers of ten rarer in
    them. Documents hold typos as web text does ("dsr" once beside "der" six thousand
    times), and the word they write all the time is what a one-slip neighbour met once
    was meant to be; that is the noisy-channel odds of the Zipf-gain exemption, with the
    team's counts for the frequencies. A word listed without a count is trusted whole."""
    count = vocab[normalize_key(part, fold=True)]
    if count == 0:
        return False
    gain = settings.options["vocabulary-typo-gain"]
    assert isinstance(gain, float)
    target = vocab.get(normalize_key(replaced, fold=True), 0)
    return target >= count * 10**gain and _near(part, replaced, settings)


def _vocabulary_head(rw: Rewrite, vocab: WordCounts, least: int) -> str | None:
    """A word of the domain vocabulary, ``least`` letters or more, that the changed word
    (or changed part) of the source begins with and what replaces it does not: the
    speller rewrote the known head of a derived or compound word ("versionierten" begins
    with "version")."""
    if least < 1:
        return None
    old = content_tokens(rw.old_tokens)
    new = content_tokens(rw.new_tokens)
    if len(old) != 1 or len(new) != 1:
        return None
    for part, replaced in changed_parts(old[0].text, new[0].text):
        word = normalize_key(part, fold=True)
        if len(word) <= least:
            continue  # the whole part is a vocabulary word or not: _vocabulary_word's case
        after = normalize_key(replaced, fold=True)
        for size in range(len(word) - 1, least - 1, -1):
            piece = word[:size]
            if piece in vocab and not after.startswith(piece):
                return piece
    return None


def _outside_vocabulary(rw: Rewrite, vocab: WordCounts) -> bool:
    """Whether a word the rewrite writes (a changed part, for a hyphenated word) is
    missing from the domain vocabulary."""
    old = content_tokens(rw.old_tokens)
    new = content_tokens(rw.new_tokens)
    if len(old) == 1 and len(new) == 1:
        written = [b for _, b in changed_parts(old[0].text, new[0].text)]
    else:
        written = [t.text for t in new]
    return any(normalize_key(w, fold=True) not in vocab for w in written)


def _vocabulary_finding(
    rw: Rewrite, ctx: PairContext, settings: RuleSettings, vocab: WordCounts
) -> Finding | None:
    """The objection when the rewrite changes a word of the domain vocabulary, or the
    vocabulary word a source word begins with."""
    template = (
        "'{word}' is a word of the domain's own documents ({lang} vocabulary); "
        "a speller that changes it does not know it"
    )
    word = _vocabulary_word(rw, vocab, settings)
    if word is None:
        least = settings.options["vocabulary-part-letters"]
        assert isinstance(least, int)
        word = _vocabulary_head(rw, vocab, least)
        template = (
            "'{old}' begins with '{word}', a word of the domain's own documents ({lang} "
            "vocabulary), and '{new}' rewrites it"
        )
    if word is None:
        return None
    return finding(
        NAME,
        Tier.EVIDENCE,
        settings,
        template,
        rewrite=rw.index,
        old=rw.old,
        new=rw.new,
        word=word,
        lang=ctx.lang,
    )


def check(rw: Rewrite | None, ctx: PairContext, settings: RuleSettings) -> Finding | None:
    assert rw is not None
    if ctx.lexicon is None or rw.kind is RewriteKind.INSERT:
        return None
    vocab = domain_vocabulary(ctx)
    if vocab is not None and rw.refinement not in SKIP:
        found = _vocabulary_finding(rw, ctx, settings, vocab)
        if found is not None:
            return found
    split_zipf = _split_of_known_word(rw, ctx, settings)
    if split_zipf is not None:
        return finding(
            NAME,
            Tier.EVIDENCE,
            settings,
            "'{old}' is a {lang} word (Zipf {zipf_old}); splitting it is not a fix",
            rewrite=rw.index,
            old=rw.old,
            new=rw.new,
            lang=ctx.lang,
            zipf_old=split_zipf,
        )
    if rw.refinement in SKIP:
        return None
    if not content_tokens(rw.old_tokens):
        return None
    min_zipf = settings.options["min-zipf"]
    min_gain = settings.options["min-gain"]
    assert isinstance(min_zipf, float) and isinstance(min_gain, float)
    z_old = phrase_zipf(ctx, rw.old_tokens)
    if z_old < min_zipf:
        return None
    z_new = phrase_zipf(ctx, rw.new_tokens) if content_tokens(rw.new_tokens) else 0.0
    if z_new - z_old >= min_gain and _near(rw.old, rw.new, settings):
        floor = settings.options["vocabulary-min-zipf"]
        assert isinstance(floor, float)
        if vocab is None or z_old < floor or not _outside_vocabulary(rw, vocab):
            return None
        return finding(
            NAME,
            Tier.EVIDENCE,
            settings,
            "'{old}' is a {lang} word (Zipf {zipf_old}), too common for a misspelling, "
            "and '{new}' is not a word of the domain's own documents",
            rewrite=rw.index,
            old=rw.old,
            new=rw.new,
            lang=ctx.lang,
            zipf_old=z_old,
            vocabulary_min_zipf=floor,
        )
    return finding(
        NAME,
        Tier.EVIDENCE,
        settings,
        "'{old}' is already listed as a word in {lang} (Zipf {zipf_old}); "
        "'{new}' (Zipf {zipf_new}) is not enough more common to call it a fix",
        rewrite=rw.index,
        old=rw.old,
        new=rw.new,
        lang=ctx.lang,
        zipf_old=z_old,
        zipf_new=z_new,
        min_zipf=min_zipf,
        min_gain=min_gain,
    )


RULE = Rule(
    name=NAME,
    scope=Scope.REWRITE,
    local=True,
    tier=Tier.EVIDENCE,
    default_action=Action.VETO,
    options={
        "min-zipf": OptionSpec(
            default=3.0,
            type=float,
            doc="Zipf at or above which the source word counts as real",
            per_lang=True,
        ),
        "min-gain": OptionSpec(
            default=1.5,
            type=float,
            doc="Zipf by which the new word must be more common for the rewrite to pass",
            per_lang=True,
        ),
        "gain-max-distance": OptionSpec(
            default=-1,
            type=int,
            doc="the min-gain exemption holds only for fixes at most this many edits away "
            "(-1: any distance)",
            per_lang=True,
        ),
        "vocabulary-min-zipf": OptionSpec(
            default=2.5,
            type=float,
            doc="with a domain vocabulary, a source word at least this common passes the "
            "min-gain exemption only toward a word of the vocabulary",
            per_lang=True,
        ),
        "vocabulary-part-letters": OptionSpec(
            default=6,
            type=int,
            doc="with a domain vocabulary, a source word that begins with a vocabulary word "
            "of at least this many letters, which the rewrite changes, is a domain word "
            "changed (0: off)",
            per_lang=True,
        ),
        "vocabulary-typo-gain": OptionSpec(
            default=1.75,
            type=float,
            doc="with a counted domain vocabulary, a vocabulary word that the documents use "
            "this many powers of ten less often than the word a fix within gain-max-distance "
            "writes is read as their own misspelling, not a domain word (99: trust them all)",
            per_lang=True,
        ),
        "split-min-zipf": OptionSpec(
            default=1.0,
            type=float,
            doc="a word at least this common is not cut in two (compounds, glued terms)",
            per_lang=True,
        ),
    },
    check=check,
    doc=__doc__ or "",
)
