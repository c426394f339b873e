#!/usr/bin/env bash
# npm run restore -- <backup dir> [--force]: load a backup made by `npm run backup` into the
# configured database (DATABASE_URL) and DATA_DIR/uploads. Refuses a database that has tables (or
# an uploads dir with files) unless --force, which drops every table first. Checks the SHA-256 of the
# dump, the tar and every upload against the manifest, and the row counts afterwards.
set -euo pipefail
source "$(dirname "$0")/backup-lib.sh"
cd "$ROOT"

SRC="" FORCE=0
for a in "$@"; do case "$a" in --force) FORCE=1 ;; *) SRC="$a" ;; esac; done
[ -n "$SRC" ] || SRC="$(ls -d "$ROOT"/backups/*/ 2>/dev/null | sort | tail -1)"
[ -n "$SRC" ] && [ -f "$SRC/manifest.json" ] || die "usage: npm run restore -- <backup dir> [--force] (no manifest.json in '${SRC}')"
SRC="$(cd "$SRC" && pwd)"

check_file() { node -e '
  const [dir, f] = process.argv.slice(1); const m = require(`${dir}/manifest.json`); const h = require("crypto").createHash("sha256").update(require("fs").readFileSync(`${dir}/${f}`)).digest("hex")
  if (h !== m.files[f]) { console.error(`${f}: SHA-256 differs from the manifest`); process.exit(1) }' "$SRC" "$1" || die "backup $SRC is damaged"; }
check_file database.sql.gz
check_file uploads.tar.gz

TABLES="$(db_tables)"
if [ -n "$TABLES" ]; then
  [ "$FORCE" = 1 ] || die "database $DB_NAME is not empty ($(echo "$TABLES" | wc -l) tables): restore into an empty database, or add --force to replace it"
  log "--force: dropping the $(echo "$TABLES" | wc -l) tables of $DB_NAME"
  sql -e "SET FOREIGN_KEY_CHECKS = 0; $(for t in $TABLES; do printf 'DROP TABLE `%s`; ' "$t"; done)"
fi
if [ -d "$DATA/uploads" ] && [ -n "$(find "$DATA/uploads" -type f -print -quit)" ]; then
  [ "$FORCE" = 1 ] || die "$DATA/uploads has files: add --force to replace them"
  rm -rf "$DATA/uploads"
fi

log "loading the dump into $DB_NAME on $DB_HOST:$DB_PORT_"
# DEFINER clauses name the user that made the backup; the triggers are re-created as the restoring user.
gunzip -c "$SRC/database.sql.gz" | sed -E 's/DEFINER=`[^`]*`@`[^`]*`//g' | sql || die "loading the dump failed"
mkdir -p "$DATA"
tar -C "$DATA" -xzf "$SRC/uploads.tar.gz"

node -e '
  const [dir, counts, uploads] = process.argv.slice(1); const m = require(`${dir}/manifest.json`)
  const c = JSON.parse(counts), u = JSON.parse(uploads); const bad = []
  for (const [t, n] of Object.entries(m.tables)) if (c[t] !== n) bad.push(`table ${t}: ${c[t]} rows, manifest ${n}`)
  for (const [p, h] of Object.entries(m.uploads)) if (u[p] !== h) bad.push(`upload ${p}: ${u[p] ? "hash differs" : "missing"}`)
  if (bad.length) { console.error(bad.join("\n")); process.exit(1) }
  console.error(`[overtone] restored ${Object.keys(m.tables).length} tables and ${Object.keys(m.uploads).length} uploads; counts and hashes match the manifest`)' \
  "$SRC" "$(db_counts)" "$(file_hashes "$DATA/uploads")" || die "the restored data differs from the manifest"
