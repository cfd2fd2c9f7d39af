#!/usr/bin/env bash
# npm run db:backup -- FILE: one archive (tar) holding the database (pg_dump, custom format) and
# every attachment file. Consistent when the server is stopped; with the server running, an
# attachment uploaded during the backup may be missing from it (its row then points nowhere).
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

out=${1:-}
[[ -n $out ]] || fail "usage: npm run db:backup -- FILE"
out=$(realpath -m "$out")
PG_PORT=${ISOBAR_PG_PORT:-54470}
DB_NAME=${ISOBAR_DB_NAME:-isobar}
ATTACHMENTS=$(realpath -m "${ATTACHMENT_DIR:-storage/attachments}")

ensure_postgres_installed
if ! "$PG_BIN/pg_isready" -q -h 127.0.0.1 -p "$PG_PORT"; then
  start_cluster postgres "$PG_PORT"
  trap stop_cluster EXIT
fi

work=$(mktemp -d)
trap 'rm -rf "$work"; stop_cluster' EXIT
log "dumping database $DB_NAME"
"$PG_BIN/pg_dump" -h 127.0.0.1 -p "$PG_PORT" -U postgres -d "$DB_NAME" --format=custom --file="$work/database.dump"
mkdir -p "$work/attachments"
if [[ -d $ATTACHMENTS ]]; then
  # The stored files only (incoming uploads are not yet attachments).
  (cd "$ATTACHMENTS" && find . -mindepth 1 -maxdepth 1 -type d ! -name incoming -exec cp -a {} "$work/attachments/" \;)
fi
files=$(find "$work/attachments" -type f | wc -l)
printf 'isobar backup\ndatabase=%s\ncreated=%s\nattachments=%s\n' "$DB_NAME" "$(date -u +%FT%TZ)" "$files" >"$work/MANIFEST"
tar -C "$work" -cf "$out.partial" MANIFEST database.dump attachments
mv "$out.partial" "$out"
log "backup written to $out ($files attachment files)"
