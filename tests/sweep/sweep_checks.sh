#!/usr/bin/env bash
# The sweep commands as a user runs them, locally: a plan run in one process, by a pool of
# workers killed with SIGKILL part-way and run again, and as 16 shards (more shards than points)
# all give byte-identical point folders and gathered tables; a corrupted point is redone; bad
# sweep files are refused with one line and plan nothing. Usage: sweep_checks.sh UNDERTOW SRC WORK
set -euo pipefail
U=$1
SRC=$2
W=$3
rm -rf "$W"
mkdir -p "$W"
cd "$W"
fail() { echo "FAIL: $*" >&2; exit 1; }
sweep="$SRC/tests/sweep/ci-sweep.toml"
finished() { find "$1/points" -mindepth 1 -maxdepth 1 -type d ! -name '*.partial' 2>/dev/null | wc -l; }
# Waits (up to a minute: a sanitizer build is slow) until one point of plan $1 has finished and
# another is half-way (its .partial folder).
mid_point() {
  for _ in $(seq 3000); do
    compgen -G "$1/points/*.partial/.keys" >/dev/null && [ "$(finished "$1")" -ge 1 ] && return 0
    sleep 0.02
  done
}

start=$(date +%s.%N)
"$U" sweep plan "$sweep" -o one >/dev/null
n=$(grep -c '^\[\[point\]\]' one/plan.toml)
[ "$n" = 7 ] || fail "expected 7 points, planned $n"

# Planned from the sweep file's own folder with relative paths: the same ids.
(cd "$SRC/tests/sweep" && "$U" sweep plan ci-sweep.toml -o "$W/rel" >/dev/null)
diff <(grep '^id' one/plan.toml) <(grep '^id' rel/plan.toml) >/dev/null || fail "relative planning changed the ids"

# 1. The reference: all points in one process.
"$U" sweep run one 2>one.err | tee one.out
grep -q ": ran 7, already finished 0, failed 0" one.out || fail "one process did not run 7 points"
"$U" sweep gather one >/dev/null
one_done=$(date +%s.%N)

# 2. A pool of 2 workers, killed with SIGKILL once two points have finished, then run again.
"$U" sweep plan "$sweep" -o pool >/dev/null
"$U" sweep run pool --workers 2 --threads 1 >pool-1.out 2>pool-1.err &
pid=$!
for _ in $(seq 3000); do
  [ "$(finished pool)" -ge 2 ] && break
  sleep 0.02
done
kill -9 "$pid"
wait "$pid" 2>/dev/null || true
# The workers die with the pool (PR_SET_PDEATHSIG), but a process killed with SIGKILL takes a
# moment to be torn down and to free its point's lock: on a slow machine 0.3 s was not enough and
# the rerun found a point "running in another task". Wait until no worker of this plan is left.
for _ in $(seq 500); do
  pgrep -f "sweep run pool --point" >/dev/null || break
  sleep 0.02
done
! pgrep -f "sweep run pool --point" >/dev/null || fail "the pool's workers outlived it by 10 s"
k=$(finished pool)
[ "$k" -lt 7 ] || fail "the pool finished before it was killed; nothing was resumed"
[ "$k" -ge 1 ] || fail "the pool was killed before any point finished; nothing to skip"
echo "pool killed with $k of 7 points finished"
"$U" sweep status pool | tail -n 1
"$U" sweep run pool --workers 2 --threads 1 >pool-2.out 2>pool-2.err ||
  { cat pool-2.out pool-2.err; fail "the rerun of the killed pool failed"; }
grep -q "already finished $k," pool-2.out || fail "the rerun did not skip the $k finished points"

# 2b. One worker of a pool killed (as the out-of-memory killer would): that point is recorded as
# failed, the others finish, and the next run retries it.
"$U" sweep plan "$sweep" -o oom >/dev/null
"$U" sweep run oom --workers 2 --threads 1 >oom-1.out 2>oom-1.err &
pid=$!
worker=""
for _ in $(seq 3000); do
  worker=$(pgrep -P "$pid" -f "sweep run . --point" | head -n 1 || true)
  [ -n "$worker" ] && break
  sleep 0.02
