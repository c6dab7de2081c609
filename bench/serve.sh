#!/usr/bin/env bash
# Load test of the real server on loopback (a benchmark, not a test):
#
#   1. builds wardload (CGO_ENABLED=0) and starts `serve --demo` on
#      127.0.0.1 with a fresh SQLite data directory;
#   2. signs in as the demo charge nurse with curl (cookie jar; the
#      cross-origin check wants same-origin POSTs to say so, so Origin and
#      Sec-Fetch-Site: same-origin are sent);
#   3. takes the first projection page from the shift list;
#   4. runs wrk (50 connections, DURATION seconds each, --latency) against a
#      static asset of the same binary and against the projection page with
#      the session cookie, and prints requests/s, p99 and their ratio
#      (targets: projection >= 30% of static throughput, p99 <= 50 ms);
#   5. times SAVES census saves through the form, projection included, with
#      bench/censussave (target: p99 <= 100 ms).
#
# Usage: bench/serve.sh [port]   env: DURATION (default 10), SAVES (default 200)
# Needs wrk and curl. The server is stopped on exit.
set -euo pipefail
cd "$(dirname "$0")/.."
export CGO_ENABLED=0

port="${1:-18089}"
duration="${DURATION:-10}"
saves="${SAVES:-200}"
base="http://127.0.0.1:${port}"
ward=w7-east
for tool in wrk curl; do
	command -v "$tool" >/dev/null || { echo "bench: $tool is required" >&2; exit 2; }
done

. bench/demo-server.sh
unset DB # this script compares with its own SQLite numbers
echo "== build"
start_demo_server "$port"
go build -o "$work/censussave" ./bench/censussave
user=demo.charge1
password=$(awk -v u="$user" '$1 == u { print $3 }' "$work/serve.out")
[ -n "$password" ] || { echo "bench: no password for $user in the demo output" >&2; exit 1; }

echo "== sign in as $user"
jar="$work/cookies"
status=$(curl -sS -o /dev/null -w '%{http_code} %{redirect_url}' -c "$jar" -b "$jar" \
	-H "Origin: $base" -H 'Sec-Fetch-Site: same-origin' \
	--data-urlencode "name=$user" --data-urlencode "password=$password" "$base/signin")
case "$status" in
"303 $base/signin"*) echo "bench: sign-in refused: $status" >&2; exit 1 ;;
303*) ;;
*) echo "bench: sign-in failed: $status" >&2; exit 1 ;;
esac
cookie=$(awk '$6 ~ /wardload_session$/ { print $6 "=" $7 }' "$jar")
[ -n "$cookie" ] || { echo "bench: no session cookie" >&2; exit 1; }

list=$(curl -sS -b "$jar" "$base/wards/$ward/projections")
projection=$(printf '%s' "$list" | grep -o 'href="/wards/'"$ward"'/projections/[0-9]*"' | head -n 1 | cut -d'"' -f2)
[ -n "$projection" ] || { echo "bench: no projection link on the shift list" >&2; exit 1; }
static=$(printf '%s' "$list" | grep -o 'href="/static/wardload.css[^"]*"' | head -n 1 | cut -d'"' -f2)
[ -n "$static" ] || static=/static/wardload.css
code=$(curl -sS -o /dev/null -w '%{http_code}' -b "$jar" "$base$projection")
[ "$code" = 200 ] || { echo "bench: $projection answers $code" >&2; exit 1; }
echo "static page:     $static"
echo "projection page: $projection"

# run_wrk NAME URL [header]: prints "rps p99_ms" on the last line.
run_wrk() {
	local name=$1 url=$2
	shift 2
	local out
	out=$(wrk -t 4 -c 50 -d "${duration}s" --latency "$@" "$url")
	printf '%s\n' "$out" >"$work/wrk-$name.txt"
	local non2xx
	non2xx=$(printf '%s\n' "$out" | awk '/Non-2xx or 3xx responses/ { print $NF }')
	if [ -n "$non2xx" ]; then
		echo "bench: $name: $non2xx non-2xx responses" >&2
		printf '%s\n' "$out" >&2
		exit 1
	fi
	printf '%s\n' "$out" | awk '
		function ms(v) {
			if (v ~ /us$/) return substr(v, 1, length(v) - 2) / 1000
			if (v ~ /ms$/) return substr(v, 1, length(v) - 2) + 0
			if (v ~ /s$/) return substr(v, 1, length(v) - 1) * 1000
			return v
		}
		$1 == "99%" { p99 = ms($2) }
		$1 == "Requests/sec:" { rps = $2 }
		END { printf "%s %s\n", rps, p99 }'
}

echo "== wrk: 50 connections, ${duration}s each, loopback"
read -r static_rps static_p99 < <(run_wrk static "$base$static")
read -r proj_rps proj_p99 < <(run_wrk projection "$base$projection" -H "Cookie: $cookie")
# The projection run must have stayed signed in (a lost session would be
# a fast 303 to the sign-in page, which wrk counts as success).
curl -sS -o /dev/null -w '%{http_code}' -b "$jar" "$base$projection" | grep -q '^200$' ||
	{ echo "bench: session lost during the run" >&2; exit 1; }

awk -v srps="$static_rps" -v sp99="$static_p99" -v prps="$proj_rps" -v pp99="$proj_p99" 'BEGIN {
	printf "static     %10.0f req/s   p99 %7.2f ms\n", srps, sp99
	printf "projection %10.0f req/s   p99 %7.2f ms\n", prps, pp99
	ratio = prps / srps
	printf "throughput ratio projection/static: %.1f%% (target >= 30%%): %s\n", 100 * ratio, (ratio >= 0.30 ? "PASS" : "FAIL")
	printf "projection p99 %.2f ms (target <= 50 ms): %s\n", pp99, (pp99 <= 50 ? "PASS" : "FAIL")
}'

echo "== census saves ($saves, sequential, projection included)"
"$work/censussave" -base "$base" -user "$user" -password "$password" -ward "$ward" -n "$saves"
