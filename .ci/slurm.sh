#!/usr/bin/env bash
# A real Slurm array job: install Slurm from Debian's packages (slurm-wlm,
# munge), start a one-node cluster on this machine (munged, slurmctld,
# slurmd, each with its files in a temporary directory), submit an array of
# 4 tasks each running one --shard of a plumb scan (the README's job
# script, taken from README.md), wait for them, join the shard files with
# plumb merge and compare the bytes with the unsharded scan (cmp).
#
# Usage: bash .ci/slurm.sh [PLUMB_BINARY]   (default: build ./cmd/plumb)
#
# Needs root (to install the packages and run the daemons). Where that or
# the packages are not available it prints SKIP with the reason and exits
# 0; every other failure exits 1. It stops the daemons it started.
set -euo pipefail
cd "$(dirname "$0")/.."
t_start=$(date +%s)
skip() { echo "SKIP: $*"; exit 0; }

[ "$(uname -s)" = Linux ] || skip "Slurm's Debian packages need Linux (this is $(uname -s))"
[ "$(id -u)" -eq 0 ] || skip "installing Slurm and running its daemons needs root (uid $(id -u))"
if ! command -v slurmctld >/dev/null || ! command -v slurmd >/dev/null || ! command -v sbatch >/dev/null || ! command -v munged >/dev/null; then
  command -v apt-get >/dev/null || skip "no apt-get: not a Debian-like system"
  echo "== installing slurm-wlm and munge"
  if ! { DEBIAN_FRONTEND=noninteractive apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq slurm-wlm munge; } > /tmp/plumb-slurm-apt.log 2>&1; then
    tail -n 5 /tmp/plumb-slurm-apt.log
    skip "apt-get install slurm-wlm munge failed (log above)"
  fi
fi
echo "== $(slurmctld -V)"

