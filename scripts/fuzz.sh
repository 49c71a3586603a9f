#!/usr/bin/env bash
# Runs one fuzz target for a number of seconds on the stable toolchain.
#
#   scripts/fuzz.sh <read|model|structured|sheet|check> <seconds> [extra libFuzzer flags...]
#
# cargo-fuzz and libFuzzer want a nightly compiler; RUSTC_BOOTSTRAP=1 lets the stable one
# accept the `-Z` flags they pass. The address sanitizer is used when the toolchain ships
# its runtime (stable does on x86_64 Linux); set FUZZ_SANITIZER=none to go without.
#
# The working corpus is fuzz/corpus/<target> (not committed). It is seeded from the
# committed, minimised seeds in fuzz/seeds/<target> and, for the byte-level targets, from
# every fixture. Crashes land in fuzz/artifacts/<target>; copy each one into a regression
# test in tests/malformed.rs.
set -euo pipefail

target=${1:?usage: scripts/fuzz.sh <read|model|structured|sheet|check> <seconds> [libFuzzer flags]}
seconds=${2:?usage: scripts/fuzz.sh <target> <seconds>}
shift 2

root=$(cd "$(dirname "$0")/.." && pwd)
cd "$root"

case "$target" in
  read | model | structured | sheet) features=() ;;
  check) features=(--features check) ;; # needs netmargin::pipeline::check_source
  *) echo "fuzz.sh: unknown target \`$target\` (read, model, structured, sheet, check)" >&2; exit 2 ;;
esac

if ! command -v cargo-fuzz >/dev/null 2>&1; then
  echo "fuzz.sh: installing cargo-fuzz" >&2
  cargo install cargo-fuzz --locked
fi

export RUSTC_BOOTSTRAP=1
# the fuzz crate keeps its own target folder (fuzz/target), not the main crate's
unset CARGO_TARGET_DIR

sanitizer=${FUZZ_SANITIZER:-}
if [ -z "$sanitizer" ]; then
  sysroot=$(rustc --print sysroot)
  host=$(rustc -vV | sed -n 's/^host: //p')
  if ls "$sysroot/lib/rustlib/$host/lib/"librustc-*_rt.asan.a >/dev/null 2>&1; then
    sanitizer=address
  else
    sanitizer=none
  fi
fi

corpus=fuzz/corpus/$target
mkdir -p "$corpus"
seed() { # copies $1 to $2 unless $2 exists (cp -n's exit status differs between versions)
  [ -e "$2" ] || cp "$1" "$2"
}
if [ -d "fuzz/seeds/$target" ]; then
  for f in fuzz/seeds/"$target"/*; do seed "$f" "$corpus/$(basename "$f")"; done
fi
if [ "$target" != structured ]; then
  # every fixture small enough to be a useful seed (the 200 kB nesting file is not)
  find fixtures -type f \( -name '*.net' -o -name '*.sch' -o -name '*.kicad_*' -o -name '*.json' \) -size -64k |
    while read -r f; do seed "$f" "$corpus/fixture-$(echo "$f" | tr '/' '_')"; done
fi

# byte-level targets get the netlist dictionary; the generator's input is not text, and it
# gets its whole length from the start (a short input makes a near-empty netlist)
if [ "$target" != structured ]; then
  flags=(-dict=fuzz/netlist.dict -max_len=65536)
else
  flags=(-max_len=8192 -len_control=0)
fi

echo "fuzz.sh: target $target, ${seconds}s, sanitizer $sanitizer, corpus $corpus ($(ls "$corpus" | wc -l) files)" >&2
exec cargo fuzz run --fuzz-dir fuzz -s "$sanitizer" "${features[@]}" "$target" "$corpus" -- \
  -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 \
  -print_final_stats=1 "${flags[@]}" "$@"
