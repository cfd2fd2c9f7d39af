#!/usr/bin/env bash
# Audit search benchmark: a fresh isobar_audit_bench database on the test cluster, the audit trail of
# 1,000,000 studies, timed HTTP requests against the real app. Stops the cluster afterwards if this script started it.
# ISOBAR_BENCH_KEEP=1 keeps the database for a closer look; ISOBAR_BENCH_REUSE=1 times a kept one again
# without seeding anew (a seed takes about a quarter of an hour on two cores).
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export ATTACHMENT_DIR="$DATA_DIR/bench-audit-attachments"
SCRATCH_KEEP=${ISOBAR_BENCH_KEEP:-}${ISOBAR_BENCH_REUSE:-}
with_scratch_database isobar_audit_bench "$([[ -n ${ISOBAR_BENCH_REUSE:-} ]] || echo fresh)"
node_modules/.bin/tsx scripts/bench-audit.ts "$@"
