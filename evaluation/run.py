"""The accuracy target, measured: typos -> each real speller -> guard -> score, per language.

For each language of evaluation/sets/ (real program messages, see sets/PROVENANCE.md)
this takes ``--cap`` lines from line ``--start``, injects synthetic typos (guard.evaluate.typos, one
seed), runs every speller over them, checks each (source, proposal) pair with the guard
(bundled base ruleset and default options unless told otherwise) and scores the result
against the clean line. It prints one table: overcorrections prevented and good
corrections kept, per language and speller, with F0.5 of the speller alone and with the
guard.

Speller output does not depend on the ruleset, and it is the slow part (pyspellchecker at
distance 2 on long unknown words), so proposals are cached in evaluation/proposals/
(committed for the default cap and seed), keyed by speller, language and source text:
tuning the ruleset and running again takes seconds. A cold run (no cache) takes much
longer: pyspellchecker at distance 2 spent about 20 minutes on 300 German lines on a busy
two-core machine.
Each set has three parts: lines 0-299 are the tuning part (the default; the base
ruleset's thresholds were chosen on it), lines 300-599 the held-out part (``--start 300``,
scored only to report, never to choose a setting), lines 600-899 a second tuning sample.
With ``--harvest``, each language is also scored with a second ruleset: base plus the
terms and the vocabulary ``guard harvest`` draws from the harvest corpus
(evaluation/harvest/<lang>.jsonl.gz: the rest of the same catalogs, none of lines 0-899),
which no scored line overlaps: other text of the same domain, as a team would harvest its
own documents. The draft lists are used as harvested, unreviewed.

The scored records are written to evaluation/scored/<lang>.<speller>.jsonl (the held-out
part to <lang>.<speller>.from300.jsonl), so that one
pair of language and speller can be examined or swept on its own:

    guard score evaluation/scored/de.pyspellchecker.jsonl --sweep rules.real-word.min-zipf=2:4:0.25

Usage:

    python evaluation/run.py [--cap 300] [--start 0|300] [--seed 1] [--rules base ...] [--jobs 2]
                             [--langs en,de,...] [--spellers pyspellchecker,...]
                             [--undo-flagged] [--markdown] [--examples N] [--harvest]
"""

from __future__ import annotations

import argparse
import gzip
import hashlib
import json
import os
import sys
import time
from collections.abc import Sequence
from concurrent.futures import ProcessPoolExecutor
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))

from guard.api import Guard, load_ruleset  # noqa: E402
from guard.evaluate.jsonl import CleanText  # noqa: E402
from guard.evaluate.render import pct  # noqa: E402
from guard.evaluate.score import ScoreInput, Summary, TokenEvent, score_inputs  # noqa: E402
from guard.evaluate.spellers import get_speller  # noqa: E402
from guard.evaluate.typos import TypoOptions, typo_records  # noqa: E402

LANGS = ("en", "de", "fr", "es", "nl")
SPELLERS = ("pyspellchecker", "pyspellchecker-d1", "symspell-word", "symspell-compound")
CACHE = HERE / "proposals"
TUNE = 0
"""Lines 0-299 of each set: the part the base ruleset's thresholds were tuned on."""
HELD_OUT = 300
"""Lines 300-599: the held-out part, scored only to report (``--start 300``)."""
HARVEST = HERE / "harvest"
"""<lang>.jsonl.gz: a team's "own documents" for ``--harvest``, apart from every part."""
WORK = HERE / "scored"


def load_set(lang: str, cap: int, start: int = 0) -> list[CleanText]:
    """Lines ``start`` to ``start + cap`` of the language's set."""
    path = HERE / "sets" / f"{lang}.jsonl"
    out: list[CleanText] = []
    with path.open(encoding="utf-8") as fh:
        for number, line in enumerate(fh):
            if number < start:
                continue
            d = json.loads(line)
            out.append(CleanText(text=d["text"], id=d["id"], lang=d["lang"]))
            if len(out) >= cap:
                break
    return out


def typo_set(lang: str, cap: int, seed: int, start: int = 0) -> list[dict[str, object]]:
    """The typo records of lines ``start`` to ``start + cap``: each line's typos depend on
    the seed and its line number only, so a part gets the typos the whole set would."""
    options = TypoOptions(seed=seed)
    texts = load_set(lang, cap, start)
    return list(typo_records(texts, lang=lang, options=options, start=start))


