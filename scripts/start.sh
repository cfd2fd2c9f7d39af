#!/usr/bin/env bash
# npm start: install what is missing, start PostgreSQL, migrate, load the demo, build, serve.
# Ctrl-C stops everything this script started.
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

PG_PORT=${ISOBAR_PG_PORT:-54470}
export PORT=${PORT:-8470}
export HOST=${HOST:-127.0.0.1}
export DATABASE_URL=${DATABASE_URL:-postgres://isobar@127.0.0.1:$PG_PORT/isobar}
export MIGRATION_DATABASE_URL=${MIGRATION_DATABASE_URL:-postgres://isobar_owner@127.0.0.1:$PG_PORT/isobar}

export OIDC_ISSUER=${OIDC_ISSUER:-http://127.0.0.1:8471}

SERVER_PID=
FAKES_PID=
cleaned=0
stop_process() {
  if [[ -n $1 ]] && kill -0 "$1" 2>/dev/null; then
    kill -TERM "$1" 2>/dev/null || true
    wait "$1" 2>/dev/null || true
  fi
}
cleanup() {
  [[ $cleaned -eq 1 ]] && return
  cleaned=1
  stop_process "$SERVER_PID"
  stop_process "$FAKES_PID"
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

# The local stand-ins for hospital services (identity provider), unless a real one is configured.
if [[ -z ${ISOBAR_NO_FAKES:-} ]]; then
  # The admin may read what the local mail stand-in caught (a development aid, off unless asked for).
  export CAUGHT_MAIL_PAGE=${CAUGHT_MAIL_PAGE:-on}
  node_modules/.bin/tsx server/fakes/main.ts &
  FAKES_PID=$!
  for _ in $(seq 1 100); do
    curl -fsS "$OIDC_ISSUER/.well-known/openid-configuration" >/dev/null 2>&1 && break
    kill -0 "$FAKES_PID" 2>/dev/null || fail "the local identity provider stopped during start-up"
    sleep 0.2
  done
fi

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
[[ -n $FAKES_PID ]] && log "demo sign-in: user names ivarga (staff), koduya (physician), mlinde (coder), shalvorsen (chief), tbrandt (admin), pvisitor (no role); password demo"
log "press Ctrl-C to stop the server, the local services and the database"
wait -n "$SERVER_PID" ${FAKES_PID:+"$FAKES_PID"}
