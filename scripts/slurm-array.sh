#!/usr/bin/env bash
# Submits one lagfold run, sweep, plan or stress test to Slurm as a job array of shards and
# a dependent merge job.
#
#   scripts/slurm-array.sh SCENARIO --shards N [--out DIR] [--command run|plan|stress]
#                          [--cpus C] [--partition P] [-- MORE LAGFOLD OPTIONS]
#
# Task K of the array runs `lagfold COMMAND SCENARIO --shard K/N --out
# DIR/shard-K`; when every task has succeeded, the merge job runs `lagfold
# merge DIR/shard-* --out DIR/merged`, whose files are those of the single run
# with the same options and seed, byte for byte. DIR (default
# lagfold-out/slurm-<scenario>) must be on a file system every node sees, and
# `lagfold` on every node's PATH (or set LAGFOLD to its path). Prints the two
# job ids; `--wait` waits for the merge and fails if any job did.
set -euo pipefail

usage() { sed -n '2,15p' "$0" | sed 's/^# \{0,1\}//' >&2; exit 2; }

scenario="" shards="" out="" command="run" cpus=1 partition="" wait=""
extra=()
while [ $# -gt 0 ]; do
  case "$1" in
    --shards) shards="${2:-}"; shift 2 ;;
    --out) out="${2:-}"; shift 2 ;;
    --command) command="${2:-}"; shift 2 ;;
    --cpus) cpus="${2:-}"; shift 2 ;;
    --partition) partition="${2:-}"; shift 2 ;;
    --wait) wait=1; shift ;;
    -h|--help) usage ;;
    --) shift; extra=("$@"); break ;;
    -*) echo "slurm-array.sh: unknown option $1" >&2; usage ;;
    *) [ -z "$scenario" ] || { echo "slurm-array.sh: one scenario only (got $scenario and $1)" >&2; exit 2; }
       scenario="$1"; shift ;;
  esac
done
[ -n "$scenario" ] || { echo "slurm-array.sh: give a scenario file or preset name" >&2; usage; }
case "$shards" in
  ''|*[!0-9]*) echo "slurm-array.sh: --shards must be a whole number from 1 to 10000 (got '${shards}')" >&2; exit 2 ;;
esac
[ "$shards" -ge 1 ] && [ "$shards" -le 10000 ] \
  || { echo "slurm-array.sh: --shards must be from 1 to 10000 (got $shards)" >&2; exit 2; }
case "$command" in run|plan|stress) ;; *) echo "slurm-array.sh: --command is run, plan or stress (got '$command')" >&2; exit 2 ;; esac
case "$cpus" in ''|*[!0-9]*|0) echo "slurm-array.sh: --cpus must be a whole number of at least 1" >&2; exit 2 ;; esac
command -v sbatch >/dev/null || { echo "slurm-array.sh: sbatch not found: is this a Slurm login node?" >&2; exit 2; }

lagfold="${LAGFOLD:-lagfold}"
name=$(basename "$scenario" .toml)
out="${out:-lagfold-out/slurm-$name}"
mkdir -p "$out/logs"
out=$(cd "$out" && pwd)
# A scenario file is read on the nodes: give them its absolute path.
[ -f "$scenario" ] && scenario="$(cd "$(dirname "$scenario")" && pwd)/$(basename "$scenario")"

# Words quoted for the shell, joined by spaces (nothing for no words).
quote() { local s=""; [ $# -gt 0 ] && s=$(printf '%q ' "$@"); printf '%s' "${s% }"; }
charts=""
for a in "${extra[@]+"${extra[@]}"}"; do if [ "$a" = --no-charts ]; then charts=--no-charts; fi; done
part_flag=()
if [ -n "$partition" ]; then part_flag=(--partition "$partition"); fi

array=$(sbatch --parsable "${part_flag[@]}" --job-name "lagfold-$name" --array "0-$((shards - 1))" \
  --cpus-per-task "$cpus" --output "$out/logs/shard-%a.log" \
  --wrap "$(quote "$lagfold" "$command" "$scenario") --shard \$SLURM_ARRAY_TASK_ID/$shards \
--threads $cpus --quiet --out $(quote "$out")/shard-\$SLURM_ARRAY_TASK_ID $(quote "${extra[@]+"${extra[@]}"}")")
array=${array%%;*}
merge=$(sbatch --parsable "${part_flag[@]}" --job-name "lagfold-$name-merge" --dependency "afterok:$array" \
  --kill-on-invalid-dep=yes --cpus-per-task "$cpus" --output "$out/logs/merge.log" \
  --wrap "$(quote "$lagfold") merge $(quote "$out")/shard-* --threads $cpus --quiet --out $(quote "$out/merged") $charts")
merge=${merge%%;*}
echo "array job $array ($shards shards of lagfold $command $scenario), merge job $merge"
echo "merged outputs: $out/merged   logs: $out/logs"

if [ -n "$wait" ]; then
  while squeue -h -j "$array,$merge" 2>/dev/null | grep -q .; do sleep 1; done
  case "$command" in plan) want=plan.json ;; stress) want=stress.json ;; *) want=summary.json ;; esac
  [ -f "$out/merged/$want" ] || [ -f "$out/merged/sweep.json" ] \
    || { echo "slurm-array.sh: the merge did not finish; see $out/logs" >&2; tail -n 5 "$out"/logs/*.log >&2; exit 1; }
  echo "done: $out/merged"
fi
