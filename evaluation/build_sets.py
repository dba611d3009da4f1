"""Build the evaluation sets from program messages installed on this machine.

The accuracy target is about real technical text nobody on the project wrote: program
messages and command help. Debian packages install their translated messages as gettext
catalogs, /usr/share/locale/<lang>/LC_MESSAGES/<domain>.mo; each catalog maps the
program's English message (msgid) to its translation (msgstr). This script reads those
catalogs with its own small .mo reader (the GNU gettext binary format: a magic number,
then tables of string lengths and offsets), cuts messages into lines, keeps the lines that
read as text, and draws a deterministic sample per language:

* English: the msgids, German/French/Spanish/Dutch: the msgstrs of that language;
* a line is kept when it is 20 to 200 characters long and has at least four words of
  letters, three of them at least three letters long; printf placeholders (%s, %d,
  %1$s...), option names and paths are kept: they are the literal tokens of real
  messages;
* catalogs of plain code lists (iso_639, iso_3166...) are left out;
* lines are ranked by a SHA-256 hash of (language, domain, line) and taken round-robin
  over the domains (so that no one large catalog fills a set), up to ``--per-lang``.

Each output line names its source package and gettext domain, for provenance.
PROVENANCE.md is written beside the sets, with each package's licence as its Debian
copyright file states it.

The harvest corpus (``--harvest-only``) is the rest of the same catalogs: every kept line
of every domain that is not among the first ``--exclude`` (900) lines of the committed set
of its language, which the evaluation scores (0-599) or tunes on (600-899). It stands for
a team's own documents, the text `guard harvest` reads, and is written gzipped to
``evaluation/harvest/<lang>.jsonl.gz`` with its own PROVENANCE.md.

    python evaluation/build_sets.py [--per-lang 1000] [--out evaluation/sets]
    python evaluation/build_sets.py --harvest-only [--exclude 900] [--harvest evaluation/harvest]
"""

from __future__ import annotations

import argparse
import gzip
import hashlib
import json
import re
import struct
import subprocess
from collections import defaultdict
from collections.abc import Iterator
from pathlib import Path

LOCALE = Path("/usr/share/locale")
LANGS = ("de", "fr", "es", "nl")
SKIP_DOMAINS = re.compile(r"^(iso_|iso-)")
WORD = re.compile(r"[^\W\d_]+")


def read_mo(path: Path) -> dict[str, str]:
    """msgid -> msgstr of a .mo file (singular messages only; the header entry dropped)."""
    data = path.read_bytes()
    if len(data) < 28:
        return {}
    magic = struct.unpack("<I", data[:4])[0]
    order = "<" if magic == 0x950412DE else ">" if magic == 0xDE120495 else None
    if order is None:
        return {}
    _rev, count, ids_at, strs_at = struct.unpack(order + "4I", data[4:20])
    raw: list[tuple[bytes, bytes]] = []
    for i in range(count):
        id_len, id_off = struct.unpack(order + "2I", data[ids_at + 8 * i : ids_at + 8 * i + 8])
        s_len, s_off = struct.unpack(order + "2I", data[strs_at + 8 * i : strs_at + 8 * i + 8])
        raw.append((data[id_off : id_off + id_len], data[s_off : s_off + s_len]))
    charset = "utf-8"
    for mid, mstr in raw:
        if mid == b"":
            m = re.search(rb"charset=([-\w]+)", mstr)
            if m:
                charset = m.group(1).decode("ascii")
    out: dict[str, str] = {}
    for mid, mstr in raw:
        if not mid or b"\x00" in mid or b"\x04" in mid:  # header, plurals, contexts
            continue
        try:
            out[mid.decode(charset)] = mstr.split(b"\x00")[0].decode(charset)
        except (UnicodeDecodeError, LookupError):
            continue
    return out


def good_line(line: str) -> bool:
    """Does a message line read as text (see the module docstring)?"""
    if not 20 <= len(line) <= 200:
        return False
    words = WORD.findall(line)
    return len(words) >= 4 and sum(len(w) >= 3 for w in words) >= 3


