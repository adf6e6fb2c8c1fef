#!/usr/bin/env bash
# Smoke test of fringe on a real Slurm cluster of one node.
#
# Installs Slurm and munge from Debian's packages (if missing), starts a
# private one-node cluster on loopback (munged, slurmctld and slurmd with a
# minimal configuration written here, on free ports, everything under one
# temporary directory; /etc/slurm and the system's munge are not touched),
# writes the job for a small spec with `fringe slurm`, submits it (a job
# array of shards and a merge job that depends on it), waits, and compares
# the merged run byte for byte with a local run of the same spec (every
# file but manifest.json and timings.csv). It then stops the daemons it
# started (by their process ids) and removes its directory.
#
# Needs root (slurmd launches jobs) and apt-get or the binaries. Exit
# status: 0 passed, 1 failed, 77 skipped (with the reason on stderr).
#
#   bash scripts/slurm-smoke.sh            # from the repository root
#   KEEP=1 bash scripts/slurm-smoke.sh     # keep the directory for a look
set -euo pipefail
cd "$(dirname "$0")/.."
repo=$(pwd)
limit=${SMOKE_TIMEOUT:-240}   # seconds for the jobs to finish

say() { echo "slurm-smoke: $*"; }
skip() { echo "slurm-smoke: SKIPPED: $*" >&2; exit 77; }
fail() { echo "slurm-smoke: FAILED: $*" >&2; exit 1; }

[ "$(id -u)" = 0 ] || skip "needs root to run slurmd"
need=(munged mungekey slurmctld slurmd sbatch squeue sinfo scontrol scancel)
missing() { for b in "${need[@]}"; do command -v "$b" >/dev/null 2>&1 || return 0; done; return 1; }
if missing; then
  command -v apt-get >/dev/null 2>&1 || skip "Slurm is not installed and apt-get is not available"
  say "installing slurm-wlm and munge from Debian's packages"
  (apt-get update -qq && DEBIAN_FRONTEND=noninteractive timeout 600 apt-get install -y -qq --no-install-recommends slurm-wlm munge) >/dev/null 2>&1 ||
    skip "apt-get could not install slurm-wlm and munge"
  missing && skip "slurm-wlm installed but some of ${need[*]} are missing"
fi
command -v go >/dev/null 2>&1 || fail "go not found"

