package wardload

import (
	"testing"
	"time"
)

// TestThrottleRuleGrowth: the waiting schedule min(2^(n-After) s, MaxWait)
// of the rule's doc comment, counted by hand.
func TestThrottleRuleGrowth(t *testing.T) {
	r := ThrottleRule{After: 3, MaxWait: 15 * time.Minute, Forget: 24 * time.Hour}
	now := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	c := SignInAttempts{Key: "k"}
	for i, want := range []time.Duration{0, 0, 1, 2, 4, 8, 16, 32, 64, 128, 256, 512, 900, 900} {
		c = r.Count(c, now)
		if got := r.Wait(c, now); got != want*time.Second {
			t.Errorf("after attempt %d: wait %v, want %v", i+1, got, want*time.Second)
		}
	}
	big := SignInAttempts{Key: "big", Attempts: 101, Last: now}
	if got := r.Wait(big, now); got != 15*time.Minute { // no overflow past the cap
		t.Errorf("after 101 attempts: %v", got)
	}
	if got := r.Wait(c, now.Add(10*time.Minute)); got != 5*time.Minute {
		t.Errorf("10 min into a 15 min wait: %v", got)
	}
	// Forgotten after a day without attempts: the next counts as the first.
	later := now.Add(24*time.Hour + time.Second)
	if got := r.Wait(c, later); got != 0 {
		t.Errorf("after a day: %v", got)
	}
	if n := r.Count(c, later); n.Attempts != 1 || !n.Last.Equal(later) {
		t.Errorf("counted after a day: %+v", n)
	}
	// The latest time never goes back.
	if n := r.Count(c, now.Add(-time.Second)); !n.Last.Equal(now) {
		t.Errorf("an earlier clock moved Last back: %+v", n)
	}
}
