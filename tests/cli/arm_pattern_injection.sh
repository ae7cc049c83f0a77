#!/usr/bin/env bash
# Injection and recovery of what 'undertow arms' says about the whole pattern, through the command
# line as a user runs it: 40 catalogs simulated from the demo's arm truth (demo/arms-truth.toml:
# four arms of pitch 13 deg, one crossing R0 = 8.1 kpc at psi = 25 deg, 160 sources) with other
# seeds, each fitted. Four arms must be preferred in at least 36 of the 40 (the level of the arm
# count's test on segment summaries, tests/arms/test_arm_count.cpp). Where they are, the shared
# pitch's and the arm azimuth's pulls must have mean 0 and dispersion 1 and their 68 % intervals
# must cover the truth 68 % of the time, each within three standard errors for that many catalogs
# (definition of a calibrated interval; the standard errors of a normal sample's mean, 1/sqrt(n),
# and dispersion, 1/sqrt(2(n - 1)), and the binomial one of the coverage).
# Usage: arm_pattern_injection.sh UNDERTOW SOURCE_DIR WORK_DIR
set -euo pipefail
undertow=$(realpath "$1") src=$(realpath "$2") work=$3
rm -rf "$work"; mkdir -p "$work"; cd "$work"
fail() { echo "FAIL: $*" >&2; exit 1; }

for seed in $(seq 101 140); do
  sed "s/^seed = .*/seed = $seed/" "$src/demo/arms-truth.toml" >truth.toml
  grep -q "^seed = $seed\$" truth.toml || fail "no seed line in demo/arms-truth.toml"
  "$undertow" mock-kinematics truth.toml -o "catalog-$seed.csv" >/dev/null
  "$undertow" arms "catalog-$seed.csv" --r0 8.1 -o "fit-$seed" >/dev/null 2>"fit-$seed.err" ||
    { cat "fit-$seed.err"; fail "arm fit of the catalog of seed $seed"; }
done

/usr/bin/python3 - <<'PY'
import glob, math, sys, h5py
truth_pitch, truth_azimuth, arms = 13.0, 25.0, 4
rows = []
for d in sorted(glob.glob("fit-*/")):
    with h5py.File(d + "arms.h5") as f:
        rows.append(dict(f["preferred"].attrs))
n_all = len(rows)
four = [a for a in rows if int(a["arms"]) == arms]
print(f"{len(four)} of {n_all} catalogs prefer {arms} arms; the others:",
      [(int(a["arms"]), round(float(a["pitch_deg"]), 2)) for a in rows if int(a["arms"]) != arms])
ok = len(four) >= 36
def pull(x, lo, hi, truth):  # lo, hi: distances to the 16 and 84 % quantiles
    return (x - truth) / (lo if x > truth else hi)
def wrap(d, period):  # an azimuth difference into (-period/2, period/2]
    return d - period * math.floor(d / period + 0.5)
n = len(four)
checks = {
    "shared pitch": [pull(a["pitch_deg"], a["pitch_minus_deg"], a["pitch_plus_deg"], truth_pitch)
                     for a in four],
    "arm azimuth at R0": [wrap(a["arm_azimuth_deg"] - truth_azimuth, 360 / arms)
                          / a["arm_azimuth_sigma_deg"] for a in four],
}
se_mean, se_sd = 1 / math.sqrt(n), 1 / math.sqrt(2 * (n - 1))
se_cov = math.sqrt(0.6827 * 0.3173 / n)
for what, p in checks.items():
    mean = sum(p) / n
    sd = math.sqrt(sum((x - mean) ** 2 for x in p) / (n - 1))
    cov = sum(abs(x) <= 1 for x in p) / n
    good = abs(mean) < 3 * se_mean and abs(sd - 1) < 3 * se_sd and abs(cov - 0.6827) < 3 * se_cov
    print(f"{what}: pull mean {mean:+.2f} (limit ±{3 * se_mean:.2f}), dispersion {sd:.2f} "
          f"(1 ± {3 * se_sd:.2f}), 68 % coverage {cov:.2f} (0.68 ± {3 * se_cov:.2f})"
          + ("" if good else "  <- outside"))
    ok = ok and good
sys.exit(0 if ok else 1)
PY
