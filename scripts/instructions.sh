#!/usr/bin/env bash
# Counts the instructions `netmargin check --format json` executes on the scale benchmark's
# files, and how many times more each shape takes for ten times the data. An instruction count
# is the same from run to run and from machine to machine (of one architecture), whatever the
# load, the caches and the memory: it tells the work that grows faster than the input apart
# from the time the memory system adds, which the timed benchmark cannot.
#
#   cargo build --release && cargo bench --bench scale -- 5,50,500 1 0   # writes the files
#   scripts/instructions.sh [SIZES_MB]                                   # default 5,50
#
# SIZES_MB as the scale benchmark's (the schematics are a tenth of each: 5,50 counts the
# 5 MB hierarchy; 5,50,500 the 50 MB one too). Needs valgrind (Debian: `apt-get install
# valgrind`); runs as many counts at once as there are cores. Takes about a minute for 5,50
# and half an hour of CPU for 5,50,500.
set -euo pipefail

root=$(cd "$(dirname "$0")/.." && pwd)
sizes=${1:-5,50}
bin=$(ls "$root"/target/*/release/netmargin "$root"/target/release/netmargin 2>/dev/null | head -1 || true)
[ -x "${bin:-}" ] || { echo "instructions.sh: build first: cargo build --release" >&2; exit 2; }
command -v valgrind >/dev/null || { echo "instructions.sh: needs valgrind" >&2; exit 2; }
dir=$(ls -d "$root"/target/*/bench-scale "$root"/target/bench-scale 2>/dev/null | head -1 || true)
[ -d "${dir:-}" ] || { echo "instructions.sh: no bench files: run the scale benchmark first" >&2; exit 2; }

out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
files=()
IFS=, read -ra list <<<"$sizes"
for s in "${list[@]}"; do
  for f in "$dir"/*-"${s}MB.net"; do [ -f "$f" ] && files+=("$f"); done
  sch=$((s / 10)); [ "$sch" -ge 1 ] || sch=1
  for f in "$dir/hierarchy-${sch}MB/root.kicad_sch" "$dir/synthetic-${sch}MB.kicad_sch"; do
    [ -f "$f" ] && files+=("$f")
  done
done
[ ${#files[@]} -gt 0 ] || { echo "instructions.sh: no files of sizes $sizes in $dir" >&2; exit 2; }

count() {
  local f=$1 key
  key=$(echo "${f#"$2"/}" | tr '/' '_')
  valgrind --tool=cachegrind --cache-sim=no --cachegrind-out-file=/dev/null \
    "$3" check --no-config --format json "$f" >/dev/null 2>"$4/$key.err" || true
  grep 'I *refs' "$4/$key.err" | awk -v k="$key" '{gsub(",", "", $NF); print k, $NF}' >"$4/$key.n"
}
export -f count
printf '%s\n' "${files[@]}" | xargs -P "$(nproc)" -I{} bash -c 'count "$@"' _ {} "$dir" "$bin" "$out"

echo "| file | instructions | x for 10 x data |"
echo "| --- | ---: | ---: |"
cat "$out"/*.n | python3 -c '
import re, sys
rows = [l.split() for l in sys.stdin if l.strip()]
def key(r):
    m = re.match(r"(.*?)-?(\d+)MB(.*)", r[0])
    return (m.group(1) + m.group(3), int(m.group(2))) if m else (r[0], 0)
rows.sort(key=key)
seen = {}
for r in rows:
    shape, size = key(r)
    n = int(r[1])
    prev = seen.get(shape)
    x = f"{n / prev[1]:.2f}" if prev and size == prev[0] * 10 else ""
    seen[shape] = (size, n)
    print(f"| {r[0]} | {n:,} | {x} |")
'
