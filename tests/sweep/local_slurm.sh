#!/usr/bin/env bash
# A throw-away single-node Slurm cluster on this machine, for the sweep test (needs root and the
# slurm-wlm and munge packages, which cmake/install-deps.sh installs).
#   local_slurm.sh start DIR   writes DIR/slurm.conf, starts munged (if no munge daemon answers),
#                              slurmctld and slurmd, and waits until the node is idle
#   local_slurm.sh stop DIR    stops the daemons it started, by their pid files
# Clients find the cluster through SLURM_CONF=DIR/slurm.conf. Any failure exits non-zero with
# the reason: the test that uses this must fail, never skip.
set -euo pipefail
action=${1:?start or stop}
dir=$(mkdir -p "${2:?state folder}" && cd "$2" && pwd)

fail() {
  echo "local_slurm: $*" >&2
  for f in "$dir"/slurmctld.log "$dir"/slurmd.log; do
    [ -f "$f" ] && { echo "--- last lines of $f" >&2; tail -n 20 "$f" >&2; }
  done
  exit 1
}

stop_pid() {
  local f=$1
  [ -f "$f" ] || return 0
  local pid
  pid=$(cat "$f")
  if [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null; then
    kill "$pid" 2>/dev/null || true
    for _ in $(seq 50); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
    kill -9 "$pid" 2>/dev/null || true
  fi
  rm -f "$f"
}

if [ "$action" = stop ]; then
  stop_pid "$dir/slurmd.pid"
  stop_pid "$dir/slurmctld.pid"
  stop_pid "$dir/munged.pid"
  exit 0
fi
[ "$action" = start ] || fail "unknown action '$action' (start or stop)"
[ "$(id -u)" -eq 0 ] || fail "must run as root (slurmd starts jobs as their users)"
for p in slurmctld slurmd sbatch sinfo munged munge unmunge; do
  command -v "$p" >/dev/null || fail "$p is not installed (cmake/install-deps.sh installs slurm-wlm and munge)"
done

# munge: the key and the socket folder; start a daemon only when none answers.
if ! munge -n 2>/dev/null | unmunge >/dev/null 2>&1; then
  if [ ! -s /etc/munge/munge.key ]; then
    mkdir -p /etc/munge
    dd if=/dev/urandom of=/etc/munge/munge.key bs=1024 count=1 status=none
  fi
  chown munge:munge /etc/munge/munge.key 2>/dev/null || true
  chmod 400 /etc/munge/munge.key
  mkdir -p /run/munge /var/log/munge /var/lib/munge
  chown munge:munge /run/munge /var/log/munge /var/lib/munge 2>/dev/null || true
  munged --force --pid-file="$dir/munged.pid" 2>"$dir/munged.err" \
    || fail "munged did not start: $(cat "$dir/munged.err")"
  for _ in $(seq 50); do munge -n 2>/dev/null | unmunge >/dev/null 2>&1 && break; sleep 0.1; done
  munge -n | unmunge >/dev/null 2>&1 || fail "munge does not answer after starting munged"
fi

host=$(hostname -s)
cpus=$(nproc)
mem=$(awk '/MemTotal/ {print int($2 / 1024 * 0.8)}' /proc/meminfo)
mkdir -p "$dir/ctld" "$dir/d"
# Ports of our own, so that a cluster already on this machine is not disturbed; addresses by
# number, so that nothing depends on the host name resolving.
base=$((20000 + RANDOM % 20000))
cat >"$dir/slurm.conf" <<CONF
ClusterName=undertow-test
SlurmctldHost=$host(127.0.0.1)
SlurmctldPort=$base
SlurmdPort=$((base + 1))
SlurmUser=root
AuthType=auth/munge
CredType=cred/munge
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
SchedulerType=sched/backfill
ReturnToService=2
MpiDefault=none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
StateSaveLocation=$dir/ctld
SlurmdSpoolDir=$dir/d
SlurmctldPidFile=$dir/slurmctld.pid
SlurmdPidFile=$dir/slurmd.pid
SlurmctldLogFile=$dir/slurmctld.log
SlurmdLogFile=$dir/slurmd.log
SlurmctldTimeout=30
SlurmdTimeout=30
MaxArraySize=1001
NodeName=$host NodeAddr=127.0.0.1 CPUs=$cpus RealMemory=$mem State=UNKNOWN
PartitionName=debug Nodes=$host Default=YES MaxTime=INFINITE State=UP
CONF
export SLURM_CONF="$dir/slurm.conf"
slurmctld -i 2>"$dir/slurmctld.err" || fail "slurmctld did not start: $(cat "$dir/slurmctld.err")"
slurmd 2>"$dir/slurmd.err" || fail "slurmd did not start: $(cat "$dir/slurmd.err")"
for _ in $(seq 300); do
  state=$(sinfo -h -o %T 2>/dev/null | head -n1 || true)
  [ "$state" = idle ] && { echo "local_slurm: node $host idle ($cpus CPUs), SLURM_CONF=$SLURM_CONF"; exit 0; }
  sleep 0.1
done
fail "the node did not become idle within 30 s (state: '${state:-none}')"
