#!/usr/bin/env bash
# Runs every fuzz target (or the ones named) for SECONDS each, two at a time, niced, and prints
# one summary line per target: seconds run, executions, corpus files, crash artifacts.
#
#   fuzz/run-all.sh [SECONDS] [TARGET ...]      (default: 600 seconds, every target)
#
# Needs the nightly toolchain and cargo-fuzz (`cargo install cargo-fuzz`). The working corpus
# grows in fuzz/corpus/TARGET (seeded read-only from fuzz/seeds/TARGET), crash inputs land in
# fuzz/artifacts/TARGET, and each run's libFuzzer log in fuzz/logs/TARGET.log. Runs use fork
# mode with -ignore_crashes, so one shallow crash does not end a run; look at the artifacts
# afterwards (DEVELOPERS.md, "Fuzzing", says what to do with them).
set -euo pipefail

cd "$(dirname "$0")"
seconds="${1:-600}"
shift || true

# Largest input per target, sized to the format (the largest seed fits).
declare -A max_len=(
    [store_csv]=20000 [plain_import]=8192 [pls_import]=4096 [project_toml]=2048
    [phoneset_toml]=20000 [variant_rules]=2048 [variant_profile]=1024 [lts_rules]=10000
    [lang_config]=4096 [model_file]=8192 [queue_file]=12000 [journal_file]=4096 [g2p_decode]=128
)
targets=("$@")
if [ ${#targets[@]} -eq 0 ]; then
    targets=(store_csv plain_import pls_import project_toml phoneset_toml variant_rules variant_profile
             lts_rules lang_config model_file queue_file journal_file g2p_decode)
fi

nice -n 15 cargo +nightly fuzz build -a -s none
mkdir -p logs

run_one() {
    local t="$1"
    mkdir -p "corpus/$t" "artifacts/$t"
    local start
    start=$(date +%s)
    nice -n 15 cargo +nightly fuzz run -a -s none "$t" "corpus/$t" "seeds/$t" -- \
        -max_total_time="$seconds" -rss_limit_mb=2048 -max_len="${max_len[$t]}" -timeout=10 \
        -fork=1 -ignore_crashes=1 -ignore_timeouts=1 -ignore_ooms=1 \
        -artifact_prefix="artifacts/$t/" >"logs/$t.log" 2>&1 || true
    local took=$(( $(date +%s) - start ))
    # Fork mode prints "#EXECS ... DONE" / "#EXECS: cov: ..." lines; the last count is the total.
    local execs
    execs=$(grep -oE '^#[0-9]+' "logs/$t.log" | tail -1 | tr -d '#')
    printf '%-16s %6ss %12s execs %6s corpus %4s artifacts\n' "$t" "$took" "${execs:-?}" \
        "$(find "corpus/$t" -type f | wc -l)" "$(find "artifacts/$t" -type f | wc -l)"
}

# Two at a time: start a pair, wait for both.
for ((i = 0; i < ${#targets[@]}; i += 2)); do
    run_one "${targets[i]}" &
    if [ $((i + 1)) -lt ${#targets[@]} ]; then
        run_one "${targets[i + 1]}" &
    fi
    wait
done
