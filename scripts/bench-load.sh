#!/usr/bin/env bash
# Load benchmark: the worklist through the real app beside a bare Express + pg `SELECT 1` route, in
# one run, on a fresh isobar_load database of the test cluster. Prints both and the ratio.
# BENCH_BASELINE_REF=<commit>: that commit's worklist is served and measured too, in turn with
# this one (same run, same database), for a before/after under the same load. BENCH_ROUNDS=<n>
# repeats the measurements in turn (default 1); BENCH_PROFILE=<file> writes a CPU profile.
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

PG_PORT=${ISOBAR_TEST_PG_PORT:-54471}
export NODE_ENV=test
export DATABASE_URL=postgres://isobar@127.0.0.1:$PG_PORT/isobar_load
export MIGRATION_DATABASE_URL=postgres://isobar_owner@127.0.0.1:$PG_PORT/isobar_load
export ATTACHMENT_DIR="$DATA_DIR/load-attachments"

cleanup() {
  [[ -n ${BASELINE_DIR:-} ]] && rm -rf "$BASELINE_DIR"
  [[ -n ${PG_BIN:-} ]] && psql_admin "$PG_PORT" "DROP DATABASE IF EXISTS isobar_load WITH (FORCE)" 2>/dev/null || true
  stop_cluster
}
trap cleanup EXIT
trap 'exit 130' INT TERM

ensure_node_modules
ensure_postgres_installed
start_cluster postgres-test "$PG_PORT"
ensure_database "$PG_PORT" isobar_load fresh
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
node_modules/.bin/tsx scripts/bench-load.ts "$@"
