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

. bench/demo-server.sh
start_demo_server "$port"
go build -o "$work/load" ./bench/load
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