tmp=$(mktemp -d /tmp/plumb-slurm.XXXXXX)
chmod 755 "$tmp"
pids=()
cleanup() {
  local code=$?
  # Stop only the daemons this script started, by their pid files.
  for f in slurmd slurmctld munged; do
    if [ -s "$tmp/$f.pid" ]; then
      local p; p=$(cat "$tmp/$f.pid")
      kill "$p" 2>/dev/null || true
      for _ in $(seq 50); do kill -0 "$p" 2>/dev/null || break; sleep 0.1; done
      kill -9 "$p" 2>/dev/null || true
    fi
  done
  if [ "$code" -ne 0 ]; then
    for log in munged slurmctld slurmd; do
      [ -s "$tmp/$log.log" ] && { echo "--- tail of $log.log"; tail -n 15 "$tmp/$log.log"; }
    done
    for log in "$tmp"/out/*.log; do
      [ -s "$log" ] && { echo "--- $log"; cat "$log"; }
    done
  fi
  rm -rf "$tmp"
  exit "$code"
}
trap cleanup EXIT

bin=${1:-}
if [ -z "$bin" ]; then
  CGO_ENABLED=0 go build -o "$tmp/plumb" ./cmd/plumb
else
  cp "$bin" "$tmp/plumb"
fi
bin="$tmp/plumb"

# munge: the packaged key, our own socket, pid and log files.
key=/etc/munge/munge.key
if [ ! -s "$key" ]; then
  mkdir -p /etc/munge
  if command -v mungekey >/dev/null; then mungekey --create --keyfile="$key"; else dd if=/dev/urandom of="$key" bs=1 count=1024 2>/dev/null; fi
fi
cp "$key" "$tmp/munge.key"
chmod 400 "$tmp/munge.key"
mkdir -p "$tmp/munge"
chmod 700 "$tmp/munge"
munged --force --socket="$tmp/munge/munge.sock" --key-file="$tmp/munge.key" --pid-file="$tmp/munged.pid" \
  --log-file="$tmp/munged.log" --seed-file="$tmp/munge/seed"
for _ in $(seq 50); do [ -S "$tmp/munge/munge.sock" ] && break; sleep 0.1; done
[ -S "$tmp/munge/munge.sock" ] || { echo "munged did not start"; exit 1; }

host=$(hostname -s)
mkdir -p "$tmp/state" "$tmp/spool" "$tmp/out"
conf="$tmp/slurm.conf"
cat > "$conf" <<EOF
ClusterName=plumbci
SlurmctldHost=$host
AuthType=auth/munge
AuthInfo=socket=$tmp/munge/munge.sock
CredType=cred/munge
SlurmUser=root
SlurmdUser=root
SlurmctldPort=16817
SlurmdPort=16818
StateSaveLocation=$tmp/state
SlurmdSpoolDir=$tmp/spool
SlurmctldPidFile=$tmp/slurmctld.pid
SlurmdPidFile=$tmp/slurmd.pid
SlurmctldLogFile=$tmp/slurmctld.log
SlurmdLogFile=$tmp/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
SchedulerType=sched/builtin
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
MpiDefault=none
ReturnToService=2
NodeName=$host CPUs=2 State=UNKNOWN
PartitionName=ci Nodes=$host Default=YES MaxTime=INFINITE State=UP
EOF
export SLURM_CONF="$conf"
slurmctld -c -f "$conf"
slurmd -f "$conf"
state=
for _ in $(seq 120); do
  state=$(sinfo -h -n "$host" -o %t 2>/dev/null || true)
  case "$state" in idle*|mix*|alloc*) break ;; esac
  sleep 0.5
done
case "$state" in idle*|mix*|alloc*) echo "== one-node cluster up: $host is $state" ;; *) echo "the node did not come up (sinfo: '$state')"; exit 1 ;; esac

# The README's job script (between its "slurm job script" markers): one
# shard of the scan per array task, run in $tmp/out with plumb on PATH.
script="$tmp/diagram.sbatch"
awk '/<!-- slurm job script -->/ { f = 1; next } /<!-- end slurm job script -->/ { f = 0 } f' README.md | sed '/^```/d' > "$script"
scan_line=$(grep -m1 '^plumb scan .* --shard auto' "$script" || true)
if [ -z "$scan_line" ]; then
  echo "README.md has no job script with a 'plumb scan ... --shard auto' line between its slurm job script markers"; exit 1
fi
grep -q -- '--array=0-3' "$script" || { echo "the README's job script is not an array of the 4 tasks 0-3"; exit 1; }
whole_cmd=${scan_line%% --shard auto*}
job=$(sbatch --parsable --chdir="$tmp/out" --export=ALL,PATH="$tmp:$PATH" "$script")
job=${job%%;*}
echo "== submitted array job $job (4 tasks)"
deadline=$(( $(date +%s) + 300 ))
while [ -n "$(squeue -h -j "$job" 2>/dev/null)" ]; do
  if [ "$(date +%s)" -gt "$deadline" ]; then
    echo "the array job did not finish within 300 s"; squeue -j "$job" || true; scancel "$job" || true; exit 1
  fi
  sleep 1
done
for i in 0 1 2 3; do
  f="$tmp/out/shard-$i.jsonl"
  [ -s "$f" ] || { echo "task $i wrote no shard file"; exit 1; }
  grep -q "shard $((i + 1))/4 (from SLURM_ARRAY_TASK_ID=$i" "$tmp/out/task-$i.log" || {
    echo "task $i did not say it was shard $((i + 1))/4 from Slurm's variables"; exit 1; }
done
echo "== each task said which shard it was, e.g. $(grep -h 'from SLURM' "$tmp/out/task-2.log")"
"$bin" merge "$tmp"/out/shard-*.jsonl > "$tmp/merged.csv" 2> "$tmp/merge.err" || { cat "$tmp/merge.err"; exit 1; }
echo "\$ $whole_cmd   # unsharded"
(cd "$tmp" && PATH="$tmp:$PATH" bash -c "$whole_cmd --quiet") > "$tmp/whole.csv"
if ! cmp "$tmp/whole.csv" "$tmp/merged.csv"; then
  echo "FAIL: the merged array job differs from the unsharded scan"; exit 1
fi
echo "ok: 4 Slurm array tasks merged into the unsharded scan's $(wc -c < "$tmp/whole.csv") bytes ($(wc -l < "$tmp/whole.csv") CSV lines), identical; $(( $(date +%s) - t_start )) s in all"
