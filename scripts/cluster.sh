#!/usr/bin/env bash
# npm run test:cluster: a real three-node MariaDB Galera cluster on loopback ports, two app servers
# (the built dist/server/index.js) on different nodes behind haproxy (HTTP, round robin, no
# stickiness), the tests of tests/cluster/ through the proxy, then everything torn down (also on
# failure or ^C). Prints the cluster size it saw and an "N passed, N failed" line; exits non-zero
# when anything failed or the cluster could not start (never skips).
#
#   CLUSTER_DIR       where the nodes' data lives (default .test-data/cluster; wiped at the start)
#   KEEP_CLUSTER_DATA=1  keep it afterwards for a look
#   CLUSTER_JSON      also write the Vitest JSON report here (scripts/test.sh reads it)
#
# `scripts/cluster.sh bench` (npm run bench:cluster) starts node 1 alone instead and runs
# bench/galera.ts: write throughput through the proxy on one node, then on three (it starts nodes 2
# and 3), then the failover time when a node is killed.
set -uo pipefail
MODE="${1:-test}"
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

CL="${CLUSTER_DIR:-$ROOT/.test-data/cluster}"
DB=overtone_cluster
DB_USER=overtone_cluster
DB_PW=cluster-only-pw
SST_METHOD=rsync
NODES=(1 2 3)
APP_PIDS=()
PROXY_PID=""
START_SECONDS=$SECONDS
# The nodes run as Debian's mysql user (as the packaged service does): rsync SST starts an rsync
# daemon as the node's user, and one started as root would switch to "nobody" and could not write
# the joiner's data dir.
NODE_USER=mysql
id "$NODE_USER" >/dev/null 2>&1 || NODE_USER=root

ensure_galera_installed() {
  [ -f /usr/lib/galera/libgalera_smm.so ] || apt_install galera-4
  [ -f /usr/lib/galera/libgalera_smm.so ] || die "galera-4 is installed but /usr/lib/galera/libgalera_smm.so is missing"
  # rsync SST needs rsync; mariabackup SST would need mariadb-backup and socat.
  if command -v rsync >/dev/null; then SST_METHOD=rsync
  elif command -v mariabackup >/dev/null && command -v socat >/dev/null; then SST_METHOD=mariabackup
  else apt_install rsync; SST_METHOD=rsync; fi
  command -v ss >/dev/null || command -v lsof >/dev/null || apt_install iproute2
}

node_dir() { echo "$CL/node$1"; }
node_sock() { echo "$CL/node$1/run/mysqld.sock"; }
node_sql() { local i="$1"; shift; mariadb --no-defaults --socket="$(node_sock "$i")" -uroot -N -B "$@"; }
wsrep_status() { node_sql "$1" -e "SHOW STATUS LIKE '$2'" 2>/dev/null | awk '{print $2}'; }

# Write node i's start script (the tests run it again to bring a killed node back).
write_node_script() {
  local i="$1" d; d="$(node_dir "$i")"
  local addrs="" j
  for j in "${NODES[@]}"; do addrs="${addrs:+$addrs,}127.0.0.1:${GPORT[$j]}"; done
  mkdir -p "$d/mariadb" "$d/run"
  cat > "$d/start.sh" <<EOF
#!/usr/bin/env bash
# Start Galera node $i (pass --wsrep-new-cluster to bootstrap a new cluster from it).
exec "$(find_mariadbd)" --no-defaults --datadir="$d/mariadb" --user=$NODE_USER \\
  --socket="$d/run/mysqld.sock" --pid-file="$d/run/mysqld.pid" --log-error="$d/run/error.log" \\
  --port=${PORT_OF[$i]} --bind-address=127.0.0.1 --skip-name-resolve \\
  --character-set-server=utf8mb4 --collation-server=utf8mb4_unicode_ci \\
  --innodb-buffer-pool-size=96M --innodb-log-file-size=16M --innodb-flush-log-at-trx-commit=2 \\
  --query-cache-type=DEMAND --query-cache-size=16M --max-connections=200 \\
  --binlog-format=ROW --default-storage-engine=InnoDB --innodb-autoinc-lock-mode=2 --log-bin-trust-function-creators=1 \\
  --wsrep-on=ON --wsrep-provider=/usr/lib/galera/libgalera_smm.so \\
  --wsrep-cluster-name=overtone-test --wsrep-cluster-address="gcomm://$addrs" \\
  --wsrep-node-name=node$i --wsrep-node-address=127.0.0.1:${GPORT[$i]} \\
  --wsrep-provider-options="gmcast.listen_addr=tcp://127.0.0.1:${GPORT[$i]};ist.recv_addr=127.0.0.1:${IPORT[$i]};gcache.size=64M;evs.inactive_timeout=PT6S;evs.suspect_timeout=PT3S" \\
  --wsrep-sst-method=$SST_METHOD --wsrep-sst-receive-address=127.0.0.1:${SPORT[$i]} \\
  "\$@"
EOF
  chmod +x "$d/start.sh"
  chown -R "$NODE_USER": "$d/mariadb" "$d/run"
}

