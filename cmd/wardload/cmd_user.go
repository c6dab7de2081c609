package main

import (
	"bufio"
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"strings"

	"golang.org/x/term"

	"wardload/internal/password"
	"wardload/internal/wardload"
)

func init() {
	register(command{name: "user add", summary: "create a staff account (password from stdin or a prompt)", run: runUserAdd})
}

// runUserAdd creates a user. The password is never a flag, so that it does
// not end up in shell history or the process list: it is read from a
// terminal prompt, or as the first line of piped stdin.
func runUserAdd(ctx context.Context, e *env, args []string) int {
	fs := newFlagSet(e, "user add", "NAME",
		"Create a staff account. The password is prompted for on a terminal, or read as the first\n"+
			"line of stdin. On a new database, create the first admin with --role admin.")
	role := fs.String("role", wardload.RoleChargeNurse, "role: charge_nurse, manager, staffing_office or admin")
	wards := fs.String("ward", "", "comma-separated codes of the wards the user belongs to")
	so := addStoreFlags(fs)
	names, code, ok := parseInterleaved(e, fs, args) // flags may follow NAME
	if !ok {
		return code
	}
	if len(names) != 1 {
		fmt.Fprintln(e.stderr, "wardload user add: give exactly one user NAME (see --help)")
		return exitUsage
	}
	// Check name and role before asking for a password; the placeholder
	// hash only gets past Validate's own check and is replaced below.
	u := &wardload.User{Name: names[0], Role: *role, PasswordHash: "pending"}
	if err := u.Validate(); err != nil {
		return reportError(e, "user add", err)
	}

	pw, err := readPassword(e, u.Name)
	if err != nil {
		return reportError(e, "user add", err)
	}
	if _, err := password.Check(pw, u.Name); err != nil {
		return reportError(e, "user add", err)
	}

	st, err := openStore(ctx, so, true)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload user add: %v\n", err)
		return exitFailure
	}
	defer st.Close()

	if u.WardIDs, err = wardIDs(ctx, st, *wards); err != nil {
		return reportError(e, "user add", err)
	}
	if u.PasswordHash, err = e.password.HashNew(pw, u.Name, ""); err != nil {
		return reportError(e, "user add", err)
	}
	ctx = wardload.WithActor(ctx, wardload.Actor{Name: "cli"})
	if err := st.CreateUser(ctx, u); err != nil {
		return reportError(e, "user add", err)
	}
	fmt.Fprintf(e.stdout, "created user %s (%s)\n", u.Name, u.Role)
	if u.Role != wardload.RoleAdmin {
		admin := wardload.RoleAdmin
		if _, n, err := st.FindUsers(ctx, wardload.UserFilter{Role: &admin, Limit: 1}); err == nil && n == 0 {
			fmt.Fprintln(e.stderr, "note: there is no admin yet; create one with: wardload user add --role admin NAME")
		}
	}
	return exitOK
}

// wardIDs resolves a comma-separated list of ward codes.
func wardIDs(ctx context.Context, st wardload.WardService, codes string) ([]int64, error) {
	var ids []int64
	for code := range strings.SplitSeq(codes, ",") {
		if code = strings.TrimSpace(code); code == "" {
			continue
		}
		w, err := st.FindWardByCode(ctx, code)
		if wardload.ErrorCode(err) == wardload.ENOTFOUND {
			return nil, wardload.FieldErrorf(wardload.EINVALID, "ward", "There is no ward with code %q (see wardload ward list).", code)
		} else if err != nil {
			return nil, err
		}
		ids = append(ids, w.ID)
	}
	return ids, nil
}

// readPassword prompts twice on a terminal, without echo; otherwise it
// takes the first line of stdin.
func readPassword(e *env, name string) (string, error) {
	if f, ok := e.stdin.(*os.File); ok && term.IsTerminal(int(f.Fd())) {
		fmt.Fprintf(e.stderr, "Password for %s (%d to %d characters; a few unrelated words make a good one): ", name, password.MinLength, password.MaxLength)
		pw, err := term.ReadPassword(int(f.Fd()))
		fmt.Fprintln(e.stderr)
		if err != nil {
			return "", fmt.Errorf("read password: %w", err)
		}
		fmt.Fprint(e.stderr, "Repeat the password: ")
		again, err := term.ReadPassword(int(f.Fd()))
		fmt.Fprintln(e.stderr)
		if err != nil {
			return "", fmt.Errorf("read password: %w", err)
		}
		if string(pw) != string(again) {
			return "", wardload.FieldErrorf(wardload.EINVALID, "password", "The two passwords differ.")
		}
		return string(pw), nil
	}
	line, err := bufio.NewReader(e.stdin).ReadString('\n')
	if err != nil && !errors.Is(err, io.EOF) {
		return "", fmt.Errorf("read password: %w", err)
	}
	line = strings.TrimRight(line, "\r\n")
	if line == "" {
		return "", wardload.FieldErrorf(wardload.EINVALID, "password", "No password given: type it at the prompt or pipe it as the first line of stdin.")
	}
	return line, nil
}

// reportError prints err for the person at the terminal and returns the
// exit status: 2 when their input was wrong, 1 when wardload failed.
func reportError(e *env, cmd string, err error) int {
	switch wardload.ErrorCode(err) {
	case wardload.EINVALID, wardload.ECONFLICT, wardload.ENOTFOUND:
		fmt.Fprintf(e.stderr, "wardload %s: %s\n", cmd, wardload.ErrorMessage(err))
		return exitUsage
	case wardload.EINTERNAL:
		// The operator of the command line may see internal text: it is
		// their database, and they need it to fix it.
		fmt.Fprintf(e.stderr, "wardload %s: %v\n", cmd, err)
		return exitFailure
	default:
		fmt.Fprintf(e.stderr, "wardload %s: %s\n", cmd, wardload.ErrorMessage(err))
		return exitFailure
	}
}
