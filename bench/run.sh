#!/usr/bin/env bash
# Benchmark for `slopewise run`, end to end, on synthetic CSVs with 8 groups.
#
#   bench/run.sh            1M and 10M rows
#   bench/run.sh --quick    1M rows only
#
# Builds the release binary and the data generator (examples/bench_data.rs),
# writes the CSVs and their plans into bench/data/ (git-ignored; a CSV is reused
# until the generator's source changes), times `slopewise run PLAN --out DIR`
# (best of BENCH_RUNS runs, default 5, on a warm page cache), records peak
# resident memory, and checks the figures against the targets of the issue:
#
#   1M rows under 0.3 s, 10M rows under 4 s (on a 2-core machine),
#   peak RSS under 1.5 times the CSV's size,
#   at least 30 times faster than the pandas + statsmodels pipeline at 1M rows.
#
# The pandas + statsmodels comparison (bench/pandas_pipeline.py) runs when a
# Python with pandas, statsmodels, numpy and scipy is found: BENCH_PYTHON if set
# (BENCH_PYTHON=none skips it), else /tmp/refvenv/bin/python, else python3.
# It also checks that both pipelines computed the same key figures.
#
# Figures go to bench/RESULTS.md (BENCH_RESULTS overrides the path).
#
# Other settings, for testing the script itself or for CI with a prebuilt binary:
#   BENCH_NO_BUILD=1    do not run cargo; use the binaries already in the target dir
#   CARGO_TARGET_DIR    where the binaries are (default: target/)
#   BENCH_DATA_DIR      where the CSVs and plans go (default: bench/data/)
#   BENCH_RSS=proc      measure peak RSS by sampling /proc even if /usr/bin/time exists
#
# Nothing is installed; the script uses bash, coreutils, awk and, if present,
# GNU time (/usr/bin/time -v) for peak RSS.

set -euo pipefail

usage() { sed -n '2,5p' "$0" | sed 's/^# \{0,1\}//'; }

quick=0
for arg in "$@"; do
    case "$arg" in
        --quick) quick=1 ;;
        -h | --help) usage; exit 0 ;;
        *) echo "bench/run.sh: unknown argument '$arg' (try --quick or --help)" >&2; exit 2 ;;
    esac
done

root=$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)
cd "$root"

target_dir=${CARGO_TARGET_DIR:-$root/target}
bin=$target_dir/release/slopewise
gen=$target_dir/release/examples/bench_data
data_dir=${BENCH_DATA_DIR:-$root/bench/data}
results_file=${BENCH_RESULTS:-$root/bench/RESULTS.md}
runs=${BENCH_RUNS:-5}

work=$(mktemp -d "${TMPDIR:-/tmp}/slopewise-bench.XXXXXX")
trap 'rm -rf "$work"' EXIT

die() { echo "bench/run.sh: $*" >&2; exit 1; }

# --- build -------------------------------------------------------------------

if [[ ${BENCH_NO_BUILD:-0} != 1 ]]; then
    echo "== building (cargo build --release, example bench_data)"
    cargo build --release --quiet
    cargo build --release --quiet --example bench_data
fi
[[ -x $bin ]] || die "no binary at $bin (build it with 'cargo build --release')"
[[ -x $gen ]] || die "no generator at $gen (build it with 'cargo build --release --example bench_data')"

# --- data and plans ------------------------------------------------------------

sizes=(1000000)
((quick)) || sizes+=(10000000)

label() { # 1000000 -> 1m, 10000000 -> 10m
    echo "$(($1 / 1000000))m"
}

mkdir -p "$data_dir"
for rows in "${sizes[@]}"; do
    name=bench-$(label "$rows")
    csv=$data_dir/$name.csv
    if [[ ! -s $csv || $root/examples/bench_data.rs -nt $csv ]]; then
        echo "== generating $csv ($rows rows)"
        if [[ ${BENCH_NO_BUILD:-0} == 1 ]]; then
            "$gen" "$rows" "$csv.tmp"
        else
            cargo run --release --quiet --example bench_data -- "$rows" "$csv.tmp"
        fi
        mv "$csv.tmp" "$csv"
    fi
    cat >"$data_dir/$name.toml" <<EOF
