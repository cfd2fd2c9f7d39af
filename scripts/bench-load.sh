#!/usr/bin/env bash
# Load benchmark: the worklist through the real app beside a bare Express + pg `SELECT 1` route, in
# one run, on a fresh isobar_load database of the test cluster. Prints both and the ratio.
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export ATTACHMENT_DIR="$DATA_DIR/load-attachments"
with_scratch_database isobar_load fresh
node_modules/.bin/tsx scripts/bench-load.ts "$@"
