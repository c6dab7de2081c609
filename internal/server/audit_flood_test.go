package server

import (
	"context"
	"fmt"
	"net/http/httptest"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"wardload/internal/wardload"
)

func TestThrottledFloodAuditRowsPostgres(t *testing.T) {
	clock := &testClock{t: time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)}
	testThrottledFlood(t, mustSharedPostgres(t, 2, clock.Now), clock)
}

func TestThrottledFloodAuditRowsSQLite(t *testing.T) {
	testThrottledFlood(t, mustSharedSQLite(t), &testClock{t: time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)})
}

// testThrottledFlood: 10,000 sign-in attempts from one address within one
// audit window, spread over every instance, half of them naming an
// account and half a name that matches none (a password typed into the
// name box). They add a bounded number of audit rows (one per instance
// and source in the window) and throttle rows (one per key), and the
// typed name is stored nowhere: not in the audit log, not as a throttle
// key.
func testThrottledFlood(t *testing.T, db *sharedDB, clock *testClock) {
	ctx := context.Background()
	h, err := testPassword.Hash("pw of n.nurse 7c1e")
	if err != nil {
		t.Fatal(err)
	}
	if err := db.stores[0].CreateUser(wardload.WithActor(ctx, wardload.Actor{Name: "test"}),
		&wardload.User{Name: "n.nurse", Role: wardload.RoleChargeNurse, PasswordHash: h}); err != nil {
		t.Fatal(err)
	}
	var checked atomic.Int64
	ins := startInstances(t, db, clock, &checked, nil)
	count := func() int {
		_, n, err := db.stores[0].FindAudit(ctx, wardload.AuditFilter{Limit: 1})
		if err != nil {
			t.Fatal(err)
		}
		return n
	}
	const flood, typed = 10_000, "Horse-Battery-9!"
	before := count()
	codes := map[int]int{}
	for i := range flood {
		name := "n.nurse"
		if i%2 == 1 {
			name = typed
		}
		rec := httptest.NewRecorder()
		ins[i%len(ins)].s.Handler().ServeHTTP(rec, signInForm(name, fmt.Sprintf("guess %d", i), "/"))
		codes[rec.Code]++
	}
	added := count() - before
	keys := db.keys(t)
	t.Logf("%d instance(s): %d attempts (%v), %d checked, %d audit rows added, %d throttle rows",
		len(ins), flood, codes, checked.Load(), added, len(keys))
	// Checked: the account's 3 and the unknown name's 3, then the address
	// limit (20 attempts) stops everything.
	if codes[401] != int(checked.Load()) || checked.Load() > 20 || codes[429] != flood-codes[401] {
		t.Errorf("statuses %v with %d checked; want at most 20 checked and the rest 429", codes, checked.Load())
	}
	if added > len(ins) {
		t.Errorf("%d attempts added %d audit rows, want at most one per instance", flood, added)
	}
	if len(keys) != 3 { // the account, the unknown name, the address
		t.Errorf("throttle keys %q, want 3", keys)
	}
	es, _, err := db.stores[0].FindAudit(ctx, wardload.AuditFilter{})
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range es {
		for _, v := range []string{e.Actor, e.Before, e.After} {
			if strings.Contains(strings.ToLower(v), "horse") {
				t.Errorf("typed name kept in audit row %s: %q", e.Action, v)
			}
		}
	}
	for _, k := range keys {
		if strings.Contains(strings.ToLower(k), "horse") || strings.Contains(k, "n.nurse") {
			t.Errorf("throttle key %q holds a typed name", k)
		}
	}
}
