#!/usr/bin/env bash
# A real single-node Slurm cluster for the shard test: installs Debian's
# slurm-wlm and munge when missing, writes a slurm.conf for this host with
# its own ports and a temporary state folder, starts munged, slurmctld and
# slurmd, runs the demo night as a job array of 4 shards
# (sbatch --array=0-3 --wait, each task 'dlsbatch run --shard auto'),
# merges the shards and compares every output with one whole run byte for
# byte. It stops the daemons it started, by their PIDs. Exit status is
# non-zero on any difference or failure.
set -euo pipefail
cd "$(dirname "$0")/.."
repo=$(pwd)

if ! command -v slurmctld >/dev/null || ! command -v munged >/dev/null; then
  echo "slurm-test: installing slurm-wlm and munge" >&2
  if [ "$(id -u)" -eq 0 ]; then SUDO=""; else SUDO="sudo"; fi
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq slurm-wlm munge >/dev/null
fi

T=$(mktemp -d /tmp/dlsbatch-slurm.XXXXXX)
pids=()
cleanup() {
  for p in "${pids[@]}"; do kill "$p" 2>/dev/null || true; done
  for f in "$T"/slurmctld.pid "$T"/slurmd.pid "$T"/munged.pid; do
    [ -s "$f" ] && kill "$(cat "$f")" 2>/dev/null || true
  done
  sleep 1
  rm -rf "$T"
}
trap cleanup EXIT

host=$(hostname -s)
user=$(id -un)
mkdir -p "$T/state" "$T/spool" "$T/munge" "$T/out"
chmod 700 "$T/munge"
# munge: a key of its own and a socket in the temporary folder.
dd if=/dev/urandom of="$T/munge/munge.key" bs=1024 count=1 2>/dev/null
chmod 400 "$T/munge/munge.key"
munged --force --key-file="$T/munge/munge.key" --socket="$T/munge/munge.sock" \
  --pid-file="$T/munged.pid" --log-file="$T/munged.log" --seed-file="$T/munge/seed" 
# Free ports above 20000 for the controller and the node daemon.
port() { python3 -c 'import socket; s=socket.socket(); s.bind(("127.0.0.1",0)); print(s.getsockname()[1]); s.close()'; }
ctlport=$(port); dport=$(port)
cpus=$(nproc)
mem=$(( $(awk '/MemTotal/ {print $2}' /proc/meminfo) / 1024 / 2 ))
cat > "$T/slurm.conf" <<CONF
ClusterName=dlsbatchtest
SlurmctldHost=$host
SlurmctldPort=$ctlport
SlurmdPort=$dport
SlurmUser=$user
SlurmdUser=root
AuthType=auth/munge
AuthInfo=socket=$T/munge/munge.sock
CredType=cred/munge
StateSaveLocation=$T/state
SlurmdSpoolDir=$T/spool
SlurmctldPidFile=$T/slurmctld.pid
SlurmdPidFile=$T/slurmd.pid
SlurmctldLogFile=$T/slurmctld.log
SlurmdLogFile=$T/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SwitchType=switch/none
MpiDefault=none
SchedulerType=sched/backfill
SelectType=select/linear
ReturnToService=2
JobCompType=jobcomp/none
AccountingStorageType=accounting_storage/none
NodeName=$host NodeAddr=127.0.0.1 CPUs=$cpus RealMemory=$mem State=UNKNOWN
PartitionName=batch Nodes=$host Default=YES MaxTime=INFINITE State=UP OverSubscribe=YES
CONF
export SLURM_CONF="$T/slurm.conf"
slurmctld -f "$SLURM_CONF"
slurmd -f "$SLURM_CONF"
for i in $(seq 1 60); do
  if sinfo -h -o '%t' 2>/dev/null | grep -qE '^(idle|mix|alloc)'; then break; fi
  sleep 1
done
sinfo -h -o '%t' | grep -qE '^(idle|mix|alloc)' || { echo "slurm-test: the node did not come up" >&2; tail -20 "$T"/slurmctld.log "$T"/slurmd.log >&2; exit 1; }

go build -o "$T/dlsbatch" ./cmd/dlsbatch
demo="$repo/testdata/demo"
args=(--sheet "$repo/testdata/demo-sheet.csv" --spec "$repo/testdata/demo-spec.csv" -q -j 1 --progress none)
"$T/dlsbatch" run "$demo" "${args[@]}" --out "$T/out/whole" || [ $? -eq 4 ]

sbatch --array=0-3 --wait --output="$T/out/task-%a.log" --chdir="$T" \
  --wrap "'$T/dlsbatch' run '$demo' ${args[*]} --out '$T/out/shard-'\$SLURM_ARRAY_TASK_ID --shard auto; c=\$?; [ \$c -eq 0 ] || [ \$c -eq 4 ] || [ \$c -eq 5 ] || [ \$c -eq 3 ]"
"$T/dlsbatch" merge "$T"/out/shard-0 "$T"/out/shard-1 "$T"/out/shard-2 "$T"/out/shard-3 --out "$T/out/merged" -q || [ $? -eq 4 ]

status=0
for f in results.csv samples.csv results.json manifest.json summary.txt; do
  if ! cmp -s "$T/out/whole/$f" "$T/out/merged/$f"; then
    echo "slurm-test: $f of the merged shards differs from the whole run" >&2
    status=1
  fi
done
n=$(ls -d "$T"/out/shard-* | wc -l)
[ "$n" -eq 4 ] || { echo "slurm-test: $n shard folders, want 4" >&2; status=1; }
[ $status -eq 0 ] && echo "slurm-test: 4 shards on a Slurm job array merged to the bytes of one run"
exit $status