# Wait until node i is Synced (deadline in seconds).
wait_synced() {
  local i="$1" deadline=$((SECONDS + $2))
  while [ $SECONDS -lt $deadline ]; do
    [ "$(wsrep_status "$i" wsrep_local_state_comment)" = Synced ] && [ "$(wsrep_status "$i" wsrep_ready)" = ON ] && return 0
    if [ -f "$(node_dir "$i")/run/mysqld.pid" ] && ! kill -0 "$(cat "$(node_dir "$i")/run/mysqld.pid" 2>/dev/null)" 2>/dev/null; then break; fi
    sleep 0.2
  done
  log "node $i did not reach Synced; its log:"; tail -25 "$(node_dir "$i")/run/error.log" >&2
  return 1
}

node_start() {
  local i="$1"; shift
  log "starting Galera node $i on 127.0.0.1:${PORT_OF[$i]} $*"
  "$(node_dir "$i")/start.sh" "$@" > /dev/null 2>&1 &
}

# Stop every process this run started: app servers, the proxy, and each node by its pid file (a
# node the tests restarted has written its own). Also after a failure or ^C.
cluster_cleanup() {
  trap - EXIT INT TERM
  local pid i
  for pid in "${APP_PIDS[@]}"; do kill -INT "$pid" 2>/dev/null; done
  [ -n "$PROXY_PID" ] && kill "$PROXY_PID" 2>/dev/null
  for pid in "${APP_PIDS[@]}"; do wait "$pid" 2>/dev/null; done
  for i in "${NODES[@]}"; do
    [ -S "$(node_sock "$i")" ] && timeout 20 mariadb-admin --no-defaults --socket="$(node_sock "$i")" -uroot shutdown >/dev/null 2>&1 &
  done
  local deadline=$((SECONDS + 30)) alive
  while :; do
    alive=0
    for i in "${NODES[@]}"; do
      pid="$(cat "$(node_dir "$i")/run/mysqld.pid" 2>/dev/null)"
      [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null && alive=1
    done
    [ $alive = 0 ] || [ $SECONDS -ge $deadline ] && break
    sleep 0.2
  done
  for i in "${NODES[@]}"; do
    pid="$(cat "$(node_dir "$i")/run/mysqld.pid" 2>/dev/null)"
    [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null && { log "node $i did not stop: kill -9"; kill -9 "$pid" 2>/dev/null; }
  done
  log "cluster stopped"
  [ "${KEEP_CLUSTER_DATA:-0}" = 1 ] || rm -rf "$CL"
}

fail_early() {
  log "the cluster test could not run: $*"
  echo "cluster size seen: 0"
  echo "0 passed, 1 failed"
  exit 1
}

ensure_node_modules
ensure_mariadb_installed
ensure_galera_installed
command -v haproxy >/dev/null || apt_install haproxy
command -v haproxy >/dev/null || fail_early "haproxy is not installed"

# Leftovers of an earlier run that was killed hard: stop its nodes (by their pid files) first.
if [ -d "$CL" ]; then
  for i in "${NODES[@]}"; do
    pid="$(cat "$CL/node$i/run/mysqld.pid" 2>/dev/null)"
    [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null && kill -9 "$pid" 2>/dev/null
  done
  rm -rf "$CL"
fi
mkdir -p "$CL"
# The nodes run as $NODE_USER, who must be able to reach their data dirs: `npm test` puts them in its
# run directory, a 0700 temp dir of root's. Let others traverse (not read) the directories above.
if [ "$NODE_USER" != "$(id -un)" ]; then
  p="$CL"
  while [ "$p" != "/" ]; do chmod o+x "$p" 2>/dev/null || true; p=$(dirname "$p"); done
fi
trap cluster_cleanup EXIT INT TERM

declare -A PORT_OF GPORT IPORT SPORT
for i in "${NODES[@]}"; do PORT_OF[$i]=$(free_port); GPORT[$i]=$(free_port); IPORT[$i]=$(free_port); SPORT[$i]=$(free_port); done
for i in "${NODES[@]}"; do write_node_script "$i"; done

log "initialising node 1's data dir (nodes 2 and 3 get theirs by $SST_METHOD state transfer)"
mariadb-install-db --no-defaults --datadir="$(node_dir 1)/mariadb" --user="$NODE_USER" \
  --auth-root-authentication-method=socket --skip-test-db --skip-name-resolve \
  --innodb-log-file-size=16M > "$(node_dir 1)/run/install-db.log" 2>&1 || { cat "$(node_dir 1)/run/install-db.log" >&2; fail_early "mariadb-install-db failed"; }

node_start 1 --wsrep-new-cluster
wait_synced 1 60 || fail_early "node 1 did not bootstrap"
db_create "$(node_dir 1)" "$DB" "$DB_USER" "$DB_PW"
WANT_SIZE=3
if [ "$MODE" = bench ]; then WANT_SIZE=1; else
  for i in 2 3; do node_start "$i"; wait_synced "$i" 120 || fail_early "node $i did not join"; done
fi
SIZE="$(wsrep_status 1 wsrep_cluster_size)"
log "Galera cluster up: wsrep_cluster_size=$SIZE ($(( SECONDS - START_SECONDS )) s)"
[ "$SIZE" = "$WANT_SIZE" ] || fail_early "cluster size is $SIZE, not $WANT_SIZE"

url_from() { # url_from 2 3 1: the app's DATABASE_URL with the nodes in that order
  local hosts="" i
  for i in "$@"; do hosts="${hosts:+$hosts,}127.0.0.1:${PORT_OF[$i]}"; done
  echo "mysql://$DB_USER:$DB_PW@$hosts/$DB"
}

export NODE_ENV=test
DATABASE_URL="$(url_from 1)" ./node_modules/.bin/tsx server/scripts/migrate.ts || fail_early "migrations failed"
DATABASE_URL="$(url_from 1)" DATA_DIR="$CL/seed" ./node_modules/.bin/tsx server/scripts/seed.ts || fail_early "seeding the demo lab failed"

# The server bundle is always rebuilt (a few seconds; a stale one would test old code), the client only when missing.
if [ ! -f dist/client/index.html ]; then
  log "building the client (dist/client is missing)"
  ./node_modules/.bin/vite build --logLevel warn || fail_early "client build failed"
fi
node scripts/build-server.mjs || fail_early "server build failed"

# Two app servers, each with its own port, SMTP sink, DATA_DIR and first node; one shared uploads
# dir (as a shared disk would be) so a workbook stored by one is downloadable from the other.
mkdir -p "$CL/shared-uploads"
SESSION_SECRET="cluster-$(node -e 'console.log(require("crypto").randomBytes(16).toString("hex"))')"
declare -A APP_PORT APP_URL
start_app() { # start_app NAME NODE-ORDER…
  local name="$1"; shift
  local port sink; port=$(free_port); sink=$(free_port)
  mkdir -p "$CL/app-$name"; ln -sfn "$CL/shared-uploads" "$CL/app-$name/uploads"
  PORT="$port" SMTP_SINK_PORT="$sink" DATA_DIR="$CL/app-$name" DATABASE_URL="$(url_from "$@")" \
    SESSION_SECRET="$SESSION_SECRET" LOG_LEVEL=error EXPORT_STALE_S=6 PUBLIC_URL="http://127.0.0.1:$PROXY_PORT" \
    node --enable-source-maps dist/server/index.js > "$CL/app-$name.log" 2>&1 &
  APP_PIDS+=($!)
  APP_PORT[$name]=$port; APP_URL[$name]="http://127.0.0.1:$port"
  eval "APP_PID_$name=$!"
}
PROXY_PORT=$(free_port)
start_app a 1 2 3
start_app b 2 3 1
for name in a b; do
  ok=0
  for _ in $(seq 1 200); do curl -sf "${APP_URL[$name]}/api/health" >/dev/null 2>&1 && { ok=1; break; }; sleep 0.1; done
  [ $ok = 1 ] || { tail -20 "$CL/app-$name.log" >&2; fail_early "app server $name did not start"; }
done

cat > "$CL/haproxy.cfg" <<EOF
global
  maxconn 512
defaults
  mode http
  timeout connect 1s
  timeout client 30s
  timeout server 30s
  retries 3
  option redispatch
  retry-on conn-failure empty-response
frontend web
  bind 127.0.0.1:$PROXY_PORT
  default_backend apps
backend apps
  balance roundrobin
  option httpchk GET /api/health
  timeout check 3s
  http-check expect status 200
  server a 127.0.0.1:${APP_PORT[a]} check inter 1s fall 3 rise 2
  server b 127.0.0.1:${APP_PORT[b]} check inter 1s fall 3 rise 2
EOF
haproxy -db -f "$CL/haproxy.cfg" > "$CL/haproxy.log" 2>&1 &
PROXY_PID=$!
ok=0
for _ in $(seq 1 100); do curl -sf "http://127.0.0.1:$PROXY_PORT/api/health" >/dev/null 2>&1 && { ok=1; break; }; sleep 0.1; done
[ $ok = 1 ] || { cat "$CL/haproxy.log" >&2; fail_early "haproxy did not start"; }
log "two app servers behind haproxy on http://127.0.0.1:$PROXY_PORT ($(( SECONDS - START_SECONDS )) s since start)"

NODES_JSON="["
for i in "${NODES[@]}"; do
  NODES_JSON+="{\"name\":\"node$i\",\"port\":${PORT_OF[$i]},\"socket\":\"$(node_sock "$i")\",\"pidFile\":\"$(node_dir "$i")/run/mysqld.pid\",\"start\":\"$(node_dir "$i")/start.sh\"}"
  [ "$i" = 3 ] || NODES_JSON+=","
done
NODES_JSON+="]"
REPORT="${CLUSTER_JSON:-$CL/vitest.json}"
export CLUSTER_PROXY_URL="http://127.0.0.1:$PROXY_PORT" CLUSTER_APP_A_URL="${APP_URL[a]}" CLUSTER_APP_B_URL="${APP_URL[b]}" \
  CLUSTER_APP_A_PID="$APP_PID_a" CLUSTER_APP_B_PID="$APP_PID_b" CLUSTER_NODES="$NODES_JSON" \
  CLUSTER_DB_USER="$DB_USER" CLUSTER_DB_PASSWORD="$DB_PW" CLUSTER_DB="$DB" CLUSTER_SIZE_FILE="$CL/sizes.txt"
if [ "$MODE" = bench ]; then
  timeout 600 ./node_modules/.bin/tsx bench/galera.ts
  RC=$?
  log "cluster bench took $(( SECONDS - START_SECONDS )) s"
  exit $RC
fi
timeout 300 ./node_modules/.bin/vitest run --config vitest.cluster.config.ts --reporter=default --reporter=json --outputFile.json="$REPORT"
RC=$?
for name in a b; do
  if grep -q '"level":50' "$CL/app-$name.log" 2>/dev/null; then log "app server $name logged errors (last lines):"; grep '"level":50' "$CL/app-$name.log" | tail -5 | cut -c1-400; fi
done

SEEN="$(sort -u "$CL/sizes.txt" 2>/dev/null | tr '\n' ' ')"
echo "cluster size seen: ${SEEN:-$SIZE} (wsrep_cluster_size at start: $SIZE)"
node -e '
  const fs = require("fs"); let r
  try { r = JSON.parse(fs.readFileSync(process.argv[1], "utf8")) } catch { console.log("0 passed, 1 failed (no report)"); process.exit(1) }
  let failed = r.numFailedTests ?? 0
  if ((r.numTotalTests ?? 0) === 0 || (r.success === false && failed === 0)) failed += 1
  console.log(`${r.numPassedTests ?? 0} passed, ${failed} failed`)
  process.exit(failed ? 1 : 0)' "$REPORT" || RC=1
log "cluster test took $(( SECONDS - START_SECONDS )) s"
exit $RC