done
[ -n "$worker" ] || fail "no worker process seen"
kill -9 "$worker"
if wait "$pid"; then fail "the pool exited 0 although a worker was killed"; fi
grep -q "killed by signal 9" oom-1.err || fail "the killed worker was not reported"
grep -q ": ran 6, already finished 0, failed 1" oom-1.out || { cat oom-1.out; fail "the other points did not all run"; }
"$U" sweep status oom | grep -q "1 failed" || fail "status does not show the failed point"
"$U" sweep run oom --workers 2 --threads 1 >oom-2.out 2>oom-2.err
grep -q ": ran 1, already finished 6, failed 0" oom-2.out || { cat oom-2.out; fail "the failed point was not retried alone"; }

# 3. In one process, killed in the middle of a point (its .partial folder exists), then resumed.
# The kill can land just as a point is renamed into place, before the next one starts: then
# there is nothing half-written, and the attempt is made again on a fresh plan (at most 3).
for attempt in 1 2 3; do
  rm -rf killed
  "$U" sweep plan "$sweep" -o killed >/dev/null
  "$U" sweep run killed >killed-1.out 2>killed-1.err &
  pid=$!
  mid_point killed
  kill -9 "$pid"
  wait "$pid" 2>/dev/null || true
  compgen -G "killed/points/*.partial" >/dev/null && break
done
compgen -G "killed/points/*.partial" >/dev/null || fail "no half-written point to resume (3 attempts)"
"$U" sweep status killed | grep -q "): partial" || fail "status does not show the partial point"
"$U" sweep run killed >killed-2.out 2>killed-2.err ||
  { cat killed-2.out killed-2.err; fail "the rerun of the killed process failed"; }

# 3b. SIGTERM (what Slurm sends at a time limit) in the middle of a point: exit status 130, the
# point kept to resume, and the rerun finishes it.
"$U" sweep plan "$sweep" -o term >/dev/null
"$U" sweep run term >term-1.out 2>term-1.err &
pid=$!
mid_point term
kill -TERM "$pid"
rc=0
wait "$pid" || rc=$?
[ "$rc" = 130 ] || { tail -n 3 term-1.err; fail "SIGTERM gave exit status $rc, not 130"; }
grep -q "interrupted; run the same command again to resume" term-1.err || fail "no resume hint after SIGTERM"
[ "$(finished term)" -lt 7 ] || fail "the sweep finished before SIGTERM"
"$U" sweep run term >term-2.out 2>term-2.err ||
  { cat term-2.out term-2.err; fail "the rerun after SIGTERM failed"; }

# 4. Sixteen shards, as a 16-task array would run them.
"$U" sweep plan "$sweep" -o shards >/dev/null
for k in $(seq 0 15); do
  "$U" sweep run shards --shard "$k" --shards 16 >>shards.out 2>>shards.err
done
grep -c "0 of 7 points" shards.err | grep -q 9 || fail "shards 7-15 should have had no points"

for d in pool oom killed term shards; do
  diff -r one/points "$d/points" >/dev/null || { diff -rq one/points "$d/points" | head; fail "$d differs from one process"; }
  "$U" sweep gather "$d" >/dev/null
  cmp one/ci-results.csv "$d/ci-results.csv" || fail "$d: gathered CSV differs"
  cmp one/ci-results.h5 "$d/ci-results.h5" || fail "$d: gathered HDF5 differs"
done
echo "one process, a killed pool, a pool with a killed worker, a killed process and 16 shards: identical points and tables"

# The gathered HDF5 file read by h5py (an outside reader): every point complete, units on the
# swept pattern speed, and the same ln L per id as the CSV table.
/usr/bin/python3 - one/ci-results.h5 one/ci-results.csv <<'PY' || fail "the gathered HDF5 file does not match the CSV"
import csv, sys, h5py, math
f = h5py.File(sys.argv[1], "r")
assert f.attrs["undertow_format"] == "sweep-results"
assert all(s.decode() == "complete" for s in f["status"][()]), f["status"][()]
assert f["parameters/galaxy.pattern[arms].pattern_speed_kms_kpc"].attrs["units"] == "km/s/kpc"
assert f["statistics/mean_V_simulated_kms"].attrs["units"] == "km/s"
h5 = dict(zip((i.decode() for i in f["id"][()]), f["statistics/log_likelihood"][()]))
rows = [r for r in csv.reader(open(sys.argv[2])) if r and not r[0].startswith("#")]
col = rows[0].index("log_likelihood")
assert len(rows) - 1 == len(h5) == 7
for r in rows[1:]:
    key = r[0].split()[0]
    assert math.isclose(float(r[col]), h5[key], rel_tol=1e-7), (key, r[col], h5[key])
