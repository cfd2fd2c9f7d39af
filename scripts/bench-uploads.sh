#!/usr/bin/env bash
# Memory under concurrent uploads: rounds of concurrent 19 MB attachment uploads (a PDF printout and
# a CSV export) through the real app, on a fresh isobar_uploads database of the test cluster; prints
# the server's resident memory before, at its peak and after. Target: memory flat (peak growth well
# under the sum of the files in flight, < 100 MB).
# BENCH_UPLOADS (default 8) at once, BENCH_UPLOAD_MB (default 19), BENCH_UPLOAD_ROUNDS (default 3).
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

PG_PORT=${ISOBAR_TEST_PG_PORT:-54471}
export NODE_ENV=test
export DATABASE_URL=postgres://isobar@127.0.0.1:$PG_PORT/isobar_uploads
export MIGRATION_DATABASE_URL=postgres://isobar_owner@127.0.0.1:$PG_PORT/isobar_uploads
export ATTACHMENT_DIR="$DATA_DIR/uploads-bench-attachments"

cleanup() {
  rm -rf "$ATTACHMENT_DIR"
  [[ -n ${PG_BIN:-} ]] && psql_admin "$PG_PORT" "DROP DATABASE IF EXISTS isobar_uploads WITH (FORCE)" 2>/dev/null || true
  stop_cluster
}
trap cleanup EXIT
trap 'exit 130' INT TERM

ensure_node_modules
ensure_postgres_installed
start_cluster postgres-test "$PG_PORT"
ensure_database "$PG_PORT" isobar_uploads fresh
node_modules/.bin/tsx scripts/bench-uploads.ts "$@"