# Benchmark plan written by bench/run.sh. The data are synthetic: invented
# numbers from examples/bench_data.rs, 8 groups with different lines.
title = "Benchmark, $rows rows, 8 groups"

[data]
path = "$name.csv"

[model]
response = "y"
covariate = "x"
group = "group"

[report]
formats = ["markdown", "json"]
out = "out-$(label "$rows")"
EOF
done

# --- measuring -------------------------------------------------------------------

# Peak RSS tool: GNU time reports the exact high-water mark from the kernel;
# without it, sample VmHWM in /proc while the process runs (the high-water mark
# only grows, so the last sample is the peak up to a few milliseconds before exit).
rss_method=proc
if [[ ${BENCH_RSS:-} != proc ]] && /usr/bin/time -v true >/dev/null 2>&1; then
    rss_method=gnu-time
fi

now_ns() { date +%s%N; }

# run_once LOG CMD... : runs CMD with stdout/stderr to LOG; sets last_ns, last_kb.
run_once() {
    local log=$1 start end status=0
    shift
    start=$(now_ns)
    if [[ $rss_method == gnu-time ]]; then
        /usr/bin/time -v -o "$work/time.txt" "$@" >"$log" 2>&1 || status=$?
        end=$(now_ns)
        last_kb=$(awk -F': *' '/Maximum resident set size/ {print $2}' "$work/time.txt")
    else
        # Sampling costs a little CPU beside the run; on two cores it mostly
        # lands on the other core. GNU time is the better instrument.
        "$@" >"$log" 2>&1 &
        local pid=$! key value rest done_=0
        last_kb=0
        while ((!done_)) && [[ -r /proc/$pid/status ]]; do
            while read -r key value rest; do
                case $key in
                    VmHWM:) ((value > last_kb)) && last_kb=$value ;;
                    # A finished child stays a zombie (no memory lines) until waited for.
                    State:) [[ $value == Z ]] && done_=1 ;;
                esac
            done 2>/dev/null <"/proc/$pid/status" || true
            ((done_)) || sleep 0.005
        done
        wait "$pid" || status=$?
        end=$(now_ns)
    fi
    last_ns=$((end - start))
    return "$status"
}

# measure NAME PREP CMD... : best wall time (ns) and peak RSS (KB) over $runs
# runs; the shell function PREP runs before each run, outside the timing.
measure() {
    local name=$1 prep=$2 i
    shift 2
    best_ns=
    peak_kb=0
    for ((i = 1; i <= runs; i++)); do
        "$prep"
        if ! run_once "$work/$name.log" "$@"; then
            echo "---- output of the failed run ($name):" >&2
            cat "$work/$name.log" >&2
            die "'$*' failed"
        fi
        if [[ -z $best_ns ]] || ((last_ns < best_ns)); then best_ns=$last_ns; fi
        if ((last_kb > peak_kb)); then peak_kb=$last_kb; fi
    done
}

secs() { awk -v ns="$1" 'BEGIN { printf "%.3f", ns / 1e9 }'; }
mib() { awk -v b="$1" 'BEGIN { printf "%.1f", b / 1048576 }'; }
verdict() { if awk "BEGIN { exit !($1) }"; then echo pass; else echo FAIL; fi; }

