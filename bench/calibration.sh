#!/bin/sh
# Runs the simulation battery of internal/simstudy (issue 8, item 6) and
# prints its coverage table, version 1 ("before") beside versions 2 and 3
# (the current one). Exits non-zero when a version 3 row breaks the pass rule.
# Usage: bench/calibration.sh [-reps 200] [-draws 20000] [-truth 200000]
#        [-scenario name,name] [-seed N] [-quantile]   (from anywhere; needs go)
set -eu
cd "$(dirname "$0")/.."
export CGO_ENABLED=0
exec go run ./bench/calibration "$@"
