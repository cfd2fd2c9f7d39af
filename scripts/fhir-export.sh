#!/usr/bin/env bash
# npm run fhir:export -- DIR: the FHIR bundle of every signed demo study version, written into DIR.
# Needs nothing running: its own PostgreSQL cluster (.data/postgres-export, port ISOBAR_EXPORT_PG_PORT,
# default 54472) with a fresh isobar_export database, the migrations and the demo scenario (kept
# afterwards). Stops the cluster afterwards if this script started it.
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

[[ $# -eq 1 && $1 != -* ]] || fail "usage: npm run fhir:export -- DIR"

export ATTACHMENT_DIR="$DATA_DIR/export-attachments"
SCRATCH_PG_PORT=${ISOBAR_EXPORT_PG_PORT:-54472} SCRATCH_CLUSTER=postgres-export SCRATCH_KEEP=1 PG_FSYNC=off
with_scratch_database isobar_export fresh
node_modules/.bin/tsx scripts/fhir-export.ts "$1"
