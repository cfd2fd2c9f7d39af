#!/usr/bin/env bash
# First-load benchmark on a phone profile: Isobar's worklist against a bare Expo Router app built with
# the same versions (scripts/bare-app), both served precompressed. A fresh isobar_firstload database
# on the test cluster with the demo scenario and a page of extra studies. Stops the cluster afterwards
# if this script started it.
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

PG_PORT=${ISOBAR_TEST_PG_PORT:-54471}
export NODE_ENV=test
export DATABASE_URL=postgres://isobar@127.0.0.1:$PG_PORT/isobar_firstload
export MIGRATION_DATABASE_URL=postgres://isobar_owner@127.0.0.1:$PG_PORT/isobar_firstload
export ATTACHMENT_DIR="$DATA_DIR/bench-attachments"
export ISOBAR_BARE_DIST="$DATA_DIR/bare-dist"

cleanup() {
  if [[ -n ${PG_BIN:-} ]]; then
    psql_admin "$PG_PORT" "DROP DATABASE IF EXISTS isobar_firstload WITH (FORCE)" 2>/dev/null || true
  fi
  stop_cluster
}
trap cleanup EXIT
trap 'exit 130' INT TERM

ensure_node_modules
ensure_postgres_installed
ensure_chromium
ensure_web_build
ensure_bare_web_build
start_cluster postgres-test "$PG_PORT"
ensure_database "$PG_PORT" isobar_firstload fresh
node_modules/.bin/tsx scripts/bench-first-load.ts "$@"
