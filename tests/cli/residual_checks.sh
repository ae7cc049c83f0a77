#!/usr/bin/env bash
# 'observe' and 'residuals' as a user runs them: a mock catalog from a short run, its residuals,
# and the bad-input cases (no source inside the selection, a misspelled observation key, a bad
# catalog row) with one-line errors and no files written.
# Usage: residual_checks.sh UNDERTOW SOURCE_DIR WORK_DIR
set -euo pipefail
undertow=$1 src=$2 work=$3
rm -rf "$work"; mkdir -p "$work"; cd "$work"
fail() { echo "FAIL: $*" >&2; exit 1; }

cat > run.toml <<TOML
[run]
name = "residual-checks"
seed = 9
[galaxy]
model_file = "$src/potentials/kestrel.toml"
[tracers]
source = "disk"
count = 6000
scale_length_kpc = 3.0
r_min_kpc = 3.0
r_max_kpc = 15.0
scale_height_kpc = 0.05
sigma_r_kms = 6.0
sigma_z_kms = 3.0
[integration]
method = "leapfrog"
end_myr = 200.0
step_myr = 0.2
[output]
every_myr = 20.0
TOML
"$undertow" integrate run.toml -o run.h5 > /dev/null

cat > obs.toml <<'TOML'
seed = 3
[sun]
r0_kpc = 8.1
[selection]
distance_max_kpc = 8
latitude_max_deg = 5
parallax_snr_min = 3
sources_max = 150
[young]
age_window_myr = 40
[errors]
kind = "fractional"
parallax_err_fraction = 0.08
pm_err_masyr = 0.05
vlsr_err_kms = 5
TOML
"$undertow" observe run.h5 obs.toml -o mock.csv | tee observe.log
grep -q "150 sources observed at t = 200 Myr" observe.log || fail "unexpected: $(cat observe.log)"
"$undertow" residuals mock.csv --model "$src/potentials/kestrel.toml" --r0 8.1 -o mock-res > res.log 2> res.err
for f in mock-res-sources.csv mock-res-summary.md mock-res-summary.tex mock-res.h5; do
  [ -s "$f" ] || fail "missing $f"
done
grep -q "| all | 150 |" res.log || fail "summary lacks 150 sources: $(head -5 res.log)"
grep -q "^with R0 = 8.1 kpc, z_sun = 0 kpc, Theta0 = .* km/s, solar motion (11.1, 12.24, 7.25) km/s" res.log ||
  fail "the solar parameters used are not printed: $(head -3 res.log)"
/usr/bin/python3 - <<'PY' || fail "the residual HDF5 file is not as documented"
import h5py
with h5py.File("mock-res.h5") as f:
    assert f["sources/V_kms"].attrs["units"] == "km/s"
    assert f["sources/name"].shape == (150,)
    assert f["summary/group"][0] in (b"all", "all")
PY
echo "   observe + residuals: $(grep '| all' res.log)"

echo "-- no tracer inside the selection"
sed 's/^distance_max_kpc = 8/distance_max_kpc = 0.001/' obs.toml > empty.toml
if "$undertow" observe run.h5 empty.toml -o empty.csv > e.log 2>&1; then fail "no error for an empty selection"; fi
grep -q "no tracer passes the selection" e.log || fail "unclear: $(cat e.log)"
[ -e empty.csv ] && fail "a catalog was written for an empty selection"
echo "   $(cat e.log)"

echo "-- a misspelled observation key"
sed 's/^sources_max/source_max/' obs.toml > typo.toml
if "$undertow" observe run.h5 typo.toml > t.log 2>&1; then fail "no error for a misspelled key"; fi
grep -q "typo.toml:8:1: selection.source_max: unknown key" t.log || fail "unclear: $(cat t.log)"
echo "   $(cat t.log)"

echo "-- a catalog whose sources all fail the parallax cut"
if "$undertow" residuals mock.csv --flat 230 --r0 8.1 --min-parallax-snr 1e6 -o none > n.log 2>&1; then fail "no error"; fi
grep -q "no source is left after the selection; nothing written" n.log || fail "unclear: $(cat n.log)"
[ -e none-summary.csv ] && fail "tables written for an empty selection"
echo "   $(tail -1 n.log)"

echo "-- a bad catalog row"
{ head -3 mock.csv; echo "X1,10,20,0.5,-0.05,-1,0.1,-2,0.1,30,5,0,"; } > bad.csv
if "$undertow" residuals bad.csv --flat 230 --r0 8.1 -o bad > b.log 2>&1; then fail "no error"; fi
grep -q "bad.csv:4: parallax_err_mas: errors must be positive" b.log || fail "unclear: $(cat b.log)"
[ "$(wc -l < b.log)" -eq 1 ] || fail "error is not one line"
echo "   $(cat b.log)"
echo "-- the Galactic parameters said, never guessed"
one_line_error() { # pattern, command...
  local pattern=$1; shift
  if "$@" > o.log 2> o.err; then fail "no error: $*"; fi
  [ "$(wc -l < o.err)" -eq 1 ] && grep -q -- "$pattern" o.err || fail "unclear: $(cat o.err)"
  echo "   $(cat o.err)"
}
one_line_error "give --r0 KPC" "$undertow" residuals mock.csv --model "$src/potentials/kestrel.toml" -o x
one_line_error "give a linear curve as --linear THETA0,SLOPE" \
  "$undertow" residuals mock.csv --flat 230 --slope -2 --r0 8.1 -o x
one_line_error "give one rotation curve" "$undertow" residuals mock.csv --flat 230 --linear 230,-2 --r0 8.1 -o x
one_line_error "the curve's value at R0 is Theta0" \
  "$undertow" residuals mock.csv --flat 230 --theta0 240 --r0 8.1 -o x
[ -e x-summary.csv ] && fail "tables written for refused options"
"$undertow" residuals mock.csv --linear 230,-2 --r0 8.1 -o lin > lin.log 2>&1 || fail "a linear curve: $(cat lin.log)"
grep -q "Theta(R) = 230 + -2 (R - R0) km/s" lin.log || fail "the linear curve is not said: $(head -2 lin.log)"
echo "residual checks: all passed"
