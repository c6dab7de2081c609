#!/bin/sh
# Times a bulk observation import against the database's own bulk loader on
# the same rows, in the same run (issue 12 item 2, issue 9 item 2):
#   SQLite:     wardload observations import  vs  the sqlite3 shell's .import
#   PostgreSQL: wardload observations import  vs  psql \copy
# The rows are one CSV file of invented observations (bench/importdata: a
# year of dates, four tiers, two shifts, one factor column), 1,000,000 by
# default. wardload's side is the whole command: reading and checking the
# file, resolving tiers and shifts, storing the observations and their
# factor rows with the batch's audit row, in one transaction. The
# yardstick loads the same file into a plain table with the same column
# types and no index, key or check, which is the most it could be asked to
# do. Each run starts from the same state (a fresh copy of the seeded
# SQLite file; emptied tables on PostgreSQL). Prints every run's seconds
# and peak resident memory, then median rows/s of each side and the
# median of the per-run ratios.
# Targets: PostgreSQL >= 0.5 of psql's rows/s; SQLite >= 100,000 rows/s
# (and >= 0.5 of the shell's).
# Usage: bench/import.sh [rows] [runs]   (defaults 1000000 and 3)
#   PostgreSQL is measured when WARDLOAD_BENCH_DATABASE_URL is set (a
#   database the script may create and drop the schema wlbench_import in);
#   SQLite when the sqlite3 shell is installed (apt-get install sqlite3)
#   and SKIP_SQLITE is unset.
set -eu
cd "$(dirname "$0")/.."
export CGO_ENABLED=0
rows="${1:-1000000}"
runs="${2:-3}"
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT

go build -o "$tmp/wardload" ./cmd/wardload
go build -o "$tmp/importdata" ./bench/importdata
go version
csv="$tmp/obs.csv"

# timed LABEL CMD...: runs CMD, appends "LABEL seconds peak-KB cpu-seconds"
# to $tmp/times. CPU is the command's own (user + system): on PostgreSQL
# most of the work is the server's and is not in it.
timed() {
	label=$1
	shift
	if ! /usr/bin/time -f "$label %e %M %U %S" -o "$tmp/one" "$@" >"$tmp/out" 2>&1; then
		cat "$tmp/out" "$tmp/one" >&2
		exit 2
	fi
	cat "$tmp/one" >>"$tmp/times"
	awk -v n="$rows" '{ printf "  %-10s %7.2f s  %9.0f rows/s  peak %6.0f MB  cpu %6.2f s\n", $1, $2, n / $2, $3 / 1024, $4 + $5 }' "$tmp/one"
}

# report A B TARGET: medians of both sides and of the per-run ratios A/B (rows/s).
report() {
	awk -v a="$1" -v b="$2" -v n="$rows" -v target="$3" '
	function median(v, k,    i, j, x) {
		for (i = 2; i <= k; i++) { x = v[i]; j = i - 1; while (j > 0 && v[j] > x) { v[j+1] = v[j]; j-- } v[j+1] = x }
		return (k % 2) ? v[(k+1)/2] : (v[k/2] + v[k/2+1]) / 2
	}
	$1 == a { ta[++na] = $2; ma[na] = $3; ca[na] = $4 + $5 }
	$1 == b { tb[++nb] = $2; cb[nb] = $4 + $5 }
	END {
		for (i = 1; i <= na; i++) r[i] = tb[i] / ta[i]
		pa = median(ma, na) / 1024
		printf "median %s: %.0f rows/s (peak %.0f MB, cpu %.2f s)\nmedian %s: %.0f rows/s (cpu %.2f s)\nmedian ratio %s/%s rows/s over %d paired runs: %.2f (target >= %s)\n",
			a, n / median(ta, na), pa, median(ca, na), b, n / median(tb, nb), median(cb, nb), a, b, na, median(r, na), target
	}' "$tmp/times"
}

if [ -z "${SKIP_SQLITE:-}" ] && command -v sqlite3 >/dev/null; then
	echo "== SQLite: $rows observations; sqlite3 $(sqlite3 --version | cut -d' ' -f1)"
	mkdir "$tmp/seed"
	"$tmp/importdata" -sqlite "$tmp/seed/wardload.db" -rows "$rows" -out "$csv"
	ls -l "$csv" | awk '{ printf "file: %.1f MB\n", $5 / 1e6 }'
	: >"$tmp/times"
	for i in $(seq "$runs"); do
		rm -rf "$tmp/run" "$tmp/plain.db"
		mkdir -m 700 "$tmp/run"
		cp "$tmp/seed/wardload.db" "$tmp/run/"
		timed wardload "$tmp/wardload" observations import --data-dir "$tmp/run" --ward bench-import "$csv"
		sqlite3 "$tmp/plain.db" 'CREATE TABLE plain (date TEXT, shift TEXT, tier TEXT, window_hours REAL, care_minutes REAL, dependency REAL)'
		timed sqlite3 sqlite3 "$tmp/plain.db" ".import --csv --skip 1 $csv plain"
	done
	report wardload sqlite3 "0.5, and >= 100000 rows/s"
	rm -rf "$tmp/run" "$tmp/plain.db" "$tmp/seed"
else
	echo "== SQLite: skipped (no sqlite3 shell; apt-get install sqlite3)"
fi

if [ -n "${WARDLOAD_BENCH_DATABASE_URL:-}" ]; then
	base=$WARDLOAD_BENCH_DATABASE_URL
	schema=wlbench_import
	case "$base" in *\?*) url="$base&search_path=$schema" ;; *) url="$base?search_path=$schema" ;; esac
	echo "== PostgreSQL: $rows observations; $(psql "$base" -Atc 'SHOW server_version' | sed 's/^/server /')"
	PGOPTIONS="-c client_min_messages=warning" psql "$base" -q -v ON_ERROR_STOP=1 -c "DROP SCHEMA IF EXISTS $schema CASCADE" -c "CREATE SCHEMA $schema"
	"$tmp/importdata" -db "$url" -rows "$rows" -out "$csv"
	export PGOPTIONS="-c search_path=$schema -c client_min_messages=warning"
	psql "$base" -q -v ON_ERROR_STOP=1 -c 'CREATE TABLE plain (date DATE, shift TEXT, tier TEXT, window_hours DOUBLE PRECISION, care_minutes DOUBLE PRECISION, dependency DOUBLE PRECISION)'
	: >"$tmp/times"
	for i in $(seq "$runs"); do
		psql "$base" -q -v ON_ERROR_STOP=1 -c 'TRUNCATE observation_factors, observations' -c 'TRUNCATE plain' -c 'VACUUM ANALYZE observations, observation_factors, plain' -c CHECKPOINT
		timed wardload "$tmp/wardload" observations import --db "$url" --ward bench-import "$csv"
		timed psql psql "$base" -q -v ON_ERROR_STOP=1 -c "\\copy plain FROM '$csv' WITH (FORMAT csv, HEADER true)"
	done
	report wardload psql "0.5"
	psql "$base" -q -c "DROP SCHEMA $schema CASCADE"
else
	echo "== PostgreSQL: skipped (set WARDLOAD_BENCH_DATABASE_URL)"
fi
