"""Regenerate queries.jsonl: catalogue searches of the invented Harbourline Marine Supply,
each with the rewrite a general-language speller might propose.

About half the pairs are good fixes of real typos: the typo is made here, by one seeded
keyboard slip, on a word that is not a protected term; a few slips happen to make another
real word, which word frequencies cannot tell from a deliberate word. About half are
overcorrections: part numbers, invented brand and model names, units, acronyms, marine
words, sizes and negations "corrected" into something else. A few are mixed (a good fix
and a bad one in the same query) and a few leave the query unchanged. Every record
carries ``gold``, the text the searcher meant, and ``kind``, what the pair demonstrates.

The output depends only on the seed, the lists below, the parts-catalogue term lists and
the wordfreq data (used to make sure a made-up typo is not itself a word). It is a demo
generator: it never imports guard, so the demo data cannot lean on the code it exercises.

Run: .venv/bin/python examples/harbourline/make_queries.py
"""

from __future__ import annotations

import json
import random
import re
from collections.abc import Iterator
from pathlib import Path

from wordfreq import zipf_frequency

SEED = 2207
TOTAL = 200
HERE = Path(__file__).resolve().parent
TERMS = HERE.parent.parent / "rulesets" / "parts-catalogue" / "terms"
CRITICAL = HERE.parent.parent / "rulesets" / "parts-catalogue" / "critical"
OUT = HERE / "queries.jsonl"

# What searchers type, spelt right. Brands, models and part numbers are invented.
QUERIES: dict[str, list[str]] = {
    "en": [
        "bilge pump with float switch",
        "stainless steel shackle 8 mm",
        "galvanised anchor chain 10 mm",
        "replacement impeller for Tidewell BP-220",
        "Halyon HX-40 winch handle",
        "Ankora Flex anchor 15 kg",
        "HM-2207-B shaft seal",
        "stainless hose clamp 16-27 mm",
        "EPDM gasket for deck hatch",
        "NMEA 2000 backbone cable 5 m",
        "zinc anode for outboard motor",
        "bronze seacock 3/4 BSP",
        "davit arm with pulley",
        "aluminium cleat 200 mm",
        "windlass remote control switch",
        "fairlead roller for mooring line",
        "Quayden Q7 navigation light",
        "Skerrow Duo battery charger",
        "Portvane Glide rudder bearing",
        "Seaveld Mistral ventilation cowl",
        "Brinevale Keelguard protection strip",
        "Kelpford mooring rope 12 mm",
        "thru-hull fitting with PTFE tape",
        "fuel filter not for petrol engines",
        "freshwater pump max 3 bar",
        "deck drain scupper stainless",
        "gunwale rubber fender profile",
        "stanchion base AISI 316",
        "propeller shaft coupling M12",
        "transom ladder with four steps",
        "hatch hinge polished stainless",
        "exhaust elbow cast bronze",
        "torque wrench 40 Nm",
        "pressure gauge 10 bar",
        "hydraulic hose 145 psi",
        "battery switch IP67 waterproof",
        "marine grease cartridge",
        "cockpit drain hose 38 mm",
        "nylon thimble for rope 10 mm",
        "skeg guard replacement",
        "pintle and gudgeon set",
        "stainless padeye with backing plate",
        "compass mounting bracket",
        "sacrificial anode kit",
        "water strainer basket",
        "HM-3140-C impeller kit",
        "HM-1185-A fuel valve",
        "anchor swivel connector",
        "starboard navigation light",
        "mooring buoy with chain",
    ],
    "de": [
        "Lenzpumpe mit Schwimmerschalter",
        "Schäkel aus Edelstahl 8 mm",
        "Ankerkette verzinkt 10 mm",
        "Ersatzimpeller für Tidewell BP-220",
        "Dichtung aus EPDM für die Luke",
        "Schlauchschelle Edelstahl 16-27 mm",
        "Zinkanode für Außenborder",
        "Opferanode nicht für Aluminium",
        "Seeventil Bronze 3/4 BSP",
        "Festmacherleine 12 mm",
        "Relingsstütze AISI 316",
        "Wasserfilter mit Sieb",
        "Batteriehauptschalter wasserdicht",
        "Kurbel für Halyon HX-40 Winde",
        "Drehmomentschlüssel 40 Nm",
        "Positionslaterne Backbord",
    ],
    "nl": [
        "lenspomp met vlotterschakelaar",
        "sluiting van RVS 8 mm",
        "ankerketting verzinkt 10 mm",
        "waaier voor Tidewell BP-220",
        "afdichting van EPDM voor luik",
        "slangklem RVS 16-27 mm",
        "zinkanode voor buitenboordmotor",
        "pomp niet geschikt voor diesel",
        "afsluiter brons 3/4 BSP",
        "landvast met oog 12 mm",
        "stootwil met lijn",
        "accuschakelaar waterdicht",
        "kikker van RVS 200 mm",
        "drukmeter 10 bar",
        "navigatielicht stuurboord",
    ],
    "es": [
        "bomba de achique con interruptor",
        "grillete de acero inoxidable 8 mm",
        "cadena de ancla galvanizada 10 mm",
        "impulsor para Tidewell BP-220",
        "junta de EPDM para escotilla",
        "abrazadera de acero inoxidable 16-27 mm",
        "ánodo de zinc para motor fueraborda",
        "grifo de fondo de bronce 3/4 BSP",
        "cabo de amarre 12 mm",
        "cornamusa de acero inoxidable",
        "interruptor de batería estanco",
        "manómetro 10 bar",
        "llave dinamométrica 40 Nm",
        "luz de navegación babor",
        "bomba de agua sin filtro",
    ],
}

