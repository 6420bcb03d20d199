#!/bin/bash
# Starts a one-node Slurm cluster on this machine (slurmctld and slurmd on localhost, a munge
# key made on the spot, everything under a temporary folder; needs root), then:
#   1. runs a --shard auto/4 estimate as a job array (sbatch --array=0-3), merges the four
#      shard stores and checks the merged figures equal the unsharded run's bit for bit;
#   2. runs a job array whose time limit is shorter than the run, so that Slurm's SIGTERM at
#      the limit leaves interrupted shards, resumes them, merges, and checks the same.
# Stops the daemons it started by their pid files, whatever happens. Exit 0 when all agree.
set -euo pipefail
ROOT="$(cd "$(dirname "$0")/../.." && pwd)"
RECKON="node $ROOT/dist/cli/main.js"
WORK="$(mktemp -d /tmp/reckon-slurm-XXXXXX)"
HOST="$(hostname -s)"
PORT=$((20000 + RANDOM % 20000))
CPUS="$(nproc)"
export SLURM_CONF="$WORK/slurm.conf"

stop_daemons() {
  local status=$?
  for name in slurmd slurmctld munged; do
    if [ -f "$WORK/$name.pid" ]; then
      pid="$(cat "$WORK/$name.pid")"
      kill "$pid" 2>/dev/null || true
      for _ in $(seq 1 50); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
    fi
  done
  # Keep the folder (logs, stores) when something failed, to look at.
  if [ "$status" -eq 0 ]; then rm -rf "$WORK"; else echo "slurm-check: logs and stores kept in $WORK"; fi
}
trap stop_daemons EXIT
say() { echo "slurm-check: $*"; }

mkdir -p "$WORK/state" "$WORK/spool" "$WORK/shards" "$WORK/limited"
dd if=/dev/urandom of="$WORK/munge.key" bs=1024 count=1 status=none
chmod 400 "$WORK/munge.key"
munged --force --key-file="$WORK/munge.key" --socket="$WORK/munge.socket" --pid-file="$WORK/munged.pid" \
  --log-file="$WORK/munged.log" --seed-file="$WORK/munged.seed"

cat > "$SLURM_CONF" <<CONF
ClusterName=reckoncheck
SlurmctldHost=$HOST
SlurmctldPort=$PORT
SlurmdPort=$((PORT + 1))
AuthType=auth/munge
AuthInfo=socket=$WORK/munge.socket
CredType=cred/munge
SlurmUser=root
SlurmdUser=root
StateSaveLocation=$WORK/state
SlurmdSpoolDir=$WORK/spool
SlurmctldPidFile=$WORK/slurmctld.pid
SlurmdPidFile=$WORK/slurmd.pid
SlurmctldLogFile=$WORK/slurmctld.log
SlurmdLogFile=$WORK/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
MpiDefault=none
ReturnToService=2
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
KillWait=30
NodeName=$HOST CPUs=$CPUS State=UNKNOWN
PartitionName=check Nodes=$HOST Default=YES MaxTime=INFINITE State=UP
CONF
slurmctld
slurmd
for _ in $(seq 1 240); do
  state="$(sinfo -h -o %T 2>/dev/null | head -1 || true)"
  if [ "$state" = "idle" ]; then break; fi
  sleep 0.5
done
[ "$state" = "idle" ] || { say "the node never came up (state '$state'); see $WORK/slurmd.log"; exit 1; }
say "cluster up on $HOST (port $PORT)"

wait_for_job() {
  for _ in $(seq 1 600); do
    if [ -z "$(squeue -h -j "$1" 2>/dev/null)" ]; then return 0; fi
    sleep 0.5
  done
  say "job $1 did not finish"; return 1
}
figures() { python3 -c 'import json,sys; d=json.load(sys.stdin); print(json.dumps([d["episodes"], repr(d["mean"]), repr(d["std"]), d["ci"]]))'; }

