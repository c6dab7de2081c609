package main

import (
	"context"
	"fmt"

	"wardload/internal/wardload"
)

func init() {
	register(command{name: "user password", summary: "set a user's password (from stdin or a prompt); ends their sessions", run: runUserPassword})
}

// runUserPassword sets the password of an existing, enabled user, read as
// `user add` reads it (a terminal prompt asked twice, or the first line of
// piped stdin; never a flag). The new password must satisfy the policy of
// password.HashNew and differ from the current one. The change ends every
// session of the user (their next request signs them out).
//
// By default the password is the user's own from now on: an operator
// typing it at the server is taken to be the user, or to hand it over
// in person. --temporary marks it as a reset like the admin page's: the
// user must choose a new one at their next sign-in.
func runUserPassword(ctx context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "user password", "NAME",
		"Set the password of user NAME, prompted for on a terminal or read as the first line of stdin.\n"+
			"Every session of the user ends. With --temporary the user must choose a new password at\n"+
			"their next sign-in (as after a reset on the users page); without it they keep this one.")
	temporary := fs.Bool("temporary", false, "make the user choose a new password at their next sign-in")
	so := addStoreFlags(fs)
	names, code, ok := parseInterleaved(e, fs, args)
	if !ok {
		return code
	}
	if len(names) != 1 {
		fmt.Fprintln(e.stderr, "wardload user password: give exactly one user NAME (see --help)")
		return exitUsage
	}
	name := names[0]
	st, err := openStore(ctx, so, true)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload user password: %v\n", err)
		return exitFailure
	}
	defer st.Close()

	// Look the user up before asking for a password, so that a typo in
	// the name or a disabled account is told at once.
	// A name that is not storable text (invalid UTF-8, NUL) names nobody,
	// and PostgreSQL would refuse the lookup.
	u, err := (*wardload.User)(nil), wardload.NotFound("User")
	if wardload.StorableText(name) {
		u, err = st.FindUserByName(ctx, name)
	}
	if wardload.ErrorCode(err) == wardload.ENOTFOUND {
		return reportError(e, "user password", wardload.Errorf(wardload.ENOTFOUND, "There is no user called %q.", clipName(name)))
	} else if err != nil {
		return reportError(e, "user password", err)
	}
	if u.Disabled {
		return reportError(e, "user password", wardload.Errorf(wardload.EINVALID,
			"The account %s is disabled: enable it on the users page before setting a new password.", u.Name))
	}
	pw, err := readPassword(e, u.Name)
	if err != nil {
		return reportError(e, "user password", err)
	}
	hash, err := e.password.HashNew(pw, u.Name, u.PasswordHash)
	if err != nil {
		return reportError(e, "user password", err)
	}
	ctx = wardload.WithActor(ctx, wardload.Actor{Name: "cli"})
	if _, err := st.UpdateUser(ctx, u.ID, wardload.UserUpdate{PasswordHash: &hash, MustChangePassword: temporary}); err != nil {
		return reportError(e, "user password", err)
	}
	if *temporary {
		fmt.Fprintf(e.stdout, "set a temporary password for %s: they must choose a new one at their next sign-in; their sessions were ended\n", u.Name)
	} else {
		fmt.Fprintf(e.stdout, "set the password of %s; their sessions were ended\n", u.Name)
	}
	return exitOK
}

// clipName shortens a name for a message: at most 40 characters.
func clipName(s string) string {
	if r := []rune(s); len(r) > 40 {
		return string(r[:40]) + "…"
	}
	return s
}