# How a general-language speller "corrects" what it does not know. Each wrong form is a
# rewrite of one protected token (or phrase) into something else; the kind names what is
# lost.
OVERCORRECTIONS: list[tuple[str, str, str]] = [
    # part numbers and model codes
    ("HM-2207-B", "HM-2207-8", "part-number"),
    ("HM-2207-B", "HM-2270-B", "part-number"),
    ("HM-3140-C", "HM-3140-G", "part-number"),
    ("HM-3140-C", "HM-3410-C", "part-number"),
    ("HM-1185-A", "HM-1185 A", "part-number"),
    ("HM-1185-A", "HM-1158-A", "part-number"),
    ("BP-220", "BP-22", "part-number"),
    ("BP-220", "BP-2200", "part-number"),
    ("HX-40", "HX-400", "part-number"),
    # invented brand and model names turned into dictionary words
    ("Halyon", "Halcyon", "brand"),
    ("Ankora", "Angora", "brand"),
    ("Tidewell", "Tidewater", "brand"),
    ("Tidewell", "Tide well", "brand"),
    ("Skerrow", "Sparrow", "brand"),
    ("Quayden", "Quaden", "brand"),
    ("Portvane", "Port vane", "brand"),
    ("Seaveld", "Seafield", "brand"),
    ("Brinevale", "Brine vale", "brand"),
    ("Kelpford", "Kelp ford", "brand"),
    ("Keelguard", "Keel guard", "brand"),
    ("Mistral", "mistral", "brand"),
    ("Glide", "glide", "brand"),
    ("Duo", "Dup", "brand"),
    # units
    ("Nm", "nm", "unit"),
    ("Nm", "NM", "unit"),
    ("mm", "cm", "unit"),
    ("bar", "bars", "unit"),
    ("bar", "bat", "unit"),
    ("psi", "pi", "unit"),
    ("psi", "PSI", "unit"),
    ("kg", "kgs", "unit"),
    # acronyms of standards and materials
    ("EPDM", "Epdm", "acronym"),
    ("EPDM", "EDPM", "acronym"),
    ("NMEA", "Nema", "acronym"),
    ("AISI", "Aisi", "acronym"),
    ("PTFE", "PTEF", "acronym"),
    ("BSP", "BPS", "acronym"),
    ("RVS", "RV", "acronym"),
    ("IP67", "IP76", "acronym"),
    # words of the trade replaced by a commoner neighbour
    ("davit", "David", "marine-term"),
    ("bilge", "bulge", "marine-term"),
    ("cleat", "clear", "marine-term"),
    ("windlass", "windless", "marine-term"),
    ("fairlead", "fairhead", "marine-term"),
    ("scupper", "supper", "marine-term"),
    ("gunwale", "gun wale", "marine-term"),
    ("stanchion", "stanching", "marine-term"),
    ("skeg", "keg", "marine-term"),
    ("pintle", "pinto", "marine-term"),
    ("gudgeon", "dudgeon", "marine-term"),
    ("seacock", "sea cock", "marine-term"),
    ("transom", "transform", "marine-term"),
    ("Lenzpumpe", "Lenz Pumpe", "marine-term"),
    ("kikker", "kikkers", "marine-term"),
    ("achique", "achaque", "marine-term"),
    ("cornamusa", "cornamuse", "marine-term"),
    # words that decide what fits where
    ("not", "now", "critical"),
    ("not", "note", "critical"),
    ("niet", "net", "critical"),
    ("nicht", "nichts", "critical"),
    ("sin", "si", "critical"),
    ("max", "mac", "critical"),
    ("outboard", "onboard", "critical"),
    ("starboard", "starboards", "critical"),
    ("Backbord", "Backboard", "critical"),
    ("stuurboord", "stuurboort", "critical"),
    ("babor", "babero", "critical"),
    # sizes and threads
    ("3/4", "34", "size"),
    ("3/4", "3/8", "size"),
    ("M12", "M1", "size"),
    ("16-27", "16-72", "size"),
    ("316", "361", "size"),
]

