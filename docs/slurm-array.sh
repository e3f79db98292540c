#!/bin/bash
# fitseal on a Slurm job array: one array task per shard, then one merge job
# that waits for the whole array. Submit with:
#
#   SOURCE_DATE_EPOCH=$(date +%s) sbatch docs/slurm-array.sh
#
# Adapt the #SBATCH lines (shard count, time, memory, partition) and the three
# paths below. The array must be a range with step 1: task IDs MIN…MAX become
# shards 0…N−1 (fitseal reads SLURM_ARRAY_TASK_ID, SLURM_ARRAY_TASK_MIN and
# SLURM_ARRAY_TASK_COUNT). Every task must see the same project folder and
# the same fitseal build (a shared file system), and all of them — and the
# merge — must use the same SOURCE_DATE_EPOCH if the merged bundle is to be
# byte-identical to a single run's.
#SBATCH --job-name=fitseal-shard
#SBATCH --array=0-15
#SBATCH --cpus-per-task=4
#SBATCH --mem=4G
#SBATCH --time=02:00:00
#SBATCH --output=logs/fitseal-%A_%a.out
set -euo pipefail

PROJECT=${PROJECT:-$HOME/study/fitseal.toml}   # the project file
PARTS=${PARTS:-$HOME/study/parts}              # where the partial bundles go
FITSEAL=${FITSEAL:-fitseal}                    # the fitseal binary (one build for all tasks)
# The signing key: a key readable by the tasks, e.g. one made for this study
# with `fitseal keygen -o $HOME/.config/fitseal/study_ed25519`.
export FITSEAL_KEY=${FITSEAL_KEY:-$HOME/.config/fitseal/id_ed25519}
# One created time for every shard and the merge, fixed at submission
# (sbatch passes the submitting shell's environment on by default).
: "${SOURCE_DATE_EPOCH:?submit with SOURCE_DATE_EPOCH=\$(date +%s) sbatch docs/slurm-array.sh}"
export SOURCE_DATE_EPOCH

mkdir -p "$PARTS" logs
I=$((SLURM_ARRAY_TASK_ID - ${SLURM_ARRAY_TASK_MIN:-0}))
"$FITSEAL" run -q -j "${SLURM_CPUS_PER_TASK:-1}" --shard auto \
    -o "$PARTS/shard-$I-of-$SLURM_ARRAY_TASK_COUNT.tar.gz" "$PROJECT"

# The first task submits the merge, to run once every task has ended well.
if [ "$SLURM_ARRAY_TASK_ID" = "${SLURM_ARRAY_TASK_MIN:-0}" ]; then
    sbatch --dependency="afterok:$SLURM_ARRAY_JOB_ID" --job-name=fitseal-merge \
        --cpus-per-task=1 --mem=8G --time=01:00:00 --output=logs/fitseal-merge-%j.out \
        --export=ALL,SOURCE_DATE_EPOCH="$SOURCE_DATE_EPOCH" \
        --wrap "$FITSEAL merge -o '$PARTS/../study.tar.gz' '$PARTS'/shard-*-of-$SLURM_ARRAY_TASK_COUNT.tar.gz"
fi
