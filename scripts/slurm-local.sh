#!/usr/bin/env bash
# A one-node Slurm cluster on localhost, for testing socmap's job arrays
# (scripts/test-cluster.sh). Usage:
#
#   scripts/slurm-local.sh start    install slurm-wlm and munge if missing,
#                                   write the configuration, start munged,
#                                   slurmctld and slurmd, wait until the node
#                                   is idle
#   scripts/slurm-local.sh stop     stop exactly the daemons started here (by
#                                   the pids in their pid files)
#   scripts/slurm-local.sh status   show the daemons and `sinfo`
#   scripts/slurm-local.sh env      print the export line that the Slurm
#                                   commands need (SLURM_CONF)
#
# Everything lives in one private directory, $SOCMAP_SLURM_DIR (default
# /tmp/socmap-slurm-$UID): slurm.conf, the munge key and socket, pid files,
# logs, spool and state. Nothing is written to /etc. The daemons run as the
# calling user (root: SlurmUser=root), without cgroups
# (proctrack/linuxproc, task/none), so the cluster also works in a
# container. Ports: $SOCMAP_SLURM_PORT (slurmctld, default 16817) and the
# next one (slurmd), away from a system Slurm's defaults.
#
# The Slurm client commands (sbatch, sinfo, squeue, scontrol) find this
# cluster through SLURM_CONF=$SOCMAP_SLURM_DIR/slurm.conf.
set -euo pipefail

dir=${SOCMAP_SLURM_DIR:-${TMPDIR:-/tmp}/socmap-slurm-$(id -u)}
port=${SOCMAP_SLURM_PORT:-16817}
node=socmapnode
conf=$dir/slurm.conf
export SLURM_CONF=$conf

say() { echo "slurm-local: $*" >&2; }

# pid of a daemon ($1: munged, slurmctld, slurmd) from its pid file if that
# process is alive, else empty.
alive() {
  local f=$dir/$1.pid
  local p
  p=$(cat "$f" 2>/dev/null) || return 0 # a daemon removes its pid file on exit
  # Only a live process of that name (a stale pid file may name a reused pid).
  if [ -n "$p" ] && running "$1" "$p"; then echo "$p"; fi
}

