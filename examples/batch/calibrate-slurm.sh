#!/bin/sh
# A calibration study as a Slurm job array: 16 tasks, each one shard, then one merge.
#   sbatch --array=1-16 calibrate-slurm.sh                       # the shards
#   sbatch --dependency=afterok:JOBID --wrap 'priorscope merge parts/part-*.json --out calibration.json'
# The same seed gives the same numbers however many shards run: each replicate's random stream is
# seeded from the seed and the replicate's index only.
#SBATCH --job-name=priorscope-calibrate
#SBATCH --cpus-per-task=1
#SBATCH --time=01:00:00
#SBATCH --output=logs/calibrate-%A_%a.log
set -eu
N=${SLURM_ARRAY_TASK_COUNT:-16}
K=${SLURM_ARRAY_TASK_ID:?run as a job array: sbatch --array=1-16}
mkdir -p parts
priorscope calibrate --problem problem.json --prior prior-a.json prior-b.json prior-c.json \
  --replicates 2000 --seed 20261204 --shard "$K/$N" --out "parts/part-$K.json"
