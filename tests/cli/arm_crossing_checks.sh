#!/usr/bin/env bash
# The cloud gas against the steady flow across the arms (arm-flow --clouds): gas runs of 12 500,
# 25 000 and 50 000 clouds in the demo truth's galaxy (four arms of pitch 20 deg), the cloud
# radius shrinking as N^-1/2 so that every run has the same collision rate, compared at 6 kpc
# after 600 Myr. Checks: the velocity drop across the arm converges with the cloud number (every
# pair agrees within 3 sigma of their standard errors), and the clouds' densest bin lies within
# a tenth of an arm spacing of the steady flow's (the place of the arm's compression). The
# 25 000-cloud run is repeated with half the time step (0.25 Myr): its drop must agree with the
# 0.5 Myr run's within 3 sigma. (The collision search is exact, so its cells do not enter.)
# Usage: arm_crossing_checks.sh UNDERTOW SOURCE_DIR WORK_DIR
set -euo pipefail
undertow=$1 src=$2 work=$3
rm -rf "$work"; mkdir -p "$work"; cd "$work"
fail() { echo "FAIL: $*" >&2; exit 1; }
model=$src/demo/truth/galaxy.toml

for run in "12500 0.042 0.5" "25000 0.0297 0.5" "50000 0.021 0.5" "25000h 0.0297 0.25"; do
  set -- $run
  cat > g$1.toml <<TOML
[run]
name = "clouds-$1"
seed = 21
[galaxy]
model_file = "$model"
[tracers]
source = "disk"
count = ${1%h}
scale_length_kpc = 5.0
r_min_kpc = 4.0
r_max_kpc = 13.0
scale_height_kpc = 0.03
sigma_r_kms = 5.0
sigma_z_kms = 3.0
[gas]
cloud_radius_kpc = $2
normal_restitution = 0.3
stirring_kms = 0.5
[integration]
method = "leapfrog"
end_myr = 600.0
step_myr = $3
[output]
times_myr = [600]
TOML
  "$undertow" integrate g$1.toml -o g$1.h5 --threads 2 > /dev/null
  "$undertow" arm-flow "$model" --radius 6 --clouds g$1.h5 --format csv -o steady$1.csv \
    --crossing-output crossing$1.csv 2> summary$1.txt
  cat summary$1.txt
  grep -q "velocity drop across the arm: clouds" summary$1.txt || fail "no drop for $1 clouds"
done

drop() { sed -n 's/.*velocity drop across the arm: clouds \([0-9.]*\) +- \([0-9.]*\) km\/s.*/\1 \2/p' summary$1.txt; }
for a in 12500 25000; do
  for b in 25000 50000; do
    [ $a = $b ] && continue
    read -r da ea <<< "$(drop $a)"; read -r db eb <<< "$(drop $b)"
    awk -v da=$da -v ea=$ea -v db=$db -v eb=$eb 'BEGIN { d = da - db; s = sqrt(ea*ea + eb*eb);
      exit !(d < 3 * s && -d < 3 * s) }' || fail "drops of $a and $b clouds differ: $da +- $ea vs $db +- $eb"
  done
done
awk -F, '!/^#|^x_min/ { if ($4 > bc) { bc = $4; xc = ($1 + $2) / 2 }
                        if ($5 > bs) { bs = $5; xs = ($1 + $2) / 2 }
                        lo = (lo == "" || $1 < lo) ? $1 : lo; hi = $2 }
  END { spacing = hi - lo; d = xc - xs; if (d < 0) d = -d; if (d > spacing / 2) d = spacing - d;
        printf "densest clouds at %g kpc, steady flow at %g kpc (spacing %g kpc)\n", xc, xs, spacing;
        exit !(d <= 0.1 * spacing) }' crossing50000.csv || fail "the clouds' compression is not at the steady flow's"
read -r da ea <<< "$(drop 25000)"; read -r db eb <<< "$(drop 25000h)"
awk -v da=$da -v ea=$ea -v db=$db -v eb=$eb 'BEGIN { d = da - db; s = sqrt(ea*ea + eb*eb);
  exit !(d < 3 * s && -d < 3 * s) }' || fail "drops at 0.5 and 0.25 Myr steps differ: $da +- $ea vs $db +- $eb"
echo "arm-crossing checks passed"
