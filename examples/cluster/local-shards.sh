#!/usr/bin/env bash
# Simulates a cluster run on one machine: the diagrams of a dataset are computed as N shards in parallel
# local processes (as N elements of a job array would), merged, and compared with an unsharded run.
#
#   examples/cluster/local-shards.sh [DATASET] [N]
#
# DATASET defaults to the shipped printed-lattice cross-sections (datasets/lattice.csv), N to 3. Run it from the
# repository after `npm ci` (which builds the `landform` command). Set LANDFORM to use another command line,
# e.g. LANDFORM="npx tsx src/cli/main.ts" to run the sources without a build.
set -euo pipefail

dataset="${1:-datasets/lattice.csv}"
shards="${2:-3}"
landform="${LANDFORM:-npx landform}"
work="$(mktemp -d "${TMPDIR:-/tmp}/landform-shards.XXXXXX")"
trap 'rm -rf "$work"' EXIT

echo "dataset $dataset, $shards shards, working in $work"

# 1. The shards, in parallel. Each writes $work/out/diagrams.shard-I-of-N.csv and its provenance sidecar.
#    One worker thread per process: the processes themselves are the parallelism here.
pids=()
for i in $(seq 1 "$shards"); do
  $landform diagrams "$dataset" --degrees 0,1 --workers 1 --quiet \
    --shard "$i/$shards" --out "$work/out/diagrams.csv" &
  pids+=("$!")
done
failed=0
for pid in "${pids[@]}"; do wait "$pid" || failed=1; done
if [ "$failed" -ne 0 ]; then echo "a shard failed; rerun it (finished shards are skipped)" >&2; exit 1; fi

# 2. A rerun of a finished shard does nothing (add --force to recompute).
$landform diagrams "$dataset" --degrees 0,1 --workers 1 --shard "1/$shards" --out "$work/out/diagrams.csv"

# 3. The merge checks completeness, disjointness and settings, then writes the dataset's order.
$landform merge "$work"/out/diagrams.shard-*-of-"$shards".csv --out "$work/diagrams.csv"

# 4. The same command without --shard gives the same bytes.
$landform diagrams "$dataset" --degrees 0,1 --quiet --out "$work/unsharded.csv"
if cmp -s "$work/diagrams.csv" "$work/unsharded.csv"; then
  echo "merged shards equal the unsharded run byte for byte ($(wc -l < "$work/diagrams.csv") lines)"
else
  echo "merged shards differ from the unsharded run" >&2
  exit 1
fi

# 5. The learning step takes the merged file directly (here: a quick 3-fold check with one model).
$landform evaluate "$work/diagrams.csv" --folds 3 --models pca-svm --quiet --out "$work/study" \
  && echo "evaluate read the merged diagrams: $work/study/metrics.json"
