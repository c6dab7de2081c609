#!/bin/sh
# Runs the simulation battery of internal/simstudy (issue 8, item 6) and
# prints its coverage table, version 1 ("before") beside version 2
# ("after"). Exits non-zero when a version 2 row breaks the pass rule.
# Usage: bench/calibration.sh [-reps 200] [-draws 20000] [-truth 200000]
#        [-scenario name,name] [-seed N] [-quantile]   (from anywhere; needs go)
set -eu
cd "$(dirname "$0")/.."
export CGO_ENABLED=0
exec go run ./bench/calibration "$@"
