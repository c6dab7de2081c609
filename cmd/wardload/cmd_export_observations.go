package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"wardload/internal/export"
	"wardload/internal/wardload"
)

func init() {
	register(command{name: "export observations", summary: "write a ward's care observations as CSV in the layout the import reads", run: runExportObservations})
	// The same runner as "observations import", under the verb-first name
	// that matches "export observations".
	register(command{name: "import observations", summary: "import a ward's care observations from a CSV file (same as observations import)",
		run: func(ctx context.Context, e *env, args []string) int {
			return observationsImport(ctx, e, args, "import observations")
		}})
}

const exportObservationsSummary = `Write a ward's care observations as CSV (RFC 4180) in the layout the observation import
reads: date, shift, tier, window_hours, care_minutes and the ward's factors, oldest first.
Without --include-excluded only the observations included in the model are written (the ones
the weekly review summarises), so "wardload summarize" on the file gives the review's figures.
With --include-excluded every observation is written with four more columns: excluded,
excluded_reason, excluded_by and excluded_at (RFC 3339 in the ward's time zone); remove them
before importing the file again. With --output the file appears only when it is complete.`

func runExportObservations(ctx context.Context, e *env, args []string) int {
	const name = "export observations"
	fs := newFlagSet(e, name, "", exportObservationsSummary)
	wardCode := fs.String("ward", "", "ward code (required)")
	fromFlag := fs.String("from", "", "first observation date, YYYY-MM-DD (default: the first)")
	toFlag := fs.String("to", "", "last observation date, YYYY-MM-DD (default: the last)")
	review := fs.Bool("include-excluded", false, "write excluded observations too, with the review state")
	output := fs.String("output", "", "write to this `file` (created when complete) instead of standard output")
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
	q := export.ObservationQuery{Review: *review}
	for _, f := range []struct {
		flag, v string
		dst     **wardload.Date
	}{{"--from", *fromFlag, &q.From}, {"--to", *toFlag, &q.To}} {
		if f.v == "" {
			continue
		}
		d, err := wardload.ParseDate(f.v)
		if err != nil {
			return usageErr("%s: %s", f.flag, wardload.ErrorMessage(err))
		}
		*f.dst = &d
	}
	if q.From != nil && q.To != nil && q.To.Before(*q.From) {
		return usageErr("--to %s is before --from %s", q.To, q.From)
	}

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

	write := func(w io.Writer) (int, error) { return export.WriteObservations(ctx, w, st, ward, q) }
	var n int
	if *output == "" {
		// Streamed: a year of observations need not fit in memory. A failure
		// part-way is reported on stderr with a non-zero exit status.
		n, err = write(e.stdout)
	} else {
		n, err = writeFileWhole(*output, write)
	}
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload %s: stopped after %d rows: %v\n", name, n, err)
		return exitFailure
	}
	fmt.Fprintf(e.stderr, "exported %d observations of ward %s\n", n, ward.Code)
	return exitOK
}

// writeFileWhole writes through write into a temporary file next to path
// and renames it to path only when write succeeded, so that a reader never
// sees half a file under the final name.
func writeFileWhole(path string, write func(io.Writer) (int, error)) (int, error) {
	tmp, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".*.part")
	if err != nil {
		return 0, err
	}
	defer os.Remove(tmp.Name()) // fails harmlessly after the rename
	n, err := write(tmp)
	if cerr := tmp.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return n, err
	}
	return n, os.Rename(tmp.Name(), path)
}
