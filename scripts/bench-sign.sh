#!/usr/bin/env bash
# Signing benchmark: a fresh isobar_bench_sign database on the test cluster, studies made through the
# API, then timed signatures through HTTP against the real app. Stops the cluster afterwards if this
# script started it. ISOBAR_BENCH_KEEP=1 keeps the database for a closer look.
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export ATTACHMENT_DIR="$DATA_DIR/bench-attachments"
SCRATCH_KEEP=${ISOBAR_BENCH_KEEP:-}
with_scratch_database isobar_bench_sign fresh
node_modules/.bin/tsx scripts/bench-sign.ts "$@"
