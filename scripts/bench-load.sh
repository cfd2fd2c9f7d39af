#!/usr/bin/env bash
# Load benchmark: the worklist through the real app beside a bare Express + pg `SELECT 1` route, in
# one run, on a fresh isobar_load database of the test cluster. Prints both and the ratio.
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

PG_PORT=${ISOBAR_TEST_PG_PORT:-54471}
export NODE_ENV=test
export DATABASE_URL=postgres://isobar@127.0.0.1:$PG_PORT/isobar_load
export MIGRATION_DATABASE_URL=postgres://isobar_owner@127.0.0.1:$PG_PORT/isobar_load
export ATTACHMENT_DIR="$DATA_DIR/load-attachments"

cleanup() {
  [[ -n ${PG_BIN:-} ]] && psql_admin "$PG_PORT" "DROP DATABASE IF EXISTS isobar_load WITH (FORCE)" 2>/dev/null || true
  stop_cluster
}
trap cleanup EXIT
trap 'exit 130' INT TERM

ensure_node_modules
ensure_postgres_installed
start_cluster postgres-test "$PG_PORT"
ensure_database "$PG_PORT" isobar_load fresh
node_modules/.bin/tsx scripts/bench-load.ts "$@"