print("gathered HDF5 read by h5py: 7 points, units present, ln L equal to the CSV")
PY

# 4b. The gathered sweep's figures (docs/figures.md): drawn by gather, redrawn in every format,
# with chosen axes; unknown axes refused.
for f in fig-sweep-map.png fig-sweep-profiles.png fig-sweep-map.pdf; do
  [ -s "one/figures/$f" ] || fail "gather drew no $f"
done
"$U" draw one --format png,svg,pdf -o figs >/dev/null || fail "draw on a gathered sweep"
"$U" draw one --figure sweep-map --axes force_ratio pattern_speed_kms_kpc --format svg -o figs-axes \
  >/dev/null || fail "draw --axes"
[ "$(pdfinfo figs/fig-sweep-map.pdf | awk '/^Pages:/ {print $2}')" = 1 ] || fail "sweep map PDF pages"
/usr/bin/python3 -c "import sys, xml.etree.ElementTree as E; E.parse(sys.argv[1])" figs/fig-sweep-profiles.svg ||
  fail "sweep profiles SVG is not XML"
if "$U" draw one --figure sweep-map --axes force_ratio pitch_deg -o figs-bad 2>axes.err; then
  fail "an axis that was not swept was accepted"
fi
grep -q "'pitch_deg' is not a numeric swept parameter" axes.err || { cat axes.err; fail "axes message"; }
echo "sweep figures drawn by gather and redrawn as PNG, SVG, PDF; --axes checked"

# 5. Gathering twice gives identical files; a missing point makes gather fail unless --partial.
cp one/ci-results.h5 first.h5
"$U" sweep gather one >/dev/null
cmp first.h5 one/ci-results.h5 || fail "gathering twice differs"
victim=$(find one/points -mindepth 1 -maxdepth 1 -type d | sort | head -n 1)
mv "$victim" "$W/set-aside"
if "$U" sweep gather one >gather.out 2>gather.err; then fail "gather passed with a point missing"; fi
grep -q "^missing: point" gather.out || fail "gather did not list the missing point"
"$U" sweep gather one --partial >/dev/null || fail "gather --partial failed"
grep -q "PARTIAL" one/ci-results.md || fail "partial table not marked"
mv "$W/set-aside" "$victim"

# 5b. The posterior. This grid is too coarse (force ratio: two values, both of them edges), so the
# posterior is refused: gather still writes its table and says why; --posterior stops with one line,
# exit 2 and nothing written.
"$U" sweep gather one >post.out || fail "gather failed on a sweep without a posterior"
grep -q "^no posterior: .*force_ratio' takes 2 values: a grid posterior needs at least 3" post.out ||
  { cat post.out; fail "gather did not say why there is no posterior"; }
grep -q "no posterior written" one/ci-results.md || fail "the results table does not say why there is no posterior"
set +e
"$U" sweep gather one --posterior -o "$W/required/x" >req.out 2>req.err
code=$?
set -e
[ "$code" = 2 ] || fail "gather --posterior on an edge-heavy grid exited $code, expected 2"
[ "$(wc -l <req.err)" = 1 ] || { cat req.err; fail "gather --posterior: more than one line"; }
[ ! -e "$W/required" ] || fail "gather --posterior wrote something"
# A one-point grid: one value of one parameter.
cat >"$W/one-point.toml" <<ONE
[sweep]
name = "onept"
base = "$SRC/tests/sweep/small-spiral.toml"
design = "grid"
[[parameter]]
key = "galaxy.pattern[arms].pattern_speed_kms_kpc"
values = [21]
ONE
"$U" sweep plan "$W/one-point.toml" -o onept >/dev/null
"$U" sweep run onept >/dev/null 2>&1
set +e
"$U" sweep gather onept --posterior -o "$W/onept-out/x" >onept.out 2>onept.err
code=$?
set -e
[ "$code" = 2 ] || fail "a one-point posterior exited $code, expected 2"
grep -q "takes one value only\|at least two points" onept.err || { cat onept.err; fail "no clear message for a one-point posterior"; }
[ "$(wc -l <onept.err)" = 1 ] || { cat onept.err; fail "one-point posterior: more than one line"; }
[ ! -e "$W/onept-out" ] || fail "a one-point posterior wrote something"
echo "posterior: refused at a grid edge and on a one-point grid, with nothing written"

