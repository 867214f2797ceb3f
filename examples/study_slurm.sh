#!/bin/bash
# Spread a ribbonmap study over a Slurm job array: task I of N runs shard I/N
# of the plan and appends to its own results file. Resubmitting the array
# (or a failed task) resumes: jobs already in a results file are skipped.
#
#   sbatch examples/study_slurm.sh
#   ribbonmap tabulate results-*.jsonl --normalize --format markdown --chart cells.svg
#
#SBATCH --job-name=ribbonmap-study
#SBATCH --array=1-8
#SBATCH --cpus-per-task=4
#SBATCH --mem=4G
#SBATCH --time=02:00:00
#SBATCH --output=study-%A-%a.log

set -euo pipefail

PLAN=${PLAN:-examples/study_plan.json}

ribbonmap study "$PLAN" \
    --shard "$SLURM_ARRAY_TASK_ID/$SLURM_ARRAY_TASK_COUNT" \
    --jobs "${SLURM_CPUS_PER_TASK:-1}" \
    -o "results-$SLURM_ARRAY_TASK_ID.jsonl"
