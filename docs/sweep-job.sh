#!/bin/sh
# One shard of an areal sweep per Slurm array task. This is the script `npm run test:scheduler` submits.
#
#   ROUTINE=kepler-elliptic GRID=grid.json SHARDS=32 PARTS=parts sbatch --array=1-32 --cpus-per-task=4 docs/sweep-job.sh
#   areal merge parts/part-*.json --out sweep.json
#
# Environment (sbatch passes the submitting shell's environment): ROUTINE (default kepler-elliptic), GRID (the
# grid JSON), SHARDS (n, the array size), PARTS (folder for the part files, default parts), AREAL (the command,
# default `npx --no-install areal`). Worker threads: the CPUs Slurm grants the task (SLURM_CPUS_PER_TASK).
# Safe to resubmit: a task whose part file already holds its whole shard of this sweep (same routine, grid,
# module and shard) keeps it and ends at once (`--resume`); a missing or broken part is run again and written
# whole. `areal merge` names any shard still missing.
#SBATCH --job-name=areal-sweep
set -eu
: "${GRID:?set GRID to the grid JSON}"
: "${SHARDS:?set SHARDS to the number of shards (the array size)}"
ROUTINE="${ROUTINE:-kepler-elliptic}"
PARTS="${PARTS:-parts}"
AREAL="${AREAL:-npx --no-install areal}"
k="${SLURM_ARRAY_TASK_ID:?run as an array task: sbatch --array=1-$SHARDS}"
mkdir -p "$PARTS"
# $AREAL is a command with arguments: word splitting is wanted here.
# shellcheck disable=SC2086
exec $AREAL sweep "$ROUTINE" --grid "$GRID" --shard "$k/$SHARDS" --workers "${SLURM_CPUS_PER_TASK:-1}" \
  --out "$PARTS/part-$k.json" --resume
