#!/usr/bin/env bash
# Diagrams of a large dataset as a Slurm job array: every element runs the same command line and landform
# takes its shard from SLURM_ARRAY_TASK_ID / SLURM_ARRAY_TASK_COUNT (any start index and step; see
# SLURM_ARRAY_TASK_MIN). An example to adapt, not run in CI: paths, module loads and resources are yours.
#
#   jobid=$(sbatch --parsable examples/cluster/slurm-array.sh)
#   sbatch --dependency=afterok:"$jobid" --wrap \
#     "npx landform merge out/sensor-field/diagrams.shard-*-of-16.csv --out out/sensor-field/diagrams.csv"
#
# A failed or pre-empted element can simply be resubmitted (sbatch --array=5 …): finished shards are skipped
# unless --force, and an interrupted one left no partial file.
#SBATCH --job-name=landform-diagrams
#SBATCH --array=1-16
#SBATCH --cpus-per-task=4
#SBATCH --mem=8G
#SBATCH --time=02:00:00
#SBATCH --output=logs/diagrams-%A_%a.log
set -euo pipefail

# module load nodejs/20   # or however Node 20 is provided on your cluster

npx landform diagrams data/sensor-field/windows.csv \
  --kind signal --embed 3:4 --degrees 0,1 \
  --workers "${SLURM_CPUS_PER_TASK:-1}" \
  --out out/sensor-field/diagrams.csv
# → out/sensor-field/diagrams.shard-01-of-16.csv … diagrams.shard-16-of-16.csv, each with a .provenance.json
