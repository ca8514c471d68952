#!/bin/bash
# A Slurm job array that runs one sharded sweep: each array task runs one part; a dependent job merges them.
#
#   sbatch --array=1-40 docs/examples/slurm/sweep-array.sh my-scenario.json 40
#   sbatch --dependency=afterok:<array job id> --wrap "thermal-sampling merge parts/part-*.json --output all.json"
#
# The second argument is the number of parts, N: give it explicitly, so that rerunning one failed part alone
# (sbatch --array=7 docs/examples/slurm/sweep-array.sh my-scenario.json 40) still runs part 7 of 40. Each task writes
# parts/part-<I>.json through a temporary file, so a task that is killed leaves no part, and 'merge' lists the missing
# ones (each task's log is thermal-sampling-<job>_<task>.log beside them). Every part samples its own chains with the run's seed, so the merged document is the one the one-process
# 'sweep' writes, bit for bit.
#SBATCH --job-name=thermal-sampling-sweep
#SBATCH --output=thermal-sampling-%A_%a.log
#SBATCH --cpus-per-task=2
#SBATCH --time=01:00:00
set -euo pipefail
scenario="${1:?give the scenario file}"
count="${2:?give the number of parts}"
index="${SLURM_ARRAY_TASK_ID:?run this as a job array: sbatch --array=1-N}"
# Tasks are numbered from 1 here (--array=1-N); with --array=0-(N-1) use index=$((SLURM_ARRAY_TASK_ID + 1)).
mkdir -p parts
exec thermal-sampling sweep "$scenario" --shard "${index}/${count}" --threads "${SLURM_CPUS_PER_TASK:-1}" \
    --output "parts/part-${index}.json" --quiet
