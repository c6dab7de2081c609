package sqlite_test

import (
	"context"
	"errors"
	"testing"

	"wardload/internal/wardload"
)

// Atomically: an error from fn keeps nothing; a method that fails inside
// keeps nothing of its own (savepoint) while the rest commits; finders
// inside see the batch's uncommitted writes.
func TestAtomically(t *testing.T) {
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	s := MustOpen(t, nil)
	boom := errors.New("boom")
	err := s.Atomically(ctx, func(ctx context.Context) error {
		if err := s.CreateWard(ctx, &wardload.Ward{Code: "w1", Name: "Ward 1", TimeZone: "UTC"}); err != nil {
			return err
		}
		if _, err := s.FindWardByCode(ctx, "w1"); err != nil {
			t.Errorf("finder inside the batch: %v", err)
		}
		return boom
	})
	if !errors.Is(err, boom) {
		t.Fatalf("Atomically = %v, want fn's error", err)
	}
	if _, n, _ := s.FindWards(ctx, wardload.WardFilter{}); n != 0 {
		t.Errorf("after a failed batch: %d wards, want 0", n)
	}

	err = s.Atomically(ctx, func(ctx context.Context) error {
		if err := s.CreateWard(ctx, &wardload.Ward{Code: "w2", Name: "Ward 2", TimeZone: "UTC"}); err != nil {
			return err
		}
		dup := s.CreateWard(ctx, &wardload.Ward{Code: "w2", Name: "Again", TimeZone: "UTC"})
		if wardload.ErrorCode(dup) != wardload.ECONFLICT {
			t.Errorf("duplicate code inside the batch: %v, want ECONFLICT", dup)
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if ws, n, _ := s.FindWards(ctx, wardload.WardFilter{}); n != 1 || ws[0].Name != "Ward 2" {
		t.Errorf("after the batch: %d wards %v, want only Ward 2", n, ws)
	}
	if _, n, _ := s.FindAudit(ctx, wardload.AuditFilter{}); n != 1 {
		t.Errorf("audit rows: %d, want 1 (the failed create keeps none)", n)
	}
}
