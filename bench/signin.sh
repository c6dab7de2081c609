#!/usr/bin/env bash
# Hostile sign-ins against the real server on loopback (a benchmark, not a
# test): starts `serve --demo` (SQLite in a fresh data directory, or
# PostgreSQL when DB is set), sends N wrong-password sign-ins at once with
# bench/load -hostile, samples the server's resident memory from /proc
# every 20 ms meanwhile, and prints the peak (VmHWM). The stated bound is
# 1 GiB (the README's Performance section); the script fails above it.
#
# Usage: bench/signin.sh [port]   env: N (default 200), DB (postgres URL)
set -euo pipefail
cd "$(dirname "$0")/.."
export CGO_ENABLED=0

port="${1:-18091}"
n="${N:-200}"
bound_mib=1024
base="http://127.0.0.1:${port}"

work=$(mktemp -d)
server_pid=""
cleanup() {
	if [ -n "$server_pid" ]; then
		kill "$server_pid" 2>/dev/null || true
		wait "$server_pid" 2>/dev/null || true
	fi
	rm -rf "$work"
}
trap cleanup EXIT INT TERM

go build -o "$work/wardload" ./cmd/wardload
go build -o "$work/load" ./bench/load
if [ -n "${DB:-}" ]; then store=(--db "$DB"); else mkdir "$work/data"; store=(--data-dir "$work/data"); fi
"$work/wardload" serve --demo --addr "127.0.0.1:${port}" "${store[@]}" >"$work/serve.out" 2>"$work/serve.log" &
server_pid=$!
for _ in $(seq 1 300); do
	grep -q '^listening on' "$work/serve.out" 2>/dev/null && break
	kill -0 "$server_pid" 2>/dev/null || { echo "bench: server exited" >&2; cat "$work/serve.log" >&2; exit 1; }
	sleep 0.1
done
grep -q '^listening on' "$work/serve.out" || { echo "bench: server did not start" >&2; exit 1; }
rss() { awk -v f="$1" '$1 == f":" { print int($2 / 1024) }' "/proc/$server_pid/status"; }
echo "server resident memory before: $(rss VmRSS) MiB (peak so far $(rss VmHWM) MiB, demo seeding included)"
"$work/load" -base "$base" -user demo.charge1 -hostile "$n" &
load_pid=$!
peak=0
while kill -0 "$load_pid" 2>/dev/null; do
	r=$(rss VmRSS)
	[ "$r" -gt "$peak" ] && peak=$r
	sleep 0.02
done
wait "$load_pid"
echo "server resident memory during the burst: peak sampled ${peak} MiB; VmHWM $(rss VmHWM) MiB (bound ${bound_mib} MiB)"
[ "$(rss VmHWM)" -le "$bound_mib" ] || { echo "bench: FAIL: above the bound" >&2; exit 1; }
echo "PASS"
