#!/usr/bin/env bash
# Turnaround benchmark: a fresh isobar_bench_turnaround database on the test cluster, 1,000,000
# studies over ten years seeded in SQL, timed requests for a 12-month range against the real app.
# Stops the cluster afterwards if this script started it. ISOBAR_BENCH_KEEP=1 keeps the database;
# ISOBAR_BENCH_REUSE=1 times a kept one again without seeding anew (when it holds BENCH_STUDIES studies).
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

PG_PORT=${ISOBAR_TEST_PG_PORT:-54471}
export NODE_ENV=test
export DATABASE_URL=postgres://isobar@127.0.0.1:$PG_PORT/isobar_bench_turnaround
export MIGRATION_DATABASE_URL=postgres://isobar_owner@127.0.0.1:$PG_PORT/isobar_bench_turnaround
export ATTACHMENT_DIR="$DATA_DIR/bench-attachments"

cleanup() {
  if [[ -z ${ISOBAR_BENCH_KEEP:-}${ISOBAR_BENCH_REUSE:-} && -n ${PG_BIN:-} ]]; then
    psql_admin "$PG_PORT" "DROP DATABASE IF EXISTS isobar_bench_turnaround WITH (FORCE)" 2>/dev/null || true
  fi
  stop_cluster
}
trap cleanup EXIT
trap 'exit 130' INT TERM

ensure_node_modules
ensure_postgres_installed
start_cluster postgres-test "$PG_PORT"
ensure_database "$PG_PORT" isobar_bench_turnaround "$([[ -n ${ISOBAR_BENCH_REUSE:-} ]] || echo fresh)"
node_modules/.bin/tsx scripts/bench-turnaround.ts "$@"
