#!/usr/bin/env bash
# Load benchmark: the worklist through the real app beside a bare Express + pg `SELECT 1` route, in
# one run, on a fresh isobar_load database of the test cluster. Prints both and the ratio.
# BENCH_BASELINE_REF=<commit>: that commit's worklist is served and measured too, in turn with
# this one (same run, same database), for a before/after under the same load. BENCH_ROUNDS=<n>
# repeats the measurements in turn (default 1); BENCH_PROFILE=<file> writes a CPU profile.
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export ATTACHMENT_DIR="$DATA_DIR/load-attachments"
with_scratch_database isobar_load fresh
if [[ -n ${BENCH_BASELINE_REF:-} ]]; then
  BASELINE_DIR=$(mktemp -d /tmp/isobar-baseline.XXXXXX)
  git archive "$BENCH_BASELINE_REF" server shared tests/support fhir templates package.json tsconfig.json | tar -x -C "$BASELINE_DIR"
  ln -s "$ROOT/node_modules" "$BASELINE_DIR/node_modules"
  export BENCH_BASELINE=$BASELINE_DIR
  # tsx compiles by the tsconfig it is given: one that covers both trees (decorators, for TypeORM).
  printf '{ "extends": "%s/tsconfig.json", "include": ["%s/**/*.ts", "%s/**/*.ts"], "exclude": ["%s/node_modules", "%s/node_modules", "%s/.data"] }\n' \
    "$ROOT" "$ROOT" "$BASELINE_DIR" "$ROOT" "$BASELINE_DIR" "$ROOT" >"$BASELINE_DIR/tsconfig.bench.json"
  export TSX_TSCONFIG_PATH=$BASELINE_DIR/tsconfig.bench.json
fi
status=0
node_modules/.bin/tsx scripts/bench-load.ts "$@" || status=$?
[[ -n ${BASELINE_DIR:-} ]] && rm -rf "$BASELINE_DIR"
exit "$status"