N_OVER = 80  # overcorrections (every wrong form above at least once)
N_MIXED = 10  # a good fix and an overcorrection in one query
N_SAME = 8  # proposal equals source
N_REAL = 6  # good fixes of slips that happen to make another real word (pimp -> pump)
N_FIX = TOTAL - N_OVER - N_MIXED - N_SAME - N_REAL
REAL_ZIPF = 3.0  # a slip this common in the language counts as a real word

# QWERTY neighbours, for substitution slips (common practice, no source: the commonest
# typing error is a neighbouring key).
_ROWS = ("qwertyuiop", "asdfghjkl", "zxcvbnm")
_NEAR: dict[str, str] = {}
for r, row in enumerate(_ROWS):
    for c, ch in enumerate(row):
        near = [row[i] for i in (c - 1, c + 1) if 0 <= i < len(row)]
        for rr in (r - 1, r + 1):
            if 0 <= rr < len(_ROWS):
                near += [_ROWS[rr][i] for i in (c - 1, c, c + 1) if 0 <= i < len(_ROWS[rr])]
        _NEAR[ch] = "".join(near)

_UNACCENT = str.maketrans("áéíóúüäöñ", "aeiouuaon")


def read_list(path: Path) -> list[str]:
    """The terms of a list: one a line, '#' comments, as the ruleset format has it."""
    out = []
    for line in path.read_text(encoding="utf-8").splitlines():
        text = line.split(" #", 1)[0].strip()
        if text and not text.startswith("#"):
            out.append(text)
    return out


def untouchable() -> set[str]:
    """Words the typo maker must leave alone: protected terms and critical words."""
    words: set[str] = set()
    for folder in (TERMS, CRITICAL):
        for path in sorted(folder.glob("*.txt")):
            for term in read_list(path):
                words.update(w.casefold() for w in term.split())
    return words


def slips(word: str) -> Iterator[str]:
    """Every one-slip misspelling of ``word``, first letter kept (typists rarely miss it)."""
    for i in range(1, len(word) - 1):
        yield word[:i] + word[i + 1] + word[i] + word[i + 2 :]  # transposition
    for i in range(1, len(word)):
        yield word[:i] + word[i + 1 :]  # a letter left out
    for i in range(1, len(word)):
        yield word[:i] + word[i] + word[i:]  # a letter doubled
    for i in range(1, len(word)):
        for ch in _NEAR.get(word[i], ""):
            yield word[:i] + ch + word[i + 1 :]  # a neighbouring key
    plain = word.translate(_UNACCENT)
    if plain != word:
        yield plain  # accents left out


def is_word(text: str, lang: str) -> bool:
    return zipf_frequency(text, lang) > 0.0


def make_fix(
    rng: random.Random, query: str, lang: str, banned: set[str], *, real: bool = False
) -> str | None:
    """``query`` with one word misspelt by one slip, or None if no word can take one.

    The slip makes a non-word; with ``real``, a word of the language at least REAL_ZIPF
    common (the hard case: the source looks right to a frequency list).
    """
    words = query.split(" ")
    spots = [
        i
        for i, w in enumerate(words)
        if w.isalpha() and len(w) >= 4 and w.casefold() not in banned and is_word(w, lang)
    ]
    rng.shuffle(spots)
    for i in spots:
        options = sorted(
            {
                s
                for s in slips(words[i])
                if s != words[i]
                and s.casefold() not in banned
                and (zipf_frequency(s, lang) >= REAL_ZIPF if real else not is_word(s, lang))
            }
        )
        if options:
            bad = list(words)
            bad[i] = rng.choice(options)
            return " ".join(bad)
    return None


