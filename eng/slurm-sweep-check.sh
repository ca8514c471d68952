#!/usr/bin/env bash
# A sharded sweep on a real Slurm: start a single-node cluster from Debian's packages (munge, slurmctld, slurmd) with its
# own configuration in a scratch directory, submit docs/examples/slurm/sweep-array.sh as a job array, merge the parts and
# check the merged document is the one-process sweep's, byte for byte; then kill one part mid-run, check that merge names
# it as missing, rerun that task alone and check again. Stops only the daemons it started, by their recorded process ids.
#
#   eng/slurm-sweep-check.sh TOOL_DIR     (TOOL_DIR holds the installed thermal-sampling command; run as root)
set -euo pipefail
tool_dir=$(cd "${1:?give the directory of the installed thermal-sampling tool}" && pwd)
repo=$(cd "$(dirname "$0")/.." && pwd)
work=$(mktemp -d /tmp/thermal-sampling-slurm.XXXXXX)
export PATH="$tool_dir:$PATH"
export SLURM_CONF="$work/slurm.conf"
started=()   # "name pid" of every daemon this script started

alive() { # alive PID NAME: the process exists, is not a zombie, and has that name
  [ -n "${1:-}" ] && [ -r "/proc/$1/stat" ] && [ "$(cat "/proc/$1/comm" 2>/dev/null)" = "$2" ] && [ "$(awk '{print $3}' "/proc/$1/stat")" != Z ]
}

stop_started() {
  for entry in "${started[@]}"; do
    set -- $entry
    if alive "$2" "$1"; then kill "$2" 2>/dev/null || true; fi
  done
  for entry in "${started[@]}"; do
    set -- $entry
    for _ in $(seq 50); do alive "$2" "$1" || break; sleep 0.1; done
    if alive "$2" "$1"; then kill -9 "$2" 2>/dev/null || true; fi
  done
}
trap stop_started EXIT

echo "-- packages"
if ! command -v slurmctld >/dev/null || ! command -v slurmd >/dev/null || ! command -v sbatch >/dev/null || ! command -v munged >/dev/null; then
  export DEBIAN_FRONTEND=noninteractive
  own_policy=
  if [ ! -e /usr/sbin/policy-rc.d ]; then   # keep the packages' init scripts from starting daemons we would not own
    printf '#!/bin/sh\nexit 101\n' > /usr/sbin/policy-rc.d; chmod +x /usr/sbin/policy-rc.d; own_policy=1
  fi
  apt-get update -qq
  apt-get install -y -qq --no-install-recommends slurmctld slurmd slurm-client munge >/dev/null
  if [ -n "$own_policy" ]; then rm -f /usr/sbin/policy-rc.d; fi
fi

echo "-- munge"
if [ ! -s /etc/munge/munge.key ]; then runuser -u munge -- mungekey -c; fi
chown munge:munge /etc/munge /etc/munge/munge.key; chmod 0700 /etc/munge; chmod 0400 /etc/munge/munge.key
install -d -o munge -g munge -m 0755 /run/munge
if munge -n 2>/dev/null | unmunge >/dev/null 2>&1; then
  echo "munged: already running, used as it is"
else
  rm -f /run/munge/munged.pid
  runuser -u munge -- /usr/sbin/munged
  for _ in $(seq 50); do [ -s /run/munge/munged.pid ] && break; sleep 0.1; done
  started+=("munged $(cat /run/munge/munged.pid)")
fi

