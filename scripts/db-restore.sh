#!/usr/bin/env bash
# npm run db:restore -- FILE: replaces the database and the attachment folder with a backup made by
# db:backup. Stop the server first. The folder being replaced is kept beside it (…before-restore-TIME).
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

in=${1:-}
[[ -n $in && -f $in ]] || fail "usage: npm run db:restore -- FILE (a file written by npm run db:backup)"
in=$(realpath "$in")
PG_PORT=${ISOBAR_PG_PORT:-54470}
DB_NAME=${ISOBAR_DB_NAME:-isobar}
ATTACHMENTS=$(realpath -m "${ATTACHMENT_DIR:-storage/attachments}")
export DATABASE_URL=${DATABASE_URL:-postgres://isobar@127.0.0.1:$PG_PORT/$DB_NAME}
export MIGRATION_DATABASE_URL=${MIGRATION_DATABASE_URL:-postgres://isobar_owner@127.0.0.1:$PG_PORT/$DB_NAME}

work=$(mktemp -d)
trap 'rm -rf "$work"; stop_cluster' EXIT
tar -C "$work" -xf "$in" MANIFEST database.dump attachments || fail "$in is not a backup made by npm run db:backup"
grep -q '^isobar backup$' "$work/MANIFEST" || fail "$in is not a backup made by npm run db:backup"

ensure_postgres_installed
if ! "$PG_BIN/pg_isready" -q -h 127.0.0.1 -p "$PG_PORT"; then
  start_cluster postgres "$PG_PORT"
fi

log "restoring database $DB_NAME"
ensure_roles "$PG_PORT"
psql_admin "$PG_PORT" "DROP DATABASE IF EXISTS $DB_NAME WITH (FORCE)"
psql_admin "$PG_PORT" "CREATE DATABASE $DB_NAME OWNER isobar_owner"
# Everything is recreated by the owner role; the server role's privileges are granted afresh below.
"$PG_BIN/pg_restore" -h 127.0.0.1 -p "$PG_PORT" -U isobar_owner -d "$DB_NAME" --no-owner --no-privileges --exit-on-error "$work/database.dump"

if [[ -d $ATTACHMENTS ]] && [[ -n $(ls -A "$ATTACHMENTS" 2>/dev/null) ]]; then
  aside="$ATTACHMENTS.before-restore-$(date -u +%Y%m%dT%H%M%SZ)"
  mv "$ATTACHMENTS" "$aside"
  log "the previous attachment folder is kept in $aside"
fi
mkdir -p "$(dirname "$ATTACHMENTS")"
cp -a "$work/attachments" "$ATTACHMENTS"

node_modules/.bin/tsx server/cli/prepare-database.ts
log "restored $DB_NAME and $(find "$ATTACHMENTS" -type f | wc -l) attachment files from $in"
