#!/usr/bin/env bash
# npm run test:cluster: tiercake under a real (one-node) SLURM scheduler.
#
#  1. finds the one-node SLURM script: $TIERCAKE_SLURM_SCRIPT, else ../shared/slurm-one-node.sh
#     next to this repository, else /work/shared/slurm-one-node.sh; starts it (root; it
#     installs the Debian packages if needed and keeps everything under /tmp) and stops it
#     on exit, whatever happens (trap);
#  2. runs the `tiercake ...` commands of the README section "On a cluster" as written
#     (tiercake -> node dist/main.js, runs/ -> a temporary folder): a disorder ensemble of
#     16 realisations as a 4-task array plus merge, and a scan of 12 points in 4 shards;
#     waits by polling squeue (finished jobs stay listed for MinJobAge); checks every job
#     COMPLETED and the merged results byte-identical to single-machine runs;
#  3. submits an ensemble of 8 realisations with the tasks held, cancels task 2 before it
#     runs (scancel JOB_2), releases the others; checks that the merge job is cancelled and
#     writes nothing, that `progress` names shard 2 as missing, runs the resubmission it
#     prints, and checks the final result against the single-machine run.
# Exits non-zero, saying why, when no scheduler can be started (no script, not root, the
# daemons do not come up). `npm test` does not depend on this.
set -euo pipefail
cd "$(dirname "$0")/.."
REPO=$PWD
T0=$(date +%s)
TOOL=(node "$REPO/dist/main.js")
say() { echo "test:cluster: $*" >&2; }
fail() {
    say "FAIL: $*"
    exit 1
}

S=""
for candidate in "${TIERCAKE_SLURM_SCRIPT:-}" "$REPO/../shared/slurm-one-node.sh" /work/shared/slurm-one-node.sh; do
    if [ -n "$candidate" ] && [ -f "$candidate" ]; then
        S=$(cd "$(dirname "$candidate")" && pwd)/$(basename "$candidate")
        break
    fi
done
[ -n "$S" ] || fail "no one-node SLURM script (set TIERCAKE_SLURM_SCRIPT, or put shared/slurm-one-node.sh next to the repository); cannot test under a scheduler here"
[ "$(id -u)" = 0 ] || fail "the one-node SLURM ($S) must be started as root; cannot test under a scheduler here"
[ -f "$REPO/dist/main.js" ] || fail "dist/main.js is missing: npm run build"

