#!/usr/bin/env bash
# Setup shared by `npm start` and `npm test`: dependencies, PostgreSQL, chromium, web build.
# Everything is installed by these functions on a fresh machine and reused when already there.
set -euo pipefail

ROOT=$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)
DATA_DIR=${ISOBAR_DATA_DIR:-$ROOT/.data}
mkdir -p "$DATA_DIR"

log() { printf '[isobar] %s\n' "$*"; }
fail() { printf '[isobar] error: %s\n' "$*" >&2; exit 1; }

# Installing system packages needs root; CI and the development machines run as root.
apt_install() {
  [[ $(id -u) -eq 0 ]] || fail "installing $* needs root: run 'sudo apt-get install -y $*' once, then try again"
  if [[ -z ${ISOBAR_APT_UPDATED:-} ]]; then
    log "refreshing Debian's package lists"
    apt-get update -qq
    ISOBAR_APT_UPDATED=1
  fi
  log "installing $* from Debian's packages"
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "$@" >/dev/null
}

# npm ci whenever the lock file changed since the last install.
ensure_node_modules() {
  local stamp="$ROOT/node_modules/.isobar-lock-sha" want
  want=$(sha1sum "$ROOT/package-lock.json" | cut -d' ' -f1)
  if [[ ! -f $stamp || $(cat "$stamp") != "$want" ]]; then
    log "installing dependencies (npm ci)"
    (cd "$ROOT" && npm ci --no-audit --no-fund --loglevel=error)
    echo "$want" >"$stamp"
  fi
}

pg_bin_dir() { ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1; }

ensure_postgres_installed() {
  if [[ -z $(pg_bin_dir) || ! -x "$(pg_bin_dir)/initdb" ]]; then
    apt_install postgresql
  fi
  PG_BIN=$(pg_bin_dir)
}

ensure_chromium() {
  command -v chromium >/dev/null 2>&1 || apt_install chromium
}

# pdftoppm / pdftotext read the signed PDFs back in the tests (Debian's poppler-utils).
ensure_poppler() {
  command -v pdftoppm >/dev/null 2>&1 || apt_install poppler-utils
}

# PostgreSQL refuses to run as root: run its programs as the `postgres` user when we are root.
as_pg() {
  if [[ $(id -u) -eq 0 ]]; then runuser -u postgres -- "$@"; else "$@"; fi
}

# The private cluster lives under the project (.data/, ignored by git). When the postgres user
# cannot reach the project folder (e.g. a clone inside a 0700 temporary folder), it lives in
# /var/tmp under a name derived from the project path instead.
cluster_base() {
  if [[ $(id -u) -ne 0 ]] || runuser -u postgres -- test -x "$DATA_DIR" 2>/dev/null; then
    echo "$DATA_DIR"
  else
    local dir="/var/tmp/isobar-$(echo "$ROOT" | sha1sum | cut -c1-12)"
    mkdir -p "$dir" && chmod 755 "$dir"
    echo "$dir"
  fi
}

# start_cluster NAME PORT: sets PG_DIR and PG_STARTED (1 when this script started it).
start_cluster() {
  local name=$1 port=$2 base
  base=$(cluster_base)
  PG_DIR="$base/$name"
  PG_STARTED=0
  if [[ ! -f $PG_DIR/PG_VERSION ]]; then
    log "creating a PostgreSQL cluster in $PG_DIR"
    mkdir -p "$PG_DIR"
    [[ $(id -u) -eq 0 ]] && chown postgres:postgres "$PG_DIR"
    chmod 700 "$PG_DIR"
    as_pg "$PG_BIN/initdb" -D "$PG_DIR" -U postgres --auth=trust --encoding=UTF8 --locale=C.UTF-8 >/dev/null
  fi
  if as_pg "$PG_BIN/pg_ctl" -D "$PG_DIR" status >/dev/null 2>&1; then
    log "PostgreSQL already running on 127.0.0.1:$port (reused)"
    return
  fi
  # Listens on loopback only; the socket stays inside the cluster folder.
  as_pg "$PG_BIN/pg_ctl" -D "$PG_DIR" -l "$PG_DIR/server.log" -w -t 30 \
    -o "-c listen_addresses=127.0.0.1 -p $port -k $PG_DIR -c fsync=${PG_FSYNC:-on}" start >/dev/null \
    || { tail -n 20 "$PG_DIR/server.log" >&2; fail "PostgreSQL did not start (port $port in use?)"; }
  PG_STARTED=1
  log "PostgreSQL started on 127.0.0.1:$port"
}

stop_cluster() {
  if [[ ${PG_STARTED:-0} -eq 1 && -n ${PG_DIR:-} ]]; then
    as_pg "$PG_BIN/pg_ctl" -D "$PG_DIR" -m fast -w stop >/dev/null 2>&1 || true
    PG_STARTED=0
    log "PostgreSQL stopped"
  fi
}

psql_admin() { # PORT SQL
  "$PG_BIN/psql" -h 127.0.0.1 -p "$1" -U postgres -d postgres -v ON_ERROR_STOP=1 -qtAc "$2"
}

# Two roles: `isobar_owner` owns the database and its schema and runs the migrations;
# `isobar` is the server's role, which may only read and write rows (the privileges are granted
# by the owner after each migration run: server/db/privileges.ts).
ensure_roles() {
  local port=$1 role
  for role in isobar_owner isobar; do
    if [[ -z $(psql_admin "$port" "SELECT 1 FROM pg_roles WHERE rolname = '$role'") ]]; then
      psql_admin "$port" "CREATE ROLE $role LOGIN NOSUPERUSER NOCREATEDB NOCREATEROLE"
    fi
  done
}

