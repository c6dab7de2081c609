package server

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"wardload/internal/wardload"
)

// TestMaintainAppliesRetention: the periodic run exports and purges
// security events past the retention period, keeps the audit of data
// changes whatever its age, records the purge as done by "system", and
// forgets throttle counts older than a day.
func TestMaintainAppliesRetention(t *testing.T) {
	f := newFixture(t)
	ctx := context.Background()
	f.s.cfg.AuditExportDir = filepath.Join(t.TempDir(), "exports")
	now := f.clock.Now()
	old := now.Add(-f.s.cfg.SecurityRetention - time.Hour)
	for _, a := range append(wardload.SecurityActions(), wardload.ActionUserCreate, wardload.ActionSettingsSave) {
		if err := f.st.AppendAudit(ctx, &wardload.AuditEntry{At: old, Actor: "x", Action: a, Entity: "user"}); err != nil {
			t.Fatal(err)
		}
	}
	f.s.signin.addr.Reserve(ctx, "addr:old", now.Add(-25*time.Hour))
	f.s.signin.addr.Reserve(ctx, "addr:new", now)
	_, dataBefore, _ := f.st.FindAudit(ctx, wardload.AuditFilter{To: &now})

	f.s.maintain(ctx)
	files, _ := filepath.Glob(filepath.Join(f.s.cfg.AuditExportDir, "*.jsonl"))
	if len(files) != 1 {
		t.Fatalf("export files %v", files)
	}
	b, _ := os.ReadFile(files[0])
	if n := strings.Count(string(b), "\n"); n != len(wardload.SecurityActions()) {
		t.Errorf("export has %d lines, want %d:\n%s", n, len(wardload.SecurityActions()), b)
	}
	es, n, _ := f.st.FindAudit(ctx, wardload.AuditFilter{To: &now})
	if n != dataBefore-len(wardload.SecurityActions()) {
		t.Errorf("%d old rows left of %d", n, dataBefore)
	}
	for _, e := range es {
		if e.Action == wardload.ActionSignInOK || e.Action == wardload.ActionSignInFail {
			t.Errorf("old security event left: %+v", e)
		}
	}
	if ps := f.audit(t, wardload.ActionAuditPurge); len(ps) != 1 || ps[0].Actor != "system" {
		t.Errorf("purge rows %+v", ps)
	}
	if c, _ := f.st.FindSignInAttempts(ctx, "addr:old"); c.Attempts != 0 {
		t.Error("a day-old throttle count was kept")
	}
	if c, _ := f.st.FindSignInAttempts(ctx, "addr:new"); c.Attempts != 1 {
		t.Error("a fresh throttle count was purged")
	}
}

// TestSignOutIsAudited: a sign-out is a security event of its own.
func TestSignOutIsAudited(t *testing.T) {
	f := newFixture(t)
	res, _ := f.do(t, f.as(t, pNurseA, post("/signout", nil)))
	if res.StatusCode != 303 {
		t.Fatalf("sign-out = %d", res.StatusCode)
	}
	if es := f.audit(t, wardload.ActionSignOut); len(es) != 1 || es[0].Actor != "n.nurse" || es[0].UserID != f.users[pNurseA].ID {
		t.Errorf("signout rows %+v", es)
	}
}
