package main

import (
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"wardload/internal/wardload"
)

// TestAuditPurge: the command exports the old security events to a new
// file, deletes exactly those, keeps every data change and newer events,
// and is itself audited as done by "cli".
func TestAuditPurge(t *testing.T) {
	dir := t.TempDir()
	st := openTestStore(t, dir)
	ctx := context.Background()
	old := time.Date(2024, 6, 1, 12, 0, 0, 0, time.UTC)
	recent := time.Now().UTC().Add(-time.Hour)
	for _, e := range []*wardload.AuditEntry{
		{At: old, Actor: "n.nurse", Action: wardload.ActionSignInOK, Entity: "user"},
		{At: old, Actor: "(unknown name)", Action: wardload.ActionSignInFail, Entity: "user"},
		{At: old, Actor: "n.nurse", Action: wardload.ActionSignOut, Entity: "user"},
		{At: old, Actor: "m.manager", Action: wardload.ActionObservationExclude, Entity: "observation"},
		{At: old, Actor: "a.admin", Action: wardload.ActionUserUpdate, Entity: "user"},
		{At: recent, Actor: "n.nurse", Action: wardload.ActionSignInOK, Entity: "user"},
	} {
		if err := st.AppendAudit(ctx, e); err != nil {
			t.Fatal(err)
		}
	}
	export := filepath.Join(t.TempDir(), "purged.jsonl")
	for _, bad := range [][]string{
		{"audit", "purge", "--export", export},                           // no --before
		{"audit", "purge", "--before", "2025-01-01"},                     // no --export
		{"audit", "purge", "--before", "1 Jan", "--export", export},      // bad date
		{"audit", "purge", "--before", "2999-01-01", "--export", export}, // future
	} {
		if code, _, _ := runCLI(t, dir, "", bad...); code != exitUsage {
			t.Errorf("%v = %d, want %d", bad, code, exitUsage)
		}
	}
	code, out, errs := runCLI(t, dir, "", "audit", "purge", "--before", "2025-01-01", "--export", export)
	if code != exitOK || out != "" || !strings.Contains(errs, "purged 3 security events") {
		t.Fatalf("purge = %d %q %q", code, out, errs)
	}
	b, err := os.ReadFile(export)
	if err != nil {
		t.Fatal(err)
	}
	var actions []string
	for l := range strings.Lines(string(b)) {
		var e struct{ Action string }
		if err := json.Unmarshal([]byte(l), &e); err != nil {
			t.Fatal(err)
		}
		actions = append(actions, e.Action)
	}
	if strings.Join(actions, ",") != "signin.ok,signin.fail,signout" {
		t.Errorf("exported %v", actions)
	}
	es, _, _ := st.FindAudit(ctx, wardload.AuditFilter{})
	var left []string
	for _, e := range es {
		left = append(left, e.Action+"/"+e.Actor)
	}
	if strings.Join(left, ",") != "audit.purge/cli,signin.ok/n.nurse,user.update/a.admin,observation.exclude/m.manager" {
		t.Errorf("left %v", left)
	}
	// The export is never overwritten.
	if code, _, errs := runCLI(t, dir, "", "audit", "purge", "--before", "2025-01-01", "--export", export); code != exitFailure {
		t.Errorf("export over an existing file = %d %q", code, errs)
	}
}
