#!/usr/bin/env bash
# Turnaround benchmark: a fresh isobar_bench_turnaround database on the test cluster, 1,000,000
# studies over ten years seeded in SQL, timed requests for a 12-month range against the real app.
# Stops the cluster afterwards if this script started it. ISOBAR_BENCH_KEEP=1 keeps the database;
# ISOBAR_BENCH_REUSE=1 times a kept one again without seeding anew (when it holds BENCH_STUDIES studies).
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export ATTACHMENT_DIR="$DATA_DIR/bench-attachments"
SCRATCH_KEEP=${ISOBAR_BENCH_KEEP:-}${ISOBAR_BENCH_REUSE:-}
with_scratch_database isobar_bench_turnaround "$([[ -n ${ISOBAR_BENCH_REUSE:-} ]] || echo fresh)"
node_modules/.bin/tsx scripts/bench-turnaround.ts "$@"