# 6. A corrupted point folder is detected and redone, to the same bytes.
good=$(cat "$victim/comparison-global.csv")
printf 'garbage' >"$victim/comparison-global.csv"
"$U" sweep status one | grep -q "): corrupt" || fail "status did not see the corrupted point"
"$U" sweep run one >redo.out 2>redo.err
grep -q ": ran 1, already finished 6" redo.out || fail "the corrupted point was not redone"
[ "$(cat "$victim/comparison-global.csv")" = "$good" ] || fail "the redone point differs"

# 6b. A Latin hypercube planned twice: the same plan, byte for byte, with its 5 points.
cat >"$W/lhs.toml" <<LHS
[sweep]
name = "lhs"
base = "$SRC/tests/sweep/small-spiral.toml"
design = "latin-hypercube"
points = 5
seed = 11
[[parameter]]
key = "galaxy.pattern[arms].pitch_deg"
from = 10.0
to = 30.0
[[parameter]]
key = "galaxy.pattern[arms].force_ratio"
from = 0.01
to = 0.1
scale = "log"
LHS
"$U" sweep plan "$W/lhs.toml" -o lhs-a >/dev/null
"$U" sweep plan "$W/lhs.toml" -o lhs-b >/dev/null
cmp lhs-a/plan.toml lhs-b/plan.toml || fail "replanning a Latin hypercube changed the plan"
[ "$(grep -c '^\[\[point\]\]' lhs-a/plan.toml)" = 5 ] || fail "the Latin hypercube has not 5 points"
"$U" sweep show lhs-a --point 4 | grep -q "^pitch_deg = " || fail "show did not print the point's scenario"

# 7. Bad sweep files: one line naming the file and the problem, nothing planned.
bad() { # name, expected message, sweep text
  printf '%s\n' "$3" >"$W/$1.toml"
  rc=0
  "$U" sweep plan "$W/$1.toml" -o "$W/$1-plan" >"$1.out" 2>"$1.err" || rc=$?
  [ "$rc" = 2 ] || { cat "$1.err"; fail "$1: exit status $rc, not 2 (bad input)"; }
  [ "$(wc -l <"$1.err")" = 1 ] || { cat "$1.err"; fail "$1: not one line"; }
  grep -q "$2" "$1.err" || { cat "$1.err"; fail "$1: message lacks '$2'"; }
  [ ! -e "$W/$1-plan" ] || fail "$1 left a plan folder"
  echo "refused $1: $(cat "$1.err")"
}
head='[sweep]
name = "bad"
base = "'"$SRC"'/tests/sweep/small-spiral.toml"'
bad empty-range "range is empty" "$head
[[parameter]]
key = \"galaxy.pattern[arms].force_ratio\"
from = 0.08
to = 0.02
step = 0.01"
bad negative-count "at least 1, got -4" "$head
[[parameter]]
key = \"galaxy.pattern[arms].force_ratio\"
from = 0.02
to = 0.08
count = -4"
bad duplicate "swept twice" "$head
[[parameter]]
key = \"galaxy.pattern[arms].force_ratio\"
values = [0.02]
[[parameter]]
key = \"galaxy.pattern[arms].force_ratio\"
values = [0.04]"
bad missing-base "does not exist" '[sweep]
name = "bad"
base = "no-such-scenario.toml"
[[parameter]]
key = "run.seed"
values = [1, 2]'
bad unknown-key "pattern_sped_kms_kpc: unknown key" "$head
[[parameter]]
key = \"galaxy.pattern[arms].pattern_sped_kms_kpc\"
values = [20]"
end=$(date +%s.%N)
awk -v a="$start" -v b="$one_done" -v c="$end" 'BEGIN {
  printf "wall time: 7-point sweep in one process %.1f s; whole check %.1f s\n", b - a, c - a }'
