#!/usr/bin/env bash
# Every write of a whole run and of a sweep made to fail in turn: the output goes to a tmpfs whose
# size is set, run after run, to just below what the outputs up to a given file need (the files of
# an uninterrupted run in the order they were written). Each failure must give exit status 2, one
# error line, and no temporary; a rerun with room to spare then finishes with results identical to
# the uninterrupted run's. Needs root (mount). Usage: full_disk_checks.sh UNDERTOW SRC WORK
set -euo pipefail
U=$(realpath "$1")
SRC=$(realpath "$2")
W=$3
if mountpoint -q "$W/disk" 2>/dev/null; then umount "$W/disk"; fi
rm -rf "$W"
mkdir -p "$W/disk"
W=$(realpath "$W")
cd "$W"
export SOURCE_DATE_EPOCH=1800000000 # identical bytes from run to run (docs/snapshot-format.md)
source "$SRC/tests/cli/full_disk_lib.sh"
room() { mount -o remount,size="$1" disk; }
filler
# The cuts of the files of an uninterrupted run in FOLDER, the filler's 8 KiB included, at most 80
# (full_disk_lib.sh).
cuts() { find "$1" -type f | cut_sizes 80 0 8; }

# A failed command: exit status 2 (a sweep whose points failed: 1, docs/sweeps.md), exactly one
# error line, nothing half-written.
failed_cleanly() { # what, rc, stderr file, folder
  [ "$2" = 2 ] || { [ "$2" = 1 ] && [ "$1" != "${1#sweep}" ] && grep -q "points\? failed" "$3"; } ||
    { cat "$3"; fail "$1: exit status $2, not 2"; }
  [ "$(grep -c '^undertow: ' "$3")" = 1 ] || { cat "$3"; fail "$1: not one error line"; }
  [ -z "$(debris "$4")" ] || { debris "$4"; fail "$1: temporaries left behind"; }
}
# Runs "$@" again and again in a disk given more room each time (the cuts, then 256 MiB): each time
# it must fail cleanly, until it finishes. The rerun resumes from the stages finished before, so
# the failures move on from one write to the next. Prints the files whose writes failed.
fill_in_turn() { # label, check-folder, cuts file, command...
  local label=$1 folder=$2 list=$3 s rc
  shift 3
  for s in $(cat "$list") 262144; do
    [ "$s" -ge "$(used_kib)" ] || continue
    room "${s}k"
    rc=0
    "$@" >step.out 2>step.err || rc=$?
    [ "$rc" = 0 ] && return 0
    failed_cleanly "$label on $s KiB" "$rc" step.err "$folder"
    # the files whose writes failed, a point's id and a process id left out
    grep -o '[^ ]*: write failed' step.err | sed 's/: write failed//; s|[0-9a-f]\{12\}|ID|g' >>failed-writes.txt
    if [ -d "$folder" ] && [ -n "$(ls -A "$folder")" ] && [ ! -f "$folder/plan.toml" ]; then
      grep -q "kept in $folder/\|outputs in $folder are complete and kept" step.err ||
        { cat step.err; fail "$label on $s KiB: files were left without saying so"; }
    fi
    # a failed point's folder stays only with finished stages in it, and its message says so
    for d in $(find "$folder" -name '*.partial' 2>/dev/null); do
      grep -q "kept in points/$(basename "$d") for the retry" step.err ||
        { cat step.err; fail "$label on $s KiB: $d was left without saying so"; }
    done
  done
  fail "$label: did not finish with 256 MiB"
}

# 1. The whole run.
run=("$U" run "$SRC/tests/cli/tiny-run.toml" --threads 2)
"${run[@]}" -o disk/ref >ref.out 2>ref.err || { cat ref.err; fail "the whole run with room to spare"; }
cuts disk/ref >run-cuts.txt
cp -a disk/ref ref && rm -rf disk/ref
: >failed-writes.txt
fill_in_turn "whole run" disk/out run-cuts.txt "${run[@]}" -o disk/out
diff -r ref disk/out >/dev/null || { diff -rq ref disk/out | head; fail "whole run: the result after the failures differs"; }
n=$(sort -u failed-writes.txt | wc -l)
echo "whole run: $(wc -l <failed-writes.txt) failed writes on a full disk, at $n different files, each one line and exit 2, no temporary; the result identical"
sort -u failed-writes.txt | sed 's/^/  /'
[ "$n" -ge 10 ] || fail "whole run: the failures reached only $n different files"

# 2. The sweep: its plan, points and gathered tables.
rm -rf disk/*
room 256m
filler
"$U" sweep plan "$SRC/tests/cli/tiny-sweep.toml" -o disk/sref >/dev/null
"$U" sweep run disk/sref --threads 2 >sref.out 2>sref.err || { cat sref.err; fail "the sweep with room to spare"; }
"$U" sweep gather disk/sref >/dev/null
cuts disk/sref >sweep-cuts.txt
cp -a disk/sref sref && rm -rf disk/sref
: >failed-writes.txt
sweep() {
  # (called under ||, so without set -e: each step only after the one before it worked)
  { [ -f disk/s/plan.toml ] || "$U" sweep plan "$SRC/tests/cli/tiny-sweep.toml" -o disk/s; } &&
    "$U" sweep run disk/s --threads 2 && "$U" sweep gather disk/s
}
fill_in_turn "sweep" disk/s sweep-cuts.txt sweep
diff -r sref/points disk/s/points >/dev/null || { diff -rq sref/points disk/s/points | head; fail "sweep: the points after the failures differ"; }
cmp -s sref/tiny-results.h5 disk/s/tiny-results.h5 || fail "sweep: the gathered table differs"
n=$(sort -u failed-writes.txt | wc -l)
echo "sweep: $(wc -l <failed-writes.txt) failed writes on a full disk, at $n different files, each one line and exit 2, no temporary; the result identical"
sort -u failed-writes.txt | sed 's/^/  /'
echo "every write of a whole run and of a sweep failed in turn: exit 2, one line, no temporary, and the rerun identical"
