#!/usr/bin/env bash
# SIGKILL at 20 moments of a whole run and of a sweep, then the same command again: the resumed
# result is byte-identical to an uninterrupted one and no temporary is left behind. The moments
# are spread over the uninterrupted run's wall time.
# Usage: kill_checks.sh UNDERTOW SRC WORK
set -euo pipefail
U=$(realpath "$1")
SRC=$(realpath "$2")
W=$3
rm -rf "$W"
mkdir -p "$W"
cd "$W"
# files record when they were written (orbits.h5's created_utc, a PDF's creation date): fixed here
# so that two runs can be compared byte for byte (docs/snapshot-format.md)
export SOURCE_DATE_EPOCH=1800000000
fail() { echo "FAIL: $*" >&2; exit 1; }
now() { date +%s.%N; }
# what a writer killed mid-write leaves: an atomic file's or staged folder's temporary, a folder
# being replaced, a point half-done
debris() { find "$1" \( -name '.*.tmp-*' -o -name '.*.old-*' -o -name '*.partial' \) -print; }
# moment i of 20 (seconds) within the first 90 % of a run of T seconds: one in each twentieth of
# it, at a random place (a fixed seed, so that a failure can be replayed)
moment() {
  awk -v i="$1" -v t="$2" 'BEGIN { srand(20261204); for (k = 1; k <= i; k++) u = rand();
    printf "%.3f", 0.9 * t * (i - 1 + u) / 20 }'
}
# A kill that came after the run had finished: the machine runs it faster now than it ran the
# reference (a loaded machine, the pool of workers): the later moments are spread over 3/4 of the
# time, so that most kills still land mid-run.
shorter() { awk -v t="$1" 'BEGIN { printf "%.4f", 0.75 * t }'; }
# SIGKILL to a command started in the background after $1 seconds; 0 if it was still running
kill_after() {
  "${@:2}" >/dev/null 2>&1 &
  local pid=$!
  sleep "$1"
  local alive=0
  kill -9 "$pid" 2>/dev/null || alive=1
  wait "$pid" 2>/dev/null || true
  return $alive
}

# The tiny whole run, its figures in PNG and PDF.
run=("$U" run "$SRC/tests/cli/tiny-run.toml" --threads 2)

t0=$(now)
"${run[@]}" -o ref >ref.out 2>ref.err || { cat ref.err; fail "the uninterrupted whole run"; }
T=$(awk -v a="$t0" -v b="$(now)" 'BEGIN { print b - a }')
echo "whole run: $T s uninterrupted"
late=0
for i in $(seq 20); do
  m=$(moment "$i" "$T")
  rm -rf "k$i"
  when="mid-run"
  kill_after "$m" "${run[@]}" -o "k$i" || { late=$((late + 1)); when="after it had finished"; T=$(shorter "$T"); }
  "${run[@]}" -o "k$i" >"k$i.out" 2>"k$i.err" || { cat "k$i.err"; fail "whole run killed at $m s: the rerun failed"; }
  diff -r ref "k$i" >/dev/null || { diff -rq ref "k$i" | head; fail "whole run killed at $m s: the resumed result differs"; }
  [ -z "$(debris "k$i")" ] || { debris "k$i"; fail "whole run killed at $m s: temporaries left after the rerun"; }
  echo "  killed at $m s ($when): resumed, identical, no temporary"
done
# a loaded machine may run faster or slower than the reference; most kills must land mid-run
[ "$late" -le 5 ] || fail "$late of 20 kills came after the whole run had finished"

# The tiny sweep (4 points of the tiny run), in one process (odd moments) or by a pool of two
# workers (even moments).
# the pool's workers die with it (PR_SET_PDEATHSIG); wait until their locks are free
workers_gone() {
  for _ in $(seq 500); do
    pgrep -f "sweep run $1 --point" >/dev/null || return 0
    sleep 0.02
  done
  fail "the workers of $1 outlived their pool by 10 s"
}
"$U" sweep plan "$SRC/tests/cli/tiny-sweep.toml" -o sref >/dev/null
t0=$(now)
"$U" sweep run sref >sref.out 2>sref.err || { cat sref.err; fail "the uninterrupted sweep"; }
T=$(awk -v a="$t0" -v b="$(now)" 'BEGIN { print b - a }')
"$U" sweep gather sref >/dev/null
echo "sweep: $T s uninterrupted"
late=0
for i in $(seq 20); do
  m=$(moment "$i" "$T")
  rm -rf "s$i"
  "$U" sweep plan "$SRC/tests/cli/tiny-sweep.toml" -o "s$i" >/dev/null
  if [ $((i % 2)) -eq 1 ]; then how=(--threads 2); else how=(--workers 2 --threads 1); fi
  when="mid-run"
  kill_after "$m" "$U" sweep run "s$i" "${how[@]}" || { late=$((late + 1)); when="after it had finished"; T=$(shorter "$T"); }
  workers_gone "s$i"
  "$U" sweep run "s$i" "${how[@]}" >"s$i.out" 2>"s$i.err" || { cat "s$i.out" "s$i.err"; fail "sweep killed at $m s: the rerun failed"; }
  "$U" sweep gather "s$i" >/dev/null
  diff -r sref/points "s$i/points" >/dev/null || { diff -rq sref/points "s$i/points" | head; fail "sweep killed at $m s: the resumed points differ"; }
  for f in tiny-results.csv tiny-results.h5; do
    cmp -s "sref/$f" "s$i/$f" || fail "sweep killed at $m s: the gathered $f differs"
  done
  [ -z "$(debris "s$i")" ] || { debris "s$i"; fail "sweep killed at $m s: temporaries left after the rerun"; }
  echo "  killed at $m s ($when): resumed, identical, no temporary"
done
[ "$late" -le 5 ] || fail "$late of 20 kills came after the sweep had finished"
echo "SIGKILL at 20 moments of a whole run and of a sweep: every resumed result identical, no temporary left"
