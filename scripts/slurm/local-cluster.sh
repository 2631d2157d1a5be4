#!/usr/bin/env bash
# A single-node Slurm cluster on this machine (Debian's slurm-wlm and munge, root, no systemd),
# for CI and for trying the batch scripts locally. Not for a real cluster: there the site's own
# Slurm runs the scripts in this folder unchanged.
#
#   local-cluster.sh install   apt-get install slurm-wlm munge (services are not started by it)
#   local-cluster.sh start     munged, slurmctld, slurmd; waits until the node is idle
#   local-cluster.sh stop      cancels every job, waits for them, then stops the three daemons
#                              by the PIDs in their pid files (never by name)
#
# Pitfalls handled here: no systemd, so /run/munge is made by hand; the node line comes from
# `slurmd -C` (a bare CPUs=N gets sockets/cores wrong); job ids and state carry over restarts, so
# the state folders are emptied on start; a failed array task would leave an afterok dependant
# pending for ever without DependencyParameters=kill_invalid_depend.
set -euo pipefail

PIDS=(/run/slurmd.pid /run/slurmctld.pid /run/munge/munged.pid)
STATE_DIRS=(/var/spool/slurmctld /var/spool/slurmd)
# Seconds to wait for the node to become idle, and for daemons and jobs to end.
START_TIMEOUT_S=60
STOP_TIMEOUT_S=10

say() { printf 'local-cluster: %s\n' "$*" >&2; }

install_packages() {
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  # "policy-rc.d denied" on install is expected: services are started by `start`, not by apt.
  apt-get install -y -qq --no-install-recommends slurm-wlm munge
}

start_munge() {
  [ -s /etc/munge/munge.key ] || /usr/sbin/mungekey --create --force
  chown munge:munge /etc/munge/munge.key
  chmod 0400 /etc/munge/munge.key
  install -d -o munge -g munge -m 0755 /run/munge
  runuser -u munge -- /usr/sbin/munged
  munge -n | unmunge | grep -q 'STATUS: *Success' || { say "munge does not authenticate"; return 1; }
}

write_config() {
  local node nodeline
  node=$(hostname -s)
  nodeline=$(slurmd -C | head -n1)
  install -d /etc/slurm /var/log/slurm "${STATE_DIRS[@]}"
  cat > /etc/slurm/slurm.conf <<CONF
ClusterName=kiln-ci
SlurmctldHost=${node}(127.0.0.1)
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
MpiDefault=none
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
SchedulerType=sched/backfill
DependencyParameters=kill_invalid_depend
ReturnToService=2
MinJobAge=600
StateSaveLocation=/var/spool/slurmctld
SlurmdSpoolDir=/var/spool/slurmd
SlurmctldPidFile=/run/slurmctld.pid
SlurmdPidFile=/run/slurmd.pid
SlurmctldLogFile=/var/log/slurm/slurmctld.log
SlurmdLogFile=/var/log/slurm/slurmd.log
${nodeline} NodeAddr=127.0.0.1 State=UNKNOWN
PartitionName=debug Nodes=ALL Default=YES MaxTime=INFINITE State=UP
CONF
}

start() {
  for f in "${PIDS[@]}"; do
    if [ -s "$f" ] && kill -0 "$(cat "$f")" 2>/dev/null; then say "already running ($f); stop it first"; return 1; fi
  done
  for d in "${STATE_DIRS[@]}"; do rm -rf "${d:?}"/*; done
  start_munge
  write_config
  slurmctld
  slurmd
  local node state=""
  node=$(hostname -s)
  for _ in $(seq $((START_TIMEOUT_S * 2))); do
    state=$(sinfo -h -n "$node" -o %T 2>/dev/null || true)
    [ "$state" = idle ] && { say "node $node idle"; return 0; }
    sleep 0.5
  done
  say "node $node not idle after ${START_TIMEOUT_S} s (state: ${state:-none}); see /var/log/slurm/"
  return 1
}

stop() {
  if command -v scancel >/dev/null && [ -s /run/slurmctld.pid ] && kill -0 "$(cat /run/slurmctld.pid)" 2>/dev/null; then
    # Job processes outlive slurmd: cancel them and wait before the daemons go.
    scancel --user="$(id -un)" 2>/dev/null || true
    for _ in $(seq $((STOP_TIMEOUT_S * 2))); do [ -z "$(squeue -h 2>/dev/null)" ] && break; sleep 0.5; done
  fi
  local f pid
  for f in "${PIDS[@]}"; do
    [ -s "$f" ] || continue
    pid=$(cat "$f")
    kill -TERM "$pid" 2>/dev/null || continue
    for _ in $(seq $((STOP_TIMEOUT_S * 2))); do kill -0 "$pid" 2>/dev/null || break; sleep 0.5; done
    if kill -0 "$pid" 2>/dev/null; then say "pid $pid ($f) did not stop; SIGKILL"; kill -KILL "$pid" 2>/dev/null || true; fi
    rm -f "$f"
  done
  say "stopped"
}

case "${1:-}" in
  install) install_packages ;;
  start) start ;;
  stop) stop ;;
  *) echo "usage: local-cluster.sh install|start|stop" >&2; exit 2 ;;
esac
