#!/usr/bin/env bash
# 'mock-kinematics', 'fit' and 'residuals --galactic-from' as a user runs them: the demo's
# simulated catalog regenerated bit for bit, a fit of a small simulated survey with its outputs
# read back by h5py, residuals with the fit's Galactic parameters, and the bad-input cases (one
# line naming the file and key, exit 2, nothing written).
# Usage: fit_checks.sh UNDERTOW SOURCE_DIR WORK_DIR
set -euo pipefail
undertow=$1 src=$2 work=$3
rm -rf "$work"; mkdir -p "$work"; cd "$work"
fail() { echo "FAIL: $*" >&2; exit 1; }

# 1. The demo's simulated survey is made by the tool from its documented truth, bit for bit.
"$undertow" mock-kinematics "$src/demo/kinematic-truth.toml" -o demo-catalog.csv > /dev/null
cmp demo-catalog.csv "$src/demo/kinematic-catalog.csv" ||
  fail "demo/kinematic-catalog.csv is not what demo/kinematic-truth.toml gives (regenerate it)"

# 2. A small survey, simulated and fitted.
cp "$src/tests/cli/tiny-survey.toml" truth.toml
"$undertow" mock-kinematics truth.toml -o survey.csv | grep -q "60 sources" || fail "mock-kinematics"
cat > fit.toml <<'TOML'
catalog = "survey.csv"
[rotation]
form = "flat"
[distances]
prior = "disk"
distance_min_kpc = 1.0
distance_max_kpc = 10.0
[parameters]
r0_kpc = { start = 8.0, min = 6.0, max = 11.0 }
theta0_kms = { start = 230, min = 150, max = 320 }
u_sun_kms = 11.1
v_sun_kms = 12.24
w_sun_kms = 7.25
mean_u_kms = { start = 0, min = -40, max = 40 }
mean_v_kms = { start = 0, min = -40, max = 40 }
dispersion_kms = { start = 8, min = 0.5, max = 40 }
disk_scale_length_kpc = 5.0
disk_scale_height_kpc = 0.05
TOML
"$undertow" fit fit.toml -o out > fit.log 2> fit.err || { cat fit.log fit.err; fail "fit"; }
grep -q "^converged" fit.log || fail "the fit did not say it converged"
grep -q "The data constrain r0_kpc" fit.log || fail "no plain sentence on the constraints"
for f in parameters correlations sources kinematic-distances; do
  for e in csv md tex; do [ -s "out/$f.$e" ] || fail "out/$f.$e missing"; done
done
[ -s out/summary.txt ] && [ -s out/fit.h5 ] || fail "summary.txt or fit.h5 missing"
/usr/bin/python3 - out/fit.h5 <<'PY'
import sys, h5py, numpy as np
h = h5py.File(sys.argv[1], "r")
names = h["chain"].attrs["parameters"].split(",")
assert names == ["r0_kpc", "theta0_kms", "mean_u_kms", "mean_v_kms", "dispersion_kms"], names
pos = h["chain/positions"][:]
w, n = int(h["chain"].attrs["walkers"]), int(h["chain"].attrs["steps"])
assert pos.shape == (w * n, 5), pos.shape
assert h["chain/ln_posterior"].shape[0] == w * n
med = h["galactic/median"][:].ravel()
keys = h["galactic"].attrs["parameters"].split(",")
r0 = med[keys.index("r0_kpc")]
burn = int(h["chain"].attrs["burn_in_steps"])
kept = pos[burn * w:, 0]
assert abs(np.median(kept) - r0) < 1e-12, (np.median(kept), r0)  # the table is the chain's median
assert 6 < r0 < 11
assert h["galactic/samples"].shape[1] == len(keys)
assert "sources" in h and "kinematic_distances" in h
print("fit.h5 read back: chain", pos.shape, "R0 median", r0)
PY

# 2b. The same truth observed as a catalog of distances (10 % Gaussian errors, no parallaxes):
# mock-kinematics writes it, the fit reads it and recovers R0 = 8.2 kpc within 3 sigma.
sed 's/^parallax_err_mas = 0.02/distance_err_fraction = 0.1/' truth.toml > truth-dist.toml
"$undertow" mock-kinematics truth-dist.toml -o survey-distances.ecsv > /dev/null || fail "mock-kinematics of distances"
grep -q "distance_kpc" survey-distances.ecsv && ! grep -q "parallax_mas" survey-distances.ecsv ||
  fail "the simulated catalog of distances has parallaxes"
"$undertow" fit fit.toml --catalog survey-distances.ecsv -o out-dist > fit-dist.log 2>&1 ||
  { cat fit-dist.log; fail "fit of a catalog of distances"; }
grep -q "^converged" fit-dist.log || fail "the fit of distances did not converge"
/usr/bin/python3 - <<'PY' || fail "the fit of distances misses R0"
from astropy.table import Table
b = Table.read("out-dist/parameters.ecsv")
r = b[b["parameter"] == "r0_kpc"][0]
sigma = 0.5 * (r["minus"] + r["plus"])
assert abs(r["median"] - 8.2) < 3 * sigma, (r["median"], sigma)
print(f"   distances given: R0 = {r['median']:.3f} +- {sigma:.3f} kpc (truth 8.2)")
PY

