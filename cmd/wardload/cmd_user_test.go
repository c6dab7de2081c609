package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wardload/internal/demo"
	"wardload/internal/password"
	"wardload/internal/wardload"
)

// testPassword are the argon2id parameters of the hashes the tests'
// commands and servers make: production parameters cost 64 MiB per hash;
// the hash itself is tested in internal/password.
var testPassword = password.Params{MemoryKiB: 64, Time: 1, Threads: 1, SaltLen: 16, KeyLen: 32}

// runCLI runs the command in args in-process against the SQLite database
// in dir. --data-dir goes right after the command's name (one or two
// words) because flags end at the first argument that is not a flag.
func runCLI(t *testing.T, dir, stdin string, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errb bytes.Buffer
	e := &env{stdin: strings.NewReader(stdin), stdout: &out, stderr: &errb, getenv: func(string) string { return "" }, password: testPassword}
	words := 1
	if _, ok := commands[strings.Join(args[:min(2, len(args))], " ")]; ok && len(args) >= 2 {
		words = 2
	}
	full := append(append(append([]string{}, args[:words]...), "--data-dir", dir), args[words:]...)
	code = run(context.Background(), full, e)
	return code, out.String(), errb.String()
}

// openTestStore opens the store the commands used, for checking what they did.
func openTestStore(t *testing.T, dir string) *openedStore {
	t.Helper()
	st, err := openStore(context.Background(), &storeOptions{DataDir: dir}, true)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	return st
}

func TestUserAdd(t *testing.T) {
	dir := t.TempDir()
	code, out, errs := runCLI(t, dir, "first admin passphrase\n", "user", "add", "--role", "admin", "ada.admin")
	if code != exitOK || out != "created user ada.admin (admin)\n" {
		t.Fatalf("user add = %d, %q, %q; want 0 and the created line", code, out, errs)
	}

	st := openTestStore(t, dir)
	u, err := st.FindUserByName(context.Background(), "ada.admin")
	if err != nil {
		t.Fatal(err)
	}
	if u.Role != wardload.RoleAdmin {
		t.Errorf("role = %q; want admin", u.Role)
	}
	if ok, err := password.Verify("first admin passphrase", u.PasswordHash); err != nil || !ok {
		t.Errorf("stored hash does not verify the piped password: %v, %v", ok, err)
	}
	if strings.Contains(u.PasswordHash, "first admin passphrase") {
		t.Error("the password is stored in clear")
	}
}

func TestUserAddWithWard(t *testing.T) {
	dir := t.TempDir()
	st := openTestStore(t, dir)
	ctx := context.Background()
	w := &wardload.Ward{Code: "w2", Name: "Ward 2", TimeZone: "Europe/London"}
	if err := st.CreateWard(ctx, w); err != nil {
		t.Fatal(err)
	}
	st.Close()

	code, out, errs := runCLI(t, dir, "a long passphrase here\r\nsecond line ignored\n", "user", "add", "--role", "manager", "--ward", "w2", "m.ward")
	if code != exitOK || out != "created user m.ward (manager)\n" {
		t.Fatalf("user add = %d, %q, %q", code, out, errs)
	}
	if !strings.Contains(errs, "no admin yet") {
		t.Errorf("stderr = %q; want a note that no admin exists", errs)
	}
	st = openTestStore(t, dir)
	u, err := st.FindUserByName(ctx, "m.ward")
	if err != nil {
		t.Fatal(err)
	}
	if len(u.WardIDs) != 1 || u.WardIDs[0] != w.ID {
		t.Errorf("wards = %v; want [%d]", u.WardIDs, w.ID)
	}
	if ok, _ := password.Verify("a long passphrase here", u.PasswordHash); !ok {
		t.Error("password with CRLF line end not stored as typed without the line end")
	}
}

func TestUserAddRejects(t *testing.T) {
	for _, tc := range []struct {
		name   string
		stdin  string
		args   []string
		code   int
		stderr string
	}{
		{"short password", "short\n", []string{"user", "add", "nine.chars"}, exitUsage, "at least 15 characters"},
		{"no password", "", []string{"user", "add", "no.pw"}, exitUsage, "No password given"},
		{"bad role", "long enough passphrase\n", []string{"user", "add", "--role", "boss", "bad.role"}, exitUsage, "Role must be"},
		{"bad name", "long enough passphrase\n", []string{"user", "add", "Has Spaces"}, exitUsage, "User name must be"},
		{"no name", "long enough passphrase\n", []string{"user", "add"}, exitUsage, "exactly one user NAME"},
		{"unknown ward", "long enough passphrase\n", []string{"user", "add", "--ward", "nope", "x.ward"}, exitUsage, `no ward with code "nope"`},
		{"password flag", "", []string{"user", "add", "--password", "secret12345", "pw.flag"}, exitUsage, "flag provided but not defined"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			code, out, errs := runCLI(t, dir, tc.stdin, tc.args...)
			if code != tc.code || out != "" || !strings.Contains(errs, tc.stderr) {
				t.Fatalf("= %d, %q, %q; want %d, no output, stderr containing %q", code, out, errs, tc.code, tc.stderr)
			}
			st := openTestStore(t, dir)
			if _, n, err := st.FindUsers(context.Background(), wardload.UserFilter{}); err != nil || n != 0 {
				t.Errorf("users after rejected add = %d, %v; want 0", n, err)
			}
		})
	}
}

