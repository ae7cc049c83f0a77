#!/usr/bin/env bash
# Every write of each standalone command that writes files (tabulate, integrate, observe,
# mock-kinematics, residuals, fit, arms, draw, versus, arm-flow, sweep slurm, sweep gather -o)
# made to fail in turn, as tests/cli/full_disk_checks.sh does for the whole run and the sweep: the
# command's outputs go to a tmpfs whose room is set, attempt after attempt, to just below what its
# outputs up to a given file need (the files of an uninterrupted run in the order they were
# written). Each failure must give exit status 2, exactly one line starting with "undertow: " that
# says the disk may be full, no temporary anywhere on the tmpfs, and no output of the command left
# behind, unless it is a documented finished stage and the message says it is kept (the parts of
# an integration, the tables of a fit beside which a figure failed). With room, the result is
# byte-identical to the uninterrupted one. Every problem is listed (command, room, exit status, message, files left) and
# the script fails at the end if there was any. Needs root (mount).
# Usage: full_disk_commands.sh UNDERTOW SRC WORK
set -euo pipefail
U=$(realpath "$1")
SRC=$(realpath "$2")
W=$3
if mountpoint -q "$W/disk" 2>/dev/null; then umount "$W/disk"; fi
rm -rf "$W"
mkdir -p "$W/disk" "$W/in" "$W/ref"
W=$(realpath "$W")
cd "$W"
export SOURCE_DATE_EPOCH=1800000000 # identical bytes from run to run (docs/snapshot-format.md)
source "$SRC/tests/cli/full_disk_lib.sh"
filler
room() { mount -o remount,size="$1" disk || fail "cannot give the tmpfs $1"; }

# The cuts: sizes beyond what the disk held before the command (full_disk_lib.sh).
cuts() { cut_sizes "$1" "$2" 0; } # max, even

# The outputs go to disk/o. SETUP (a function name) puts there what a command works on (nothing
# for most); base is then the room the disk holds before the command.
setup=true
reset_out() {
  rm -rf disk/o
  mkdir disk/o
  room 256m
  "$setup" >setup.out 2>setup.err || { cat setup.err; fail "setup $setup"; }
  find disk/o | sort >setup.list
  base=$(used_kib)
}
problems=0
problem() { # what: one block of the report
  problems=$((problems + 1))
  printf '%s\n' "$*" | tee -a problems.txt >&2
}
left_behind() { comm -13 setup.list <(find disk/o | sort); }

