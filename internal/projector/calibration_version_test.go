package projector_test

import (
	"context"
	"testing"

	"wardload/internal/projector"
	"wardload/internal/wardload"
)

// readCounter counts the observation reads that reach the store.
type readCounter struct {
	wardload.Store
	reads int
}

func (c *readCounter) FindObservations(ctx context.Context, f wardload.ObservationFilter) ([]*wardload.Observation, int, error) {
	c.reads++
	return c.Store.FindObservations(ctx, f)
}

// TestCalibrateVersionKey: while the ward's data version stands still a
// repeated Calibrate reads no observations; a new observation, an
// exclusion and a restoration each move the version, and the next
// Calibrate reads the data again and backtests what it now holds.
func TestCalibrateVersionKey(t *testing.T) {
	h := seedHand(t)
	rc := &readCounter{Store: h.st}
	s := &projector.Service{Store: rc, Now: h.service().Now}
	first, err := s.Calibrate(ctx, h.ward.ID, h.shiftDate)
	must(t, err)
	reads := rc.reads
	if reads == 0 {
		t.Fatal("the first Calibrate read no observations")
	}
	again, err := s.Calibrate(ctx, h.ward.ID, h.shiftDate)
	must(t, err)
	if again != first || rc.reads != reads {
		t.Fatalf("same version: %d more observation reads, same result %v; want 0, true", rc.reads-reads, again == first)
	}
	o := &wardload.Observation{WardID: h.ward.ID, TierID: h.a.ID, ShiftID: h.early.ID, Date: h.shiftDate.AddDays(-2),
		WindowHours: 8, CareMinutes: 40}
	_, err = h.st.CreateObservations(ctx, []*wardload.Observation{o})
	must(t, err)
	for _, step := range []struct {
		what   string
		change func() error
	}{
		{"a new observation", func() error { return nil }},
		{"an exclusion", func() error { _, err := h.st.ExcludeObservation(ctx, o.ID, "extra zero typed", 0); return err }},
		{"a restoration", func() error { _, err := h.st.RestoreObservation(ctx, o.ID, 0); return err }},
	} {
		must(t, step.change())
		reads = rc.reads
		_, err := s.Calibrate(ctx, h.ward.ID, h.shiftDate)
		must(t, err)
		if rc.reads == reads {
			t.Errorf("after %s Calibrate read no observations: a stale backtest", step.what)
		}
	}
	// The backtest now matches one computed from scratch on the same data.
	got, err := s.Calibrate(ctx, h.ward.ID, h.shiftDate)
	must(t, err)
	fresh, err := h.service().Calibrate(ctx, h.ward.ID, h.shiftDate)
	must(t, err)
	if got.Sentence != fresh.Sentence || got.Totals.Checked != fresh.Totals.Checked || got.Skipped != fresh.Skipped {
		t.Errorf("cached backtest %q (%d checked) differs from a fresh one %q (%d)", got.Sentence, got.Totals.Checked, fresh.Sentence, fresh.Totals.Checked)
	}
}