# 1. The README's recipe: four shards as a job array, merged, against the unsharded run.
export RECKON ENV_FILE="$ROOT/envs/warehouse.json" POLICY_FILE="$ROOT/envs/picker-direct-eps.json" EPISODES=40000 SEED=2024 SHARD_COUNT=4 SHARDS="$WORK/shards"
job="$(sbatch --parsable --array=0-3 --output="$WORK/array-%a.out" "$ROOT/scripts/slurm/shard-array.sbatch")"
say "submitted array job $job"
wait_for_job "$job"
merged="$($RECKON runs merge "$SHARDS"/shard-*.sqlite --into "$WORK/merged.sqlite" --json | figures)"
whole="$($RECKON estimate --env "$ENV_FILE" --policy "$POLICY_FILE" --episodes "$EPISODES" --seed "$SEED" --no-store --json | figures)"
say "merged: $merged"
say "whole:  $whole"
[ "$merged" = "$whole" ] || { say "the merged shards differ from the unsharded run"; exit 1; }

# 2. A time limit shorter than the run: Slurm sends SIGTERM at the limit, the shards stop as
# interrupted; resumed (without the slowdown, which changes no draw) and merged, they agree.
cat > "$WORK/limited/slow.js" <<'JS'
// The demo's kind of grid walk as code, slowed by a wait per step (no CPU used) when asked.
const pause = new Int32Array(new SharedArrayBuffer(4));
export default () => ({
  actions: ['left', 'right'], discount: 0.95, horizon: 20, rewardBounds: [-1, 1],
  reset: () => 0,
  step(state, action, rng, out) {
    if (process.env.RECKON_CHECK_SLOW === '1') Atomics.wait(pause, 0, 0, 10);
    out.state = state + (action === 1 ? 1 : -1);
    out.reward = rng.uniform() * 2 - 1;
    out.done = Math.abs(out.state) >= 4;
    return out;
  },
});
JS
echo '{ "kind": "module", "path": "./slow.js" }' > "$WORK/limited/slow.json"
echo '{ "kind": "uniform" }' > "$WORK/limited/uniform.json"
export ENV_FILE="$WORK/limited/slow.json" POLICY_FILE="$WORK/limited/uniform.json" EPISODES=20000 SEED=7 SHARD_COUNT=2 SHARDS="$WORK/limited"
job="$(RECKON_CHECK_SLOW=1 sbatch --parsable --array=0-1 --time=1 --export=ALL --output="$WORK/limited-%a.out" "$ROOT/scripts/slurm/shard-array.sbatch")"
say "submitted time-limited array job $job (--time=1)"
wait_for_job "$job"
# The job leaves the queue at the limit; its shards may take a moment more to commit and stop.
for store in "$SHARDS"/shard-*.sqlite; do
  for _ in $(seq 1 120); do
    if ! $RECKON runs list --store "$store" --json | grep -q '"status": "running"'; then break; fi
    sleep 0.5
  done
done
for store in "$SHARDS"/shard-*.sqlite; do
  id="$($RECKON runs list --store "$store" --json | python3 -c 'import json,sys; r=json.load(sys.stdin)[0]; print(r["id"], r["status"], r["episodes"])')"
  set -- $id
  say "shard $store: run $1 $2 after $3 episodes"
  [ "$2" = "interrupted" ] || { say "expected the time limit to leave it interrupted"; exit 1; }
  $RECKON runs resume "$1" --store "$store" --json > /dev/null
done
merged="$($RECKON runs merge "$SHARDS"/shard-*.sqlite --into "$WORK/limited-merged.sqlite" --json | figures)"
whole="$($RECKON estimate --env "$ENV_FILE" --policy "$POLICY_FILE" --episodes "$EPISODES" --seed "$SEED" --no-store --json | figures)"
say "merged after the time limit and resume: $merged"
say "whole:                                  $whole"
[ "$merged" = "$whole" ] || { say "the resumed shards differ from the unsharded run"; exit 1; }
say "all agree"
