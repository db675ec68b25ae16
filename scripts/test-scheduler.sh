#!/usr/bin/env bash
# npm run test:scheduler: a sweep as a Slurm job array on a single-node cluster started here, checked against
# one unsharded run, byte for byte. Steps:
#  1. Slurm and munge from Debian's packages (installed when missing, as root with apt-get, unless
#     AREAL_SCHEDULER_INSTALL=0); where that is not possible, one line says why and the script exits 0.
#  2. munged, slurmctld and slurmd on this host with a minimal configuration in a temporary folder.
#  3. docs/sweep-job.sh submitted as `sbatch --array=1-N`; every task must end COMPLETED with exit code 0:0.
#  4. areal merge of the parts, compared with `cmp` against one unsharded run of the same grid.
#  5. The same array submitted again: every task keeps its part (--resume) and the merge is unchanged; a part
#     removed: merge names the missing shard.
#  6. Every daemon stopped by its process id and the folder removed, on success, failure or interrupt.
# Exit 0 when it passed (or could not run, said in one line), 1 when a check failed.
set -uo pipefail
ROOT="$(cd "$(dirname "$0")/.." && pwd)"
SHARDS="${AREAL_SCHEDULER_SHARDS:-4}"
say() { printf 'scheduler: %s\n' "$*"; }
cannot() { say "cannot run here: $*"; exit 0; }

need=()
for b in munged slurmctld slurmd sbatch squeue sinfo scontrol; do command -v "$b" >/dev/null 2>&1 || need+=("$b"); done
if [ "${#need[@]}" -gt 0 ]; then
  [ "$(id -u)" = 0 ] || cannot "not root, and ${need[*]} missing (Debian: slurmctld slurmd slurm-client munge)"
  [ "${AREAL_SCHEDULER_INSTALL:-1}" != 0 ] || cannot "${need[*]} missing and AREAL_SCHEDULER_INSTALL=0"
  command -v apt-get >/dev/null 2>&1 || cannot "${need[*]} missing and no apt-get"
  say "installing slurmctld slurmd slurm-client munge (apt-get)"
  { apt-get -o DPkg::Lock::Timeout=300 update -qq && DEBIAN_FRONTEND=noninteractive apt-get -o DPkg::Lock::Timeout=300 \
      install -y -qq --no-install-recommends slurmctld slurmd slurm-client munge; } >/dev/null 2>&1 \
    || cannot "apt-get could not install slurmctld slurmd slurm-client munge"
fi
[ -f "$ROOT/dist/harness/cli/main.js" ] || cannot "the harness is not built (npm run build)"

DIR="$(mktemp -d)"
chmod 0755 "$DIR"
PIDS=()
# Every process started under this cluster: the daemons and the job steps (slurmstepd and the tasks inherit
# SLURM_CONF pointing into this folder, so they are found by their environment, also once reparented).
ours() {
  local e p
  for e in /proc/[0-9]*/environ; do
    p="${e#/proc/}"; p="${p%/environ}"
    { tr '\0' '\n' < "$e"; } 2>/dev/null | grep -qx "SLURM_CONF=$DIR/slurm.conf" && echo "$p"
  done
}
cleanup() {
  if [ -n "${SLURM_CONF:-}" ]; then scancel --quiet --full --user=root 2>/dev/null; sleep 0.5; fi
  for p in $(ours); do [ "$p" != "$$" ] && kill "$p" 2>/dev/null; done
  for p in "${PIDS[@]}"; do kill "$p" 2>/dev/null; done
  for p in "${PIDS[@]}"; do for _ in $(seq 50); do kill -0 "$p" 2>/dev/null || break; sleep 0.1; done; kill -9 "$p" 2>/dev/null; done
  rm -rf "$DIR"
}
trap cleanup EXIT
trap 'exit 130' INT
trap 'exit 143' TERM
fail() { say "FAILED: $*"; for f in "$DIR"/slurmctld.log "$DIR"/slurmd.log; do [ -f "$f" ] && tail -n 20 "$f"; done; exit 1; }

free_port() { node -e 'const s=require("net").createServer().listen(0,"127.0.0.1",()=>{console.log(s.address().port);s.close()})'; }
HOST="$(hostname -s)"
mkdir -p "$DIR/state" "$DIR/spool" "$DIR/out" "$DIR/parts"
head -c 1024 /dev/urandom > "$DIR/munge.key"
chmod 0400 "$DIR/munge.key"
MSOCK="$DIR/munge.sock"
munged -F --force --key-file="$DIR/munge.key" --socket="$MSOCK" --pid-file="$DIR/munged.pid" \
  --seed-file="$DIR/munge.seed" --log-file="$DIR/munged.log" >/dev/null 2>&1 &
PIDS+=($!)
for _ in $(seq 50); do [ -S "$MSOCK" ] && break; sleep 0.1; done
munge -n -S "$MSOCK" | unmunge -S "$MSOCK" >/dev/null 2>&1 || fail "munge does not answer on its socket"