def _cache_path(speller: str, lang: str) -> Path:
    return CACHE / f"{lang}.{speller}.json"


def _key(text: str) -> str:
    return hashlib.sha256(text.encode("utf-8")).hexdigest()[:24]


def propose(job: tuple[str, str, list[str]]) -> tuple[str, str, dict[str, str], float]:
    """Run one speller over the sources of one language, reusing cached proposals."""
    speller, lang, sources = job
    path = _cache_path(speller, lang)
    cache: dict[str, str] = {}
    if path.is_file():
        cache = json.loads(path.read_text(encoding="utf-8"))
    todo = [s for s in sources if _key(s) not in cache]
    start = time.perf_counter()
    if todo:
        fix = get_speller(speller, lang)
        for s in todo:
            cache[_key(s)] = fix(s)
        CACHE.mkdir(exist_ok=True)
        tmp = path.with_suffix(".tmp")
        tmp.write_text(json.dumps(cache, ensure_ascii=False), encoding="utf-8")
        tmp.replace(path)
    return speller, lang, {s: cache[_key(s)] for s in sources}, time.perf_counter() - start


def harvest_ruleset(lang: str, corpus: Path) -> Path:
    """Write a ruleset: base plus the terms harvested from ``corpus/<lang>.jsonl.gz``."""
    from guard.vocab.harvest import harvest, vocabulary, write_drafts, write_vocabulary

    with gzip.open(corpus / f"{lang}.jsonl.gz", "rt", encoding="utf-8") as fh:
        docs = [(str(d["id"]), str(d["text"])) for d in map(json.loads, fh)]
    folder = WORK / "harvest" / lang
    written = write_drafts(harvest(docs, lang=lang), folder, overwrite=True)
    vocab = write_vocabulary(vocabulary(docs), folder, overwrite=True)
    parts = [
        f'[ruleset]\nname = "harvest-{lang}"\n'
        f'description = "base plus terms harvested from other {lang} messages"\n'
        'extends = ["base"]\n'
        f'languages = ["{lang}"]\n'
    ]
    for term_file in written:
        case = "fold" if term_file.stem == "term" else "exact"
        parts.append(
            f'\n[[terms]]\nfile = "terms/{term_file.name}"\nkind = "{term_file.stem}"\n'
            f'case = "{case}"\n'
        )
    parts.append(f'\n[vocabulary]\n{lang} = "{vocab.name}"\n')
    (folder / "ruleset.toml").write_text("".join(parts), encoding="utf-8")
    return folder / "ruleset.toml"


def score_one(
    guard: Guard, lang: str, speller: str, records: list[dict[str, object]],
    proposals: dict[str, str], undo_flagged: bool, examples: int, start: int = 0,
) -> Summary:  # fmt: skip
    inputs = [
        ScoreInput(
            id=str(r["id"]),
            lang=lang,
            source=str(r["source"]),
            gold=str(r["gold"]),
            proposal=proposals[str(r["source"])],
        )
        for r in records
    ]
    WORK.mkdir(exist_ok=True)
    part = "" if start == 0 else f".from{start}"
    with (WORK / f"{lang}.{speller}{part}.jsonl").open("w", encoding="utf-8") as fh:
        for r, i in zip(records, inputs, strict=True):
            row = {"id": i.id, "lang": lang, "source": i.source, "proposal": i.proposal,
                   "gold": i.gold, "typos": r.get("typos", [])}  # fmt: skip
            fh.write(json.dumps(row, ensure_ascii=False) + "\n")
    return score_inputs(
        inputs,
        lambda s, p, lg, sc: guard.check(s, p, lang=lg, score=sc),
        undo_flagged=undo_flagged,
        examples=examples,
    )


def table(results: dict[tuple[str, str], Summary], markdown: bool) -> str:
    header = ["lang", "speller", "overcorr.", "prevented", "good", "kept",
              "F0.5 speller", "F0.5 +guard"]  # fmt: skip
    rows = [
        [lang, speller, str(s.overcorrections), pct(s.prevented_share), str(s.good),
         pct(s.kept_share), f"{s.prf_speller.f05:.3f}", f"{s.prf_guarded.f05:.3f}"]
        for (lang, speller), s in results.items()
    ]  # fmt: skip
    if markdown:
        lines = ["| " + " | ".join(header) + " |", "|" + "---|" * len(header)]
        lines += ["| " + " | ".join(r) + " |" for r in rows]
        return "\n".join(lines)
    widths = [max(len(r[i]) for r in [header, *rows]) for i in range(len(header))]
    fmt = "  ".join(f"{{:{'<' if i < 2 else '>'}{w}}}" for i, w in enumerate(widths))
    return "\n".join(fmt.format(*r) for r in [header, *rows])