# 3. Residuals with the fit's Galactic parameters: median and marginalised.
"$undertow" residuals survey.csv --galactic-from out/fit.h5 -o res1 > /dev/null 2>&1
grep -q "from the kinematic fit out/fit.h5 (posterior median" res1/residuals-summary.md ||
  fail "residuals do not name the fit they took the Galactic parameters from"
"$undertow" residuals survey.csv --galactic-from out/fit.h5 --marginalise \
  --distance posterior-median --distance-range 1,10 -o res2 > /dev/null
grep -q "marginalised over" res2/residuals-summary.md || fail "marginalisation not named"

# 3b. A mock observation whose Sun comes from the fit: R0 and the Sun's total velocity as fitted.
sed 's|^model_file = "../..|model_file = "'"$src"'|' "$src/tests/cli/tiny-stars.toml" > tiny.toml
"$undertow" integrate tiny.toml -o tiny.h5 > /dev/null
printf 'seed = 2\n[sun]\nfrom_fit = "out/fit.h5"\n[selection]\ndistance_max_kpc = 6\n[errors]\nkind = "fixed"\n' > obs-fit.toml
"$undertow" observe tiny.h5 obs-fit.toml -o obs-fit.csv > obs-fit.log || fail "observe with the Sun from a fit"
[ -s obs-fit.csv ] || fail "no mock catalog with the Sun from a fit"
printf 'seed = 2\n[sun]\nfrom_fit = "out/fit.h5"\nr0_kpc = 8\n[selection]\ndistance_max_kpc = 6\n[errors]\nkind = "fixed"\n' > obs-both.toml
set +e
"$undertow" observe tiny.h5 obs-both.toml -o obs-both.csv 2> obs-both.err; code=$?
set -e
[ "$code" -eq 2 ] && grep -q "obs-both.toml:4.*sun.r0_kpc: cannot be combined with from_fit" obs-both.err ||
  { cat obs-both.err; fail "from_fit with r0_kpc: exit $code"; }

# 4. Bad input: one line, exit 2, nothing written.
refuse() { # name, expected text, fit file body (catalog and distances prepended)
  local name=$1 want=$2 body=$3
  printf 'catalog = "survey.csv"\n[distances]\ndistance_max_kpc = 10\n%s\n' "$body" > "$name.toml"
  set +e
  "$undertow" fit "$name.toml" -o "out-$name" > "$name.out" 2> "$name.err"
  local code=$?
  set -e
  [ "$code" -eq 2 ] || { cat "$name.err"; fail "$name: exit $code, not 2"; }
  [ "$(wc -l < "$name.err")" -eq 1 ] || { cat "$name.err"; fail "$name: not one line"; }
  grep -q -- "$want" "$name.err" || { cat "$name.err"; fail "$name: message lacks '$want'"; }
  grep -q "$name.toml" "$name.err" || { cat "$name.err"; fail "$name: message lacks the file"; }
  [ ! -e "out-$name" ] || fail "$name: output written"
}
refuse unknown "unknown parameter 'r0_kcp'" '[parameters]
r0_kcp = 8'
refuse width "width must be positive" '[parameters]
r0_kpc = { start = 8, mean = 8, sigma = -0.5 }'
refuse fixed "every parameter is fixed" ''
refuse degenerate "constrain only" '[parameters]
theta0_kms = { start = 230, min = 150, max = 320 }
v_sun_kms = { start = 12, min = -20, max = 40 }
mean_v_kms = { start = 0, min = -40, max = 40 }'
refuse unconverged "has not converged" '[sampler]
steps_max = 100
[parameters]
r0_kpc = { start = 8.0, min = 6.0, max = 11.0 }
theta0_kms = { start = 230, min = 150, max = 320 }'
head -4 survey.csv > single.csv # two comment lines, the header, one source
sed 's/survey.csv/single.csv/' fit.toml > single.toml
set +e
"$undertow" fit single.toml -o out-single > single.out 2> single.err; code=$?
set -e
[ "$code" -eq 2 ] && [ "$(wc -l < single.err)" -eq 1 ] && grep -q "at least two sources" single.err ||
  { cat single.err; fail "a one-source catalog: exit $code"; }
[ ! -e out-single ] || fail "one-source catalog: output written"
sed 's/pm_err_masyr = 0.05/pm_err_masyr = -0.05/' truth.toml > bad-truth.toml
set +e
"$undertow" mock-kinematics bad-truth.toml -o bad.csv 2> bad.err; code=$?
set -e
[ "$code" -eq 2 ] && grep -q "bad-truth.toml:.*pm_err_masyr" bad.err && [ ! -e bad.csv ] ||
  { cat bad.err; fail "a negative error in a truth file: exit $code"; }
echo "fit checks passed"