W=$(mktemp -d /tmp/tiercake-cluster.XXXXXX)
chmod 755 "$W"
finish() {
    rc=$?
    if [ "$rc" != 0 ]; then
        say "logs of the jobs:"
        for f in "$W"/*/logs/*.log; do [ -f "$f" ] && { echo "== $f" >&2; tail -n 15 "$f" >&2; }; done
        bash "$S" logs || true
    fi
    bash "$S" stop >/dev/null 2>&1 || say "stopping the scheduler reported a problem"
    rm -rf "$W"
    say "$([ "$rc" = 0 ] && echo passed || echo FAILED) in $(($(date +%s) - T0)) s"
    exit "$rc"
}
trap finish EXIT

say "starting the one-node SLURM with $S"
if ! e=$(bash "$S" start); then fail "the scheduler could not be started"; fi
eval "$e"
[ -n "${SLURM_CONF:-}" ] || fail "the scheduler script printed no SLURM_CONF"
say "scheduler up after $(($(date +%s) - T0)) s"

# jobs_of DIR: the array and merge job ids of the last submission in DIR.
jobs_of() {
    node -e 'const l=require("fs").readFileSync(process.argv[1],"utf8").trim().split("\n").pop();const j=JSON.parse(l);console.log(j.arrayJob+" "+j.mergeJob)' "$1/jobs.jsonl"
}

# wait_jobs ID...: poll squeue until every task of these jobs has ended; prints "id state" lines.
wait_jobs() {
    local ids states i
    ids=$(
        IFS=,
        echo "$*"
    )
    for ((i = 0; i < 1200; i++)); do
        states=$(squeue -h -t all -j "$ids" -o '%i %T' 2>/dev/null) || states=""
        if [ -n "$states" ] && ! grep -qE ' (PENDING|RUNNING|CONFIGURING|COMPLETING|SUSPENDED|REQUEUED|RESIZING)$' <<<"$states"; then
            echo "$states"
            return 0
        fi
        sleep 0.25
    done
    squeue -h -t all -j "$ids" -o '%i %T %r' >&2 || true
    fail "jobs $ids did not finish within 5 minutes"
}

# all_completed STATES: every line says COMPLETED.
all_completed() { ! grep -qv ' COMPLETED$' <<<"$1"; }

# same_result A B FILE...: the files are byte-identical, and summary.json too apart from provenance.
same_result() {
    local a=$1 b=$2 f
    shift 2
    for f in "$@"; do cmp -s "$a/$f" "$b/$f" || fail "$a/$f differs from $b/$f"; done
    node -e 'const r=(p)=>{const s=JSON.parse(require("fs").readFileSync(p+"/summary.json","utf8"));delete s.provenance;return JSON.stringify(s)};if(r(process.argv[1])!==r(process.argv[2]))process.exit(1)' "$a" "$b" ||
        fail "$a/summary.json and $b/summary.json differ outside provenance"
}
ENSEMBLE_FILES=(fields/density_mean.npy fields/density_spread.npy fields/condensate_mean.npy fields/condensate_spread.npy fields/phase_fraction.npy histograms.csv realisations.csv)

# ---- 1. the README's commands ---------------------------------------------------------
README_COMMANDS=$(sed -n '/<!-- cluster:start -->/,/<!-- cluster:end -->/p' README.md | grep -E '^(tiercake|squeue) ' || true)
[ "$(grep -c '^tiercake submit ' <<<"$README_COMMANDS")" = 2 ] || fail "README section 'On a cluster' should hold two tiercake submit commands"
while IFS= read -r line; do
    cmd=${line//runs\//$W\/runs\/}
    if [[ $cmd == tiercake\ * ]]; then
        say "README: $line"
        read -r -a words <<<"${cmd#tiercake }"
        "${TOOL[@]}" "${words[@]}" >"$W/last.out" || fail "README command failed: $line"
        sed 's/^/    /' "$W/last.out" >&2
    else
        say "README: $line (run after the jobs below)"
    fi
done <<<"$README_COMMANDS"
read -r ENS_ARRAY ENS_MERGE < <(jobs_of "$W/runs/speckle")
read -r SCAN_ARRAY SCAN_MERGE < <(jobs_of "$W/runs/hopping")
# single-machine runs of the same work while the jobs run
ONE=$(sed -n '/^tiercake ensemble configs\/speckle-layer-ensemble.json/p' README.md | head -1)
[ -n "$ONE" ] || fail "README: no single-machine ensemble command"
read -r -a words <<<"${ONE#tiercake }"
words=("${words[@]//runs\//$W/runs/}")
"${TOOL[@]}" "${words[@]}" --quiet >/dev/null
"${TOOL[@]}" scan configs/layer-two-shells.json --vary hubbard.hopping=0.01:0.03:12 --chain-length 3 --quiet --out "$W/runs/hopping-one-machine" >/dev/null
states=$(wait_jobs "$ENS_ARRAY" "$ENS_MERGE" "$SCAN_ARRAY" "$SCAN_MERGE")
all_completed "$states" || fail "not every job completed: $states"
say "ensemble array $ENS_ARRAY + merge $ENS_MERGE, scan array $SCAN_ARRAY + merge $SCAN_MERGE: all COMPLETED ($(wc -l <<<"$states") jobs and tasks)"
squeue --me -h -t all -o '%i %T' | head -3 >/dev/null || fail "squeue --me (README) failed"
"${TOOL[@]}" progress "$W/runs/speckle" >"$W/progress.out"
grep -q '^  done     0-3$' "$W/progress.out" || fail "progress does not say every shard is done: $(cat "$W/progress.out")"
grep -q '^  merged   yes' "$W/progress.out" || fail "progress does not see the merged result"
same_result "$W/runs/speckle/result" "$W/runs/speckle-one-machine" "${ENSEMBLE_FILES[@]}"
same_result "$W/runs/hopping/result" "$W/runs/hopping-one-machine" scan.csv
say "merged ensemble and scan are byte-identical to the single-machine runs"

# ---- 2. a task cancelled before it runs -------------------------------------------------
C=$W/cancel
"${TOOL[@]}" submit configs/speckle-layer-ensemble.json --ensemble 8 --block-size 2 --shards 4 --hold --out "$C" >/dev/null
read -r A M < <(jobs_of "$C")
scancel "${A}_2"
scontrol release "$A"
states=$(wait_jobs "$A" "$M")
grep -q "^$M CANCELLED$" <<<"$states" || fail "the merge job $M should be cancelled once task 2 is: $states"
[ ! -e "$C/result" ] || fail "the merge wrote a result without shard 2"
"${TOOL[@]}" progress "$C" >"$W/progress.out"
grep -q '^  missing  2  ' "$W/progress.out" || fail "progress does not name shard 2 as missing: $(cat "$W/progress.out")"
RESUBMIT=$(grep -- ' submit .* --only-shards 2 ' "$W/progress.out" | head -1)
[ -n "$RESUBMIT" ] || fail "progress prints no resubmission command: $(cat "$W/progress.out")"
say "task ${A}_2 cancelled, merge $M cancelled, progress names shard 2; resubmitting as printed"
bash -c "$RESUBMIT" >/dev/null
read -r A2 M2 < <(jobs_of "$C")
[ "$A2" != "$A" ] || fail "the resubmission recorded no new job"
states=$(wait_jobs "$A2" "$M2")
all_completed "$states" || fail "the resubmitted jobs did not complete: $states"
"${TOOL[@]}" ensemble configs/speckle-layer-ensemble.json -n 8 --block-size 2 --quiet --out "$W/cancel-one-machine" >/dev/null
same_result "$C/result" "$W/cancel-one-machine" "${ENSEMBLE_FILES[@]}"
say "after resubmitting shard 2 (array $A2, merge $M2) the result is byte-identical to the single-machine run"
