#!/usr/bin/env bash
# A real Slurm cluster test: run examples/study_slurm.sh as a job array on a
# single-node cluster started by this script, then check that `tabulate` of
# the shards' result files equals a local run of the same plan (timing fields
# aside).
#
# Needs root (to install Debian's slurm-wlm with apt-get when it is missing
# and to run slurmd). When Slurm cannot be installed or started the test is
# skipped with one clear line and exit code 0; a wrong result is exit 1.
#
# The cluster is plain processes, no systemd and no cgroups: munged -F,
# slurmctld -D and slurmd -D with a private configuration, state and
# sockets in a temporary folder (ProctrackType=proctrack/linuxproc,
# TaskPlugin=task/none, no accounting). The script stops exactly the
# processes it started (by their process ids) and removes the folder.
#
#   tests/slurm/run.sh [RIBBONMAP_BINARY]
set -uo pipefail

cd "$(dirname "$0")/../.."
repo=$PWD
started=$SECONDS

skip() {
    echo "slurm test: SKIPPED: $*"
    exit 0
}
fail() {
    echo "slurm test: FAILED: $*" >&2
    exit 1
}

# --- Slurm itself -----------------------------------------------------------
if ! command -v slurmctld >/dev/null 2>&1 || ! command -v slurmd >/dev/null 2>&1 \
    || ! command -v munged >/dev/null 2>&1; then
    if [ "$(id -u)" != 0 ] || ! command -v apt-get >/dev/null 2>&1; then
        skip "slurm-wlm is not installed and cannot be installed here (needs root and apt-get)"
    fi
    echo "slurm test: installing slurm-wlm with apt-get"
    if ! DEBIAN_FRONTEND=noninteractive apt-get install -y -q slurm-wlm >/dev/null 2>&1; then
        apt-get update -q >/dev/null 2>&1
        DEBIAN_FRONTEND=noninteractive apt-get install -y -q slurm-wlm >/dev/null 2>&1 \
            || skip "apt-get could not install slurm-wlm"
    fi
fi
[ "$(id -u)" = 0 ] || skip "slurmd must run as root"
after_install=$SECONDS

binary=${1:-$repo/target/release/ribbonmap}
if [ ! -x "$binary" ]; then
    cargo build --release --quiet || fail "cannot build ribbonmap"
fi
[ -x "$binary" ] || fail "no ribbonmap binary at $binary"
binary=$(realpath "$binary")

# --- A private single-node cluster ------------------------------------------
work=$(mktemp -d /tmp/ribbonmap-slurm.XXXXXX)
chmod 700 "$work"
pids=()
cleanup() {
    for pid in "${pids[@]}"; do
        kill "$pid" 2>/dev/null
    done
    for pid in "${pids[@]}"; do
        for _ in $(seq 50); do
            kill -0 "$pid" 2>/dev/null || break
            sleep 0.1
        done
        kill -9 "$pid" 2>/dev/null
    done
    rm -rf "$work"
}
trap cleanup EXIT

mkdir -p "$work/munge" "$work/state" "$work/spool" "$work/run"
chmod 700 "$work/munge"
# munge: its own key, socket, log and seed in the work folder.
dd if=/dev/urandom of="$work/munge/munge.key" bs=1024 count=1 status=none
chmod 400 "$work/munge/munge.key"
# Debian's slurm looks for the socket in /run/munge by default; nothing on a
# container creates that folder, so the configuration names our own socket.
mkdir -p /run/munge
socket=$work/munge/munge.socket
munged -F --force --socket="$socket" --key-file="$work/munge/munge.key" \
    --log-file="$work/munge/munged.log" --pid-file="$work/munge/munged.pid" \
    --seed-file="$work/munge/munged.seed" >"$work/munge/stdout" 2>&1 &
pids+=($!)

host=$(hostname -s)
cpus=$(nproc)
memory_mb=$(awk '/MemTotal/ {print int($2 / 1024 / 2)}' /proc/meminfo)
port=$((20000 + $$ % 20000))
cat >"$work/slurm.conf" <<CONF
ClusterName=ribbonmaptest
SlurmctldHost=$host
SlurmctldPort=$port
SlurmdPort=$((port + 1))
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
AuthInfo=socket=$socket
CredType=cred/munge
StateSaveLocation=$work/state
SlurmdSpoolDir=$work/spool
SlurmctldPidFile=$work/run/slurmctld.pid
SlurmdPidFile=$work/run/slurmd.pid
SlurmctldLogFile=$work/slurmctld.log
SlurmdLogFile=$work/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
SchedulerType=sched/builtin
SchedulerParameters=sched_min_interval=100000,sched_interval=1
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU_Memory
ReturnToService=2
MpiDefault=none
SlurmctldTimeout=30
SlurmdTimeout=30
InactiveLimit=0
KillWait=2
MinJobAge=300
NodeName=$host CPUs=$cpus RealMemory=$memory_mb State=UNKNOWN
PartitionName=test Nodes=$host Default=YES MaxTime=INFINITE State=UP
CONF
export SLURM_CONF=$work/slurm.conf

