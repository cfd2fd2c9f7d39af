#!/usr/bin/env bash
# npm run report:export -- DIR: the demo scenario in a fresh isobar_export database on the test
# cluster, its signed and amended studies signed through the signing code, then every signed version's
# PDF and narrative written to DIR as <accession>-v<version>.pdf / .html / .txt, with SHA256SUMS.
# Stops the cluster afterwards if this script started it.
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

[[ $# -eq 1 && -n $1 ]] || fail "usage: npm run report:export -- DIR"
# A relative DIR is taken from where npm was called (npm runs scripts from the project folder).
case $1 in
  /*) OUT_DIR=$1 ;;
  *) OUT_DIR="${INIT_CWD:-$PWD}/$1" ;;
esac

with_scratch_database isobar_export fresh
node_modules/.bin/tsx scripts/report-export.ts "$OUT_DIR"
