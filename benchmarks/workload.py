"""The benchmark's workload, built from a seed so that every run measures the same thing.

Everything here is invented on purpose: product codes, made-up names and multiword terms
for the protected-term lists, and short search queries built from English words (taken
from wordfreq's list, so the queries look like real traffic to the frequency rules) with
one or two words rewritten the way a speller rewrites them. Nothing here times anything;
``run.py`` does.

The same seed and sizes always give the same terms, queries and files (for one installed
wordfreq version).
"""

from __future__ import annotations

import json
import random
from collections.abc import Iterator, Sequence
from dataclasses import dataclass
from pathlib import Path

SEED = 20261202

_LETTERS = "ABCDEFGHJKLMNPRSTUVWXZ"  # no I, O, Q, Y: codes avoid look-alikes
_ONSETS = ("b", "br", "d", "dr", "f", "g", "gr", "k", "kl", "l", "m", "n", "p", "r", "s",
           "st", "t", "tr", "v", "z", "th", "sh", "qu")
_VOWELS = ("a", "e", "i", "o", "u", "ae", "io", "ei")
_CODAS = ("", "", "", "n", "r", "l", "s", "x", "m", "nd", "rt")
_QWERTY_ROWS = ("qwertyuiop", "asdfghjkl", "zxcvbnm")


@dataclass(frozen=True, slots=True, kw_only=True)
class Pair:
    """One query as typed (``source``) and as a speller rewrote it (``proposal``)."""

    source: str
    proposal: str
    touches_term: bool = False


def english_words(limit: int = 20000) -> list[str]:
    """Lower-case ASCII English words of three letters or more, commonest first."""
    from wordfreq import top_n_list

    return [w for w in top_n_list("en", limit) if w.isascii() and w.isalpha() and len(w) >= 3]


_SYLLABLES = tuple(o + v + c for o in _ONSETS for v in _VOWELS for c in _CODAS)
_NOUNS = ("pump", "valve", "module", "gateway", "suite", "engine", "bracket", "console",
          "sensor", "panel", "relay", "clamp", "filter", "router", "service", "platform")


def _pick(rng: random.Random, seq: Sequence[str]) -> str:
    """``rng.choice`` in one C call: the generator must build a million terms in seconds."""
    return seq[int(rng.random() * len(seq))]


def _num(rng: random.Random, lo: int, hi: int) -> int:
    return lo + int(rng.random() * (hi - lo))


def _invented_word(rng: random.Random, syllables: int) -> str:
    return "".join(_pick(rng, _SYLLABLES) for _ in range(syllables))


def _code(rng: random.Random) -> str:
    r = rng.random()
    a = _pick(rng, _LETTERS) + _pick(rng, _LETTERS)
    if r < 0.3:
        a += _pick(rng, _LETTERS)
        r = r / 0.3
    else:
        r = (r - 0.3) / 0.7
    if r < 0.25:
        return f"{a}-{_num(rng, 100, 100000)}"
    if r < 0.5:
        return f"{a}{_num(rng, 1, 10)}-{_num(rng, 10, 1000)}{_pick(rng, _LETTERS)}"
    if r < 0.75:
        return f"{a}-{_num(rng, 10, 100)}-{_pick(rng, _LETTERS)}{_num(rng, 1, 10)}"
    return f"{a}{_num(rng, 100, 10000)}"


def make_terms(count: int, *, seed: int = SEED, avoid: frozenset[str] = frozenset()) -> list[str]:
    """``count`` distinct invented terms: about half codes (``KT-4821``), a third made-up
    names (``Brelvaris``) and the rest multiword terms (``Tromel pump``, ``Zaeni Vorst``).

    ``avoid`` holds lower-case words an invented name must not be (real English words).

    >>> make_terms(3, seed=1) == make_terms(3, seed=1), len(set(make_terms(500, seed=1)))
    (True, 500)
    """
    rng = random.Random(seed)
    seen: set[str] = set()
    out: list[str] = []
    sizes = (2, 2, 3, 3, 4)
    while len(out) < count:
        roll = rng.random()
        if roll < 0.5:
            term = _code(rng)
        elif roll < 0.85:
            term = _invented_word(rng, sizes[int(roll * 100) % 5]).capitalize()
            if term.lower() in avoid:
                continue
        else:
            first = _invented_word(rng, 2 + (roll > 0.93)).capitalize()
            if roll < 0.94:
                term = f"{first} {_pick(rng, _NOUNS)}"
            else:
                term = f"{first} {_invented_word(rng, 2).capitalize()}"
        if term not in seen:
            seen.add(term)
            out.append(term)
    return out


def write_ruleset(folder: Path, terms: Sequence[str], *, name: str = "bench") -> Path:
    """A ruleset folder holding ``terms`` as one exact-case code list; returns the TOML path."""
    (folder / "terms").mkdir(parents=True, exist_ok=True)
    with (folder / "terms" / "big.txt").open("w", encoding="utf-8") as f:
        f.write("# invented terms for the benchmark, generated from a seed\n")
        for t in terms:
            f.write(t)
            f.write("\n")
    toml = folder / "ruleset.toml"
    toml.write_text(
        "[ruleset]\n"
        f'name = "{name}"\n'
        'description = "Benchmark workload: invented codes, names and multiword terms"\n'
        'extends = ["base"]\n'
        'languages = ["en"]\n'
        "\n"
        "[[terms]]\n"
        'file = "terms/big.txt"\n'
        'kind = "code"\n'
        'case = "exact"\n',
        encoding="utf-8",
    )
    return toml


