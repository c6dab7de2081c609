package main

import (
	"bytes"
	"context"
	"fmt"
	"strconv"

	"wardload/internal/export"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

func init() {
	register(command{name: "export projections", summary: "write a ward's shift projections for a roster planner (CSV or JSON)", run: runExportProjections})
}

var exportSummary = `Write the newest projection of each dated shift of a ward from --from to --to (inclusive,
at most ` + strconv.Itoa(export.MaxDays) + ` days), oldest first, to standard output: CSV (RFC 4180, header row, one
census_<tier> column per tier) or JSON with the same rows and digits. Times are RFC 3339 in
the ward's time zone; hours and nurse-hours have two decimals. The same content as the
shift list download and GET /api/v1/projections.

` + stats.Caution

func runExportProjections(ctx context.Context, e *env, args []string) int {
	const name = "export projections"
	fs := newFlagSet(e, name, "", exportSummary)
	wardCode := fs.String("ward", "", "ward code (required)")
	fromFlag := fs.String("from", "", "first shift date, YYYY-MM-DD (required)")
	toFlag := fs.String("to", "", "last shift date, YYYY-MM-DD (required)")
	format := fs.String("format", "csv", "csv or json")
	so := addStoreFlags(fs)
	if code, ok := parseFlags(e, fs, args); !ok {
		return code
	}
	usageErr := func(format string, args ...any) int {
		fmt.Fprintf(e.stderr, "wardload %s: %s\n", name, fmt.Sprintf(format, args...))
		return exitUsage
	}
	if fs.NArg() != 0 {
		return usageErr("takes no arguments (see --help)")
	}
	if *wardCode == "" {
		return usageErr("--ward is required")
	}
	fmtOut, ok := export.ParseFormat(*format)
	if !ok {
		return usageErr("--format must be csv or json")
	}
	var dates [2]wardload.Date
	for i, f := range []struct{ flag, v string }{{"--from", *fromFlag}, {"--to", *toFlag}} {
		if f.v == "" {
			return usageErr("%s is required", f.flag)
		}
		d, err := wardload.ParseDate(f.v)
		if err != nil {
			return usageErr("%s: %s", f.flag, wardload.ErrorMessage(err))
		}
		dates[i] = d
	}
	from, to := dates[0], dates[1]

	st, err := openExistingStore(ctx, so)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload %s: %v\n", name, err)
		return exitFailure
	}
	defer st.Close()
	ward, err := st.FindWardByCode(ctx, *wardCode)
	if wardload.ErrorCode(err) == wardload.ENOTFOUND {
		return usageErr("no ward with code %q (see wardload ward list)", *wardCode)
	} else if err != nil {
		return reportError(e, name, err)
	}
	tiers, rows, err := export.Rows(ctx, st, ward, from, to)
	if err != nil {
		if f := wardload.ErrorField(err); f == "from" || f == "to" {
			return usageErr("--%s: %s", f, wardload.ErrorMessage(err))
		}
		return reportError(e, name, err)
	}
	// Buffered, so that a failure never leaves half an export on stdout.
	var b bytes.Buffer
	if err := export.Write(&b, fmtOut, ward, from, to, tiers, rows); err != nil {
		fmt.Fprintf(e.stderr, "wardload %s: %v\n", name, err)
		return exitFailure
	}
	if _, err := e.stdout.Write(b.Bytes()); err != nil {
		fmt.Fprintf(e.stderr, "wardload %s: %v\n", name, err)
		return exitFailure
	}
	return exitOK
}