install() {
  local missing=()
  for b in munged slurmctld slurmd sbatch sinfo; do
    command -v "$b" >/dev/null 2>&1 || missing+=("$b")
  done
  [ ${#missing[@]} -eq 0 ] && return 0
  say "missing ${missing[*]}: installing the Debian packages slurm-wlm and munge"
  local here
  here=$(cd "$(dirname "$0")" && pwd)
  "$here/deps.sh" slurm-wlm munge
}

write_config() {
  mkdir -p "$dir"/{state,spool,munge}
  chmod 700 "$dir" "$dir/munge"
  local cpus mem user
  cpus=$(nproc)
  # Memory in MB, a little below what `free` reports, so that slurmd's own
  # measurement is never below the configured value (the node would drain).
  mem=$(free -m | awk '/^Mem:/ {printf "%d", $2 * 0.95}')
  user=$(id -un)
  cat >"$conf" <<EOF
# Written by scripts/slurm-local.sh: a one-node test cluster in $dir.
ClusterName=socmaptest
SlurmctldHost=localhost(127.0.0.1)
SlurmctldPort=$port
SlurmdPort=$((port + 1))
SlurmUser=$user
SlurmdUser=$user
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$dir/munge/munge.socket
MpiDefault=none
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
# FIFO scheduling, run at once on every event (not every few seconds):
# a test array finishes in about a second per wave.
SchedulerType=sched/builtin
SchedulerParameters=batch_sched_delay=0,sched_min_interval=0
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
ReturnToService=2
SlurmctldPidFile=$dir/slurmctld.pid
SlurmdPidFile=$dir/slurmd.pid
SlurmctldLogFile=$dir/slurmctld.log
SlurmdLogFile=$dir/slurmd.log
SlurmdSpoolDir=$dir/spool
StateSaveLocation=$dir/state
SlurmctldTimeout=30
SlurmdTimeout=30
InactiveLimit=0
MinJobAge=300
KillWait=5
Waittime=0
NodeName=$node NodeHostname=localhost NodeAddr=127.0.0.1 CPUs=$cpus RealMemory=$mem State=UNKNOWN
PartitionName=test Nodes=$node Default=YES MaxTime=INFINITE State=UP
EOF
  if [ ! -s "$dir/munge/munge.key" ]; then
    head -c 1024 /dev/urandom >"$dir/munge/munge.key"
  fi
  chmod 400 "$dir/munge/munge.key"
}

start() {
  install
  if [ -n "$(alive munged)$(alive slurmctld)$(alive slurmd)" ]; then
    say "already running in $dir (stop it first)"
    status
    return 0
  fi
  write_config
  say "starting munged, slurmctld, slurmd in $dir"
  munged --key-file="$dir/munge/munge.key" --socket="$dir/munge/munge.socket" \
    --pid-file="$dir/munged.pid" --log-file="$dir/munged.log" --seed-file="$dir/munge/munge.seed" \
    --force
  # -c: clear any state left by an earlier run (fresh job ids, no old jobs).
  slurmctld -f "$conf" -c
  slurmd -f "$conf" -N "$node"
  local t
  for t in $(seq 1 60); do
    if sinfo -h -N -n "$node" -o '%T' 2>/dev/null | grep -qx idle; then
      say "node $node idle ($(nproc) CPUs); export SLURM_CONF=$conf"
      return 0
    fi
    sleep 0.5
  done
  say "node did not become idle within 30 s; sinfo says: $(sinfo -h -N -o '%N %T %E' 2>&1 | tr '\n' ' ')"
  say "logs: $dir/slurmctld.log $dir/slurmd.log $dir/munged.log"
  tail -n 5 "$dir/slurmctld.log" "$dir/slurmd.log" >&2 || true
  return 1
}

# running NAME PID: is PID still a process called NAME?
running() { [ "$(ps -p "$2" -o comm= 2>/dev/null)" = "$1" ]; }

stop() {
  local d p stopped=() pids=()
  # slurmd first (it runs the job steps), then the controller, then munge.
  # The pids are read before the signals: a daemon removes its pid file
  # while it shuts down, before it has exited.
  for d in slurmd slurmctld munged; do
    p=$(alive "$d")
    if [ -n "$p" ]; then
      kill -TERM "$p" 2>/dev/null || true
      stopped+=("$d:$p")
      pids+=("$d:$p")
    fi
  done
  local e
  for e in "${pids[@]}"; do
    d=${e%%:*} p=${e#*:}
    for _ in $(seq 1 100); do
      running "$d" "$p" || break
      sleep 0.1
    done
    if running "$d" "$p"; then
      say "$d (pid $p) did not stop within 10 s of TERM: KILL"
      kill -KILL "$p" 2>/dev/null || true
    fi
  done
  rm -f "$dir"/{slurmd,slurmctld,munged}.pid
  say "stopped ${stopped[*]:-nothing (no daemon of $dir running)}"
}

status() {
  local d p rc=0
  for d in munged slurmctld slurmd; do
    p=$(alive "$d")
    if [ -n "$p" ]; then echo "$d: running (pid $p)"; else echo "$d: not running"; rc=3; fi
  done
  if [ -f "$conf" ] && command -v sinfo >/dev/null 2>&1; then
    sinfo 2>&1 || rc=3
  fi
  return $rc
}

case "${1:-}" in
start) start ;;
stop) stop ;;
status) status ;;
env) echo "export SLURM_CONF=$conf" ;;
*)
  echo "usage: $0 start|stop|status|env" >&2
  exit 2
  ;;
esac
