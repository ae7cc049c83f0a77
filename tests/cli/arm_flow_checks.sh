#!/usr/bin/env bash
# The 'arm-flow' command as a user runs it: the steady flow across the demo galaxy's arms at
# 8 kpc (a shock, its summary on stderr, a CSV table with units), and the one-line error for a
# pattern the model lacks.
# Usage: arm_flow_checks.sh UNDERTOW SOURCE_DIR WORK_DIR
set -euo pipefail
undertow=$1 src=$2 work=$3
rm -rf "$work"; mkdir -p "$work"; cd "$work"
fail() { echo "FAIL: $*" >&2; exit 1; }
model=$src/potentials/kestrel.toml

"$undertow" arm-flow "$model" --radius 8 --sound-speed 7 --format csv -o flow.csv 2> summary.txt
grep -q "shock at x = " summary.txt || fail "no shock reported at 8 kpc: $(cat summary.txt)"
grep -q "u1 u2 / c^2 = 1" summary.txt || fail "jump condition not 1: $(cat summary.txt)"
head -3 flow.csv | grep -q "^x_kpc,phase_deg,arm_potential_km2_s2,density_ratio" || fail "header"
rows=$(grep -vc '^#\|^x_kpc' flow.csv)
[ "$rows" = 2048 ] || fail "expected 2048 rows, got $rows"
# The mean of the density ratio over the spacing is 1.
awk -F, '!/^#|^x_kpc/ {s += $4; n++} END {m = s / n; if (m < 0.995 || m > 1.005) exit 1}' \
  flow.csv || fail "mean density ratio not 1"

if "$undertow" arm-flow "$model" --pattern 2 -o bad.csv 2> err.txt; then fail "pattern 2 accepted"; fi
[ "$(wc -l < err.txt)" = 1 ] || fail "not one line: $(cat err.txt)"
grep -q "no pattern number 2" err.txt || fail "error does not name the pattern: $(cat err.txt)"
[ ! -e bad.csv ] || fail "a table was written for a bad pattern"
# An output path through a missing folder: refused before the flow is solved, one line.
if "$undertow" arm-flow "$model" --radius 8 -o no-such-folder/flow.csv 2> err.txt; then fail "accepted"; fi
[ "$(wc -l < err.txt)" = 1 ] && grep -q "does not exist" err.txt || fail "unclear: $(cat err.txt)"
grep -q "shock at" err.txt && fail "the flow was solved before the output was checked"
echo "arm-flow checks passed"
