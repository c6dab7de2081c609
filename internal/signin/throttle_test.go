package signin

import (
	"context"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"wardload/internal/sqlite"
)

func mustStore(t *testing.T) *sqlite.Store {
	t.Helper()
	ctx := context.Background()
	st, err := sqlite.Open(ctx, sqlite.Config{Path: filepath.Join(t.TempDir(), "w.db")})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	if err := st.Migrate(ctx); err != nil {
		t.Fatal(err)
	}
	return st
}

func TestThrottleReserveCancelClear(t *testing.T) {
	ctx := context.Background()
	th := Throttle{Rule: AccountRule, Store: mustStore(t)}
	now := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	for i := range AccountRule.After {
		if d, err := th.Reserve(ctx, "k", now); d != 0 || err != nil {
			t.Fatalf("attempt %d: %v %v", i+1, d, err)
		}
	}
	if d, _ := th.Reserve(ctx, "k", now); d != time.Second {
		t.Errorf("after the limit: %v, want 1s", d)
	}
	// A given-back attempt frees its place; a success clears the key.
	if err := th.Cancel(ctx, "k"); err != nil {
		t.Fatal(err)
	}
	if d, _ := th.Reserve(ctx, "k", now); d != 0 {
		t.Errorf("after cancel: %v, want a reservation", d)
	}
	if err := th.Clear(ctx, "k"); err != nil {
		t.Fatal(err)
	}
	if d, err := th.Wait(ctx, "k", now); d != 0 || err != nil {
		t.Errorf("after clear: %v %v", d, err)
	}
}

func TestPurgeForgetsOldKeys(t *testing.T) {
	ctx := context.Background()
	st := mustStore(t)
	now := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	th := Throttle{Rule: AddressRule, Store: st}
	th.Reserve(ctx, "old", now.Add(-25*time.Hour))
	th.Reserve(ctx, "new", now.Add(-time.Hour))
	if n, err := Purge(ctx, st, now); n != 1 || err != nil {
		t.Fatalf("purged %d %v, want 1", n, err)
	}
	if c, _ := st.FindSignInAttempts(ctx, "new"); c.Attempts != 1 {
		t.Errorf("the recent key was purged")
	}
}

func TestKeysAreSharedAndDigestsHideNames(t *testing.T) {
	ctx := context.Background()
	st := mustStore(t)
	a, b := &Keys{Store: st}, &Keys{Store: st} // two instances on one database
	const typed = "Tr0ub4dor&3"
	da, err := a.NameDigest(ctx, typed)
	if err != nil {
		t.Fatal(err)
	}
	db, _ := b.NameDigest(ctx, typed)
	other, _ := a.NameDigest(ctx, "tr0ub4dor&3")
	if da != db || da == other || len(da) != 64 || strings.Contains(strings.ToLower(da), "tr0ub") {
		t.Errorf("digests %q %q %q", da, db, other)
	}
	ka, _ := a.Device(ctx)
	kb, _ := b.Device(ctx)
	if string(ka) != string(kb) || len(ka) != 32 {
		t.Error("instances on one database have different device keys")
	}
}
