#!/usr/bin/env bash
# 'undertow arms' as a user runs it: the demo's arm catalog regenerated bit for bit from its
# documented truth, the arm fit of that catalog with its outputs read back (the truth: four arms of
# pitch 13 deg, one crossing R0 = 8.1 kpc at 25 deg), and the bad-input cases (one line, exit 2,
# nothing written).
# Usage: arm_checks.sh UNDERTOW SOURCE_DIR WORK_DIR
set -euo pipefail
undertow=$1 src=$2 work=$3
rm -rf "$work"; mkdir -p "$work"; cd "$work"
fail() { echo "FAIL: $*" >&2; exit 1; }

# 1. The demo's arm catalog is made by the tool from its documented truth, bit for bit.
"$undertow" mock-kinematics "$src/demo/arms-truth.toml" -o arms-catalog.csv > /dev/null
cmp arms-catalog.csv "$src/demo/arms-catalog.csv" ||
  fail "demo/arms-catalog.csv is not what demo/arms-truth.toml gives (regenerate it)"

# 2. The arm fit of the demo catalog, its tables and arms.h5.
"$undertow" arms arms-catalog.csv --r0 8.1 -o fit > fit.out
for f in arm-segments.csv arm-segments.ecsv arm-segments.fits arm-segments.md arm-segments.tex \
         arm-count.csv arm-membership.csv arms.h5 summary.txt; do
  [ -s "fit/$f" ] || fail "fit/$f missing"
done
grep -q "preferred" fit.out || fail "no number of arms in the output"
/usr/bin/python3 - fit <<'PY'
import sys, csv, h5py, math
d = sys.argv[1]
rows = [r for r in csv.reader(l for l in open(d + "/arm-segments.csv") if not l.startswith("#"))]
head, body = rows[0], rows[1:]
assert len(body) == 4, body
col = {k: i for i, k in enumerate(head)}
for r in body:
    p, lo, hi = float(r[col["pitch_deg"]]), float(r[col["pitch_minus_deg"]]), float(r[col["pitch_plus_deg"]])
    # each segment's pitch within 3 sigma of the truth's 13 deg
    s = hi if p < 13 else lo
    assert abs(p - 13) < 3 * s, (r[0], p, lo, hi)
with h5py.File(d + "/arms.h5") as f:
    for g in ("arm-1", "arm0", "arm1", "arm2"):
        x = f["samples"][g][()]
        assert x.shape[1] == 3 and x.shape[0] > 1000, x.shape
    assert int(f["preferred"].attrs["arms"]) in (2, 4, 8), f["preferred"].attrs["arms"]
print("arm fit of the demo catalog: 4 segments within 3 sigma of 13 deg")
PY

# 3. The fit's arms into a model file: Kestrel's components and calibration with a spiral whose
# arms come from the fit (arms_from); the model reads and is tabulated.
sed -n '/^\[\[component\]\]/,/^\[\[pattern\]\]/p' "$src/potentials/kestrel.toml" |
  sed '$d' > model.toml
cat >> model.toml <<'TOML'
[[pattern]]
kind = "log-spiral"
arms_from = "fit/arms.h5"
arm_azimuth_at_myr = 600
pattern_speed_kms_kpc = 21
reference_radius_kpc = 8.1
force_ratio = 0.025
TOML
"$undertow" tabulate model.toml --from 8 --to 8 --step 1 > model.out || fail "arms_from: model refused"
grep -q "m = 4" model.out || fail "arms_from: the model has not the fit's four arms"

# 3b. Odd but valid input: a column undertow does not read gives a warning on stderr, counted and
# repeated in summary.txt.
awk -F, 'BEGIN { OFS = "," } /^#/ { print; next } !h { print $0, "observer"; h = 1; next } { print $0, "nobody" }' \
  arms-catalog.csv > extra.csv
"$undertow" arms extra.csv --r0 8.1 -o extra > extra.out 2> extra.err
grep -q "^warning: .*observer.*not a column undertow reads" extra.err || { cat extra.err; fail "no warning for an unread column"; }
grep -q "^1 warning reading extra.csv" extra/summary.txt || { cat extra/summary.txt; fail "summary.txt does not count the warning"; }
grep -q "^warning: .*observer" extra/summary.txt || fail "summary.txt does not repeat the warning"

# 4. Bad input: one line, exit 2, nothing written.
refuse() { # name, expected text, arguments
  local name=$1 want=$2
  shift 2
  set +e
  "$undertow" arms "$@" -o "out-$name" > "$name.out" 2> "$name.err"
  local code=$?
  set -e
  [ "$code" -eq 2 ] || { cat "$name.err"; fail "$name: exit $code, not 2"; }
  [ "$(wc -l < "$name.err")" -eq 1 ] || { cat "$name.err"; fail "$name: not one line"; }
  grep -q -- "$want" "$name.err" || { cat "$name.err"; fail "$name: message lacks '$want'"; }
  [ ! -e "out-$name" ] || fail "$name: output written"
}
# a group of two sources
awk -F, 'BEGIN{OFS=","} /^T/ && $2=="arm2" && n<2 {$2="tiny"; n++} {print}' arms-catalog.csv > tiny.csv
refuse tiny "group 'tiny' has 2 source(s); a pitch angle needs at least 3" tiny.csv --r0 8.1
# three sources at one place: one azimuth
# (one awk, no 'head' in a pipe: under pipefail a writer cut off by head can fail the script)
{ grep -v '^T' arms-catalog.csv
  awk -F, 'BEGIN{OFS=","} /^T/ {for (k = 1; k <= 3; ++k) {$1 = "S" k; $2 = "same"; print}; exit}' \
    arms-catalog.csv; } > same.csv
refuse same "span 0 deg of Galactocentric azimuth" same.csv --r0 8.1
refuse pitch-low "--pitch-range" arms-catalog.csv --r0 8.1 --pitch-range 0,30
refuse pitch-high "--pitch-range" arms-catalog.csv --r0 8.1 --pitch-range 10,95
refuse no-r0 "give --r0" arms-catalog.csv
refuse unlabelled "no source has a group label" "$src/demo/kinematic-catalog.csv" --r0 8.1
refuse no-group "no source is in group 'arm7'" arms-catalog.csv --r0 8.1 --groups arm0,arm7
# a folder of the user's that holds no earlier arm fit is never replaced; an earlier fit is
mkdir keep && echo mine > keep/notes.txt
set +e
"$undertow" arms arms-catalog.csv --r0 8.1 -o keep > keep.out 2> keep.err; code=$?
set -e
[ "$code" -eq 2 ] && grep -q "holds no earlier arm fit (no arms.h5)" keep.err &&
  [ "$(cat keep/notes.txt)" = mine ] && [ ! -e keep/arms.h5 ] ||
  { cat keep.err; fail "a folder of the user's: exit $code, or it was touched"; }
"$undertow" arms arms-catalog.csv --r0 8.1 -o fit --no-figures > again.out ||
  fail "an earlier arm fit's folder was not replaced"
touch a-file
set +e
"$undertow" arms arms-catalog.csv --r0 8.1 -o a-file > file.out 2> file.err; code=$?
set -e
[ "$code" -eq 2 ] && grep -q "not a folder" file.err || { cat file.err; fail "output a file: exit $code"; }
echo "arm checks passed"
