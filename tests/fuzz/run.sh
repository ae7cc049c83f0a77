#!/usr/bin/env bash
# Builds the readers' libFuzzer targets with clang into BUILD (the library instrumented for
# coverage, AddressSanitizer and UndefinedBehaviorSanitizer), replays the kept regression inputs,
# then fuzzes each reader for SECONDS from a seed corpus of the demo's own files. A finding is
# copied into tests/fuzz/regressions/<reader>/ (commit it with the fix) and fails the run.
# Usage: tests/fuzz/run.sh [SECONDS (60)] [BUILD (build-fuzz)]
#        tests/fuzz/run.sh --fixed [BUILD]   what CI runs: a fixed number of inputs per reader
#          (about a minute each on 2 cores) from seed 1, so the same inputs every time; a random
#          finding must not turn an unrelated change red
set -euo pipefail
here=$(cd "$(dirname "$0")/../.." && pwd)
fixed=0
if [ "${1:-}" = "--fixed" ]; then fixed=1; shift; set -- 300 "$@"; fi
secs=${1:-60} build=${2:-$here/build-fuzz}
CC=clang CXX=clang++ cmake -S "$here" -B "$build" -G Ninja -DCMAKE_BUILD_TYPE=RelWithDebInfo \
  -DUNDERTOW_FUZZ=ON -DUNDERTOW_TESTS=ON -DUNDERTOW_BENCHMARKS=OFF >/dev/null
cmake --build "$build" --target fuzzers

seeds() { # the demo's files of each kind
  case $1 in
  catalog) ls "$here"/demo/*.csv ;;
  model) ls "$here"/potentials/*.toml "$here"/demo/truth/galaxy.toml ;;
  scenario) ls "$here"/demo/{kestrel-orbits,spiral,axisymmetric}.toml "$here"/demo/truth/orbits.toml ;;
  observation) ls "$here"/demo/kestrel-survey.toml "$here"/demo/truth/survey.toml ;;
  sweep) ls "$here"/demo/sweep-arms.toml ;;
  esac
}
runs() { # --fixed: inputs per reader, about a minute each here (docs: DEVELOPERS.md)
  case $1 in
  catalog) echo 50000 ;; scenario) echo 250000 ;; *) echo 500000 ;;
  esac
}

status=0
for reader in catalog model scenario observation sweep; do
  target="$build/tests/fuzz/fuzz_$reader"
  kept="$here/tests/fuzz/regressions/$reader"
  if [ -d "$kept" ] && [ -n "$(ls -A "$kept")" ]; then # each kept input once, no fuzzing
    "$target" "$kept"/* > "$build/$reader-regressions.log" 2>&1 ||
      { tail -30 "$build/$reader-regressions.log"; echo "fuzz $reader: a kept input fails again"; status=1; }
  fi
  corpus="$build/corpus/$reader" findings="$build/findings/$reader"
  mkdir -p "$findings"
  how=(-max_total_time="$secs")
  [ $fixed -eq 1 ] && how+=(-seed=1 -runs="$(runs $reader)")
  rm -rf "$corpus" && mkdir -p "$corpus" && cp $(seeds $reader) "$corpus"/
  start=$(date +%s)
  if "$target" "${how[@]}" -timeout=10 -rss_limit_mb=2048 -print_final_stats=1 \
    -artifact_prefix="$findings/" "$corpus" > "$build/$reader.log" 2>&1; then
    echo "fuzz $reader: $(grep -o 'stat::number_of_executed_units: *[0-9]*' "$build/$reader.log" |
      grep -o '[0-9]*$') inputs in $(($(date +%s) - start)) s, no finding"
  else
    tail -40 "$build/$reader.log"
    mkdir -p "$kept" && cp "$findings"/* "$kept"/
    echo "fuzz $reader: FINDING, kept in tests/fuzz/regressions/$reader/ (log: $build/$reader.log)"
    status=1
  fi
done
exit $status
