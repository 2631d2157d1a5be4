#!/usr/bin/env bash
# Submits a sharded Kiln build to Slurm: plans the content tree here, then an array job of N
# shard tasks, a gather job after all of them (afterany: a failed shard is named by the gather),
# and with --site the site job after a successful gather. Run from anywhere on a machine that
# sees the repository, the content tree and the work folder at the same paths as the nodes.
#
#   scripts/slurm/submit.sh --shards N [--content DIR] [--work DIR] [--out DIR] [--site [--dist DIR]]
#                           [--only LIST] [--wait SECONDS] [-- SBATCH_OPTION...]
#
#   --shards N      number of shards (array tasks 1..N)
#   --content DIR   content tree (default content)
#   --work DIR      plan, shard folders and job logs (default .kiln/slurm); old shard folders are
#                   removed first unless --only is given
#   --out DIR       where the gather writes the build output (default .kiln/out)
#   --site          also build the site from it (into --dist, default dist)
#   --only LIST     run only these shard tasks (sbatch --array syntax, e.g. 2 or 1,3): rebuild
#                   failed shards and gather again, keeping the others' folders
#   --wait SECONDS  wait for the last job; exit 0 only if it COMPLETED within the time
#   -- OPTION...    passed to every sbatch (partition, account, time limit, memory…)
#
# Prints "array=ID gather=ID [site=ID]" on standard output.
set -euo pipefail
here=$(cd "$(dirname "$0")" && pwd)
root=$(cd "$here/../.." && pwd)
shards="" content="content" work=".kiln/slurm" out=".kiln/out" dist="dist" site=0 only="" wait_s=""
usage() { echo "usage: submit.sh --shards N [--content DIR] [--work DIR] [--out DIR] [--site [--dist DIR]] [--only LIST] [--wait SECONDS] [-- SBATCH_OPTION...]" >&2; exit 2; }
while [ $# -gt 0 ]; do
  case "$1" in
    --shards) shards="${2:-}"; shift 2 ;;
    --content) content="${2:-}"; shift 2 ;;
    --work) work="${2:-}"; shift 2 ;;
    --out) out="${2:-}"; shift 2 ;;
    --dist) dist="${2:-}"; shift 2 ;;
    --site) site=1; shift ;;
    --only) only="${2:-}"; shift 2 ;;
    --wait) wait_s="${2:-}"; shift 2 ;;
    --) shift; break ;;
    *) echo "submit.sh: unknown option $1" >&2; usage ;;
  esac
done
extra=("$@")
[[ "$shards" =~ ^[1-9][0-9]*$ ]] || { echo "submit.sh: --shards must be a whole number ≥ 1 (got \"$shards\")" >&2; usage; }
[ -z "$wait_s" ] || [[ "$wait_s" =~ ^[1-9][0-9]*$ ]] || { echo "submit.sh: --wait must be seconds ≥ 1 (got \"$wait_s\")" >&2; usage; }
abs() { mkdir -p "$1" && cd "$1" && pwd; }
content=$(cd "$content" && pwd)
work=$(abs "$work")
out=$(abs "$(dirname "$out")")/$(basename "$out")
dist=$(abs "$(dirname "$dist")")/$(basename "$dist")
mkdir -p "$work/logs"
[ -n "$only" ] || rm -rf "$work"/shard-*

node "$root/bin/kiln.mjs" plan --content "$content" --out "$work/plan.json"
export KILN_ROOT="$root" KILN_CONTENT="$content" KILN_WORK="$work" KILN_SHARDS="$shards" KILN_OUT="$out" KILN_DIST="$dist"
common=(--parsable --export=ALL --chdir="$root" "${extra[@]}")
array=$(sbatch "${common[@]}" --array="${only:-1-$shards}" --output="$work/logs/shard-%A_%a.out" "$here/kiln-shard.sbatch")
array=${array%%;*}
gather=$(sbatch "${common[@]}" --dependency="afterany:$array" --output="$work/logs/gather-%j.out" "$here/kiln-gather.sbatch")
gather=${gather%%;*}
last=$gather
line="array=$array gather=$gather"
if [ "$site" = 1 ]; then
  siteid=$(sbatch "${common[@]}" --dependency="afterok:$gather" --output="$work/logs/site-%j.out" "$here/kiln-site.sbatch")
  last=${siteid%%;*}
  line="$line site=$last"
fi
echo "$line"
[ -n "$wait_s" ] || exit 0

# `sbatch --wait` exits 0 even for a job cancelled by an unmet dependency: read the job's state.
state=""
for _ in $(seq "$wait_s"); do
  state=$(scontrol show job -o "$last" 2>/dev/null | grep -o 'JobState=[A-Z_]*' | cut -d= -f2 || true)
  case "$state" in
    COMPLETED) echo "submit.sh: job $last COMPLETED" >&2; exit 0 ;;
    FAILED|CANCELLED|TIMEOUT|NODE_FAIL|OUT_OF_MEMORY|BOOT_FAIL|DEADLINE|PREEMPTED)
      echo "submit.sh: job $last ended $state (logs in $work/logs)" >&2; exit 1 ;;
  esac
  sleep 1
done
echo "submit.sh: job $last not finished after $wait_s s (state ${state:-unknown}); logs in $work/logs" >&2
exit 1