declare -A wall_s rss_kb csv_bytes
table_rows=()
failures=0
for rows in "${sizes[@]}"; do
    l=$(label "$rows")
    csv=$data_dir/bench-$l.csv
    plan=$data_dir/bench-$l.toml
    csv_bytes[$l]=$(stat -c %s "$csv")
    cat "$csv" >/dev/null # warm the page cache: every timed run reads from memory
    echo "== slopewise run, $rows rows (best of $runs)"
    out=$work/out-$l
    clear_out() { rm -rf "$out"; } # each run starts without an output folder
    measure "slopewise-$l" clear_out "$bin" run "$plan" --out "$out"
    [[ -f $work/out-$l/results.json ]] || die "slopewise wrote no results.json for $plan"
    wall_s[$l]=$(secs "$best_ns")
    rss_kb[$l]=$peak_kb
    limit=$([[ $l == 1m ]] && echo 0.3 || echo 4)
    ratio=$(awk -v r="$peak_kb" -v c="${csv_bytes[$l]}" 'BEGIN { printf "%.2f", r * 1024 / c }')
    t_ok=$(verdict "${wall_s[$l]} < $limit")
    m_ok=$(verdict "$ratio < 1.5")
    [[ $t_ok == pass && $m_ok == pass ]] || failures=$((failures + 1))
    printf '   CSV %s MiB, wall %s s (target < %s s: %s), peak RSS %s MiB, RSS/CSV %s (target < 1.5: %s)\n' \
        "$(mib "${csv_bytes[$l]}")" "${wall_s[$l]}" "$limit" "$t_ok" "$(mib $((peak_kb * 1024)))" "$ratio" "$m_ok"
    table_rows+=("| $rows | $(mib "${csv_bytes[$l]}") | ${wall_s[$l]} | < $limit | $t_ok | $(mib $((peak_kb * 1024))) | $ratio | < 1.5 | $m_ok |")
done

# --- the demo plan with its PDF (typst included) --------------------------------------
pdf_line="| demo plan with PDF | not measured: typst is not installed | < 2 | |"
if command -v typst >/dev/null 2>&1; then
    echo "== slopewise run plans/nursery-2026.toml with PDF (best of $runs)"
    out=$work/out-demo
    clear_out() { rm -rf "$out"; }
    measure demo-pdf clear_out "$bin" run "$root/plans/nursery-2026.toml" --out "$out"
    [[ -f $out/report.pdf ]] || die "the demo plan wrote no report.pdf"
    demo_s=$(secs "$best_ns")
    d_ok=$(verdict "$demo_s < 2")
    [[ $d_ok == pass ]] || failures=$((failures + 1))
    printf '   wall %s s (target < 2 s: %s), %s\n' "$demo_s" "$d_ok" "$(typst --version)"
    pdf_line="| demo plan with PDF ($(typst --version)) | $demo_s s | < 2 s | $d_ok |"
fi

# --- pandas + statsmodels -----------------------------------------------------------

python=
python_note="not run: no Python with pandas, statsmodels, numpy and scipy found"
has_stack() { "$1" -c 'import pandas, statsmodels, numpy, scipy' >/dev/null 2>&1; }
if [[ -n ${BENCH_PYTHON:-} ]]; then
    if [[ $BENCH_PYTHON == none ]]; then
        python_note="not run: BENCH_PYTHON=none"
    elif has_stack "$BENCH_PYTHON"; then
        python=$BENCH_PYTHON
    else
        python_note="not run: BENCH_PYTHON=$BENCH_PYTHON lacks pandas, statsmodels, numpy or scipy"
    fi
else
    for candidate in /tmp/refvenv/bin/python python3; do
        if command -v "$candidate" >/dev/null 2>&1 && has_stack "$candidate"; then
            python=$candidate
            break
        fi
    done
fi

