#!/usr/bin/env bash
# The 'integrate' command as a user runs it: resume after SIGKILL gives the same snapshots,
# a full disk and an unwritable folder give clear errors and no file, bad tracer files and
# scenario keys give one-line errors, and h5py reads the result.
# Usage: scenario_checks.sh UNDERTOW SOURCE_DIR WORK_DIR
set -euo pipefail
undertow=$1 src=$2 work=$3
rm -rf "$work"; mkdir -p "$work"; cd "$work"
fail() { echo "FAIL: $*" >&2; exit 1; }

cat > s.toml <<TOML
[run]
name = "cli"
seed = 5
[galaxy]
model_file = "$src/potentials/kestrel.toml"
[tracers]
source = "disk"
count = 40000
scale_length_kpc = 3.0
r_min_kpc = 4
r_max_kpc = 12
scale_height_kpc = 0.05
sigma_r_kms = 8
sigma_z_kms = 4
[integration]
method = "leapfrog"
end_myr = 800
step_myr = 0.25
batch_size = 1024
[output]
every_myr = 80
TOML

echo "-- an uninterrupted run"
"$undertow" integrate s.toml -o whole.h5 --threads 2 > whole.log
echo "-- a run killed with SIGKILL after its third snapshot, then resumed"
"$undertow" integrate s.toml -o cut.h5 --threads 1 > /dev/null 2>&1 &
pid=$!
for _ in $(seq 1 600); do
  [ -f cut.h5.parts/part_00003.h5 ] && break
  sleep 0.05
done
kill -9 "$pid" 2>/dev/null || fail "the run finished before it could be killed"
wait "$pid" 2>/dev/null || true
[ -f cut.h5 ] && fail "a killed run left a file that looks complete"
"$undertow" integrate s.toml -o cut.h5 --threads 2 2> resume.log > /dev/null
grep -q "resuming from t = " resume.log || fail "the second run did not resume: $(cat resume.log)"
h5diff -r whole.h5 cut.h5 /snapshots /snapshots > diff.log || fail "resumed run differs: $(head -5 diff.log)"
echo "   resumed: $(cat resume.log)"

echo "-- a full disk (64 KiB tmpfs)"
mkdir -p full
mount -t tmpfs -o size=64k tmpfs full || fail "cannot mount a tmpfs to simulate a full disk"
trap 'umount "$work/full" 2>/dev/null || true' EXIT
if "$undertow" integrate s.toml -o full/out.h5 > full.log 2>&1; then fail "no error on a full disk"; fi
grep -q "disk full" full.log || fail "unclear full-disk error: $(cat full.log)"
[ -e full/out.h5 ] && fail "a half-written file was left on the full disk"
[ -e full/out.h5.parts ] && fail "a parts folder was left on the full disk"
echo "   $(tail -1 full.log)"
# residuals: its tables and HDF5 file join the folder together or not at all
if "$undertow" residuals "$src/demo/kestrel-measured.csv" --model "$src/potentials/kestrel.toml" \
  --r0 8.1 --draws 50 --bootstrap 50 -o full/res > full-res.log 2>&1; then
  fail "residuals: no error on a full disk"
fi
grep -q "full/res/residuals-.*write failed" full-res.log || fail "unclear error: $(cat full-res.log)"
[ -z "$(ls -A full)" ] || fail "residuals left $(ls -A full) on the full disk"
echo "   $(tail -1 full-res.log)"
umount full; trap - EXIT

echo "-- an output that is a folder: refused before any work"
mkdir -p a-folder.h5
if "$undertow" integrate s.toml -o a-folder.h5 > afold.log 2>&1; then fail "no error for a folder"; fi
[ "$(wc -l < afold.log)" -eq 1 ] || fail "error is not one line: $(cat afold.log)"
grep -q "is a folder" afold.log || fail "unclear error: $(cat afold.log)"
[ -e a-folder.h5.parts ] && fail "a parts folder was started for an output that is a folder"
echo "   $(cat afold.log)"

echo "-- an unwritable folder"
if "$undertow" integrate s.toml -o /proc/undertow-out.h5 > unw.log 2>&1; then fail "no error for /proc"; fi
[ "$(wc -l < unw.log)" -eq 1 ] || fail "error is not one line: $(cat unw.log)"
echo "   $(cat unw.log)"

echo "-- bad tracer files"
check_bad() { # file expected-substring
  sed "s|source = \"disk\"|source = \"file\"\nfile = \"$1\"|; /^count\|^scale_\|^r_m\|^sigma/d" s.toml > bad.toml
  if "$undertow" integrate bad.toml -o bad.h5 > bad.log 2>&1; then fail "no error for $1"; fi
  grep -qF "$2" bad.log || fail "for $1 expected '$2', got: $(cat bad.log)"
  [ "$(wc -l < bad.log)" -eq 1 ] || fail "error is not one line: $(cat bad.log)"
  [ -e bad.h5 ] && fail "output written despite the error"
  echo "   $(cat bad.log)"
}
printf 'id,x_kpc,y_kpc,z_kpc,vx_kms,vy_kms\n1,-8,0,0,0,220\n' > t1.csv
check_bad "$work/t1.csv" "t1.csv:1: vz_kms: missing column"
printf 'id,x_kpc,y_kpc,z_kpc,vx_kms,vy_kms,vz_kms\n1,-8,0,0,0,220,0\n2,-8,nan,0,0,220,0\n' > t2.csv
check_bad "$work/t2.csv" "t2.csv:3: y_kpc: not a finite number"
printf 'id,x_kpc,y_kpc,z_kpc,vx_kms,vy_kms,vz_kms\n1,-8000,0,0,0,220,0\n' > t3.csv
check_bad "$work/t3.csv" "outside the model's valid range"
check_bad "$work/none.csv" "none.csv: cannot open file"

echo "-- a misspelled scenario key"
sed 's/^step_myr/step_mry/' s.toml > typo.toml
if "$undertow" integrate typo.toml -o typo.h5 > typo.log 2>&1; then fail "no error for a misspelled key"; fi
grep -qF "typo.toml:18:1: integration.step_mry: unknown key" typo.log || fail "unclear: $(cat typo.log)"
echo "   $(cat typo.log)"

echo "-- h5py reads the snapshot file"
if /usr/bin/python3 -c "import h5py" 2>/dev/null; then
  /usr/bin/python3 "$src/tests/io/check_snapshot.py" whole.h5 40000 11
else
  fail "python3-h5py is not installed (tests/run.sh installs it)"
fi
echo "scenario checks: all passed"