def replace_token(query: str, old: str, new: str) -> str | None:
    """``query`` with the whole token ``old`` replaced once, or None if it is absent."""
    pattern = r"(?<![\w/-])" + re.escape(old) + r"(?![\w/-])"
    if not re.search(pattern, query):
        return None
    return re.sub(pattern, new, query, count=1)


def build() -> list[dict[str, str]]:
    rng = random.Random(SEED)
    banned = untouchable()
    pool = [(lang, q) for lang in QUERIES for q in QUERIES[lang]]
    records: list[dict[str, str]] = []
    seen: set[tuple[str, str]] = set()

    def add(lang: str, source: str, proposal: str, gold: str, kind: str) -> bool:
        if (source, proposal) in seen:
            return False
        seen.add((source, proposal))
        records.append(
            {"source": source, "proposal": proposal, "lang": lang, "gold": gold, "kind": kind}
        )
        return True

    # Overcorrections: every wrong form once, then more at random.
    candidates = [
        (lang, q, bad, kind)
        for old, new, kind in OVERCORRECTIONS
        for lang, q in pool
        if (bad := replace_token(q, old, new)) is not None
    ]
    covered: list[tuple[str, str, str, str]] = []
    for old, new, kind in OVERCORRECTIONS:
        fits = [c for c in candidates if c[3] == kind and replace_token(c[1], old, new) == c[2]]
        if not fits:
            raise SystemExit(f"no query holds {old!r} for the overcorrection to {new!r}")
        covered.append(rng.choice(fits))
    rng.shuffle(candidates)
    over = 0
    for lang, q, bad, kind in covered + candidates:
        if over == N_OVER:
            break
        over += add(lang, q, bad, q, kind)

    # Mixed: a typo fixed and a protected token broken in the same proposal.
    mixed = 0
    for lang, q, bad, kind in candidates:
        if mixed == N_MIXED:
            break
        typo = make_fix(rng, q, lang, banned)
        if typo is None:
            continue
        both = make_both(q, typo, bad)
        if both is not None:
            mixed += add(lang, typo, both, q, "mixed-" + kind)

    # Good fixes: one slip per query, cycling through the pool in a seeded order.
    fixes = 0
    order = list(pool)
    while fixes < N_FIX:
        rng.shuffle(order)
        for lang, q in order:
            if fixes == N_FIX:
                break
            typo = make_fix(rng, q, lang, banned)
            if typo is not None:
                fixes += add(lang, typo, q, q, "fix")

    # Good fixes of slips that made another real word: the guard's known cost.
    real = 0
    while real < N_REAL:
        rng.shuffle(order)
        for lang, q in order:
            if real == N_REAL:
                break
            typo = make_fix(rng, q, lang, banned, real=True)
            if typo is not None:
                real += add(lang, typo, q, q, "fix-real-word")

    # Unchanged: the speller proposes the text as it is.
    for lang, q in rng.sample(pool, N_SAME):
        add(lang, q, q, q, "unchanged")

    rng.shuffle(records)
    out = []
    for n, rec in enumerate(records, 1):
        out.append({"id": f"q{n:03d}", **rec})
    return out


def make_both(clean: str, typo: str, broken: str) -> str | None:
    """The broken proposal with the typo word fixed: the speller did one good, one bad.

    Word for word: where the typo query differs from the clean one, the proposal has the
    clean word; where the broken one differs, the broken word. None when the two changes
    fall on the same word or the broken proposal changes the number of words.
    """
    c, t, b = clean.split(" "), typo.split(" "), broken.split(" ")
    if not (len(c) == len(t) == len(b)):
        return None
    typo_at = [i for i in range(len(c)) if c[i] != t[i]]
    broken_at = [i for i in range(len(c)) if c[i] != b[i]]
    if set(typo_at) & set(broken_at):
        return None
    return " ".join(b)


def main() -> None:
    records = build()
    with OUT.open("w", encoding="utf-8") as f:
        for rec in records:
            f.write(json.dumps(rec, ensure_ascii=False) + "\n")


if __name__ == "__main__":
    main()
