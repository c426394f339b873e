#!/usr/bin/env bash
# npm run backup: a consistent dump of the app database (mariadb-dump --single-transaction, with the
# audit triggers) plus a tar of DATA_DIR/uploads, into backups/<UTC timestamp>/ (BACKUP_DIR to move
# it), with manifest.json: row counts per table and the SHA-256 of the dump, the tar and every upload.
# Prints the backup directory on stdout. Restore with `npm run restore -- <dir>`.
set -euo pipefail
source "$(dirname "$0")/backup-lib.sh"
cd "$ROOT"

STAMP="$(date -u +%Y%m%dT%H%M%SZ)"
OUT="${BACKUP_DIR:-$ROOT/backups}/$STAMP"
mkdir -p "$OUT"
log "backing up database $DB_NAME on $DB_HOST:$DB_PORT_ and $DATA/uploads into $OUT"
# Counts first, then the dump: both are snapshots; with the app writing meanwhile the dump may hold
# rows the counts do not (restore reports any difference rather than failing silently).
COUNTS="$(db_counts)"
mariadb-dump --no-defaults -h "$DB_HOST" -P "$DB_PORT_" -u "$DB_USER" --single-transaction --quick --triggers --routines \
  --no-tablespaces --hex-blob --default-character-set=utf8mb4 "$DB_NAME" | gzip -6 > "$OUT/database.sql.gz"
[ "${PIPESTATUS[0]}" = 0 ] || die "mariadb-dump failed"
if [ -d "$DATA/uploads" ]; then tar -C "$DATA" -czf "$OUT/uploads.tar.gz" uploads; else tar -czf "$OUT/uploads.tar.gz" -T /dev/null; fi
UPLOADS="$(file_hashes "$DATA/uploads")"
node -e '
  const [out, stamp, db, counts, uploads] = process.argv.slice(1); const fs = require("fs"), crypto = require("crypto")
  const sha = (f) => crypto.createHash("sha256").update(fs.readFileSync(`${out}/${f}`)).digest("hex")
  const m = { format: 1, createdAt: stamp, database: db, tables: JSON.parse(counts), uploads: JSON.parse(uploads),
    files: { "database.sql.gz": sha("database.sql.gz"), "uploads.tar.gz": sha("uploads.tar.gz") } }
  fs.writeFileSync(`${out}/manifest.json`, JSON.stringify(m, null, 2) + "\n")' "$OUT" "$STAMP" "$DB_NAME" "$COUNTS" "$UPLOADS"
log "backup done: $(du -sh "$OUT" | cut -f1), $(node -e 'const m=require(process.argv[1]);console.log(Object.keys(m.tables).length+" tables, "+Object.keys(m.uploads).length+" uploads")' "$OUT/manifest.json")"
echo "$OUT"