# The node line from slurmd -C, with RealMemory a little under what it found (a node reporting less memory than
# configured is drained).
NODE_LINE="$(slurmd -C 2>/dev/null | head -n 1 | awk '{for (i = 1; i <= NF; i++) if ($i ~ /^RealMemory=/) { split($i, a, "="); $i = "RealMemory=" int(a[2] * 0.9) } print}')"
[ -n "$NODE_LINE" ] || fail "slurmd -C printed no node line"
export SLURM_CONF="$DIR/slurm.conf"
cat > "$SLURM_CONF" <<CONF
ClusterName=areal
SlurmctldHost=$HOST
AuthType=auth/munge
AuthInfo=socket=$MSOCK
CredType=cred/munge
SlurmUser=root
SlurmctldPort=$(free_port)
SlurmdPort=$(free_port)
StateSaveLocation=$DIR/state
SlurmdSpoolDir=$DIR/spool
SlurmctldPidFile=$DIR/slurmctld.pid
SlurmdPidFile=$DIR/slurmd.pid
SlurmctldLogFile=$DIR/slurmctld.log
SlurmdLogFile=$DIR/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_Core
SchedulerParameters=batch_sched_delay=0,sched_min_interval=0
MailProg=/bin/true
ReturnToService=2
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
$NODE_LINE
PartitionName=main Nodes=$HOST Default=YES MaxTime=INFINITE State=UP
CONF
slurmctld -D -i -f "$SLURM_CONF" >/dev/null 2>&1 &
PIDS+=($!)
slurmd -D -f "$SLURM_CONF" -N "$HOST" >/dev/null 2>&1 &
PIDS+=($!)
for _ in $(seq 150); do sinfo -h -o %T 2>/dev/null | grep -q idle && break; sleep 0.2; done
sinfo -h -o %T 2>/dev/null | grep -q idle || fail "the node did not come up idle"
say "cluster up: munged, slurmctld, slurmd on $HOST (pids ${PIDS[*]})"

cat > "$DIR/grid.json" <<'GRID'
{ "inputs": { "e": { "from": 0, "to": 0.999999, "count": 300, "spacing": "log-near-1" },
              "M": { "from": 1e-9, "to": 3.14, "count": 300, "spacing": "log" } },
  "random": { "count": 10000, "seed": 7 }, "checks": 8, "worst": 8 }
GRID
export GRID="$DIR/grid.json" SHARDS PARTS="$DIR/parts" ROUTINE=kepler-elliptic AREAL="node $ROOT/bin/areal.mjs"

submit() {  # submit the array, wait, check every task COMPLETED 0:0; prints the wall time
  local t0 jid
  t0=$(date +%s.%N)
  jid="$(sbatch --parsable --array=1-"$SHARDS" --cpus-per-task=1 --chdir="$DIR" --output="$DIR/out/%A_%a.out" \
    "$ROOT/docs/sweep-job.sh")" || fail "sbatch refused the job"
  for _ in $(seq 1500); do [ -z "$(squeue -h -j "$jid" 2>/dev/null)" ] && break; sleep 0.2; done
  [ -z "$(squeue -h -j "$jid" 2>/dev/null)" ] && true || fail "job $jid still queued or running after 300 s"
  local bad
  bad="$(scontrol -o show job "$jid" 2>/dev/null | grep -v 'JobState=COMPLETED.*ExitCode=0:0' || true)"
  [ -z "$bad" ] || fail "a task did not complete: $bad"
  echo "$jid $(awk -v a="$(date +%s.%N)" -v b="$t0" 'BEGIN { printf "%.1f", a - b }')"
}

read -r JID WALL < <(submit)
[ -n "${JID:-}" ] || exit 1
AREAL_CMD=(node "$ROOT/bin/areal.mjs")
"${AREAL_CMD[@]}" merge "$DIR"/parts/part-*.json --out "$DIR/merged.json" 2>/dev/null || fail "merge failed"
"${AREAL_CMD[@]}" sweep kepler-elliptic --grid "$DIR/grid.json" --workers 1 --out "$DIR/single.json" 2>/dev/null || fail "the unsharded run failed"
cmp -s "$DIR/merged.json" "$DIR/single.json" || fail "the merged file differs from one unsharded run"
say "job $JID: $SHARDS shards as an array in ${WALL} s; merged file byte-identical to one unsharded run ($(wc -c < "$DIR/merged.json") bytes)"

before="$(stat -c %Y "$DIR"/parts/part-*.json | sort | tr '\n' ' ')"
read -r JID2 WALL2 < <(submit)
[ -n "${JID2:-}" ] || exit 1
after="$(stat -c %Y "$DIR"/parts/part-*.json | sort | tr '\n' ' ')"
[ "$before" = "$after" ] || fail "resubmission rewrote finished parts"
grep -q "already holds it" "$DIR"/out/"$JID2"_1.out || fail "resubmission did not say it kept part 1"
say "job $JID2 (resubmitted): every task kept its part in ${WALL2} s"
rm "$DIR/parts/part-3.json"
msg="$("${AREAL_CMD[@]}" merge "$DIR"/parts/part-*.json --out "$DIR/partial.json" 2>&1)" && fail "merge accepted a missing shard"
case "$msg" in *"3/$SHARDS"*) say "a removed part: merge names it ($msg)";; *) fail "merge did not name shard 3: $msg";; esac
[ ! -e "$DIR/partial.json" ] || fail "merge wrote a file with a shard missing"
say "passed"
