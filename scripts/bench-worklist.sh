#!/usr/bin/env bash
# Worklist benchmark: a fresh isobar_bench database on the test cluster, 100,000 studies, timed
# HTTP requests against the real app. Stops the cluster afterwards if this script started it.
# ISOBAR_BENCH_KEEP=1 keeps the database for a closer look.
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export ATTACHMENT_DIR="$DATA_DIR/bench-attachments"
SCRATCH_KEEP=${ISOBAR_BENCH_KEEP:-}
with_scratch_database isobar_bench fresh
node_modules/.bin/tsx scripts/bench-worklist.ts "$@"