def lines_of(message: str) -> Iterator[str]:
    for line in message.splitlines():
        line = " ".join(line.split())
        if good_line(line):
            yield line


def package_of(path: Path) -> str:
    """The Debian package that installed ``path`` (dpkg -S), or "unknown"."""
    try:
        got = subprocess.run(
            ["dpkg", "-S", str(path)], capture_output=True, text=True, check=False
        ).stdout
    except OSError:
        return "unknown"
    return got.split(":", 1)[0].strip() if ":" in got else "unknown"


def licence_of(package: str) -> str:
    """The licences a package's Debian copyright file names (its License: lines)."""
    base = package.split(":", 1)[0]
    path = Path("/usr/share/doc") / base / "copyright"
    if not path.is_file():
        return "see the package's copyright file (not installed here)"
    names: list[str] = []
    for line in path.read_text(encoding="utf-8", errors="replace").splitlines():
        if line.startswith("License:"):
            name = line.removeprefix("License:").strip()
            if name and name not in names:
                names.append(name)
    if names:
        return "; ".join(names[:6]) + (" ..." if len(names) > 6 else "")
    text = path.read_text(encoding="utf-8", errors="replace")
    for probe in ("GNU Lesser General Public License", "GNU General Public License", "BSD", "MIT"):
        if probe in text:
            return f"{probe} (from the copyright text)"
    return "see /usr/share/doc/" + base + "/copyright"


def _rank(lang: str, domain: str, line: str) -> str:
    return hashlib.sha256(f"{lang}\x00{domain}\x00{line}".encode()).hexdigest()


def collect() -> tuple[dict[str, dict[str, list[str]]], dict[str, Path]]:
    """lang -> domain -> candidate lines; and one catalog path per domain (for dpkg)."""
    by_lang: dict[str, dict[str, set[str]]] = {lang: defaultdict(set) for lang in ("en", *LANGS)}
    paths: dict[str, Path] = {}
    for lang in LANGS:
        for mo in sorted((LOCALE / lang / "LC_MESSAGES").glob("*.mo")):
            domain = mo.stem
            if SKIP_DOMAINS.match(domain):
                continue
            catalog = read_mo(mo)
            paths.setdefault(domain, mo)
            for msgid, msgstr in catalog.items():
                if not msgstr or msgstr == msgid:
                    continue
                by_lang["en"][domain].update(lines_of(msgid))
                by_lang[lang][domain].update(lines_of(msgstr))
    ranked = {
        lang: {d: sorted(lines, key=lambda s, d=d, lang=lang: _rank(lang, d, s))
               for d, lines in sorted(domains.items()) if lines}
        for lang, domains in by_lang.items()
    }  # fmt: skip
    return ranked, paths


def sample(domains: dict[str, list[str]], n: int, lang: str) -> list[tuple[str, str]]:
    """Round-robin over domains (in hash order) until ``n`` lines: (domain, line)."""
    order = sorted(domains, key=lambda d: _rank(lang, d, ""))
    picked: list[tuple[str, str]] = []
    seen: set[str] = set()
    depth = 0
    while len(picked) < n and any(depth < len(domains[d]) for d in order):
        for d in order:
            if depth < len(domains[d]) and len(picked) < n:
                line = domains[d][depth]
                if line not in seen:
                    seen.add(line)
                    picked.append((d, line))
        depth += 1
    return picked


