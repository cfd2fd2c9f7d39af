#!/usr/bin/env bash
# First-load benchmark on a phone profile: Isobar's worklist against a bare Expo Router app built with
# the same versions (scripts/bare-app), both served precompressed. A fresh isobar_firstload database
# on the test cluster with the demo scenario and a page of extra studies. Stops the cluster afterwards
# if this script started it.
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

export ATTACHMENT_DIR="$DATA_DIR/bench-attachments"
export ISOBAR_BARE_DIST="$DATA_DIR/bare-dist"

ensure_node_modules
ensure_chromium
ensure_web_build
ensure_bare_web_build
with_scratch_database isobar_firstload fresh
node_modules/.bin/tsx scripts/bench-first-load.ts "$@"