# Runs the command with room to spare for the reference, then again with the room of each cut: it
# must fail cleanly each time; last with room to spare, when it must finish with the reference's
# bytes. MODE fresh: each attempt starts from the setup alone (the command reuses nothing); resume:
# what a failure keeps stays for the next attempt (an integration resumes from its parts), and the
# cuts add sizes spread evenly (the parts are gone from the finished folder). KEPT: a
# pattern the message must hold when outputs stay behind (a documented finished stage); empty
# when none may stay. MAX: at most so many cuts.
check() { # label, mode, kept, max, command...
  local label=$1 mode=$2 kept=$3 max=$4 s rc n steps=0 left why t0=$SECONDS even=0
  shift 4
  [ "$mode" = resume ] && even=24
  reset_out
  "$@" >ref.out 2>ref.err || { cat ref.err; fail "$label with room to spare"; }
  left_behind | cuts "$max" "$even" >cuts.txt
  rm -rf "ref/$label"
  cp -a disk/o "ref/$label"
  reset_out
  : >messages.txt
  for s in $(cat cuts.txt) last; do
    if [ "$s" = last ]; then
      room 256m
    else
      [ "$mode" = fresh ] && reset_out
      [ "$((base + s))" -ge "$(used_kib)" ] || continue
      room "$((base + s))k"
    fi
    rc=0
    "$@" >step.out 2>step.err || rc=$?
    if [ "$s" = last ]; then
      if [ "$rc" != 0 ]; then
        problem "$label: did not finish with 256 MiB: exit $rc: $(cat step.err)"
      elif ! diff -r "ref/$label" disk/o >/dev/null; then
        problem "$label: the result after the failures differs: $(diff -rq "ref/$label" disk/o | head -5)"
      fi
      [ -z "$(debris disk)" ] || problem "$label: temporaries after the finished run: $(debris disk)"
      break
    fi
    if [ "$rc" = 0 ]; then # room enough after all: not a failure to check
      echo "  ($label finished in $((base + s)) KiB)"
      continue
    fi
    steps=$((steps + 1))
    grep '^undertow: ' step.err | sed "s|$W/||g; s/[0-9]\{3,\}/N/g; s/^/$((base + s)) KiB: /" >>messages.txt || true
    why=""
    [ "$rc" = 2 ] || why+=" exit status $rc, not 2;"
    n=$(grep -c '^undertow: ' step.err || true)
    [ "$n" = 1 ] || why+=" $n lines start with 'undertow: ', not 1;"
    grep -q '^undertow: .*disk full' step.err || why+=" the message does not say the disk may be full;"
    [ -z "$(debris disk)" ] || why+=" temporaries left;"
    left=$(left_behind)
    if [ -n "$left" ]; then
      if [ -z "$kept" ] || ! grep -q -- "$kept" step.err; then
        why+=" outputs left behind without saying they are kept"
        grep -q 'nothing written' step.err && why+=" (the message says 'nothing written')"
        why+=";"
      fi
    elif [ -n "$kept" ] && grep -q -- "$kept" step.err; then
      why+=" the message says outputs are kept, and none is there;"
    fi
    if [ -n "$why" ]; then
      problem "$label on $((base + s)) KiB (room for $s KiB of outputs):$why
  exit status: $rc
  stderr: $(sed 's/^/    /' step.err | sed '1s/^ *//')
  left on the disk: $( (left_behind; debris disk) | sort -u | sed "s|^disk/||" | tr '\n' ' ')"
      reset_out # the next attempt from a known state
    fi
  done
  echo "$label: $steps failures in $((SECONDS - t0)) s"
  sed 's/^[0-9]* KiB: //' messages.txt | sort | uniq -c | sed 's/^ */  /'
}

# --- Inputs, outside the tmpfs --------------------------------------------------------------
# A sweep of two points of a small gas run (tests/cli/tiny-run.toml with absolute paths and fewer
# Monte Carlo draws), keeping their orbits: for sweep gather, and its first point's folder (a whole
# run's) for draw, versus (against a copy of itself) and arm-flow --clouds.
sed -e "s|\"../../demo/|\"$SRC/demo/|; s/^draws = 20/draws = 5/; s/^bootstrap = 50/bootstrap = 10/" \
  "$SRC/tests/cli/tiny-run.toml" >in/tiny-run.toml
cat >in/tiny-sweep.toml <<'TOML'
[sweep]
name = "tiny"
base = "tiny-run.toml"
design = "grid"
keep_orbits = true
[[parameter]]
key = "galaxy.pattern[arms].pattern_speed_kms_kpc"
values = [18, 24]
TOML
"$U" sweep plan in/tiny-sweep.toml -o in/sweep >/dev/null
"$U" sweep run in/sweep --threads 2 >/dev/null 2>in.err || { cat in.err; fail "the tiny sweep"; }
run=$(find in/sweep/points -mindepth 1 -maxdepth 1 -type d | sort | head -n 1)
[ -f "$run/orbits.h5" ] || fail "no orbits.h5 kept in $run"
# A sweep point's scenario holds its galaxy inline (no model file): the figures that need the
# model take it from there (they refused to draw, though listed as available).
"$U" draw "$run" --figure rotation --figure face-on --format png -o in/model-figures >/dev/null ||
  fail "draw rotation and face-on from a sweep point's folder"
