#!/usr/bin/env bash
# Whole commands on a synthetic 2,000,000-entry lexicon: wall time and peak memory of each.
#
# usage: benches/scale_2m.sh [ENTRIES]        (default 2000000)
#
# Needs a release build (`cargo build --release`), python3 and /usr/bin/time (GNU time, for the
# peak resident set size). The lexicon comes from benches/synthetic_lexicon.py (deterministic),
# is imported into a store, and then stats, audit, find (cold: the cache is built; then warm,
# median of 7) and export (plain, then PLS) run on it, each as its own process.
set -euo pipefail
ENTRIES=${1:-2000000}
ROOT=$(cd "$(dirname "$0")/.." && pwd)
BIN=${ORTHOEPY_BIN:-$ROOT/target/release/orthoepy}
WORK=$(mktemp -d)
trap 'rm -rf "$WORK"' EXIT

python3 "$ROOT/benches/synthetic_lexicon.py" "$WORK/synthetic.dict" "$ENTRIES"
echo "plain file: $(wc -c < "$WORK/synthetic.dict") bytes, $(wc -l < "$WORK/synthetic.dict") lines; load average $(cut -d' ' -f1-3 /proc/loadavg)"

# measure LABEL COMMAND...: one run, wall seconds and peak RSS from GNU time.
measure() {
    local label=$1; shift
    /usr/bin/time -f "%e %M" -o "$WORK/time.txt" "$@" >/dev/null 2>"$WORK/stderr.txt" || true
    read -r secs kib < <(tail -n 1 "$WORK/time.txt")  # GNU time puts "Command exited ..." first on a non-zero exit
    printf '%-28s wall_s=%-7s peak_mib=%.0f\n' "$label" "$secs" "$(awk -v k="$kib" 'BEGIN {print k / 1024}')"
}

STORE=$WORK/synthetic.csv
measure "import" "$BIN" import plain "$WORK/synthetic.dict" -o "$STORE" --source synthetic
measure "stats" "$BIN" stats "$STORE"
measure "audit" "$BIN" audit "$STORE"
WORD=$(sed -n '1000000p' "$WORK/synthetic.dict" | cut -d' ' -f1)
measure "find (cold: builds cache)" "$BIN" find --lexicon "$STORE" "$WORD"
for _ in 1 2 3 4 5 6 7; do measure "find (warm)" "$BIN" find --lexicon "$STORE" "$WORD"; done
measure "export plain" "$BIN" export "$STORE" --format plain -o "$WORK/out.txt"
measure "export pls" "$BIN" export "$STORE" --format pls -o "$WORK/out.pls"
echo "cache file: $(wc -c < "$WORK/.orthoepy-index/synthetic.csv.idx") bytes"
