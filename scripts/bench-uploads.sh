#!/usr/bin/env bash
# Memory under concurrent uploads: rounds of concurrent 19 MB attachment uploads (a PDF printout and
# a CSV export) through the real app, on a fresh isobar_uploads database of the test cluster; prints
# the server's resident memory before, at its peak and after. Target: memory flat (peak growth well
# under the sum of the files in flight, < 100 MB).
# BENCH_UPLOADS (default 8) at once, BENCH_UPLOAD_MB (default 19), BENCH_UPLOAD_ROUNDS (default 3).
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export ATTACHMENT_DIR="$DATA_DIR/uploads-bench-attachments"
with_scratch_database isobar_uploads fresh
# The scratch database's own cleanup, and the uploaded files with it.
trap 'rm -rf "$ATTACHMENT_DIR"; scratch_cleanup' EXIT
node_modules/.bin/tsx scripts/bench-uploads.ts "$@"
