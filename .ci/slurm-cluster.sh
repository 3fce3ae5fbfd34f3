#!/usr/bin/env bash
# A single-node Slurm cluster for the batch test (cmd/loopgate, TestSlurmArray):
# slurmctld, slurmd and munge on this machine, one partition "ci".
#   .ci/slurm-cluster.sh start   install slurm-wlm + munge if missing, write the
#                                configuration, start the daemons, wait until
#                                the node is idle
#   .ci/slurm-cluster.sh stop    stop the daemons this script started
# Run as root (CI machines). State lives under /run/loopgate-slurm and
# /var/spool/loopgate-slurm; the configuration is /etc/slurm/slurm.conf.
set -euo pipefail
run=/run/loopgate-slurm
spool=/var/spool/loopgate-slurm
logs=/var/log/loopgate-slurm

start() {
  if ! command -v slurmctld >/dev/null || ! command -v slurmd >/dev/null || ! command -v munged >/dev/null; then
    export DEBIAN_FRONTEND=noninteractive
    apt-get update -qq
    apt-get install -y -qq slurm-wlm munge >/dev/null
  fi
  if sinfo -h -o %T 2>/dev/null | grep -q -E 'idle|mix|alloc'; then
    echo "slurm-cluster: already running"; sinfo; return 0
  fi
  mkdir -p "$run" "$spool/ctld" "$spool/d" "$logs" /etc/slurm \
           /etc/munge /var/log/munge /run/munge /var/lib/munge
  [ -s /etc/munge/munge.key ] || head -c 1024 /dev/urandom > /etc/munge/munge.key
  chown -R munge:munge /etc/munge /var/log/munge /run/munge /var/lib/munge
  chmod 400 /etc/munge/munge.key
  local host cpus mem
  host=$(hostname -s)
  cpus=$(nproc)
  mem=$(( $(free -m | awk '/^Mem:/{print $2}') - 1024 ))
  cat > /etc/slurm/slurm.conf <<CONF
# Written by loopgate .ci/slurm-cluster.sh: one node, for tests.
ClusterName=loopgate-ci
SlurmctldHost=$host
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SchedulerType=sched/backfill
SchedulerParameters=bf_interval=1,sched_interval=1,batch_sched_delay=0
SelectType=select/cons_tres
SelectTypeParameters=CR_Core_Memory
StateSaveLocation=$spool/ctld
SlurmdSpoolDir=$spool/d
SlurmctldPidFile=$run/slurmctld.pid
SlurmdPidFile=$run/slurmd.pid
SlurmctldLogFile=$logs/slurmctld.log
SlurmdLogFile=$logs/slurmd.log
ReturnToService=2
MpiDefault=none
JobAcctGatherType=jobacct_gather/none
KillWait=10
MaxArraySize=1001
NodeName=$host CPUs=$cpus RealMemory=$mem State=UNKNOWN
PartitionName=ci Nodes=$host Default=YES MaxTime=INFINITE State=UP
CONF
  if ! pgrep -x munged >/dev/null; then
    su -s /bin/sh munge -c /usr/sbin/munged
    touch "$run/munged.ours"
  fi
  /usr/sbin/slurmctld
  /usr/sbin/slurmd
  for _ in $(seq 1 30); do
    sinfo -h -o %T 2>/dev/null | grep -q -E 'idle|mix' && break
    sleep 1
  done
  sinfo -h -o %T | grep -q -E 'idle|mix' || { echo "slurm-cluster: node did not come up" >&2; tail -20 "$logs"/*.log >&2; exit 1; }
  sinfo
}

stop() {
  for d in slurmd slurmctld; do
    if [ -f "$run/$d.pid" ]; then
      kill "$(cat "$run/$d.pid")" 2>/dev/null || true
      rm -f "$run/$d.pid"
    fi
  done
  if [ -f "$run/munged.ours" ] && [ -f /run/munge/munged.pid ]; then
    kill "$(cat /run/munge/munged.pid)" 2>/dev/null || true
    rm -f "$run/munged.ours"
  fi
}

case "${1:-}" in
start) start ;;
stop) stop ;;
*) echo "usage: $0 start|stop" >&2; exit 2 ;;
esac
