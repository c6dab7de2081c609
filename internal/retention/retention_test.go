package retention

import (
	"bufio"
	"context"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"wardload/internal/sqlite"
	"wardload/internal/wardload"
)

func TestParsePeriod(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want time.Duration
		ok   bool
	}{
		{"365d", 365 * 24 * time.Hour, true},
		{"90d", 90 * 24 * time.Hour, true},
		{"0", 0, true},
		{"2160h", 90 * 24 * time.Hour, true},
		{"0d", 0, false},
		{"-5d", 0, false},
		{"1m", 0, false},
		{"forever", 0, false},
	} {
		got, err := ParsePeriod(tc.in)
		if (err == nil) != tc.ok || got != tc.want {
			t.Errorf("ParsePeriod(%q) = %v, %v; want %v ok=%v", tc.in, got, err, tc.want, tc.ok)
		}
	}
	if FormatPeriod(DefaultPeriod) != "365d" || FormatPeriod(0) != "0" || FormatPeriod(90*time.Minute) != "1h30m0s" {
		t.Error("FormatPeriod")
	}
}

// TestPurgeToDirExportsThenDeletes: old security events go to a new
// 0600 file, one JSON object a line, and out of the log; a data change
// of the same age and newer events stay; an export that cannot be
// written deletes nothing.
func TestPurgeToDirExportsThenDeletes(t *testing.T) {
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "cli"})
	now := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	st, err := sqlite.Open(ctx, sqlite.Config{Path: filepath.Join(t.TempDir(), "w.db"), Now: func() time.Time { return now }})
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	if err := st.Migrate(ctx); err != nil {
		t.Fatal(err)
	}
	old := now.Add(-400 * 24 * time.Hour)
	for _, e := range []*wardload.AuditEntry{
		{At: old, Actor: "n.nurse", Action: wardload.ActionSignInOK, Entity: "user", After: `{"address":"192.0.2.1"}`},
		{At: old.Add(time.Minute), Actor: "(unknown name)", Action: wardload.ActionSignInFail, Entity: "user"},
		{At: old, Actor: "m.manager", Action: wardload.ActionCensusCreate, Entity: "census"},
		{At: now, Actor: "n.nurse", Action: wardload.ActionSignInOK, Entity: "user"},
	} {
		if err := st.AppendAudit(ctx, e); err != nil {
			t.Fatal(err)
		}
	}
	dir := filepath.Join(t.TempDir(), "exports")
	path, n, err := PurgeToDir(ctx, st, now.Add(-DefaultPeriod), now, dir)
	if err != nil || n != 2 {
		t.Fatalf("purged %d: %v", n, err)
	}
	if fi, err := os.Stat(path); err != nil || fi.Mode().Perm() != ExportMode {
		t.Fatalf("export %s: %v %v", path, fi, err)
	}
	f, _ := os.Open(path)
	defer f.Close()
	var actions []string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		var l line
		if err := json.Unmarshal(sc.Bytes(), &l); err != nil {
			t.Fatal(err)
		}
		actions = append(actions, l.Action)
	}
	if strings.Join(actions, ",") != "signin.ok,signin.fail" {
		t.Errorf("exported %v", actions)
	}
	es, _, _ := st.FindAudit(ctx, wardload.AuditFilter{})
	var left []string
	for _, e := range es {
		left = append(left, e.Action)
	}
	if strings.Join(left, ",") != "audit.purge,signin.ok,census.create" {
		t.Errorf("left %v", left)
	}
	// A second purge the same second cannot overwrite the export.
	if _, _, err := PurgeToDir(ctx, st, now.Add(-DefaultPeriod), now, dir); !errors.Is(err, os.ErrExist) {
		t.Errorf("second export over the first: %v", err)
	}
	// Nothing left: no file, no audit row.
	if path, n, err := PurgeToDir(ctx, st, now.Add(-DefaultPeriod), now.Add(time.Second), dir); path != "" || n != 0 || err != nil {
		t.Errorf("empty purge = %q %d %v", path, n, err)
	}
	if files, _ := os.ReadDir(dir); len(files) != 1 {
		t.Errorf("%d export files, want the first only", len(files))
	}
	if _, n, _ := st.FindAudit(ctx, wardload.AuditFilter{Action: new(wardload.ActionAuditPurge)}); n != 1 {
		t.Errorf("%d purge rows, want 1", n)
	}
	// A writer that fails: nothing deleted.
	if err := st.AppendAudit(ctx, &wardload.AuditEntry{At: old, Actor: "x", Action: wardload.ActionSignOut, Entity: "user"}); err != nil {
		t.Fatal(err)
	}
	if _, err := Purge(ctx, st, now.Add(-DefaultPeriod), failWriter{}); err == nil {
		t.Error("purge with a failing export succeeded")
	}
	if _, n, _ := st.FindAudit(ctx, wardload.AuditFilter{Action: new(wardload.ActionSignOut)}); n != 1 {
		t.Error("deleted although the export failed")
	}
}

type failWriter struct{}

func (failWriter) Write([]byte) (int, error) { return 0, errors.New("disk full") }
