package main

import (
	"context"
	"fmt"

	"wardload/internal/server"
	"wardload/internal/wardload"
)

func init() {
	register(command{name: "token create", summary: "create an API token for the roster planner (printed once)", run: runTokenCreate})
	register(command{name: "token revoke", summary: "revoke an API token by name", run: runTokenRevoke})
}

// runTokenCreate makes an API token for IT staff wiring up a roster
// planner. The secret is printed once on stdout; only its hash is stored.
func runTokenCreate(ctx context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "token create", "",
		"Create an API token that may read the given wards. The token is printed once; store it\n"+
			"in the roster planner's configuration. wardload keeps only its hash.")
	wards := fs.String("ward", "", "comma-separated codes of the wards the token may read (required)")
	name := fs.String("name", "", "unique token name, e.g. roster-planner (required)")
	writeStaffing := fs.Bool("write-staffing", false, "the token may also send planned staff for its wards' shifts (PUT .../staffing); tokens are read-only without it")
	so := addStoreFlags(fs)
	if code, ok := parseFlags(e, fs, args); !ok {
		return code
	}
	if fs.NArg() > 0 || *wards == "" || *name == "" {
		fmt.Fprintln(e.stderr, "wardload token create: give --ward CODE[,CODE] and --name NAME, and nothing else (see --help)")
		return exitUsage
	}
	st, err := openStore(ctx, so, true)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload token create: %v\n", err)
		return exitFailure
	}
	defer st.Close()
	ids, err := wardIDs(ctx, st, *wards)
	if err != nil {
		return reportError(e, "token create", err)
	}
	secret, hash := server.NewTokenSecret()
	t := &wardload.APIToken{Name: *name, Hash: hash, WardIDs: ids, WriteStaffing: *writeStaffing}
	ctx = wardload.WithActor(ctx, wardload.Actor{Name: "cli"})
	if err := st.CreateToken(ctx, t); err != nil {
		return reportError(e, "token create", err)
	}
	fmt.Fprintf(e.stderr, "created token %s; it is shown only this once:\n", t.Name)
	fmt.Fprintln(e.stdout, secret)
	return exitOK
}

// runTokenRevoke revokes a token so the API refuses it from now on.
func runTokenRevoke(ctx context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "token revoke", "NAME", "Revoke the API token called NAME; the API refuses it from now on.")
	so := addStoreFlags(fs)
	names, code, ok := parseInterleaved(e, fs, args) // flags may follow NAME
	if !ok {
		return code
	}
	if len(names) != 1 {
		fmt.Fprintln(e.stderr, "wardload token revoke: give exactly one token NAME (see --help)")
		return exitUsage
	}
	st, err := openStore(ctx, so, true)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload token revoke: %v\n", err)
		return exitFailure
	}
	defer st.Close()
	t, err := st.FindTokenByName(ctx, names[0])
	if err != nil {
		if wardload.ErrorCode(err) == wardload.ENOTFOUND {
			err = wardload.Errorf(wardload.ENOTFOUND, "There is no token called %q.", names[0])
		}
		return reportError(e, "token revoke", err)
	}
	ctx = wardload.WithActor(ctx, wardload.Actor{Name: "cli"})
	if err := st.RevokeToken(ctx, t.ID); err != nil {
		return reportError(e, "token revoke", err)
	}
	fmt.Fprintf(e.stdout, "revoked token %s\n", t.Name)
	return exitOK
}