py_lines=()
if [[ -n $python ]]; then
    versions=$("$python" -c 'import sys, pandas, statsmodels, numpy; print(f"Python {sys.version.split()[0]}, pandas {pandas.__version__}, statsmodels {statsmodels.__version__}, numpy {numpy.__version__}")')
    echo "== pandas + statsmodels pipeline, 1000000 rows (best of $runs; $versions)"
    nothing() { :; }
    measure pandas-1m nothing "$python" "$root/bench/pandas_pipeline.py" "$data_dir/bench-1m.csv" "$work/pandas-1m.json"
    py_s=$(secs "$best_ns")
    speedup=$(awk -v p="$py_s" -v s="${wall_s[1m]}" 'BEGIN { printf "%.1f", p / s }')
    s_ok=$(verdict "$speedup >= 30")
    [[ $s_ok == pass ]] || failures=$((failures + 1))
    # Same figures? Compare the key numbers of both results files.
    agreement=$("$python" - "$work/out-1m/results.json" "$work/pandas-1m.json" <<'EOF'
import json, math, sys
try:
    ours, theirs = (json.load(open(p)) for p in sys.argv[1:3])
    pairs = [
        ("equal_slopes.f", ours["equal_slopes"]["f"], theirs["equal_slopes"]["f"]),
        ("common_slope.slope", ours["common_slope"]["slope"], theirs["common_slope"]["slope"]),
        ("group_effect.f", ours["group_effect"]["f"], theirs["group_effect"]["f"]),
    ]
    means = {m["level"]: m["mean"] for m in theirs["adjusted_means"]}
    pairs += [(f"adjusted_means[{m['level']}]", m["mean"], means[m["level"]]) for m in ours["adjusted_means"]]
    bad = [name for name, a, b in pairs if not math.isclose(a, b, rel_tol=1e-6, abs_tol=1e-9)]
    print(f"differ in {', '.join(bad)}" if bad else f"agree ({len(pairs)} figures within 1e-6 relative)")
except Exception as e:  # a results.json without these keys is itself a finding
    print(f"could not compare: {type(e).__name__}: {e}")
EOF
)
    printf '   wall %s s, peak RSS %s MiB; slopewise is %sx faster (target >= 30: %s); results %s\n' \
        "$py_s" "$(mib $((peak_kb * 1024)))" "$speedup" "$s_ok" "$agreement"
    py_lines+=("| pandas + statsmodels, 1000000 rows | $py_s s | $(mib $((peak_kb * 1024))) MiB |")
    python_note="$versions. slopewise is **${speedup}x** faster at 1M rows (target at least 30x: $s_ok). Key figures of the two results files: $agreement."
else
    echo "== pandas + statsmodels pipeline: ${python_note#not run: }"
fi

# --- RESULTS.md -------------------------------------------------------------------

cpu=$(awk -F': *' '/^model name/ {print $2; exit}' /proc/cpuinfo 2>/dev/null || true)
mem=$(awk '/^MemTotal/ {printf "%.1f GiB", $2 / 1048576}' /proc/meminfo 2>/dev/null || true)
version=$("$bin" --version 2>/dev/null || true)
[[ -n $version ]] || version="slopewise $(awk -F'"' '/^version/ {print $2; exit}' Cargo.toml)"
if commit=$(git rev-parse --short HEAD 2>/dev/null); then
    git diff --quiet HEAD -- 2>/dev/null || commit="$commit (with uncommitted changes)"
else
    commit="none yet"
fi

{
    echo "# Benchmark results"
    echo
    echo "Written by \`bench/run.sh$([[ $quick == 1 ]] && echo " --quick")\`; rerun it to refresh. The data are synthetic"
    echo "(examples/bench_data.rs: columns group, x, y; 8 groups with different lines)."
    echo
    echo "- Date: $(date -u '+%Y-%m-%d %H:%M UTC')"
    echo "- Machine: $(nproc) cores, ${cpu:-unknown CPU}, ${mem:-unknown memory}, $(uname -sr)"
    echo "- Program: $version, commit $commit, $(rustc --version 2>/dev/null || echo 'rustc unknown')"
    echo "- Method: \`slopewise run PLAN --out DIR\` end to end, best wall time of $runs runs on a warm"
    echo "  page cache; peak RSS is the largest of those runs ($rss_method)."
    echo
    echo "| rows | CSV (MiB) | wall (s) | target | | peak RSS (MiB) | RSS / CSV | target | |"
    echo "|---|---|---|---|---|---|---|---|---|"
    printf '%s\n' "${table_rows[@]}"
    if ((quick)); then echo "| 10000000 | not measured (--quick) | | < 4 | | | | < 1.5 | |"; fi
    echo
    echo "| run | wall | target | |"
    echo "|---|---|---|---|"
    echo "$pdf_line"
    echo
    echo "Comparison pipeline (bench/pandas_pipeline.py: the same fits and tests with pandas +"
    echo "statsmodels, whole process including imports, best of $runs):"
    echo
    if ((${#py_lines[@]})); then
        echo "| pipeline | wall | peak RSS |"
        echo "|---|---|---|"
        printf '%s\n' "${py_lines[@]}"
        echo
    fi
    echo "$python_note"
} >"$results_file.tmp"
mv "$results_file.tmp" "$results_file"
echo "== wrote $results_file"

if ((failures)); then
    echo "== $failures target(s) missed" >&2
    exit 1
fi
echo "== all targets met"
