#!/usr/bin/env bash
# npm start: install what is missing, start PostgreSQL, migrate, load the demo, build, serve.
# Ctrl-C stops everything this script started.
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

PG_PORT=${ISOBAR_PG_PORT:-54470}
export PORT=${PORT:-8470}
export HOST=${HOST:-127.0.0.1}
export DATABASE_URL=${DATABASE_URL:-postgres://isobar@127.0.0.1:$PG_PORT/isobar}

SERVER_PID=
cleaned=0
cleanup() {
  [[ $cleaned -eq 1 ]] && return
  cleaned=1
  if [[ -n $SERVER_PID ]] && kill -0 "$SERVER_PID" 2>/dev/null; then
    kill -TERM "$SERVER_PID" 2>/dev/null || true
    wait "$SERVER_PID" 2>/dev/null || true
  fi
  stop_cluster
}
trap cleanup EXIT
trap 'exit 130' INT TERM

began=$(date +%s)
ensure_node_modules
ensure_postgres_installed
start_cluster postgres "$PG_PORT"
ensure_database "$PG_PORT" isobar
node_modules/.bin/tsx server/cli/prepare-database.ts --demo
ensure_web_build

node_modules/.bin/tsx server/main.ts &
SERVER_PID=$!
for _ in $(seq 1 100); do
  if curl -fsS "http://$HOST:$PORT/api/health" >/dev/null 2>&1; then break; fi
  kill -0 "$SERVER_PID" 2>/dev/null || fail "the server stopped during start-up (see the messages above)"
  sleep 0.2
done
log "ready in $(( $(date +%s) - began )) s"
echo
echo "    Isobar is running at  ${PUBLIC_URL:-http://$HOST:$PORT}"
echo
log "press Ctrl-C to stop the server and the database"
wait "$SERVER_PID"
