#!/bin/bash
# Queues a sharded `hadamard search` on Slurm: an array job of K shards
# (search-shard.sbatch) and the merge (search-merge.sbatch) as a job that runs once every
# shard has succeeded. Prints the two job ids.
#
#   contrib/slurm/submit.sh RUN_DIR K SEARCH-ARGS...
#   contrib/slurm/submit.sh /shared/w35 16 williamson --length 35 --classes
#
# RUN_DIR must be shared storage. Set HADAMARD to the binary's path if `hadamard` is not on
# the nodes' PATH; extra sbatch options go in SBATCH_* variables (SBATCH_PARTITION,
# SBATCH_TIMELIMIT, ...). ARRAY=2,5 re-queues only those shards (after one was cancelled or
# lost) and a new merge after them; the shards that are done are not run again.
set -euo pipefail
if [ $# -lt 3 ]; then
  sed -n '2,12p' "$0" >&2
  exit 2
fi
here=$(cd "$(dirname "$0")" && pwd)
run_dir=$(mkdir -p "$1" && cd "$1" && pwd)
shards=$2
shift 2
array=${ARRAY:-0-$((shards - 1))}
shard_job=$(sbatch --parsable --array="$array" --chdir="$run_dir" \
  --output="$run_dir/shard-%a.log" \
  "$here/search-shard.sbatch" "$run_dir" "$shards" "$@")
shard_job=${shard_job%%;*}
merge_job=$(sbatch --parsable --dependency="afterok:$shard_job" --kill-on-invalid-dep=yes \
  --chdir="$run_dir" --output="$run_dir/merge.log" --open-mode=append \
  "$here/search-merge.sbatch" "$run_dir")
merge_job=${merge_job%%;*}
echo "$shard_job $merge_job"
