#!/usr/bin/env bash
# Runs the fuzz targets (cargo-fuzz, libFuzzer) from the committed seed corpus.
#
#   fuzz/run.sh                      every target, FUZZ_SECONDS each (default 600)
#   fuzz/run.sh csv_load analysis    just those
#   FUZZ_RUNS=2000000 fuzz/run.sh    stop each after that many executions instead
#   FUZZ_JOBS=2 fuzz/run.sh          libFuzzer workers per target (default 1)
#   FUZZ_SANITIZER=address ...       build with AddressSanitizer (default: none)
#
# cargo-fuzz needs nightly compiler features; this machine has one stable toolchain,
# so the script sets RUSTC_BOOTSTRAP=1, which lets stable rustc accept them. It
# installs cargo-fuzz (pinned) when absent. The working corpus grows in
# fuzz/corpus/TARGET (git-ignored), seeded from fuzz/seeds/TARGET; a crash lands in
# fuzz/artifacts/TARGET and the script exits non-zero. Each finding gets a
# regression test in the main test suite (see fuzz/README.md).
set -euo pipefail
cd "$(dirname "$0")/.."

CARGO_FUZZ_VERSION=0.13.2
export PATH="$HOME/.cargo/bin:$PATH"
export RUSTC_BOOTSTRAP=1
if ! cargo fuzz --version 2>/dev/null | grep -q "$CARGO_FUZZ_VERSION"; then
    cargo install cargo-fuzz --version "$CARGO_FUZZ_VERSION" --locked
fi

targets=("$@")
if [ ${#targets[@]} -eq 0 ]; then
    targets=(plan_parse csv_load analysis)
fi
seconds=${FUZZ_SECONDS:-600}
# slopewise has no unsafe code, so AddressSanitizer adds little but a 3x slowdown;
# FUZZ_SANITIZER=address turns it back on.
sanitizer=${FUZZ_SANITIZER:-none}
jobs=${FUZZ_JOBS:-1}
limit=(-max_total_time="$seconds")
# With one job libFuzzer runs in this process; with more it writes fuzz-N.log files
# in the current folder (git-ignored), shown below when the run ends.
parallel=()
if [ "$jobs" -gt 1 ]; then
    parallel=(-jobs="$jobs" -workers="$jobs")
fi
if [ -n "${FUZZ_RUNS:-}" ]; then
    limit=(-runs="$FUZZ_RUNS")
fi

cargo fuzz build -O -s "$sanitizer"
status=0
for t in "${targets[@]}"; do
    mkdir -p "fuzz/corpus/$t"
    echo "== fuzzing $t (${FUZZ_RUNS:+$FUZZ_RUNS runs}${FUZZ_RUNS:-$seconds s}, $jobs job(s))"
    log=$(mktemp)
    if ! cargo fuzz run -O -s "$sanitizer" "$t" "fuzz/corpus/$t" "fuzz/seeds/$t" -- \
        "${limit[@]}" "${parallel[@]}" -print_final_stats=1 \
        -max_len=8192 -timeout=10 -rss_limit_mb=2048 2>&1 | tee "$log" | grep -E "^#[0-9]+.*(DONE|pulse)|ERROR|SUMMARY|stat::number_of_executed_units"; then
        :
    fi
    if [ "$jobs" -gt 1 ]; then
        cat fuzz-*.log >>"$log" 2>/dev/null || true
        grep -hE "stat::number_of_executed_units|DONE" fuzz-*.log 2>/dev/null || true
    fi
    if grep -qE "ERROR: libFuzzer|SUMMARY: libFuzzer|panicked" "$log"; then
        echo "!! $t found a crash: see fuzz/artifacts/$t" >&2
        status=1
    fi
    rm -f "$log"
done
exit "$status"