for _ in $(seq 50); do
    [ -S "$socket" ] && break
    sleep 0.1
done
[ -S "$socket" ] || skip "munged did not start: $(tail -n 3 "$work/munge/munged.log" "$work/munge/stdout" 2>/dev/null | tr '\n' ' ')"

slurmctld -D -f "$SLURM_CONF" >"$work/slurmctld.out" 2>&1 &
pids+=($!)
slurmd -D -f "$SLURM_CONF" -N "$host" >"$work/slurmd.out" 2>&1 &
pids+=($!)

# Wait for the node to become idle.
ready=
for _ in $(seq 100); do
    state=$(sinfo -h -n "$host" -o '%t' 2>/dev/null | head -n 1)
    case "$state" in
        idle*|mix*|alloc*) ready=1; break ;;
    esac
    sleep 0.1
done
[ -n "$ready" ] || skip "the cluster did not come up (node state '${state:-none}'): $(tail -n 3 "$work/slurmctld.log" "$work/slurmd.log" 2>/dev/null | tr '\n' ' ')"

# --- The study: three shards under Slurm, one local run ----------------------
mkdir -p "$work/study"
# 2 benchmarks x 2 libraries x 1 goal = 4 jobs, small enough for seconds.
cat >"$work/study/plan.json" <<PLAN
{
  "benchmarks": ["$repo/benchmarks/adder8_carry_select.blif", {"generate": "parity", "width": 8}],
  "libraries": ["ribbon3", "ribbon3-nomaj"],
  "goals": ["delay"],
  "options": {"cut_size": 4, "cuts_per_node": 8, "verify": "full", "patterns": 1024}
}
PLAN
mkdir -p "$work/bin"
ln -s "$binary" "$work/bin/ribbonmap"
shards=3
# The example asks for 4 CPUs and 4 GB per task, which a small node never
# has: the command line overrides both.
job=$(cd "$work/study" && sbatch --parsable --array=1-$shards --cpus-per-task=1 --mem=200M \
    --time=00:05:00 --output="$work/study/study-%A-%a.log" \
    --export=ALL,PATH="$work/bin:$PATH",PLAN="$work/study/plan.json",RIBBONMAP_CACHE_DIR="$work/cache" \
    "$repo/examples/study_slurm.sh") || fail "sbatch refused the job: $job"
job=${job%%;*}
echo "slurm test: cluster up in $((SECONDS - after_install)) s; submitted job array $job ($shards tasks)"

# A local run of the same plan meanwhile.
RIBBONMAP_CACHE_DIR="$work/cache-local" "$binary" study "$work/study/plan.json" \
    -o "$work/study/local.jsonl" --jobs 1 2>"$work/study/local.log" \
    || fail "the local run failed: $(cat "$work/study/local.log")"

# Poll (sbatch --wait is slow); without accounting, scontrol knows the states.
done_tasks=0
for _ in $(seq 600); do
    states=$(scontrol -o show job "$job" 2>/dev/null | grep -o 'JobState=[A-Z_]*' | cut -d= -f2)
    pending=$(grep -c -v -E '^(COMPLETED|FAILED|CANCELLED|TIMEOUT|OUT_OF_MEMORY|NODE_FAIL)$' <<<"$states")
    if [ -n "$states" ] && [ "$pending" = 0 ]; then
        done_tasks=$(grep -c '^COMPLETED$' <<<"$states")
        break
    fi
    sleep 0.1
done
[ "$done_tasks" = "$shards" ] || fail "$done_tasks of $shards tasks completed (states: $(echo $states)); logs: $(cat "$work"/study/study-*.log 2>/dev/null | tail -n 5 | tr '\n' ' ')"

# --- The check ---------------------------------------------------------------
cd "$work/study"
"$binary" tabulate results-*.jsonl -o merged.jsonl --normalize --format csv >merged.csv 2>tabulate.log \
    || fail "tabulate failed: $(cat tabulate.log)"
"$binary" tabulate local.jsonl -o local-sorted.jsonl --normalize --format csv >local.csv 2>>tabulate.log \
    || fail "tabulate of the local run failed: $(cat tabulate.log)"
# Timing fields (seconds per phase) differ from run to run; all else must agree.
strip_timing() {
    python3 -c '
import json, sys
for line in open(sys.argv[1]):
    record = json.loads(line)
    record.pop("seconds", None)
    print(json.dumps(record, sort_keys=True))
' "$1"
}
lines=$(wc -l <merged.jsonl)
[ "$lines" = 4 ] || fail "the shards wrote $lines result lines, expected 4 (2 x 2 x 1)"
if ! diff <(strip_timing merged.jsonl) <(strip_timing local-sorted.jsonl) >diff.txt; then
    fail "the shards' results differ from the local run: $(head -c 600 diff.txt)"
fi
cmp -s merged.csv local.csv || fail "the tables differ: $(diff merged.csv local.csv | head -n 5)"
echo "slurm test: passed: $shards shards under Slurm equal the local run on 4 jobs ($((SECONDS - after_install)) s after installation, $((SECONDS - started)) s in all)"
