#!/usr/bin/env bash
# npm run fhir:export -- DIR: the FHIR bundle of every signed demo study version, written into DIR.
# Needs nothing running: its own PostgreSQL cluster (.data/postgres-export, port ISOBAR_EXPORT_PG_PORT,
# default 54472) with a fresh isobar_export database, the migrations and the demo scenario.
# Stops the cluster afterwards if this script started it.
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

[[ $# -eq 1 && $1 != -* ]] || fail "usage: npm run fhir:export -- DIR"

PG_PORT=${ISOBAR_EXPORT_PG_PORT:-54472}
export NODE_ENV=test
export DATABASE_URL=postgres://isobar@127.0.0.1:$PG_PORT/isobar_export
export MIGRATION_DATABASE_URL=postgres://isobar_owner@127.0.0.1:$PG_PORT/isobar_export
export ATTACHMENT_DIR="$DATA_DIR/export-attachments"

trap stop_cluster EXIT
trap 'exit 130' INT TERM

ensure_node_modules
ensure_postgres_installed
PG_FSYNC=off start_cluster postgres-export "$PG_PORT"
ensure_database "$PG_PORT" isobar_export fresh
node_modules/.bin/tsx scripts/fhir-export.ts "$1"
