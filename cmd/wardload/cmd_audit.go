package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"time"

	"wardload/internal/retention"
	"wardload/internal/wardload"
)

func init() {
	register(command{name: "audit purge", summary: "export, then delete security events older than a date", run: runAuditPurge})
}

// runAuditPurge applies the retention rule by hand: it writes the security
// events (sign-ins, failure summaries, sign-outs, refused tokens) older
// than --before to --export, one JSON object a line, and only then deletes
// them. The audit of data changes is never deleted. The purge itself is
// recorded in the audit log, by "cli".
func runAuditPurge(ctx context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "audit purge", "",
		"Write the security events (sign-ins, sign-in failure summaries, sign-outs, refused API tokens)\n"+
			"older than --before to --export as JSON Lines, then delete them from the audit log. The\n"+
			"audit of data changes (census, observations, settings, users, tokens) is never deleted.")
	before := fs.String("before", "", "purge events before this UTC date (YYYY-MM-DD) or time (RFC 3339); required")
	export := fs.String("export", "", "new file to write the purged events to, or - for standard output; required")
	so := addStoreFlags(fs)
	if code, ok := parseFlags(e, fs, args); !ok {
		return code
	}
	if fs.NArg() > 0 || *before == "" || *export == "" {
		fmt.Fprintln(e.stderr, "wardload audit purge: give --before DATE and --export FILE (see --help)")
		return exitUsage
	}
	cut, err := parseCutoff(*before)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload audit purge: --before %q: want YYYY-MM-DD or an RFC 3339 time\n", *before)
		return exitUsage
	}
	if cut.After(e.clock()) {
		fmt.Fprintln(e.stderr, "wardload audit purge: --before is in the future")
		return exitUsage
	}
	st, err := openStore(ctx, so, true)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload audit purge: %v\n", err)
		return exitFailure
	}
	defer st.Close()

	var w io.Writer = e.stdout
	if *export != "-" {
		f, err := retention.CreateExport(*export)
		if err != nil {
			fmt.Fprintf(e.stderr, "wardload audit purge: cannot create the export (it must not exist yet): %v\n", err)
			return exitFailure
		}
		defer f.Close()
		w = f
	}
	ctx = wardload.WithActor(ctx, wardload.Actor{Name: "cli"})
	n, err := retention.Purge(ctx, st, cut, w)
	if err != nil {
		if *export != "-" {
			os.Remove(*export) // nothing was deleted; the partial export is no record
		}
		return reportError(e, "audit purge", err)
	}
	where := *export
	if where == "-" {
		where = "standard output"
	}
	fmt.Fprintf(e.stderr, "purged %d security events before %s; exported to %s\n", n, cut.Format(time.RFC3339), where)
	return exitOK
}

// parseCutoff reads a date (midnight UTC) or an RFC 3339 time.
func parseCutoff(s string) (time.Time, error) {
	if t, err := time.Parse(time.DateOnly, s); err == nil {
		return t, nil
	}
	return time.Parse(time.RFC3339, s)
}