cp -a "$run" in/run2
# A run without gas, 3000 stars for 10 Myr (tests/cli/tiny-stars.toml), six snapshots: for
# integrate and observe.
sed 's|^model_file = "../..|model_file = "'"$SRC"'|; s|^every_myr = .*|every_myr = 2.0|; s|^name = .*|name = "stars"|' \
  "$SRC/tests/cli/tiny-stars.toml" >in/stars.toml
"$U" integrate in/stars.toml -o in/stars.h5 --threads 2 >/dev/null
printf 'seed = 2\n[sun]\nr0_kpc = 8.1\n[selection]\ndistance_max_kpc = 6\n[errors]\nkind = "fractional"\nparallax_err_fraction = 0.1\npm_err_masyr = 0.1\nvlsr_err_kms = 5.0\n' >in/obs.toml
# A small simulated survey (tests/cli/fit_checks.sh), its fit cut short, and a small arm catalog.
cp "$SRC/tests/cli/tiny-survey.toml" in/truth.toml
"$U" mock-kinematics in/truth.toml -o in/survey.csv >/dev/null
cat >in/fit.toml <<'TOML'
catalog = "survey.csv"
[rotation]
form = "flat"
[distances]
prior = "disk"
distance_min_kpc = 1.0
distance_max_kpc = 10.0
nodes = 32
[sampler]
steps_max = 200
accept_unconverged = true
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
sed 's/^sources = 160/sources = 48/' "$SRC/demo/arms-truth.toml" >in/arms-truth.toml
"$U" mock-kinematics in/arms-truth.toml -o in/arms.csv >/dev/null
echo "inputs ready in $SECONDS s"

# --- The commands ---------------------------------------------------------------------------
model=$SRC/demo/truth/galaxy.toml
check tabulate-csv fresh "" 80 "$U" tabulate "$model" --from 0.5 --to 20 --step 0.05 --format csv -o disk/o/profile.csv
check tabulate-fits fresh "" 80 "$U" tabulate "$model" --from 0.5 --to 20 --step 0.05 --format fits -o disk/o/profile.fits
check integrate resume "kept" 80 "$U" integrate in/stars.toml -o disk/o/stars.h5 --threads 2
check observe-csv fresh "" 80 "$U" observe in/stars.h5 in/obs.toml -o disk/o/mock.csv
check observe-fits fresh "" 80 "$U" observe in/stars.h5 in/obs.toml -o disk/o/mock.fits
check mock-kinematics-ecsv fresh "" 80 "$U" mock-kinematics in/truth.toml -o disk/o/survey.ecsv
check residuals fresh "" 80 "$U" residuals in/survey.csv --r0 8.2 --flat 235 --draws 50 --bootstrap 50 -o disk/o/res
check fit fresh "kept" 16 "$U" fit in/fit.toml -o disk/o/fit --threads 2
check arms fresh "kept" 10 "$U" arms in/arms.csv --r0 8.1 --groups arm0,arm1 -o disk/o/arms --threads 2
check draw fresh "" 40 "$U" draw "$run" --figure residuals --figure pulls --format png,svg,pdf -o disk/o/figures
check versus fresh "" 80 "$U" versus "$run" in/run2 -o disk/o/versus
check arm-flow fresh "" 80 "$U" arm-flow "$model" --radius 8 --clouds "$run/orbits.h5" --format csv \
  -o disk/o/flow.csv --crossing-output disk/o/crossing.csv
plan() { "$U" sweep plan in/tiny-sweep.toml -o disk/o/plan; }
setup=plan
check sweep-slurm fresh "" 80 "$U" sweep slurm disk/o/plan --time 00:10:00 --mem 1G
setup=true
check sweep-gather fresh "kept" 80 "$U" sweep gather in/sweep -o disk/o/gathered

echo "total $SECONDS s"
if [ "$problems" -gt 0 ]; then
  echo "FAIL: $problems problems on a full disk (above, and in $W/problems.txt)" >&2
  exit 1
fi
echo "every write of every standalone command failed in turn: exit 2, one line, no temporary, nothing left unsaid; the rerun identical"
