#!/bin/sh
# Runs BenchmarkReviewPage (the weekly review of a ward holding a year of
# observations: the demo ward plus 50,960 invented ones) and judges the
# median of the year view (?weeks=52) against the target of at most
# 150 ms server time per page (issue "A ward from nothing … weekly review").
# Usage: bench/review.sh [count]   (default 5 runs)
set -eu
cd "$(dirname "$0")/.."
export CGO_ENABLED=0
count="${1:-5}"
out=$(go test -run '^$' -bench '^BenchmarkReviewPage$' -benchtime 5x -count "$count" ./internal/server/)
echo "$out" | grep '^Benchmark'
echo "$out" | awk '
	/^BenchmarkReviewPage\/weeks=52/ { v[++n] = $3 / 1e6 }
	END {
		if (n == 0) { print "no benchmark result"; exit 2 }
		# median by insertion sort (n is small)
		for (i = 2; i <= n; i++) { x = v[i]; j = i - 1; while (j > 0 && v[j] > x) { v[j+1] = v[j]; j-- } v[j+1] = x }
		med = (n % 2) ? v[(n+1)/2] : (v[n/2] + v[n/2+1]) / 2
		printf "review page, a year of observations: median %.0f ms/op over %d runs (target <= 150 ms)\n", med, n
		if (med <= 150) { print "PASS: within 150 ms" } else { print "FAIL: above 150 ms"; exit 1 }
	}'
