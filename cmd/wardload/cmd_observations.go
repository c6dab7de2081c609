package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"time"

	"wardload/internal/server"
	"wardload/internal/wardload"
)

func init() {
	register(command{name: "observations import", summary: "import a ward's care observations from a CSV file of any size, all or nothing", run: runObservationsImport})
}

// runObservationsImport stores a CSV file of observations for a ward as
// one batch, as the web import does, but with no size or time limit: it is
// the way in for files over the web import's limit.
func runObservationsImport(ctx context.Context, e *env, args []string) int {
	return observationsImport(ctx, e, args, "observations import")
}

// observationsImport is the import command under its name (it has two).
func observationsImport(ctx context.Context, e *env, args []string, name string) int {
	fs := newFlagSet(e, name, "FILE",
		"Import care observations for a ward from FILE (- for standard input), in the web import's\n"+
			"format: columns date, shift, tier, window_hours, care_minutes and the ward's factors. The\n"+
			"file is stored as one batch, or not at all if any line is wrong; the message names the line.")
	code := fs.String("ward", "", "code of the ward the observations belong to (required)")
	so := addStoreFlags(fs)
	if c, ok := parseFlags(e, fs, args); !ok {
		return c
	}
	if fs.NArg() != 1 || *code == "" {
		fmt.Fprintf(e.stderr, "wardload %s: needs --ward CODE and one FILE (- for standard input)\n", name)
		return exitUsage
	}
	in := e.stdin
	if name := fs.Arg(0); name != "-" {
		f, err := os.Open(name)
		if err != nil {
			fmt.Fprintf(e.stderr, "wardload %s: %v\n", name, err)
			return exitUsage
		}
		defer f.Close()
		in = f
	}
	st, err := openExistingStore(ctx, so)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload %s: %v\n", name, err)
		return exitFailure
	}
	defer st.Close()
	n, batch, err := importObservations(wardload.WithActor(ctx, wardload.Actor{Name: "cli"}), st, *code, in, time.Now())
	if err != nil {
		return reportError(e, name, err)
	}
	fmt.Fprintf(e.stdout, "imported %d observations for ward %s (batch %s)\n", n, *code, batch)
	return exitOK
}

// importObservations parses r for the ward with code and stores it as one
// batch, returning how many observations and the batch.
func importObservations(ctx context.Context, st wardload.Store, code string, r io.Reader, now time.Time) (int, string, error) {
	ward, err := st.FindWardByCode(ctx, code)
	if err != nil {
		return 0, "", err
	}
	shifts, err := st.FindShiftPatterns(ctx, ward.ID)
	if err != nil {
		return 0, "", err
	}
	tiers, err := st.FindTiers(ctx, ward.ID)
	if err != nil {
		return 0, "", err
	}
	obs, lines, err := server.ParseObservationImport(r, ward, tiers, shifts, now)
	if err != nil {
		return 0, "", err
	}
	batch, err := st.CreateObservations(ctx, obs)
	if wardload.ErrorCode(err) == wardload.EINVALID {
		return 0, "", wardload.Errorf(wardload.EINVALID, "%s", server.RowToLine(wardload.ErrorMessage(err), lines))
	} else if err != nil {
		return 0, "", err
	}
	return len(obs), batch, nil
}
