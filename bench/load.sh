#!/usr/bin/env bash
# Mixed load on the real server over loopback (a benchmark, not a test):
#
#   1. builds wardload (CGO_ENABLED=0) and bench/load, and starts
#      `serve --demo` on 127.0.0.1: on SQLite in a fresh data directory, or
#      on PostgreSQL when DB is set (a database the script may fill; the
#      demo seed refuses one that already holds other data);
#   2. creates an API token for the ward with `wardload token create`;
#   3. runs bench/load: CONNS connections for DURATION, mixing signed-in
#      pages, projection pages, API calls and census saves; it prints
#      requests/s, p50, p99, the non-2xx/3xx answers and the acknowledged
#      census saves missing from the stored revisions (goal: 0);
#   4. prints the server's peak resident memory (VmHWM from /proc).
#
# Usage: bench/load.sh [port]
# env: CONNS (default 200), DURATION (default 60s), DB (postgres URL; default SQLite)
set -euo pipefail
cd "$(dirname "$0")/.."
export CGO_ENABLED=0

port="${1:-18090}"
conns="${CONNS:-200}"
duration="${DURATION:-60s}"
base="http://127.0.0.1:${port}"
ward=w7-east
user=demo.charge1

. bench/demo-server.sh
start_demo_server "$port"
go build -o "$work/load" ./bench/load
password=$(awk -v u="$user" '$1 == u { print $3 }' "$work/serve.out")
[ -n "$password" ] || { echo "bench: no password for $user in the demo output (was the database empty?)" >&2; exit 1; }
token=$("$work/wardload" token create --ward "$ward" --name "load-$$-$(date +%s)" "${store[@]}" 2>/dev/null)

echo "== load"
status=0
"$work/load" -base "$base" -user "$user" -password "$password" -token "$token" -ward "$ward" -c "$conns" -d "$duration" || status=$?
echo "server peak resident memory: $(awk '/^VmHWM/ { printf "%.0f MiB", $2 / 1024 }' "/proc/$server_pid/status")"
errors=$(grep -c '"level":"ERROR"\|level=ERROR' "$work/serve.log" || true)
echo "server log lines at level ERROR: $errors"
exit "$status"