work=$(mktemp -d /tmp/fringe-slurm-smoke.XXXXXX)
chmod 755 "$work"
pids=()
jobs_submitted=()
cleanup() {
  local rc=$?
  set +e
  export SLURM_CONF="$work/etc/slurm.conf"
  for j in "${jobs_submitted[@]}"; do scancel "$j" >/dev/null 2>&1; done
  # Stop the daemons this script started, newest first, by process id.
  for ((k=${#pids[@]}-1; k>=0; k--)); do kill -TERM "${pids[k]}" 2>/dev/null; done
  for _ in $(seq 1 50); do
    alive=0
    for p in "${pids[@]}"; do kill -0 "$p" 2>/dev/null && alive=1; done
    [ "$alive" = 0 ] && break
    sleep 0.2
  done
  for p in "${pids[@]}"; do kill -0 "$p" 2>/dev/null && kill -KILL "$p" 2>/dev/null; done
  if [ "$rc" != 0 ] && [ "$rc" != 77 ]; then
    for f in "$work"/log/*.log "$work"/run.shards/logs/*.log; do
      [ -f "$f" ] && { echo "---- $f (last lines)"; tail -n 15 "$f"; }
    done
  fi
  if [ -n "${KEEP:-}" ]; then say "kept $work"; else rm -rf "$work"; fi
  exit "$rc"
}
trap cleanup EXIT
trap 'exit 1' INT TERM

mkdir -p "$work"/{etc,state,spool,log,munge,bin}

# Two free TCP ports on loopback (a port is taken if something accepts on it).
free_port() {
  local p
  for p in $(seq "$1" $(($1 + 200))); do
    if ! (exec 3<>"/dev/tcp/127.0.0.1/$p") 2>/dev/null; then echo "$p"; return; fi
  done
  fail "no free port near $1"
}
ctld_port=$(free_port 46817)
slurmd_port=$(free_port $((ctld_port + 1)))

say "starting munged"
mungekey --create --keyfile="$work/munge/munge.key" --force >/dev/null 2>&1 ||
  dd if=/dev/urandom of="$work/munge/munge.key" bs=1024 count=1 status=none
chmod 400 "$work/munge/munge.key"
munged --foreground --force --key-file="$work/munge/munge.key" --socket="$work/munge/munge.socket" \
  --pid-file="$work/munge/munged.pid" --seed-file="$work/munge/munge.seed" >"$work/log/munged.log" 2>&1 &
pids+=($!)
for _ in $(seq 1 50); do [ -S "$work/munge/munge.socket" ] && break; sleep 0.1; done
[ -S "$work/munge/munge.socket" ] || fail "munged did not start"

host=$(hostname -s)
cpus=$(nproc)
mem=$(awk '/^MemTotal:/ { printf "%d", $2 / 1024 * 0.8 }' /proc/meminfo)
cat > "$work/etc/slurm.conf" <<EOF
# Minimal one-node cluster for fringe's smoke test (written by scripts/slurm-smoke.sh).
ClusterName=fringesmoke
SlurmctldHost=$host(127.0.0.1)
SlurmctldPort=$ctld_port
SlurmdPort=$slurmd_port
AuthType=auth/munge
CredType=cred/munge
AuthInfo=socket=$work/munge/munge.socket
SlurmUser=root
SlurmdUser=root
StateSaveLocation=$work/state
SlurmdSpoolDir=$work/spool/%n
SlurmctldPidFile=$work/slurmctld.pid
SlurmdPidFile=$work/slurmd.pid
SlurmctldLogFile=$work/log/slurmctld.log
SlurmdLogFile=$work/log/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
SchedulerType=sched/builtin
SelectType=select/cons_tres
SelectTypeParameters=CR_Core_Memory
MpiDefault=none
ReturnToService=2
MinJobAge=600
NodeName=$host NodeAddr=127.0.0.1 CPUs=$cpus RealMemory=$mem State=UNKNOWN
PartitionName=smoke Nodes=$host Default=YES MaxTime=INFINITE State=UP
EOF
export SLURM_CONF="$work/etc/slurm.conf"

say "starting slurmctld and slurmd (ports $ctld_port, $slurmd_port)"
slurmctld -D -i -f "$SLURM_CONF" >"$work/log/slurmctld.out" 2>&1 &
pids+=($!)
slurmd -D -f "$SLURM_CONF" -N "$host" >"$work/log/slurmd.out" 2>&1 &
pids+=($!)
state=""
for _ in $(seq 1 120); do
  state=$(sinfo -h -n "$host" -o %t 2>/dev/null || true)
  [ "$state" = idle ] && break
  sleep 0.5
done
[ "$state" = idle ] || fail "the node did not become idle (state '$state')"
say "cluster up: node $host idle, $cpus CPUs"

say "building fringe"
go build -o "$work/bin/fringe" ./bench/cmd/fringe

cat > "$work/smoke.toml" <<'EOF'
# Small grid for the cluster smoke test (embedded data).
name = "slurm-smoke"
seed = 424242
datasets = ["iris", "wine"]
pipelines = ["std+l2", "minmax"]

[cv]
method = "stratified"
folds = 5
repeats = 2

[[model]]
kind = "interference"
balance = true

[[model]]
kind = "interference"
mode = "shots"
shots = 16
balance = true

[[model]]
kind = "knn"
k = 3

[[model]]
kind = "logreg"
EOF

shards=3
"$work/bin/fringe" slurm "$work/smoke.toml" -shards "$shards" -out "$work/run" -fringe "$work/bin/fringe" \
  -cpus 1 -mem 256M -time 10 -partition smoke -script "$work/job.sh"
grep -q -- "--array=1-$shards" "$work/job.sh" || fail "job script lacks the array line"
sub=$(cd "$work" && bash job.sh)
echo "$sub"
array=$(echo "$sub" | sed -n 's/.*job array \([0-9]*\).*/\1/p')
merge=$(echo "$sub" | sed -n 's/.*merge job \([0-9]*\).*/\1/p')
[ -n "$array" ] && [ -n "$merge" ] || fail "could not read the job ids from: $sub"
jobs_submitted+=("$array" "$merge")

say "waiting for array job $array and merge job $merge (at most ${limit}s)"
start=$SECONDS
while [ -n "$(squeue -h -j "$array,$merge" -o %i 2>/dev/null)" ]; do
  [ $((SECONDS - start)) -lt "$limit" ] || { squeue; fail "jobs still queued or running after ${limit}s"; }
  sleep 1
done
for j in "$merge" $(seq -f "${array}_%g" 1 "$shards"); do
  st=$(scontrol -o show job "$j" 2>/dev/null | tr ' ' '\n' | sed -n 's/^JobState=//p')
  [ "$st" = COMPLETED ] || fail "job $j ended in state '${st:-unknown}'"
done
say "all $shards shards and the merge completed in $((SECONDS - start))s"
[ -f "$work/run/summary.csv" ] || fail "the merge job wrote no run directory"
[ -f "$work/run.shards/shard-1-of-$shards/PARTIAL" ] || fail "shard 1 left no partial run directory"

say "local run of the same spec"
"$work/bin/fringe" run "$work/smoke.toml" -out "$work/local" -workers 2 -quiet
(cd "$work/local" && find . -type f ! -name manifest.json ! -name timings.csv | sort) > "$work/files.txt"
(cd "$work/run" && find . -type f ! -name manifest.json ! -name timings.csv | sort) | cmp -s - "$work/files.txt" ||
  fail "the merged and the local run directories hold different files"
n=0
while read -r f; do
  cmp "$work/local/$f" "$work/run/$f" || fail "$f differs between the cluster run and the local run"
  n=$((n + 1))
done < "$work/files.txt"
say "PASSED: the merged cluster run is byte-identical to the local run ($n files; manifest.json and timings.csv excepted)"
