#!/bin/sh
# Times the tier summary against R on the same 10,000,000 values.
# R draws the data (set.seed(20261201); rlnorm(1e7, meanlog = 3, sdlog = 0.6)),
# times quantile(x, c(.25, .5, .75)) with system.time (data generation not
# included) and writes the values to a temporary file; the Go benchmark
# BenchmarkSummary10M reads that file (loading not timed) and times
# stats.Summarize (quartiles, fences, outliers, mean, SD, bins).
# Prints the median of 5 runs each and the ratio Go/R.
# Usage: bench/summary.sh   (from anywhere; needs Rscript and go)
set -eu
cd "$(dirname "$0")/.."
export CGO_ENABLED=0
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT

R --version | head -n 1
go version
Rscript - "$tmp" <<'REOF'
dir <- commandArgs(TRUE)[1]
set.seed(20261201)
x <- rlnorm(1e7, meanlog = 3, sdlog = 0.6)
writeBin(x, file.path(dir, "x.f64"), size = 8, endian = "little")
invisible(quantile(x, c(.25, .5, .75)))  # warm up
t <- replicate(5, system.time(quantile(x, c(.25, .5, .75)))[["elapsed"]])
cat(sprintf("R quantile(x, c(.25,.5,.75)), 1e7 values, runs (s): %s\n", paste(t, collapse = " ")))
writeLines(sprintf("%.6f", median(t)), file.path(dir, "r.txt"))
REOF

WARDLOAD_BENCH_DATA="$tmp/x.f64" go test -run '^$' -bench '^BenchmarkSummary10M$' -benchtime 5x -count 5 ./internal/stats >"$tmp/go.txt"
grep '^BenchmarkSummary10M' "$tmp/go.txt"
go_s=$(awk '/^BenchmarkSummary10M/ {print $3 / 1e9}' "$tmp/go.txt" | sort -g | awk '{a[NR]=$1} END {print a[int((NR+1)/2)]}')
r_s=$(cat "$tmp/r.txt")
awk -v g="$go_s" -v r="$r_s" 'BEGIN {
  printf "median Go Summarize: %.4f s\nmedian R quantile:   %.4f s\nratio Go/R: %.3f (target <= 0.5)\n", g, r, g / r }'
# Memory: bytes allocated per summary against the input's size (at most one
# extra copy of the input is allowed).
awk '/^BenchmarkSummary10M/ { for (i = 1; i < NF; i++) { if ($(i+1) == "B/op") b = $i; if ($(i+1) == "input-bytes") n = $i } }
  END { printf "allocated per summary: %.1f MB; input: %.1f MB; copies: %.2f (target <= 1)\n", b / 1e6, n / 1e6, b / n }' "$tmp/go.txt"
