#!/usr/bin/env bash
# A one-node SLURM cluster on this machine, for tests and for trying the
# scheduler side of areasweep without a real cluster. No systemd, no cgroups.
#
#   scripts/slurm-local.sh start    install what is missing, start munged,
#                                   slurmctld and slurmd, wait until idle
#   scripts/slurm-local.sh status   print "running" or "stopped" (exit 0 / 3)
#   scripts/slurm-local.sh stop     end the daemons this script started
#   scripts/slurm-local.sh env      print the export line the clients need
#
# All state (slurm.conf, logs, pid files, spool, saved state) lives under
# $AREASWEEP_SLURM_DIR (default /tmp/areasweep-slurm). The client commands
# (sbatch, squeue, sinfo) find the cluster through SLURM_CONF, which `env`
# prints: eval "$(scripts/slurm-local.sh env)". Every subcommand is safe to
# run again. Needs root (or sudo) for apt-get, munged and slurmd.
set -euo pipefail

DIR="${AREASWEEP_SLURM_DIR:-/tmp/areasweep-slurm}"
CONF="$DIR/slurm.conf"
export SLURM_CONF="$CONF"
SUDO=""
[ "$(id -u)" -ne 0 ] && SUDO="sudo"

log() { echo "slurm-local: $*" >&2; }

# alive PIDFILE: the process in PIDFILE exists and is not a zombie.
alive() {
  local pid state
  [ -s "$1" ] || return 1
  pid="$(cat "$1")"
  [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null || return 1
  state="$(ps -o stat= -p "$pid" 2>/dev/null || true)"
  [ -n "$state" ] && [ "${state:0:1}" != "Z" ]
}

install_missing() {
  local missing=() p
  for p in slurmctld slurmd slurm-client munge; do
    dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
  done
  if [ ${#missing[@]} -gt 0 ]; then
    log "installing ${missing[*]}"
    export DEBIAN_FRONTEND=noninteractive
    $SUDO apt-get update -qq
    # "policy-rc.d denied execution of start" is expected: we start the daemons ourselves.
    $SUDO apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null 2>&1 ||
      { log "apt-get install ${missing[*]} failed"; exit 1; }
  fi
}

start_munge() {
  if munge -n 2>/dev/null | unmunge >/dev/null 2>&1; then
    return 0 # a munged is already answering (ours or the machine's)
  fi
  $SUDO mkdir -p /run/munge
  $SUDO chown munge:munge /run/munge
  $SUDO chmod 755 /run/munge
  [ -f /etc/munge/munge.key ] || { log "/etc/munge/munge.key is missing; reinstall the munge package"; exit 1; }
  $SUDO runuser -u munge -- /usr/sbin/munged
  mkdir -p "$DIR"
  touch "$DIR/munged.ours" # stop ends munged only when this script started it
  for _ in $(seq 50); do
    munge -n 2>/dev/null | unmunge >/dev/null 2>&1 && return 0
    sleep 0.1
  done
  log "munged did not answer; see /var/log/munge/munged.log"
  exit 1
}

write_conf() {
  local host cpus mem
  host="$(hostname -s)"
  cpus="$(nproc)"
  # RealMemory a little below the available memory (MB), as slurmd checks it.
  mem="$(free -m | awk '/^Mem:/ {print int($7 * 0.9)}')"
  mkdir -p "$DIR/state" "$DIR/spool"
  cat >"$CONF.tmp" <<EOF
ClusterName=local
SlurmctldHost=$host
SlurmUser=root
SlurmctldPidFile=$DIR/slurmctld.pid
SlurmdPidFile=$DIR/slurmd.pid
StateSaveLocation=$DIR/state
SlurmdSpoolDir=$DIR/spool
SlurmctldLogFile=$DIR/slurmctld.log
SlurmdLogFile=$DIR/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
MpiDefault=none
ReturnToService=2
MailProg=/bin/true
# Quick turnaround for small test jobs: schedule every second, no backfill.
SchedulerType=sched/builtin
SchedulerParameters=sched_interval=1,sched_min_interval=100000
MinJobAge=60
NodeName=$host CPUs=$cpus RealMemory=$mem State=UNKNOWN
PartitionName=debug Nodes=ALL Default=YES MaxTime=INFINITE State=UP
EOF
  mv "$CONF.tmp" "$CONF"
}

running() { alive "$DIR/slurmctld.pid" && alive "$DIR/slurmd.pid"; }

wait_idle() {
  local state=""
  for _ in $(seq 150); do
    state="$(sinfo -h -o %T 2>/dev/null | head -n1 || true)"
    case "$state" in idle | mixed | allocated | completing) return 0 ;; esac
    sleep 0.2
  done
  log "the node did not become idle (state '${state}'); see $DIR/slurmctld.log and $DIR/slurmd.log"
  exit 1
}

start() {
  install_missing
  if ! getent hosts "$(hostname -s)" >/dev/null; then
    log "adding $(hostname -s) to /etc/hosts"
    echo "127.0.1.1 $(hostname -s)" | $SUDO tee -a /etc/hosts >/dev/null
  fi
  start_munge
  if running; then
    wait_idle
    log "already running ($DIR)"
    return 0
  fi
  stop_daemons
  mkdir -p "$DIR"
  write_conf
  $SUDO /usr/sbin/slurmctld -D -f "$CONF" >>"$DIR/slurmctld.out" 2>&1 &
  echo $! >"$DIR/slurmctld.pid.launch"
  $SUDO /usr/sbin/slurmd -D -f "$CONF" >>"$DIR/slurmd.out" 2>&1 &
  echo $! >"$DIR/slurmd.pid.launch"
  for _ in $(seq 50); do
    running && break
    sleep 0.1
  done
  running || { log "the daemons did not start; see $DIR/*.log and $DIR/*.out"; exit 1; }
  wait_idle
  log "running ($DIR); clients need: export SLURM_CONF=$CONF"
}

# stop_daemons ends slurmd and slurmctld started from $DIR (by their pid
# files only) and waits until they are gone or zombies.
stop_daemons() {
  local f pid
  for f in "$DIR/slurmd.pid" "$DIR/slurmctld.pid"; do
    alive "$f" || continue
    pid="$(cat "$f")"
    $SUDO kill "$pid" 2>/dev/null || true
    for _ in $(seq 100); do
      alive "$f" || break
      sleep 0.1
    done
    if alive "$f"; then
      $SUDO kill -9 "$pid" 2>/dev/null || true
    fi
  done
}

case "${1:-}" in
start) start ;;
stop)
  stop_daemons
  if [ -f "$DIR/munged.ours" ] && alive /run/munge/munged.pid; then
    $SUDO kill "$(cat /run/munge/munged.pid)" 2>/dev/null || true
  fi
  rm -f "$DIR/munged.ours"
  log "stopped ($DIR)"
  ;;
status)
  if running; then
    echo running
  else
    echo stopped
    exit 3
  fi
  ;;
env) echo "export SLURM_CONF=$CONF" ;;
*)
  echo "usage: $0 start|stop|status|env   (state in \$AREASWEEP_SLURM_DIR, default /tmp/areasweep-slurm)" >&2
  exit 2
  ;;
esac
