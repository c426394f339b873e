# Shared helpers of backup.sh and restore.sh (sourced). The database is the one DATABASE_URL names
# (default: the npm start instance in .data); uploads are DATA_DIR/uploads.
source "$(dirname "${BASH_SOURCE[0]}")/lib.sh"

DATA="${DATA_DIR:-$ROOT/.data}"
if [ -z "${DATABASE_URL:-}" ] && [ -f "$DATA/db-password" ]; then
  DATABASE_URL="mysql://overtone:$(cat "$DATA/db-password")@127.0.0.1:${DB_PORT:-33306}/overtone"
fi
[ -n "${DATABASE_URL:-}" ] || die "DATABASE_URL is not set (and there is no $DATA/db-password)"

# Split the URL once; the password goes to the clients through MYSQL_PWD, never on the command line.
# A URL listing several hosts (a Galera cluster) is read from its first host: every node holds all data.
eval "$(node -e '
  const u = new URL(process.argv[1].replace(/@([^/@,]+),[^/@]*\//, "@$1/")); const q = (s) => "\x27" + s.replace(/\x27/g, "\x27\\\x27\x27") + "\x27"
  console.log(`DB_HOST=${q(u.hostname)} DB_PORT_=${q(u.port || "3306")} DB_USER=${q(decodeURIComponent(u.username))} DB_NAME=${q(decodeURIComponent(u.pathname.slice(1)))}`)
  console.log(`export MYSQL_PWD=${q(decodeURIComponent(u.password))}`)' "$DATABASE_URL")"
sql() { mariadb --no-defaults -h "$DB_HOST" -P "$DB_PORT_" -u "$DB_USER" --batch --skip-column-names "$DB_NAME" "$@"; }

# Base tables of the database, one a line.
db_tables() { sql -e "SELECT table_name FROM information_schema.tables WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE' ORDER BY table_name"; }

# JSON object {table: rowCount} read inside one consistent snapshot.
db_counts() {
  local q="SET SESSION TRANSACTION ISOLATION LEVEL REPEATABLE READ; START TRANSACTION WITH CONSISTENT SNAPSHOT;"
  for t in $(db_tables); do q="$q SELECT '$t', COUNT(*) FROM \`$t\`;"; done
  sql -e "$q COMMIT;" | node -e 'let s="";process.stdin.on("data",d=>s+=d).on("end",()=>{const o={};for(const l of s.trim().split("\n")){if(!l)continue;const [t,n]=l.split("\t");o[t]=Number(n)}console.log(JSON.stringify(o))})'
}

# JSON object {relative path: sha256} of every file under $1.
file_hashes() {
  node -e '
    const fs = require("fs"), path = require("path"), crypto = require("crypto"); const root = process.argv[1]; const out = {}
    const walk = (d) => { for (const e of fs.existsSync(d) ? fs.readdirSync(d, { withFileTypes: true }) : []) { const p = path.join(d, e.name)
      if (e.isDirectory()) walk(p); else if (e.isFile()) out[path.relative(root, p)] = crypto.createHash("sha256").update(fs.readFileSync(p)).digest("hex") } }
    walk(root); console.log(JSON.stringify(Object.fromEntries(Object.entries(out).sort())))' "$1"
}
