#!/usr/bin/env bash
# CI step (.ci/run): a sharded demo build on a real single-node Slurm.
#   1. start the cluster (local-cluster.sh; stopped by PID on exit, whatever happens);
#   2. build the demo on this machine (the reference);
#   3. submit it as 4 shard tasks + the gather job (submit.sh) and wait for the gather;
#   4. require the gathered output (products, site data, reports) to equal the reference byte for
#      byte (every file compared);
#   5. submit again with shard 2 not run: the gather job must fail, naming the missing job.
# Each check appends "pass NAME" or "fail NAME" to RESULTS (counted in the final "tests:" line);
# a check that cannot run (the cluster did not start) is a failure, never a skip.
set -uo pipefail
here=$(cd "$(dirname "$0")" && pwd)
root=$(cd "$here/../.." && pwd)
RESULTS="${1:?usage: ci-check.sh RESULTS_FILE}"
# Seconds each submission may take end to end (shards + gather with the spectral impact fits:
# ~40 s on 2 cores); with the start timeout this bounds the step at about 7 minutes.
WAIT_S=180
work=$(mktemp -d /tmp/kiln-slurm-XXXXXX)
: > "$RESULTS"
checks=("cluster starts" "sharded build completes" "gathered output equals a local build" "gather refuses a missing shard, naming its job" "daemons stopped by their PIDs")
record() { echo "$1 $2" >> "$RESULTS"; echo "slurm check: $1: $2"; }
# On any exit: a check that recorded nothing failed (never counted as passed or skipped).
cleanup() {
  "$here/local-cluster.sh" stop
  rm -rf "$work"
  for c in "${checks[@]}"; do grep -qxF -e "pass $c" -e "fail $c" "$RESULTS" || record fail "$c"; done
}
trap cleanup EXIT
cd "$root"

if ! "$here/local-cluster.sh" start; then
  tail -n 20 /var/log/slurm/slurmctld.log /var/log/slurm/slurmd.log 2>/dev/null
  exit 1
fi
record pass "${checks[0]}"

node bin/kiln.mjs build --out "$work/local" --no-cache --quiet || { echo "local build failed"; exit 1; }

if "$here/submit.sh" --shards 4 --work "$work/run" --out "$work/gathered" --wait "$WAIT_S"; then
  record pass "${checks[1]}"
  if diff -r "$work/local" "$work/gathered" >/dev/null && [ -f "$work/gathered/index.json" ]; then record pass "${checks[2]}"
  else diff -rq "$work/local" "$work/gathered" | head; record fail "${checks[2]}"; fi
else
  tail -n 5 "$work"/run/logs/*.out 2>/dev/null
  record fail "${checks[1]}"; record fail "${checks[2]}"
fi

# The demo plans four jobs, quillon-tarncam~2.0.0/fi0, …~2.0.0/bi1, …~2.1.0/fi0, …~2.1.0/bi1: shard 2 of 4 holds …~2.0.0/bi1.
if "$here/submit.sh" --shards 4 --only 1,3,4 --work "$work/lost" --out "$work/lost-out" --wait "$WAIT_S"; then
  record fail "${checks[3]}"
else
  log=$(cat "$work"/lost/logs/gather-*.out 2>/dev/null)
  echo "$log"
  if grep -q 'planned jobs missing: quillon-tarncam~2.0.0/bi1 (shard 2/4 not given or failed)' <<<"$log" && [ ! -e "$work/lost-out" ]; then record pass "${checks[3]}"
  else record fail "${checks[3]}"; fi
fi

# Stop now (the trap's stop is then a no-op) and require every daemon started here to be gone.
pids=$(cat /run/slurmd.pid /run/slurmctld.pid /run/munge/munged.pid 2>/dev/null)
"$here/local-cluster.sh" stop
left=""
for p in $pids; do kill -0 "$p" 2>/dev/null && left="$left $p"; done
if [ -n "$pids" ] && [ -z "$left" ]; then record pass "${checks[4]}"; else echo "still running:${left:- (no pid files were found)}"; record fail "${checks[4]}"; fi
! grep -q '^fail ' "$RESULTS"