def _typo(rng: random.Random, word: str) -> str:
    """One keyboard-style slip: a neighbouring key, a dropped, doubled or swapped letter."""
    if len(word) < 2:
        return word + word
    i = int(rng.random() * len(word))
    kind = rng.random()
    if kind < 0.25:
        ch = word[i].lower()
        for row in _QWERTY_ROWS:
            j = row.find(ch)
            if j >= 0:
                near = row[j - 1] if j > 0 and (j + 1 == len(row) or kind < 0.125) else row[j + 1]
                return word[:i] + near + word[i + 1 :]
        return word[:i] + "x" + word[i + 1 :]
    if kind < 0.5:
        return word[:i] + word[i + 1 :]
    if kind < 0.75:
        return word[:i] + word[i] + word[i:]
    i = min(i, len(word) - 2)
    return word[:i] + word[i + 1] + word[i] + word[i + 2 :]


def _zipf_word(rng: random.Random, words: Sequence[str]) -> str:
    """A word of a list sorted commonest first, drawn as Zipf's law says words occur:
    the chance of rank r falls as 1/r (a log-uniform rank)."""
    return words[int(len(words) ** rng.random()) - 1]


def make_pairs(
    count: int, *, words: Sequence[str], terms: Sequence[str], seed: int = SEED
) -> list[Pair]:
    """``count`` changed query pairs: 3–8 words, one or two of them rewritten.

    About a third of the queries carry a protected term, and in half of those the term
    itself is rewritten (a slip of a key, a letter case change, a made-up name "fixed"
    into a real word). The other rewrites are typo fixes (the typical case), real-word
    swaps and joins of two words into one.

    >>> ps = make_pairs(50, words=["alpha", "beta", "gamma", "delta"], terms=["KT-482"], seed=3)
    >>> len(ps), all(p.source != p.proposal for p in ps)
    (50, True)
    """
    rng = random.Random(seed)
    r = rng.random
    out: list[Pair] = []
    while len(out) < count:
        n = 3 + int(r() * 6)
        toks = [_zipf_word(rng, words) for _ in range(n)]
        src = list(toks)
        prop = list(toks)
        touched = False
        if terms and r() < 0.33:
            at = int(r() * n)
            term = _pick(rng, terms)
            for _ in range(min(term.count(" "), n + term.count(" ") - 8)):  # stay at 8 words
                drop = n - 1 if at != n - 1 else 0
                del toks[drop], src[drop], prop[drop]
                n -= 1
                at -= drop < at
            src[at] = prop[at] = term
            if r() < 0.5:
                touched = True
                how = r()
                if how < 0.4:
                    prop[at] = _typo(rng, term)
                elif how < 0.7:
                    prop[at] = term.lower() if term != term.lower() else term.upper()
                else:
                    prop[at] = _zipf_word(rng, words)
            others = [i for i in range(n) if i != at]
        else:
            others = list(range(n))
        k = (0 if touched else 1) + (r() < 0.25)
        for _ in range(k):
            if not others:
                break
            i = others.pop(int(r() * len(others)))
            roll = r()
            if roll < 0.75:
                src[i] = _typo(rng, toks[i])  # the speller fixes a slip
            elif roll < 0.9 or i + 1 not in others:
                prop[i] = _zipf_word(rng, words)  # a real-word swap
            else:
                prop[i] = toks[i] + toks[i + 1]  # a join: two words into one
                prop[i + 1] = ""
                others.remove(i + 1)
        source = " ".join(src)
        proposal = " ".join(t for t in prop if t)
        if source != proposal:
            out.append(Pair(source=source, proposal=proposal, touches_term=touched))
    return out


def mixed(changed: Sequence[Pair], share_unchanged: float, *, seed: int = SEED) -> list[Pair]:
    """Traffic where ``share_unchanged`` of the pairs come back from the speller untouched.

    >>> ps = [Pair(source=f"a{i}", proposal=f"b{i}") for i in range(100)]
    >>> sum(p.source == p.proposal for p in mixed(ps, 0.7))
    70
    """
    rng = random.Random(seed)
    k = round(len(changed) * share_unchanged)
    same = set(rng.sample(range(len(changed)), k))
    return [
        Pair(source=p.source, proposal=p.source) if i in same else p
        for i, p in enumerate(changed)
    ]


def jsonl_records(pairs: Sequence[Pair]) -> Iterator[str]:
    """One JSON line per pair, as ``guard filter`` reads them."""
    for i, p in enumerate(pairs):
        rec = {"id": f"q{i:07d}", "source": p.source, "proposal": p.proposal, "lang": "en"}
        yield json.dumps(rec, ensure_ascii=False) + "\n"


def write_jsonl(path: Path, pairs: Sequence[Pair]) -> Path:
    with path.open("w", encoding="utf-8") as f:
        f.writelines(jsonl_records(pairs))
    return path
