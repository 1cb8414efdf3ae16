#!/bin/bash
# A sequence survey as a Slurm array job: one shard per task, merged afterwards.
# This is the example of DEVELOPERS.md ("Surveys beyond one machine") and the script CI submits
# (ci/slurm-survey.sh), so the two cannot drift apart.
#
# The knobs a cluster user changes:
#   shard count  sbatch --array=1-N        (every task reads N from SLURM_ARRAY_TASK_MAX)
#   budget       SURVEY_EVALS=200000       (evaluations per sequence)
#   time limit   sbatch --time=HH:MM:SS
#   the survey   SURVEY_ARGS="--from E --to S ..." (everything but budget, shard and output)
#   output       SURVEY_RESULTS=results    (one JSON-lines file per shard)
#   the program  TOURWRIGHT=tourwright
# Submit:  sbatch ci/survey-array.sh
# Then:    tourwright explore --merge results/ --out ranked/
#
#SBATCH --job-name=tourwright-survey
#SBATCH --array=1-64
#SBATCH --cpus-per-task=2
#SBATCH --time=02:00:00
#SBATCH --output=slurm-%A_%a.out
set -euo pipefail
TOURWRIGHT="${TOURWRIGHT:-tourwright}"
SHARDS="${SLURM_ARRAY_TASK_MAX:?submit with sbatch --array=1-N}"
RESULTS="${SURVEY_RESULTS:-results}"
SURVEY_ARGS="${SURVEY_ARGS:---from E --to S --launch 2030-01-01..2045-12-31 --via V,E,M,J --max-swingbys 4 --max-tof-years 12 --seed 7}"
mkdir -p "$RESULTS"
# shellcheck disable=SC2086 # SURVEY_ARGS is a list of arguments
"$TOURWRIGHT" explore $SURVEY_ARGS --evals "${SURVEY_EVALS:-200000}" --quiet \
    --shard "${SLURM_ARRAY_TASK_ID}/${SHARDS}" \
    --jsonl "$RESULTS/shard-${SLURM_ARRAY_TASK_ID}.jsonl"
