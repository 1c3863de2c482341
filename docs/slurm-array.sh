#!/bin/bash
# A SLURM job array that runs a falloff batch manifest in slices, one slice
# per array task, all writing into one shared output folder (docs/batch.md).
#
# Submit N slices, then merge when they are all done:
#
#   jid=$(sbatch --parsable --array=1-8 docs/slurm-array.sh mechanism.yaml results)
#   sbatch --dependency=afterany:$jid --wrap "falloff batch mechanism.yaml --out results --merge"
#
# The array must be numbered 1-N without steps: task K runs slice K/N
# (falloff batch --shard K/N). A slice already done and up to date is
# skipped, so re-submitting the whole array after a failure or a change
# recomputes only what is missing or stale. The merge refuses, naming the
# slices to run again, while any reaction is missing or stale.
#
# Set FALLOFF to the falloff binary if it is not on the PATH of the nodes.
#SBATCH --job-name=falloff-batch
#SBATCH --cpus-per-task=1
#SBATCH --output=falloff-batch-%A_%a.log
set -euo pipefail

manifest=${1:?usage: sbatch --array=1-N slurm-array.sh MANIFEST OUTPUT-FOLDER}
out=${2:?usage: sbatch --array=1-N slurm-array.sh MANIFEST OUTPUT-FOLDER}
: "${SLURM_ARRAY_TASK_ID:?submit this script as a job array: sbatch --array=1-N}"
n=${SLURM_ARRAY_TASK_COUNT:-$((SLURM_ARRAY_TASK_MAX - SLURM_ARRAY_TASK_MIN + 1))}
k=$((SLURM_ARRAY_TASK_ID - SLURM_ARRAY_TASK_MIN + 1))

# One core per task: the Go runtime takes GOMAXPROCS from the environment.
export GOMAXPROCS=${SLURM_CPUS_PER_TASK:-1}
exec "${FALLOFF:-falloff}" batch "$manifest" --out "$out" --shard "$k/$n" \
	--jobs "${SLURM_CPUS_PER_TASK:-1}" --quiet
