package main

import (
	"context"
	"strings"
	"testing"

	"wardload/internal/server"
	"wardload/internal/wardload"
)

func TestTokenCreateAndRevoke(t *testing.T) {
	dir := t.TempDir()
	st := openTestStore(t, dir)
	ctx := context.Background()
	for _, c := range []string{"w2", "w3"} {
		if err := st.CreateWard(ctx, &wardload.Ward{Code: c, Name: "Ward " + c, TimeZone: "Europe/London"}); err != nil {
			t.Fatal(err)
		}
	}

	code, out, errs := runCLI(t, dir, "", "token", "create", "--ward", "w2,w3", "--name", "roster-planner")
	if code != exitOK {
		t.Fatalf("token create = %d, %q, %q", code, out, errs)
	}
	secret := strings.TrimSpace(out)
	if !strings.HasPrefix(secret, "wlk_") || strings.Count(out, "\n") != 1 {
		t.Fatalf("stdout = %q, want the secret alone on one line", out)
	}
	tok, err := st.FindTokenByName(ctx, "roster-planner")
	if err != nil {
		t.Fatal(err)
	}
	if tok.Hash != server.TokenHash(secret) || tok.Hash == secret || len(tok.WardIDs) != 2 || !tok.Active() {
		t.Errorf("stored token = %+v; want the hash of the printed secret, two wards, active", tok)
	}
	es, _, err := st.FindAudit(ctx, wardload.AuditFilter{Action: new("token.create")})
	// One row per ward of the token (w2 and w3), each by cli.
	if err != nil || len(es) != 2 || es[0].Actor != "cli" || es[1].Actor != "cli" || es[0].WardID == es[1].WardID {
		t.Fatalf("audit of token.create = %+v, %v; want one row by cli for each ward", es, err)
	}

	// The same name again is refused as bad input.
	if code, _, errs := runCLI(t, dir, "", "token", "create", "--ward", "w2", "--name", "roster-planner"); code != exitUsage {
		t.Errorf("duplicate name = %d (%s), want %d", code, errs, exitUsage)
	}

	code, out, errs = runCLI(t, dir, "", "token", "revoke", "roster-planner")
	if code != exitOK || out != "revoked token roster-planner\n" {
		t.Fatalf("token revoke = %d, %q, %q", code, out, errs)
	}
	if tok, err = st.FindTokenByName(ctx, "roster-planner"); err != nil || tok.Active() {
		t.Errorf("after revoke: %+v, %v; want revoked", tok, err)
	}
	if code, _, _ := runCLI(t, dir, "", "token", "revoke", "roster-planner"); code != exitUsage {
		t.Errorf("second revoke = %d, want %d (already revoked)", code, exitUsage)
	}
}

func TestTokenBadInput(t *testing.T) {
	dir := t.TempDir()
	st := openTestStore(t, dir)
	// A real ward, so that "bad name" fails on the name and not the ward.
	if err := st.CreateWard(context.Background(), &wardload.Ward{Code: "w2", Name: "Ward w2", TimeZone: "Europe/London"}); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name    string
		args    []string
		wantErr string
	}{
		{"no ward", []string{"token", "create", "--name", "x"}, "give --ward CODE[,CODE] and --name NAME"},
		{"no name", []string{"token", "create", "--ward", "w2"}, "give --ward CODE[,CODE] and --name NAME"},
		{"unknown ward", []string{"token", "create", "--ward", "nope", "--name", "x"}, `no ward with code "nope"`},
		{"bad name", []string{"token", "create", "--ward", "w2", "--name", "Bad Name"}, "Token name must be"},
		{"revoke unknown", []string{"token", "revoke", "nobody"}, `no token called "nobody"`},
		{"revoke without name", []string{"token", "revoke"}, "give exactly one token NAME"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runCLI(t, dir, "", tc.args...)
			if code != exitUsage || out != "" || !strings.Contains(errs, tc.wantErr) {
				t.Errorf("= %d, %q, %q; want %d, no output, a message with %q", code, out, errs, exitUsage, tc.wantErr)
			}
		})
	}
	if _, err := st.FindTokenByName(context.Background(), "x"); wardload.ErrorCode(err) != wardload.ENOTFOUND {
		t.Errorf("a refused token was stored: %v", err)
	}
}

// TestStaffingOfficeAndWriteToken: `user add --role staffing_office` makes
// a staffing office account for several wards, and `token create
// --write-staffing` a token that may send planned staff; without the flag
// a token stays read-only.
func TestStaffingOfficeAndWriteToken(t *testing.T) {
	dir := t.TempDir()
	st := openTestStore(t, dir)
	ctx := context.Background()
	for _, c := range []string{"w2", "w3"} {
		if err := st.CreateWard(ctx, &wardload.Ward{Code: c, Name: "Ward " + c, TimeZone: "Europe/London"}); err != nil {
			t.Fatal(err)
		}
	}
	code, out, errs := runCLI(t, dir, "office staffing passphrase\n", "user", "add", "--role", "staffing_office", "--ward", "w2,w3", "s.office")
	if code != exitOK || out != "created user s.office (staffing_office)\n" {
		t.Fatalf("user add = %d, %q, %q", code, out, errs)
	}
	u, err := st.FindUserByName(ctx, "s.office")
	if err != nil || u.Role != wardload.RoleStaffingOffice || len(u.WardIDs) != 2 {
		t.Fatalf("stored user %+v, %v", u, err)
	}
	if code, _, _ := runCLI(t, dir, "office staffing passphrase\n", "user", "add", "--role", "office", "x.office"); code != exitUsage {
		t.Errorf("unknown role = %d, want %d", code, exitUsage)
	}
	for _, tc := range []struct {
		name  string
		args  []string
		write bool
	}{
		{"planner-rw", []string{"--write-staffing"}, true},
		{"planner-ro", nil, false},
	} {
		args := append([]string{"token", "create", "--ward", "w2,w3", "--name", tc.name}, tc.args...)
		if code, out, errs := runCLI(t, dir, "", args...); code != exitOK {
			t.Fatalf("%s: %d %q %q", tc.name, code, out, errs)
		}
		tok, err := st.FindTokenByName(ctx, tc.name)
		if err != nil || tok.WriteStaffing != tc.write {
			t.Errorf("%s: %+v, %v; want WriteStaffing %v", tc.name, tok, err, tc.write)
		}
	}
}
