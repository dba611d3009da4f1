#!/bin/sh
# The Tern Labs demo end to end: clean product documentation -> synthetic typos -> a real
# speller -> the guard -> the score, with a sweep of one threshold.
#
#   examples/tern-docs/run.sh [OUT_DIR] [SPELLER]
#
# OUT_DIR defaults to $TMPDIR/tern-docs (or /tmp/tern-docs). SPELLER defaults to
# pyspellchecker-d1 (pyspellchecker at edit distance 1); any name that
# `guard propose --speller` takes works. pyspellchecker at its default distance 2 is
# slower: minutes rather than seconds, on long unknown words. Set GUARD to the guard
# command if it is not on PATH.
set -eu
here=$(cd "$(dirname "$0")" && pwd)
out=${1:-"${TMPDIR:-/tmp}/tern-docs"}
speller=${2:-pyspellchecker-d1}
guard=${GUARD:-guard}
mkdir -p "$out"

# 1. Typos, one language file at a time (the record's lang comes from --lang).
: > "$out/typos.jsonl"
for lang in en de fr es nl; do
    "$guard" typos "$here/text/$lang.txt" --lang "$lang" --seed 2024 --output "$out/typos-$lang.jsonl"
    cat "$out/typos-$lang.jsonl" >> "$out/typos.jsonl"
    rm "$out/typos-$lang.jsonl"
done

# 2. The speller proposes its corrections.
"$guard" propose "$out/typos.jsonl" --speller "$speller" --output "$out/proposed.jsonl"

# 3. Score the speller alone and with the guard: the bundled base ruleset, then the
#    demo's own ruleset (base + Tern Labs terms), with a sweep of the real-word threshold.
"$guard" score "$out/proposed.jsonl" --rules base --output "$out/score-base.txt"
"$guard" score "$out/proposed.jsonl" --rules "$here/ruleset/ruleset.toml" \
    --sweep rules.real-word.min-zipf=0.5:4:0.5 \
    --output "$out/score-tern.txt" --html "$out/score-tern.html"

echo "== base ruleset"
sed -n '1,17p' "$out/score-base.txt"
echo
echo "== base + Tern Labs terms (full report: $out/score-tern.txt, $out/score-tern.html)"
cat "$out/score-tern.txt"
