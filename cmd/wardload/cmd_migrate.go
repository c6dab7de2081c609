package main

import (
	"context"
	"fmt"
)

func init() {
	register(command{name: "migrate", summary: "create or update the database schema", run: runMigrate})
}

func runMigrate(ctx context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "migrate", "", "Apply pending database migrations and report the schema version.")
	so := addStoreFlags(fs)
	if code, ok := parseFlags(e, fs, args); !ok {
		return code
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(e.stderr, "wardload: migrate takes no arguments\n")
		return exitUsage
	}
	if _, err := so.kind(); err != nil {
		fmt.Fprintf(e.stderr, "wardload: %v\n", err)
		return exitUsage
	}
	for _, m := range so.looseModes() {
		fmt.Fprintf(e.stderr, "wardload: warning: %s\n", m)
	}
	st, err := openStore(ctx, so, false)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload: %v\n", err)
		return exitFailure
	}
	defer st.Close()
	// A fresh database has no version table yet: schemaVersion fails and
	// returns 0, its version.
	before, _ := st.schemaVersion(ctx)
	if err := st.migrate(ctx); err != nil {
		fmt.Fprintf(e.stderr, "wardload: %v\n", err)
		return exitFailure
	}
	after, err := st.schemaVersion(ctx)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload: cannot read schema version: %s\n", oneLine(err))
		return exitFailure
	}
	if after == before {
		fmt.Fprintf(e.stdout, "%s database %s is up to date (schema version %d)\n", st.Kind, st.Where, after)
	} else {
		fmt.Fprintf(e.stdout, "%s database %s migrated from schema version %d to %d\n", st.Kind, st.Where, before, after)
	}
	return exitOK
}
