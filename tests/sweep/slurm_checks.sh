#!/usr/bin/env bash
# The sweep on a real Slurm: a single-node cluster started here (local_slurm.sh), the CI sweep
# (7 points) submitted through `undertow sweep slurm --submit --wait` as a 3-task job array (and
# as a 1-task and a 16-task array), gathered, and compared byte for byte with the same plan run
# in local mode. If Slurm cannot be
# started this fails; it never skips. Usage: slurm_checks.sh UNDERTOW SRC WORK
set -euo pipefail
U=$1
SRC=$2
W=$3
rm -rf "$W"
mkdir -p "$W"
cd "$W"
fail() { echo "FAIL: $*" >&2; exit 1; }
state="$W/slurm"
trap 'bash "$SRC/tests/sweep/local_slurm.sh" stop "$state"' EXIT
t0=$(date +%s.%N)
bash "$SRC/tests/sweep/local_slurm.sh" start "$state" || fail "could not start a local Slurm"
export SLURM_CONF="$state/slurm.conf"
t1=$(date +%s.%N)

sweep="$SRC/tests/sweep/ci-sweep.toml"
"$U" sweep plan "$sweep" -o cluster >/dev/null
"$U" sweep slurm cluster --time 00:10:00 --mem 1G --cpus-per-task 1 --tasks 3 --submit --wait \
  | tee submit.out || { cat cluster/logs/*.err 2>/dev/null | tail -n 20; fail "the job array failed"; }
grep -q "^#SBATCH --array=0-2$" cluster/slurm-array.sh || fail "the array is not 0-2"
job=$(sed -n 's/^submitted job \([0-9]*\).*/\1/p' submit.out)
[ -n "$job" ] || fail "no job id printed"
t2=$(date +%s.%N)
for k in 0 1 2; do
  out="cluster/logs/slurm-${job}_$k.out"
  [ -f "$out" ] || fail "task $k wrote no $out"
  grep -q "shard $k of 3" "cluster/logs/slurm-${job}_$k.err" || fail "task $k did not run shard $k of 3"
done
cat cluster/logs/slurm-"$job"_*.out
"$U" sweep gather cluster | tail -n 1

# The same plan as a 1-task array (every point in one task) and as a 16-task array (more tasks
# than points: the array is given on sbatch's command line, which overrides the script's).
"$U" sweep plan "$sweep" -o one-task >/dev/null
"$U" sweep slurm one-task --time 00:10:00 --mem 1G --tasks 1 --submit --wait >/dev/null \
  || fail "the 1-task array failed"
grep -q "^#SBATCH --array=0-0$" one-task/slurm-array.sh || fail "the array is not 0-0"
"$U" sweep plan "$sweep" -o sixteen >/dev/null
"$U" sweep slurm sixteen --time 00:10:00 --mem 1G >/dev/null
sbatch --parsable --wait --array=0-15 sixteen/slurm-array.sh >/dev/null || fail "the 16-task array failed"
[ "$(cat sixteen/logs/slurm-*_*.err | grep -c "shard .* of 16")" = 16 ] || fail "not 16 shards of 16"
[ "$(cat sixteen/logs/slurm-*_*.err | grep -c ": 0 of 7 points")" = 9 ] || fail "9 tasks should have had nothing to do"

"$U" sweep plan "$sweep" -o local >/dev/null
"$U" sweep run local --workers 2 --threads 1 >/dev/null 2>&1
"$U" sweep gather local >/dev/null
diff -r local/points cluster/points >/dev/null || { diff -rq local/points cluster/points | head; fail "points differ"; }
cmp local/ci-results.csv cluster/ci-results.csv || fail "gathered CSV differs"
cmp local/ci-results.h5 cluster/ci-results.h5 || fail "gathered HDF5 differs"
for d in one-task sixteen; do
  "$U" sweep gather "$d" >/dev/null
  diff -r local/points "$d/points" >/dev/null || { diff -rq local/points "$d/points" | head; fail "$d: points differ"; }
  cmp local/ci-results.csv "$d/ci-results.csv" || fail "$d: gathered CSV differs"
  cmp local/ci-results.h5 "$d/ci-results.h5" || fail "$d: gathered HDF5 differs"
done
t3=$(date +%s.%N)
awk -v a="$t0" -v b="$t1" -v c="$t2" -v d="$t3" 'BEGIN {
  printf "Slurm sweeps (3, 1 and 16 tasks) equal local mode. Wall time: cluster start %.1f s, 7 points in a 3-task array (sbatch --wait) %.1f s, whole check %.1f s\n", b - a, c - b, d - a }'
