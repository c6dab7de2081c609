#!/bin/sh
# Runs the full census forecast battery of internal/simstudy (issue 16,
# item 7): coverage of the 80% and 90% census bands and MASE by horizon.
# The quick part runs in go test (TestCensusBatteryQuick).
# Usage: bench/census_forecast.sh [-reps 60] [-origins 20] [-draws 1000] [-seed N]
set -eu
cd "$(dirname "$0")/.."
export CGO_ENABLED=0
exec go run ./bench/censusforecast "$@"
