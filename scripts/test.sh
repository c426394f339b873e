#!/usr/bin/env bash
# npm test: the same set-up as npm start in a throw-away data dir, then type check, Vitest (unit + API
# on the real MariaDB), Playwright e2e in Debian's Chromium and the Galera cluster tests (scripts/cluster.sh).
# Ends with an "N passed, N failed" line.
set -uo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

ensure_node_modules
ensure_mariadb_installed
ensure_chromium_installed

export NODE_ENV=test
throwaway_lab run overtone_test KEEP_TEST_DATA

EXTRA_FAILED=0
log "type check (vue-tsc)"
if ! ./node_modules/.bin/vue-tsc --noEmit -p tsconfig.json; then log "type check FAILED"; EXTRA_FAILED=$((EXTRA_FAILED+1)); fi
log "lint (ESLint, Prettier)"
if ! npm run --silent lint; then log "lint FAILED"; EXTRA_FAILED=$((EXTRA_FAILED+1)); fi

log "unit and API tests (Vitest)"
./node_modules/.bin/vitest run --reporter=default --reporter=json --outputFile.json="$TMP/vitest.json"

log "building the app for the browser tests"
if ./node_modules/.bin/vite build --logLevel warn && node scripts/build-server.mjs; then
  PORT="$(free_port)"
  SINK_PORT="$(free_port)"
  PORT="$PORT" SMTP_SINK_PORT="$SINK_PORT" LOG_LEVEL=error node --enable-source-maps dist/server/index.js > "$TMP/server.log" 2>&1 &
  SERVER_PID=$!
  for _ in $(seq 1 100); do curl -sf "http://127.0.0.1:$PORT/api/health" >/dev/null 2>&1 && break; sleep 0.1; done
  log "browser tests (Playwright, $(/usr/bin/chromium --version 2>/dev/null | head -1))"
  E2E_BASE_URL="http://127.0.0.1:$PORT" PLAYWRIGHT_JSON_OUTPUT_NAME="$TMP/playwright.json" \
    ./node_modules/.bin/playwright test --reporter=list,json
  [ -s "$TMP/server.log" ] && { log "server log:"; tail -30 "$TMP/server.log"; }
  kill -INT "$SERVER_PID" 2>/dev/null; wait "$SERVER_PID" 2>/dev/null; SERVER_PID=""
else
  log "build FAILED"; EXTRA_FAILED=$((EXTRA_FAILED+1))
fi

# Several app servers on a real three-node Galera cluster behind haproxy (scripts/cluster.sh, about a
# minute here, cut off after 10). A cluster that cannot start is a failure, never a skip: its report
# is then missing and the summary counts it.
log "cluster tests (Galera, two app servers behind haproxy)"
CLUSTER_JSON="$TMP/cluster.json" CLUSTER_DIR="$TMP/cluster" KEEP_CLUSTER_DATA="${KEEP_TEST_DATA:-0}" \
  timeout --signal=TERM 600 bash scripts/cluster.sh || log "cluster tests FAILED (or did not run)"

node scripts/test-summary.mjs "$TMP/vitest.json" "$TMP/playwright.json" "$EXTRA_FAILED" "$TMP/cluster.json"
