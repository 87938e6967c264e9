#!/bin/bash
# A Slurm job array running one `frostline batch` (a list of cases: many sites, or variants of a
# design) in 10 shards, then merging them. Each array task runs the cases k (0-based, in list
# order) with k mod 10 = task − 1 (frostline reads SLURM_ARRAY_TASK_ID, SLURM_ARRAY_TASK_MIN and
# SLURM_ARRAY_TASK_COUNT) into out/sites/shard-K-of-10; the merge job waits for the whole array
# and copies every case's directory into out/sites-all/cases.
#
#   sbatch docs/slurm-batch.sh SITES.txt
#
# SITES.txt: one case file per line, relative to the list file; # starts a comment. Edit the
# resources to your cluster; frostline uses every core it is given (-j).
#SBATCH --job-name=frostline-batch
#SBATCH --array=1-10
#SBATCH --cpus-per-task=4
# Memory: one run per core; a 2D run takes tens of MB, a 3D run up to about 2 GB at the largest
# grid frostline accepts (178 MB for the normal-mesh 3D demo): size --mem-per-cpu to the cases.
#SBATCH --mem-per-cpu=2G
#SBATCH --time=02:00:00
#SBATCH --output=batch-%A_%a.log
set -euo pipefail
LIST="${1:?usage: sbatch docs/slurm-batch.sh SITES.txt}"
# (Outside such an array, or to run the whole list inside one, pass --shard 1/1.)
# Exit code 3 means results were written but a case did not meet a criterion (frost in the
# protected zone, not periodic, refused): the shard's work is done, so the array goes on.
code=0
frostline batch "$LIST" --out out/sites -j "${SLURM_CPUS_PER_TASK:-1}" --quiet || code=$?
if [ "$code" != 0 ] && [ "$code" != 3 ]; then exit "$code"; fi
# Submit the merge once, from the first task, to start after the whole array has ended
# successfully.
if [ "${SLURM_ARRAY_TASK_ID}" = "${SLURM_ARRAY_TASK_MIN}" ]; then
  sbatch --dependency="afterok:${SLURM_ARRAY_JOB_ID}" --job-name=frostline-merge \
    --wrap="frostline merge out/sites/shard-*-of-${SLURM_ARRAY_TASK_COUNT} --out out/sites-all || [ \$? = 3 ]"
fi
