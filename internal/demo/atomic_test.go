package demo_test

import (
	"context"
	"errors"
	"testing"

	"wardload/internal/demo"
	"wardload/internal/wardload"
)

// failingStore fails CreateObservations, a step after the ward, tiers,
// shifts, accounts and settings are created, and passes Atomically on to
// the store it wraps.
type failingStore struct {
	wardload.Store
	calls int
}

var errInjected = errors.New("injected failure")

func (f *failingStore) CreateObservations(ctx context.Context, obs []*wardload.Observation) (string, error) {
	f.calls++
	return "", errInjected
}

func (f *failingStore) Atomically(ctx context.Context, fn func(context.Context) error) error {
	return f.Store.(demo.Atomic).Atomically(ctx, fn)
}

// Issue 15 item 7: a seed that fails half-way leaves nothing on SQLite —
// no ward, no account whose password was never shown, no audit row — and
// the next start seeds the demo in full and shows the passwords.
func TestSeedFailureLeavesNothing(t *testing.T) {
	t.Parallel() // the seeds are independent; PostgreSQL's mostly waits
	ctx := context.Background()
	st := mustOpen(t)
	if _, ok := st.(demo.Atomic); !ok {
		t.Fatal("the SQLite store does not implement demo.Atomic")
	}
	f := &failingStore{Store: st}
	res, err := demo.Seed(ctx, f, now, testParams)
	if !errors.Is(err, errInjected) || res != nil {
		t.Fatalf("Seed = %v, %v; want the injected failure", res, err)
	}
	if f.calls == 0 {
		t.Fatal("the failure was not reached: the test proves nothing")
	}
	if w, err := st.FindWardByCode(ctx, demo.WardCode); wardload.ErrorCode(err) != wardload.ENOTFOUND {
		t.Errorf("demo ward after a failed seed: %v, %v; want ENOTFOUND", w, err)
	}
	if _, n, err := st.FindWards(ctx, wardload.WardFilter{}); err != nil || n != 0 {
		t.Errorf("wards after a failed seed: %d, %v; want 0", n, err)
	}
	if _, n, err := st.FindUsers(ctx, wardload.UserFilter{}); err != nil || n != 0 {
		t.Errorf("accounts after a failed seed: %d, %v; want 0", n, err)
	}
	if _, n, err := st.FindAudit(ctx, wardload.AuditFilter{}); err != nil || n != 0 {
		t.Errorf("audit rows after a failed seed: %d, %v; want 0", n, err)
	}

	// checkSeed seeds st again and checks the whole scenario, accounts
	// signing in with the passwords shown included.
	checkSeed(t, st)
}
