#!/usr/bin/env bash
# npm test: the same setup as npm start, with its own database, then every test.
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

PG_PORT=${ISOBAR_TEST_PG_PORT:-54471}
export NODE_ENV=test
export DATABASE_URL=postgres://isobar@127.0.0.1:$PG_PORT/isobar_test
export MIGRATION_DATABASE_URL=postgres://isobar_owner@127.0.0.1:$PG_PORT/isobar_test
export ATTACHMENT_DIR="$DATA_DIR/test-attachments"

# The test cluster holds nothing worth keeping: one that had to live outside the project is removed.
finish() {
  stop_cluster
  if [[ ${PG_DIR:-} == /var/tmp/isobar-*/postgres-test ]]; then rm -rf "$PG_DIR"; rmdir "$(dirname "$PG_DIR")" 2>/dev/null || true; fi
}
trap finish EXIT
trap 'exit 130' INT TERM

began=$(date +%s)
ensure_node_modules
ensure_postgres_installed
ensure_chromium
ensure_poppler
PG_FSYNC=off start_cluster postgres-test "$PG_PORT"
ensure_database "$PG_PORT" isobar_test fresh
ensure_web_build

if [[ -x ../shared/tools/name-scan ]] || [[ -f ../shared/tools/name-scan ]]; then
  log "checking for names to avoid"
  python3 ../shared/tools/name-scan --repo . --commits | tail -n 20
fi

log "type-checking"
node_modules/.bin/tsc --noEmit

log "running the tests"
report="$DATA_DIR/vitest-report.json"
rm -f "$report"
set +e
node_modules/.bin/vitest run --reporter=default --reporter=json --outputFile.json="$report" "$@"
status=$?
set -e
if [[ -f $report ]]; then
  node -e '
    const r = JSON.parse(require("fs").readFileSync(process.argv[1], "utf8"));
    console.log(`${r.numPassedTests} passed, ${r.numFailedTests} failed, ${r.numPendingTests + r.numTodoTests} skipped`);
  ' "$report"
fi
log "npm test finished in $(( $(date +%s) - began )) s"
exit $status
