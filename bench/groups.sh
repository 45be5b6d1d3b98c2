#!/usr/bin/env bash
# Many groups: wall time and peak RSS of `slopewise run` on 1,000 and 10,000 groups of
# 5 rows each (invented data, generated here and never committed), with the default
# report.max_pairs, so no pair is built beyond it. Writes its section of
# bench/RESULTS.md between the "many groups" markers (BENCH_RESULTS overrides the
# path). Needs GNU time (/usr/bin/time) and a release build.
set -euo pipefail
root=$(cd "$(dirname "$0")/.." && pwd)
results_file=${BENCH_RESULTS:-$root/bench/RESULTS.md}
cargo build --release --quiet --manifest-path "$root/Cargo.toml"
bin=$root/target/release/slopewise
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
rows=""
for groups in 1000 10000; do
  dir=$work/g$groups
  mkdir -p "$dir"
  python3 - "$groups" > "$dir/data.csv" <<'PY'
import random, sys
random.seed(20261202)
groups = int(sys.argv[1])
print("g,x,y")
for g in range(groups):
    for i in range(5):
        print(f"grp{g:05d},{i},{1 + 0.5 * i + random.gauss(0, 0.3):.4f}")
PY
  printf 'title = "Many groups (invented)"\n[data]\npath = "data.csv"\n[model]\nresponse = "y"\ncovariate = "x"\ngroup = "g"\n[report]\nout = "out"\nformats = ["json", "markdown"]\n' > "$dir/plan.toml"
  /usr/bin/time -f '%e %M' -o "$dir/time" "$bin" run "$dir/plan.toml" > /dev/null
  read -r wall rss < "$dir/time"
  json=$(stat -c %s "$dir/out/results.json")
  rows+="| $groups | $((groups * 5)) | $wall | $(awk "BEGIN {printf \"%.1f\", $rss / 1024}") | $(awk "BEGIN {printf \"%.1f\", $json / 1048576}") |"$'\n'
done
section="<!-- many groups: bench/groups.sh -->
## Many groups

\`slopewise run\` on k groups of 5 rows (markdown and json, default report.max_pairs =
5000, so the pairwise lists are left out with a note). Wall time and peak RSS from GNU
time, one run each; $(uname -m), $(nproc) cores.

| groups | rows | wall (s) | peak RSS (MiB) | results.json (MiB) |
|---|---|---|---|---|
${rows}<!-- end many groups -->"
python3 - "$results_file" "$section" <<'PY'
import re, sys
path, section = sys.argv[1], sys.argv[2]
text = open(path).read()
pattern = re.compile(r"<!-- many groups: bench/groups.sh -->.*?<!-- end many groups -->", re.S)
text = pattern.sub(lambda m: section, text) if pattern.search(text) else text.rstrip("\n") + "\n\n" + section + "\n"
open(path, "w").write(text)
PY
echo "wrote the many-groups section of $results_file"
