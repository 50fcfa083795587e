#!/usr/bin/env bash
# .ci/slurm.sh: a single-node Slurm cluster on localhost, for CI's Slurm test.
# Target: Debian 12, root, no systemd (PID 1 is not an init system).
# Usage: .ci/slurm.sh up | smoke | down
# Env: SLURM_CI_DIR (default /tmp/slurm-ci), SLURM_CI_CPUS (default nproc)
# Everything except the packages, /etc/slurm/slurm.conf and the munge key
# lives under $SLURM_CI_DIR. Only processes this script started are stopped,
# by the PIDs it recorded.
set -euo pipefail
S=${SLURM_CI_DIR:-/tmp/slurm-ci}

log() { echo "[slurm-ci] $*" >&2; }

install_pkgs() {
  if command -v slurmctld >/dev/null && command -v slurmd >/dev/null &&
     command -v sbatch >/dev/null && command -v munged >/dev/null; then return 0; fi
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  # The Docker-style policy-rc.d on this kind of machine stops the postinst
  # scripts from starting the daemons. Without it, "invoke-rc.d munge start"
  # may start a munged of its own; start_munge below then uses that one.
  apt-get install -y -qq --no-install-recommends \
    slurmctld slurmd slurm-client munge >/dev/null
}

munge_ok() { munge -n </dev/null 2>/dev/null | unmunge >/dev/null 2>&1; }

start_munge() {
  if [ ! -s /etc/munge/munge.key ]; then        # the munge postinst normally makes it
    mungekey --create --keyfile=/etc/munge/munge.key
  fi
  chown munge:munge /etc/munge/munge.key && chmod 0600 /etc/munge/munge.key
  install -d -o munge -g munge -m 0755 /run/munge
  if ! munge_ok; then
    runuser -u munge -- /usr/sbin/munged        # forks into the background, writes a pidfile
    cp /run/munge/munged.pid "$S/munged.pid"    # so "down" only stops a munged it started
  fi
  munge_ok || { log "munge does not work"; exit 1; }
}

write_conf() {
  local mem cpus extra=""
  cpus=${SLURM_CI_CPUS:-$(nproc)}
  # More CPUs than the machine has lets more tiny tasks run at once;
  # slurmd then needs config_overrides or it drains the node.
  if [ "$cpus" -gt "$(nproc)" ]; then extra="SlurmdParameters=config_overrides"; fi
  mem=$(( $(awk '/^MemTotal:/{print $2}' /proc/meminfo) / 1024 * 9 / 10 ))  # MB, 10% margin
  mkdir -p /etc/slurm
  cat > /etc/slurm/slurm.conf <<EOF
ClusterName=ci
SlurmctldHost=localhost
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
MpiDefault=none
# No cgroups: portable to containers and VMs whatever their cgroup layout
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
# No slurmdbd, so sacct does not work; a plain-text record of each finished job
JobCompType=jobcomp/filetxt
JobCompLoc=$S/log/jobcomp.log
SelectType=select/cons_tres
# CR_Core only: with CR_Core_Memory and no DefMemPerCPU, each job takes the node's memory
SelectTypeParameters=CR_Core
SchedulerType=sched/backfill
# default 3 s; 0 makes short array tasks follow each other about every 1 s
SchedulerParameters=batch_sched_delay=0
ReturnToService=2
MailProg=/bin/true
StateSaveLocation=$S/ctld
SlurmdSpoolDir=$S/d
SlurmctldPidFile=$S/slurmctld.pid
SlurmdPidFile=$S/slurmd.pid
SlurmctldLogFile=$S/log/slurmctld.log
SlurmdLogFile=$S/log/slurmd.log
NodeName=localhost NodeAddr=127.0.0.1 CPUs=$cpus RealMemory=$mem State=UNKNOWN
PartitionName=debug Nodes=ALL Default=YES MaxTime=INFINITE State=UP
$extra
EOF
}

wait_idle() {
  local i
  for i in $(seq 1 150); do                      # up to 30 s
    if [ "$(sinfo -h -n localhost -o %T 2>/dev/null)" = idle ]; then return 0; fi
    sleep 0.2
  done
  log "node never became idle"; sinfo -N -l >&2 || true
  tail -n 20 "$S/log/slurmctld.log" "$S/log/slurmd.log" >&2 || true
  return 1
}

up() {
  install_pkgs
  if [ -e "$S/slurmctld.pid" ] || [ -e "$S/slurmd.pid" ]; then down; fi  # a run left over
  rm -rf "$S"; mkdir -p "$S/ctld" "$S/d" "$S/log"
  start_munge
  write_conf
  /usr/sbin/slurmctld -c                         # daemonizes; -c: no state from earlier runs
  /usr/sbin/slurmd -N localhost                  # daemonizes; -N: node name is not the hostname
  wait_idle
  log "up: $(sinfo -h -o '%P %a %D %T %N')"
}

smoke() {
  # blocks until a job really ran, so the cluster is known to schedule work
  timeout 60 srun -N1 -n1 -t 1 true
}

stop_pid() {  # stop_pid NAME PIDFILE
  local f=$2 p i
  [ -s "$f" ] || return 0
  p=$(cat "$f")
  # a stale pidfile may name a reused PID: only signal a process of that name
  if [ "$(cat "/proc/$p/comm" 2>/dev/null)" = "$1" ]; then
    kill -TERM "$p"
    for i in $(seq 1 100); do kill -0 "$p" 2>/dev/null || break; sleep 0.1; done
    if kill -0 "$p" 2>/dev/null; then log "$1 ($p) ignored TERM, sending KILL"; kill -KILL "$p"; fi
  fi
  rm -f "$f"
}

down() {
  local ids="" i p
  # cancel what is left so no slurmstepd outlives slurmd (only if our
  # controller is alive: squeue retries for ~9 s when there is none)
  p=$(cat "$S/slurmctld.pid" 2>/dev/null || true)
  if [ -n "$p" ] && [ "$(cat "/proc/$p/comm" 2>/dev/null)" = slurmctld ]; then
    ids=$(squeue -h -o %A 2>/dev/null || true)
  fi
  if [ -n "$ids" ]; then
    scancel $ids || true
    for i in $(seq 1 50); do [ -z "$(squeue -h -o %A 2>/dev/null)" ] && break; sleep 0.2; done
  fi
  stop_pid slurmd "$S/slurmd.pid"
  stop_pid slurmctld "$S/slurmctld.pid"
  stop_pid munged "$S/munged.pid"                # only if this script started it
  log "down"
}

case "${1:-}" in
  up) up ;;
  smoke) smoke ;;
  down) down ;;
  *) echo "usage: $0 up|smoke|down" >&2; exit 2 ;;
esac
