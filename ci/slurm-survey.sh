#!/usr/bin/env bash
# CI step: run the survey example (ci/survey-array.sh) on a single-node Slurm cluster started
# here, merge its shards, and compare the ranking and the designs with a single-process survey of
# the same arguments. Debian packages slurmctld, slurmd, slurm-client and munge (Slurm 22.05);
# every daemon runs in the foreground without cgroups (proctrack/linuxproc, task/none, no
# accounting), its configuration in a temporary folder (SLURM_CONF), and is stopped by its PID on
# every exit path. Needs root (apt-get, munge's user).
#
# Usage: ci/slurm-survey.sh PATH/TO/tourwright   [SHARDS=4] [SURVEY_EVALS=20000]
set -euo pipefail
BIN="$(realpath "${1:?usage: ci/slurm-survey.sh PATH/TO/tourwright}")"
HERE="$(cd "$(dirname "$0")" && pwd)"
SHARDS="${SHARDS:-4}"
export SURVEY_EVALS="${SURVEY_EVALS:-20000}"
export SURVEY_ARGS="--from E --to J --launch 2030-01-01..2031-12-31 --via V,E,M --max-swingbys 1 --seed 7"
started=$(date +%s)

WORK="$(mktemp -d /tmp/tourwright-slurm.XXXXXX)"
chmod 755 "$WORK"
PIDS=()
cleanup() {
    local status=$?
    # munged runs under runuser: stop the daemon itself by its PID file, then the rest.
    if [ -s "$WORK/munge/munged.pid" ]; then
        kill "$(cat "$WORK/munge/munged.pid")" 2>/dev/null || true
    fi
    for p in "${PIDS[@]}"; do
        kill "$p" 2>/dev/null || true
    done
    for p in "${PIDS[@]}"; do
        wait "$p" 2>/dev/null || true
    done
    if [ "$status" -ne 0 ]; then
        echo "slurm-survey: failed (status $status); daemon logs follow" >&2
        tail -n 20 "$WORK"/*.log "$WORK"/*.out >&2 2>/dev/null || true
    fi
    rm -rf "$WORK"
    exit "$status"
}
trap cleanup EXIT
trap 'exit 130' INT TERM

if ! command -v slurmctld >/dev/null || ! command -v munged >/dev/null; then
    export DEBIAN_FRONTEND=noninteractive
    apt-get install -y -qq slurmctld slurmd slurm-client munge >/dev/null 2>&1 || {
        apt-get update -qq >/dev/null
        apt-get install -y -qq slurmctld slurmd slurm-client munge >/dev/null
    }
fi

# munge: the key the package made, a socket folder of our own, the daemon as the munge user.
mkdir -p "$WORK/munge"
chown munge:munge "$WORK/munge"
if [ ! -s /etc/munge/munge.key ]; then
    runuser -u munge -- mungekey --create --keyfile=/etc/munge/munge.key
fi
SOCKET="$WORK/munge/munge.socket"
runuser -u munge -- munged --foreground --socket="$SOCKET" \
    --pid-file="$WORK/munge/munged.pid" --log-file="$WORK/munged.log" \
    --seed-file="$WORK/munge/seed" >"$WORK/munged.out" 2>&1 &
PIDS+=($!)

HOST="$(hostname -s)"
CPUS="$(nproc)"
MEM=$(( $(awk '/MemTotal/ {print int($2 / 1024)}' /proc/meminfo) / 2 ))
export SLURM_CONF="$WORK/slurm.conf"
mkdir -p "$WORK/state" "$WORK/spool"
cat > "$SLURM_CONF" <<CONF
ClusterName=tourwright-ci
SlurmctldHost=$HOST
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
AuthInfo=socket=$SOCKET
CredType=cred/munge
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
MpiDefault=none
ReturnToService=2
SchedulerType=sched/backfill
SchedulerParameters=sched_min_interval=0
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
StateSaveLocation=$WORK/state
SlurmdSpoolDir=$WORK/spool
SlurmctldPidFile=$WORK/slurmctld.pid
SlurmdPidFile=$WORK/slurmd.pid
SlurmctldLogFile=$WORK/slurmctld.log
SlurmdLogFile=$WORK/slurmd.log
AccountingStorageType=accounting_storage/none
JobAcctGatherType=jobacct_gather/none
JobCompType=jobcomp/none
NodeName=$HOST CPUs=$CPUS RealMemory=$MEM State=UNKNOWN
PartitionName=ci Nodes=$HOST Default=YES MaxTime=INFINITE State=UP
CONF

# Wait for munge's socket before the Slurm daemons need it.
for _ in $(seq 50); do [ -S "$SOCKET" ] && break; sleep 0.1; done
[ -S "$SOCKET" ] || { echo "munged did not start" >&2; exit 1; }

slurmctld -D -i >"$WORK/slurmctld.out" 2>&1 &
PIDS+=($!)
slurmd -D >"$WORK/slurmd.out" 2>&1 &
PIDS+=($!)

# The node idle (or mixed) within 30 s.
for _ in $(seq 60); do
    state="$(sinfo -h -N -o '%t' 2>/dev/null | head -n 1 || true)"
    case "$state" in idle*|mix*) break ;; esac
    sleep 0.5
done
case "$state" in idle*|mix*) ;; *) echo "the Slurm node is not idle (state: '$state')" >&2; exit 1 ;; esac

# The array job, waited for; every task must succeed (sbatch --wait exits non-zero otherwise).
cd "$WORK"
export TOURWRIGHT="$BIN" SURVEY_RESULTS="$WORK/results"
t0=$(date +%s)
sbatch --wait --quiet --array="1-$SHARDS" --cpus-per-task=1 --time=00:10:00 \
    --output="$WORK/task-%a.out" \
    "$HERE/survey-array.sh"
echo "slurm-survey: array of $SHARDS tasks done in $(( $(date +%s) - t0 )) s"
shards=$(ls "$WORK/results"/shard-*.jsonl | wc -l)
[ "$shards" -eq "$SHARDS" ] || { echo "$shards of $SHARDS shards written" >&2; exit 1; }

# Merge, and the same survey in one process: rankings and designs identical.
"$BIN" explore --merge "$WORK/results" --out "$WORK/merged" --quiet > "$WORK/merged.txt"
# shellcheck disable=SC2086
"$BIN" explore $SURVEY_ARGS --evals "$SURVEY_EVALS" --quiet --out "$WORK/single" \
    > "$WORK/single.txt"
if ! diff -u "$WORK/single.txt" "$WORK/merged.txt" || ! diff -r "$WORK/single" "$WORK/merged"; then
    echo "slurm-survey: the merged survey differs from the single-process one" >&2
    exit 1
fi
echo "slurm-survey: $SHARDS array tasks merged equal the single-process survey ($(grep -c '' "$WORK/merged.txt") lines, $(ls "$WORK/merged" | wc -l) designs) in $(( $(date +%s) - started )) s"