def _event(e: TokenEvent) -> str:
    rules = f" [{', '.join(e.rules)}]" if e.rules else ""
    return f"    {e.id}: {e.source!r} -> {e.proposal!r} (gold {e.gold!r}){rules}"


def main(argv: Sequence[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--cap", type=int, default=300, help="lines per language (default 300)")
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument(
        "--start",
        type=int,
        default=TUNE,
        help=f"first line scored ({TUNE}: the tuning part, the default; {HELD_OUT}: held out)",
    )
    ap.add_argument("--rules", action="append", default=None, help="ruleset (repeatable)")
    ap.add_argument("--langs", default=",".join(LANGS))
    ap.add_argument("--spellers", default=",".join(SPELLERS))
    ap.add_argument("--jobs", type=int, default=min(4, os.cpu_count() or 1))
    ap.add_argument("--undo-flagged", action="store_true")
    ap.add_argument("--markdown", action="store_true", help="print the table as Markdown")
    ap.add_argument("--examples", type=int, default=0, help="show N guard mistakes per cell")
    ap.add_argument("--json", type=Path, default=None, help="also write the numbers here")
    ap.add_argument(
        "--harvest", action="store_true", help="also score with terms harvested per language"
    )
    ap.add_argument(
        "--harvest-corpus",
        type=Path,
        default=HARVEST,
        help="the folder of <lang>.jsonl.gz that --harvest reads (default evaluation/harvest)",
    )
    args = ap.parse_args(argv)
    langs = [x for x in args.langs.split(",") if x]
    spellers = [x for x in args.spellers.split(",") if x]
    refs = tuple(args.rules or ["base"])

    started = time.perf_counter()
    sets = {lang: typo_set(lang, args.cap, args.seed, args.start) for lang in langs}
    jobs = [(sp, lang, [str(r["source"]) for r in sets[lang]]) for lang in langs for sp in spellers]
    proposals: dict[tuple[str, str], dict[str, str]] = {}
    with ProcessPoolExecutor(max_workers=max(1, args.jobs)) as pool:
        for speller, lang, got, took in pool.map(propose, jobs):
            proposals[(lang, speller)] = got
            if took > 1:
                print(f"  proposals {lang}/{speller}: {took:.0f} s", file=sys.stderr)
    guard = Guard(load_ruleset(*refs))
    results: dict[tuple[str, str], Summary] = {}
    for lang in langs:
        for speller in spellers:
            results[(lang, speller)] = score_one(
                guard, lang, speller, sets[lang], proposals[(lang, speller)],
                args.undo_flagged, args.examples, args.start,
            )  # fmt: skip
    if args.harvest:
        for lang in langs:
            harvested = Guard(load_ruleset(*refs, harvest_ruleset(lang, args.harvest_corpus)))
            for speller in spellers:
                results[(lang, f"{speller} +harvest")] = score_one(
                    harvested, lang, speller, sets[lang], proposals[(lang, speller)],
                    args.undo_flagged, args.examples, args.start,
                )  # fmt: skip
    flagged = "flagged rewrites undone" if args.undo_flagged else "flagged rewrites kept"
    part = {TUNE: "tuning part", HELD_OUT: "held-out part"}.get(args.start, "part")
    print(f"ruleset {' + '.join(refs)}; {flagged}; {part}: lines {args.start} to "
          f"{args.start + args.cap - 1}, seed {args.seed}; "
          f"{time.perf_counter() - started:.0f} s")  # fmt: skip
    print(table(results, args.markdown))
    if args.examples:
        for (lang, speller), s in results.items():
            print(f"\n{lang}/{speller}: overcorrections let through")
            print("\n".join(_event(e) for e in s.missed_overcorrections[: args.examples]))
            print(f"{lang}/{speller}: good corrections blocked")
            print("\n".join(_event(e) for e in s.blocked_corrections[: args.examples]))
    if args.json is not None:
        from guard.evaluate.render import summary_json

        data = [
            {"lang": lang, "speller": sp, **summary_json(s)} for (lang, sp), s in results.items()
        ]
        args.json.write_text(json.dumps(data, indent=1), encoding="utf-8")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
