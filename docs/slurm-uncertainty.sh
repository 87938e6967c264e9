#!/bin/bash
# A Slurm job array running one `frostline uncertainty` design in 10 shards, then merging them.
# Each array task runs the samples i with i mod 10 = task − 1 (frostline reads
# SLURM_ARRAY_TASK_ID, SLURM_ARRAY_TASK_MIN and SLURM_ARRAY_TASK_COUNT) into
# out/spread/shard-K-of-10; the merge job waits for the whole array.
#
#   sbatch docs/slurm-uncertainty.sh CASE.toml
#
# Edit the resources to your cluster; frostline uses every core it is given (-j).
#SBATCH --job-name=frostline-spread
#SBATCH --array=1-10
#SBATCH --cpus-per-task=4
# Memory: one run per core; a 2D run takes tens of MB, a 3D run up to about 2 GB at the largest
# grid frostline accepts (178 MB for the normal-mesh 3D demo): size --mem-per-cpu to the cases.
#SBATCH --mem-per-cpu=2G
#SBATCH --time=02:00:00
#SBATCH --output=spread-%A_%a.log
set -euo pipefail
CASE="${1:?usage: sbatch docs/slurm-uncertainty.sh CASE.toml}"
# (Outside such an array, or to run the whole design inside one, pass --shard 1/1.)
# Exit code 3 means the shard's results were written but a criterion was not met (e.g. samples
# not periodic): its work is done, so the array goes on; the merge reports it again.
code=0
frostline uncertainty "$CASE" --out out/spread -j "${SLURM_CPUS_PER_TASK:-1}" --quiet || code=$?
if [ "$code" != 0 ] && [ "$code" != 3 ]; then exit "$code"; fi
# The last task to finish is not known in advance: submit the merge once, from task 1, as a job
# that starts after the whole array has ended successfully.
if [ "${SLURM_ARRAY_TASK_ID}" = "${SLURM_ARRAY_TASK_MIN}" ]; then
  sbatch --dependency="afterok:${SLURM_ARRAY_JOB_ID}" --job-name=frostline-merge \
    --wrap="frostline merge out/spread/shard-*-of-${SLURM_ARRAY_TASK_COUNT} --out out/spread-all || [ \$? = 3 ]"
fi
