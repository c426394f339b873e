#!/usr/bin/env bash
# npm run bench: a throw-away MariaDB (like test.sh) with the demo lab plus the large data set
# (bench/seed-large.ts), the server and client built into the run dir, the built server on a free
# port, then bench/index.ts (engine, API under autocannon beside bare mysql2, Excel export, client
# gzip sizes) prints ONE table. Everything is torn down at the end (KEEP_BENCH_DATA=1 keeps the dir).
# Heavy: run it once, on a quiet machine. BENCH_SECONDS sets the autocannon time per route (5).
set -uo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

ensure_node_modules
ensure_mariadb_installed

export NODE_ENV=production
throwaway_lab bench overtone_bench KEEP_BENCH_DATA
log "seeding the large data set"
SEED_JSON="$(./node_modules/.bin/tsx bench/seed-large.ts)" || die "large seed failed"

log "building the client and the server into $TMP (dist/ is left alone)"
./node_modules/.bin/vite build --logLevel warn --outDir "$TMP/client" --emptyOutDir || die "client build failed"
node -e '
  import("esbuild").then(({ build }) => build({ entryPoints: ["server/index.ts"], bundle: true, platform: "node", format: "esm", target: "node20",
    packages: "external", sourcemap: true, outfile: process.argv[1], logLevel: "warning" }))' "$TMP/server/index.js" || die "server build failed"

PORT="$(free_port)"
PORT="$PORT" SMTP_SINK_PORT=0 LOG_LEVEL=error node --enable-source-maps "$TMP/server/index.js" > "$TMP/server.log" 2>&1 &
SERVER_PID=$!
for _ in $(seq 1 150); do curl -sf "http://127.0.0.1:$PORT/api/health" >/dev/null 2>&1 && break; sleep 0.2; done
curl -sf "http://127.0.0.1:$PORT/api/health" >/dev/null || { cat "$TMP/server.log"; die "the bench server did not start"; }

ADMIN_EMAIL="$(./node_modules/.bin/tsx -e 'import { DEMO_PEOPLE } from "./server/db/seed/people"; console.log(DEMO_PEOPLE.find((p) => p.roles.includes("admin"))!.email)')"
ADMIN_PW="$(./node_modules/.bin/tsx -e 'import { DEMO_PASSWORD } from "./server/db/seed/people"; console.log(DEMO_PASSWORD)')"

BENCH_BASE_URL="http://127.0.0.1:$PORT" BENCH_CLIENT_DIR="$TMP/client" BENCH_SEED_JSON="$SEED_JSON" \
  BENCH_EMAIL="$ADMIN_EMAIL" BENCH_PASSWORD="$ADMIN_PW" \
  ./node_modules/.bin/tsx bench/index.ts
