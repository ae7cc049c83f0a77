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
grep -q "^the Sun: R0 = 8.1 kpc, z☉ = 0 kpc, Θ0 = .* from fixed values" observe.log ||
  fail "observe does not print the Sun it used: $(cat observe.log)"
"$undertow" residuals mock.csv --model "$src/potentials/kestrel.toml" --r0 8.1 -o mock-res > res.log 2> res.err
for f in mock-res/residuals-sources.csv mock-res/residuals-summary.md mock-res/residuals-summary.tex \
  mock-res/residuals.h5; do
  [ -s "$f" ] || fail "missing $f"
done
grep -q "| all | 150 |" res.log || fail "summary lacks 150 sources: $(head -5 res.log)"
grep -q "^with R0 = 8.1 kpc, z_sun = 0 kpc, Theta0 = .* km/s, solar motion (11.1, 12.24, 7.25) km/s" res.log ||
  fail "the solar parameters used are not printed: $(head -3 res.log)"
/usr/bin/python3 - <<'PY' || fail "the residual HDF5 file is not as documented"
import h5py
with h5py.File("mock-res/residuals.h5") as f:
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
if "$undertow" residuals mock.csv --flat 230 --r0 8.1 --parallax-snr-min 1e6 -o none > n.log 2>&1; then fail "no error"; fi
grep -q "no source is left after the selection; nothing written" n.log || fail "unclear: $(cat n.log)"
[ -e none ] && fail "tables written for an empty selection"
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
[ -e x ] && fail "tables written for refused options"
"$undertow" residuals mock.csv --linear 230,-2 --r0 8.1 -o lin > lin.log 2>&1 || fail "a linear curve: $(cat lin.log)"
grep -q "Theta(R) = 230 + -2 (R - R0) km/s" lin.log || fail "the linear curve is not said: $(head -2 lin.log)"

echo "-- renamed options are refused naming the new spelling"
one_line_error "residuals --min-parallax-snr is gone: use --parallax-snr-min" \
  "$undertow" residuals mock.csv --flat 230 --r0 8.1 --min-parallax-snr 3 -o x
one_line_error "integrate --restart is gone: use --from-scratch" "$undertow" integrate run.toml -o x.h5 --restart
one_line_error "run --force is gone: use --from-scratch" "$undertow" run run.toml -o x --force
[ -e x ] || [ -e x.h5 ] && fail "output written for a renamed option"

echo "-- -o names a folder for residuals; a file there is refused before any work"
touch afile
one_line_error "afile: not a folder" "$undertow" residuals mock.csv --flat 230 --r0 8.1 -o afile

echo "-- the mock catalog as ECSV and FITS: every digit, the same residuals byte for byte"
"$undertow" observe run.h5 obs.toml -o mock.ecsv > /dev/null
"$undertow" observe run.h5 obs.toml -o mock.fits > /dev/null
head -c 9 mock.fits | grep -q "SIMPLE  =" || fail "mock.fits is not FITS"
head -1 mock.ecsv | grep -q "^# %ECSV 1.0" || fail "mock.ecsv is not ECSV"
for f in ecsv fits; do
  "$undertow" residuals mock.$f --model "$src/potentials/kestrel.toml" --r0 8.1 -o res-$f > /dev/null 2>&1 ||
    fail "residuals of mock.$f"
  cmp -s mock-res/residuals-sources.csv res-$f/residuals-sources.csv ||
    fail "mock.$f gives other residuals than mock.csv"
done
/usr/bin/python3 - <<'PY' || fail "the mock catalogs do not hold the same numbers"
from astropy.table import Table
import numpy as np
c = Table.read("mock.csv", format="ascii.csv", comment="#")
for f in ("mock.ecsv", "mock.fits"):
    t = Table.read(f)
    assert str(t["parallax_mas"].unit) == "mas", t["parallax_mas"].unit
    for col in ("ra_deg", "parallax_mas", "pmra_masyr", "vlsr_kms"):
        assert np.array_equal(np.asarray(c[col], float), np.asarray(t[col], float)), (f, col)
PY

echo "-- distances given directly: d = 1/parallax gives the same U, V, W"
/usr/bin/python3 - <<'PY'
from astropy.table import Table
t = Table.read("mock.ecsv")
t["distance_kpc"] = 1 / t["parallax_mas"].value
t["distance_err_kpc"] = t["parallax_err_mas"].value / t["parallax_mas"].value ** 2
t["distance_kpc"].unit = t["distance_err_kpc"].unit = "kpc"
t.remove_columns(["parallax_mas", "parallax_err_mas"])
t.write("dist.ecsv", format="ascii.ecsv", overwrite=True)
PY
"$undertow" residuals dist.ecsv --model "$src/potentials/kestrel.toml" --r0 8.1 -o res-dist > /dev/null 2>&1 ||
  fail "residuals of a catalog of distances"
/usr/bin/python3 - <<'PY' || fail "distances given directly give other U, V, W than 1/parallax"
from astropy.table import Table
import numpy as np
a = Table.read("mock-res/residuals-sources.ecsv")
b = Table.read("res-dist/residuals-sources.ecsv")
for c in ("distance_kpc", "U_kms", "V_kms", "W_kms"):
    assert np.allclose(a[c], b[c], rtol=0, atol=1e-9), c
for c in ("U_err_linear_kms", "V_err_linear_kms"):
    assert np.allclose(a[c], b[c], rtol=1e-3), c
print("   distances: U, V, W equal to 1e-9 km/s, first-order errors to 1e-3")
PY
echo "residual checks: all passed"