func TestUserAddDuplicate(t *testing.T) {
	dir := t.TempDir()
	if code, _, errs := runCLI(t, dir, "long enough passphrase\n", "user", "add", "dup.user"); code != exitOK {
		t.Fatalf("first add = %d, %q", code, errs)
	}
	code, out, errs := runCLI(t, dir, "long enough passphrase\n", "user", "add", "dup.user")
	if code != exitUsage || out != "" || errs == "" {
		t.Fatalf("second add = %d, %q, %q; want exit 2 with a message", code, out, errs)
	}
}

func TestUserAddDatabaseFailure(t *testing.T) {
	// A data directory that is a regular file cannot hold a database.
	file := filepath.Join(t.TempDir(), "not-a-dir")
	if err := os.WriteFile(file, []byte("x"), 0o600); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCLI(t, file, "long enough passphrase\n", "user", "add", "db.fail")
	if code != exitFailure || out != "" || errs == "" {
		t.Fatalf("= %d, %q, %q; want exit 1 with a message", code, out, errs)
	}
}

func TestWardList(t *testing.T) {
	t.Parallel()
	dir, _ := mustDemoDataDir(t)
	st := openTestStore(t, dir)
	ctx := context.Background()
	dw, err := st.FindWardByCode(ctx, demo.WardCode)
	if err != nil {
		t.Fatal(err)
	}
	// Created after the demo ward and out of code order, so the list's
	// order is the codes' and not the rows'.
	for _, w := range []*wardload.Ward{
		{Code: "b-ward", Name: "Second by code", TimeZone: "UTC"},
		{Code: "a-ward", Name: "First by code", TimeZone: "Europe/London"},
	} {
		if err := st.CreateWard(ctx, w); err != nil {
			t.Fatal(err)
		}
	}
	st.Close()

	code, out, errs := runCLI(t, dir, "", "ward", "list")
	want := "a-ward\tFirst by code\tactive\nb-ward\tSecond by code\tactive\n" + demo.WardCode + "\t" + dw.Name + "\tactive\n"
	if code != exitOK || out != want || errs != "" {
		t.Fatalf("ward list = %d, %q, %q; want 0, %q", code, out, errs, want)
	}
	if code, _, errs := runCLI(t, dir, "", "ward", "list", "extra"); code != exitUsage || errs == "" {
		t.Errorf("ward list extra = %d, %q; want exit 2", code, errs)
	}
}

// ward list reads an existing database: a wrong --data-dir is reported in one
// line and leaves no empty database behind.
func TestWardListNeedsDatabase(t *testing.T) {
	dir := t.TempDir()
	code, out, errs := runCLI(t, dir, "", "ward", "list")
	if code != exitFailure || out != "" || strings.Count(errs, "\n") != 1 || !strings.Contains(errs, "wardload migrate") {
		t.Errorf("ward list on an empty dir: %d %q %q", code, out, errs)
	}
	if _, err := os.Stat(filepath.Join(dir, "wardload.db")); !os.IsNotExist(err) {
		t.Errorf("ward list created a database file: %v", err)
	}
}

// Flags may follow NAME, as they may follow FILE in the CSV commands.
func TestUserAddFlagsAfterName(t *testing.T) {
	dir := t.TempDir()
	var out, errb bytes.Buffer
	e := &env{stdin: strings.NewReader("a long password 1\n"), stdout: &out, stderr: &errb, getenv: func(string) string { return "" }, password: testPassword}
	if code := run(context.Background(), []string{"user", "add", "ada.admin", "--role", "admin", "--data-dir", dir}, e); code != exitOK {
		t.Fatalf("exit %d: %s", code, errb.String())
	}
	if !strings.Contains(out.String(), "created user ada.admin (admin)") {
		t.Errorf("stdout %q", out.String())
	}
}

// A command group answers --help with its sub-commands on standard output;
// bare, it is a usage error that lists them on standard error. The same
// holds for wardload itself.
func TestGroupHelp(t *testing.T) {
	for _, tc := range []struct {
		args   []string
		code   int
		stdout bool // the listing on standard output, and nothing on standard error
		want   string
	}{
		{[]string{"user", "--help"}, exitOK, true, "user add"},
		{[]string{"token", "-h"}, exitOK, true, "token revoke"},
		{[]string{"export"}, exitUsage, false, "export projections"},
		{[]string{"ward", "help"}, exitOK, true, "ward list"},
		{[]string{"--help"}, exitOK, true, "user add"},
		{[]string{"help"}, exitOK, true, "--version"},
		{nil, exitUsage, false, "user add"},
	} {
		var out, errb bytes.Buffer
		e := &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb, getenv: func(string) string { return "" }}
		code := run(context.Background(), tc.args, e)
		listing, other := errb.String(), out.String()
		if tc.stdout {
			listing, other = other, listing
		}
		if code != tc.code || !strings.Contains(listing, tc.want) || other != "" {
			t.Errorf("%q: exit %d, stdout %q, stderr %q; want %d listing %q on stdout=%v", tc.args, code, out.String(), errb.String(), tc.code, tc.want, tc.stdout)
		}
	}
}

// wardload --version is the version command.
func TestVersionFlag(t *testing.T) {
	for _, args := range [][]string{{"--version"}, {"version"}} {
		var out, errb bytes.Buffer
		e := &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb, getenv: func(string) string { return "" }}
		if code := run(context.Background(), args, e); code != exitOK || out.String() != "wardload "+version+"\n" || errb.Len() != 0 {
			t.Errorf("%q: exit %d, stdout %q, stderr %q", args, code, out.String(), errb.String())
		}
	}
	var out, errb bytes.Buffer
	e := &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb, getenv: func(string) string { return "" }}
	if code := run(context.Background(), []string{"--version", "extra"}, e); code != exitUsage || out.Len() != 0 {
		t.Errorf("--version extra: exit %d, stdout %q", code, out.String())
	}
}