echo "-- slurm (configuration and state in $work)"
host=$(hostname -s)
mkdir -p "$work/ctld" "$work/d" "$work/log"
cat > "$SLURM_CONF" <<EOF
ClusterName=tsci
SlurmctldHost=$host(127.0.0.1)
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
CredType=cred/munge
MpiDefault=none
MailProg=/bin/true
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobContainerType=job_container/none
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
SchedulerType=sched/backfill
SchedulerParameters=batch_sched_delay=0,sched_interval=1
ReturnToService=2
AccountingStorageType=accounting_storage/none
JobAcctGatherType=jobacct_gather/none
JobCompType=jobcomp/none
StateSaveLocation=$work/ctld
SlurmdSpoolDir=$work/d
SlurmctldPidFile=$work/slurmctld.pid
SlurmdPidFile=$work/slurmd.pid
SlurmctldLogFile=$work/log/slurmctld.log
SlurmdLogFile=$work/log/slurmd.log
NodeName=$host NodeAddr=127.0.0.1 CPUs=$(nproc) State=UNKNOWN
PartitionName=ci Nodes=$host Default=YES MaxTime=INFINITE State=UP
EOF
for daemon in slurmctld slurmd; do
  "$daemon" -f "$SLURM_CONF"
  for _ in $(seq 100); do alive "$(cat "$work/$daemon.pid" 2>/dev/null)" "$daemon" && break; sleep 0.1; done
  alive "$(cat "$work/$daemon.pid" 2>/dev/null)" "$daemon" || { echo "$daemon did not start; its log:" >&2; cat "$work/log/$daemon.log" >&2; exit 1; }
  started+=("$daemon $(cat "$work/$daemon.pid")")
done
for i in $(seq 120); do
  state=$(sinfo -h -n "$host" -o %T 2>/dev/null || true)
  case "$state" in
    idle) break ;;
    down*|drain*|fail*) scontrol update nodename="$host" state=resume 2>/dev/null || true ;;
  esac
  if [ "$i" = 120 ]; then echo "the node is not idle (state '$state')" >&2; cat "$work/log/slurmctld.log" >&2; exit 1; fi
  sleep 0.5
done

wait_for() { # wait_for JOBID: until no task of the job is pending or running
  for _ in $(seq 600); do
    [ -z "$(squeue -h -j "$1" 2>/dev/null)" ] && return 0
    sleep 0.2
  done
  echo "job $1 did not finish in two minutes" >&2; squeue >&2; exit 1
}

cd "$work"
script="$repo/docs/examples/slurm/sweep-array.sh"

echo "-- a sweep as a 3-task job array, merged, against the one-process sweep"
cp "$repo/docs/examples/scenarios/invented-pair-line.json" quick.json
thermal-sampling sweep quick.json --format json --quiet > one-process.json
job=$(sbatch --parsable --array=1-3 "$script" quick.json 3)
wait_for "$job"
ls parts/part-*.json >/dev/null 2>&1 || { echo "no part was written; the tasks' logs:" >&2; cat thermal-sampling-*.log >&2 || true; exit 1; }
thermal-sampling merge parts/part-*.json --format json --output merged.json
cmp one-process.json merged.json
echo "merged document equals the one-process sweep"

echo "-- a part killed mid-run: merge names it, the task alone is rerun, the merge then succeeds"
rm -rf parts
# The invented pair with longer chains, so that a task can be caught running.
sed 's/"samplesPerChain": 50000/"samplesPerChain": 40000000/' quick.json > slow.json
grep -q '"samplesPerChain": 40000000' slow.json
job=$(sbatch --parsable --array=1-3 "$script" slow.json 3)
for _ in $(seq 600); do
  [ "$(squeue -h -j "${job}_2" -o %T 2>/dev/null)" = RUNNING ] && break
  sleep 0.1
done
scancel "${job}_2"
wait_for "$job"
if thermal-sampling merge parts/part-*.json --output killed.json 2> merge-error.txt; then
  echo "merge accepted a sweep with a killed part" >&2; exit 1
fi
grep -q "1 of 3 parts are missing: 2" merge-error.txt
echo "merge refused: $(cat merge-error.txt)"
rerun=$(sbatch --parsable --array=2 "$script" slow.json 3)
wait_for "$rerun"
thermal-sampling merge parts/part-*.json --format json --output merged-slow.json
thermal-sampling sweep slow.json --format json --quiet --threads 2 > one-process-slow.json
cmp one-process-slow.json merged-slow.json
echo "after rerunning part 2 alone, the merged document equals the one-process sweep"
cd /
rm -rf "$work"