# ensure_database PORT NAME [fresh]: `isobar_owner` owns the database; `fresh` drops it first.
# A database from before the split (owned by `isobar`) is handed over to the owner role.
ensure_database() {
  local port=$1 name=$2 fresh=${3:-}
  ensure_roles "$port"
  if [[ $fresh == fresh ]]; then
    psql_admin "$port" "DROP DATABASE IF EXISTS $name WITH (FORCE)"
  fi
  if [[ -z $(psql_admin "$port" "SELECT 1 FROM pg_database WHERE datname = '$name'") ]]; then
    psql_admin "$port" "CREATE DATABASE $name OWNER isobar_owner"
    log "database $name created"
  elif [[ $(psql_admin "$port" "SELECT pg_get_userbyid(datdba) FROM pg_database WHERE datname = '$name'") != isobar_owner ]]; then
    log "handing database $name over to the owner role"
    "$PG_BIN/psql" -h 127.0.0.1 -p "$port" -U postgres -d "$name" -v ON_ERROR_STOP=1 -qtAc \
      "ALTER DATABASE $name OWNER TO isobar_owner; REASSIGN OWNED BY isobar TO isobar_owner;"
  fi
}

# Rebuild the web app only when its sources changed since the last export.
ensure_web_build() {
  local want
  want=$(cd "$ROOT" && find app components shared assets metro app.json babel.config.js metro.config.cjs tsconfig.json package-lock.json scripts/precompress-web.ts scripts/preload-web.ts \
    -type f -not -path '*/node_modules/*' -print0 2>/dev/null | sort -z | xargs -0 sha1sum | sha1sum | cut -c1-40)
  if [[ -f $ROOT/dist/.build-hash && $(cat "$ROOT/dist/.build-hash") == "$want" ]]; then
    return
  fi
  log "building the web app (expo export)"
  rm -rf "$ROOT/dist"
  web_export "$ROOT" "$ROOT/dist" "$DATA_DIR/web-build.log" scripts/preload-web.ts
  echo "$want" >"$ROOT/dist/.build-hash"
}

# web_export PROJECT OUT LOG [STEP...]: the production web export of an Expo project, each STEP
# (a script given the output folder) run over it, then its precompressed copies.
web_export() {
  local project=$1 out=$2 logfile=$3 step
  shift 3
  (cd "$project" && CI=1 EXPO_NO_TELEMETRY=1 "$ROOT/node_modules/.bin/expo" export --platform web --output-dir "$out" >"$logfile" 2>&1) \
    || { tail -n 40 "$logfile" >&2; fail "the web build of $project failed (full log: $logfile)"; }
  for step in "$@"; do
    (cd "$ROOT" && node_modules/.bin/tsx "$step" "$out" >>"$logfile" 2>&1) || { tail -n 20 "$logfile" >&2; fail "$step failed on the web build of $project"; }
  done
  (cd "$ROOT" && node_modules/.bin/tsx scripts/precompress-web.ts "$out" >>"$logfile") || fail "compressing the web build of $project failed"
}

# The first-load benchmark's baseline: a bare Expo Router app (scripts/bare-app) built with the
# installed versions, into .data/bare-dist.
ensure_bare_web_build() {
  local want out="$DATA_DIR/bare-dist"
  want=$(cd "$ROOT" && find scripts/bare-app package-lock.json scripts/precompress-web.ts -type f -not -path '*/.expo/*' -print0 | sort -z | xargs -0 sha1sum | sha1sum | cut -c1-40)
  if [[ -f $out/.build-hash && $(cat "$out/.build-hash") == "$want" ]]; then
    return
  fi
  log "building the bare baseline app (expo export)"
  rm -rf "$out"
  web_export "$ROOT/scripts/bare-app" "$out" "$DATA_DIR/bare-build.log"
  echo "$want" >"$out/.build-hash"
}

# with_scratch_database NAME [fresh]: a database of its own for a benchmark or an export, on the
# test cluster. Exports NODE_ENV=test, DATABASE_URL and MIGRATION_DATABASE_URL for NAME on PG_PORT
# (SCRATCH_PG_PORT when set, else ISOBAR_TEST_PG_PORT, else 54471), starts the cluster SCRATCH_CLUSTER (default postgres-test)
# and makes the database (`fresh`: dropped first). On exit the database is dropped, unless
# SCRATCH_KEEP is non-empty, and the cluster stopped if this script started it.
with_scratch_database() {
  SCRATCH_DB=$1
  local fresh=${2:-}
  PG_PORT=${SCRATCH_PG_PORT:-${ISOBAR_TEST_PG_PORT:-54471}}
  export NODE_ENV=test
  export DATABASE_URL=postgres://isobar@127.0.0.1:$PG_PORT/$SCRATCH_DB
  export MIGRATION_DATABASE_URL=postgres://isobar_owner@127.0.0.1:$PG_PORT/$SCRATCH_DB
  trap scratch_cleanup EXIT
  trap 'exit 130' INT TERM
  ensure_node_modules
  ensure_postgres_installed
  start_cluster "${SCRATCH_CLUSTER:-postgres-test}" "$PG_PORT"
  ensure_database "$PG_PORT" "$SCRATCH_DB" "$fresh"
}

scratch_cleanup() {
  if [[ -z ${SCRATCH_KEEP:-} && -n ${PG_BIN:-} && -n ${SCRATCH_DB:-} ]]; then
    psql_admin "$PG_PORT" "DROP DATABASE IF EXISTS $SCRATCH_DB WITH (FORCE)" 2>/dev/null || true
  fi
  stop_cluster
}