def write_harvest(
    ranked: dict[str, dict[str, list[str]]],
    paths: dict[str, Path],
    sets: Path,
    out: Path,
    exclude: int,
) -> None:
    """The harvest corpus: each language's lines outside the first ``exclude`` of its set."""
    out.mkdir(parents=True, exist_ok=True)
    packages: dict[str, str] = {}
    used: dict[str, dict[str, int]] = defaultdict(lambda: defaultdict(int))
    for lang in ("en", *LANGS):
        rows = (sets / f"{lang}.jsonl").read_text(encoding="utf-8").splitlines()
        kept_out = {json.loads(r)["text"] for r in rows[:exclude]}
        n = 0
        with gzip.open(out / f"{lang}.jsonl.gz", "wt", encoding="utf-8", compresslevel=9) as fh:
            for domain, lines in ranked[lang].items():
                for line in lines:
                    if line in kept_out:
                        continue
                    if domain not in packages:
                        packages[domain] = package_of(paths[domain])
                    n += 1
                    used[domain][lang] += 1
                    record = {"id": f"{lang}-h{n:05d}", "text": line, "lang": lang,
                              "package": packages[domain], "domain": domain}  # fmt: skip
                    fh.write(json.dumps(record, ensure_ascii=False) + "\n")
        print(f"{lang}: {n} harvest lines")
    write_provenance(out / "PROVENANCE.md", packages, used, what="harvest corpus")


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--per-lang", type=int, default=1000)
    ap.add_argument("--out", type=Path, default=Path(__file__).parent / "sets")
    ap.add_argument(
        "--harvest-only",
        action="store_true",
        help="write the harvest corpus beside the committed sets, not the sets",
    )
    ap.add_argument(
        "--exclude",
        type=int,
        default=900,
        help="lines of each set the harvest corpus leaves out (default 900)",
    )
    ap.add_argument("--harvest", type=Path, default=Path(__file__).parent / "harvest")
    args = ap.parse_args()
    ranked, paths = collect()
    if args.harvest_only:
        write_harvest(ranked, paths, args.out, args.harvest, args.exclude)
        return 0
    args.out.mkdir(parents=True, exist_ok=True)
    packages: dict[str, str] = {}
    used: dict[str, dict[str, int]] = defaultdict(lambda: defaultdict(int))
    for lang in ("en", *LANGS):
        rows = sample(ranked[lang], args.per_lang, lang)
        with (args.out / f"{lang}.jsonl").open("w", encoding="utf-8") as fh:
            for i, (domain, line) in enumerate(rows, start=1):
                if domain not in packages:
                    packages[domain] = package_of(paths[domain])
                used[domain][lang] += 1
                record = {
                    "id": f"{lang}-{i:04d}",
                    "text": line,
                    "lang": lang,
                    "package": packages[domain],
                    "domain": domain,
                }
                fh.write(json.dumps(record, ensure_ascii=False) + "\n")
        print(f"{lang}: {len(rows)} lines")
    write_provenance(args.out / "PROVENANCE.md", packages, used)
    return 0


def write_provenance(
    path: Path, packages: dict[str, str], used: dict[str, dict[str, int]], what: str = "sets"
) -> None:
    langs = ("en", *LANGS)
    rows = []
    for domain in sorted(used):
        pkg = packages[domain]
        counts = " | ".join(str(used[domain].get(lang, 0)) for lang in langs)
        rows.append(f"| {pkg} | {domain} | {licence_of(pkg)} | {counts} |")
    path.write_text(
        f"# Provenance of the evaluation {what}\n\n"
        f"Every line of the {what} (`en`, `de`, `fr`, `es` and `nl`) is a line of\n"
        "a program message as installed on the build machine by a Debian package: the English\n"
        "original (gettext msgid) for `en`, the package's translation (msgstr) for the others,\n"
        "read from `/usr/share/locale/<lang>/LC_MESSAGES/<domain>.mo` by\n"
        "`evaluation/build_sets.py`. Nobody on this project wrote them. They are used here as\n"
        "test data only, unchanged, and attributed to their packages below; each remains under\n"
        "its package's licence (as stated in `/usr/share/doc/<package>/copyright`, summarised\n"
        "from its `License:` lines; see that file for the full terms and the authors and\n"
        "translators). Each record names its `package` and gettext `domain`.\n\n"
        f"| package | domain | licence | {' | '.join(langs)} |\n"
        f"|---|---|---|{'---|' * len(langs)}\n" + "\n".join(rows) + "\n",
        encoding="utf-8",
    )


if __name__ == "__main__":
    raise SystemExit(main())
