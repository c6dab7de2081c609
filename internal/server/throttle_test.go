package server

import (
	"sync"
	"sync/atomic"
	"testing"
	"time"
)

func TestThrottleReserve(t *testing.T) {
	th := newThrottle(3, 15*time.Minute)
	now := time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)
	// A thousand reservations at one instant, from many goroutines:
	// exactly the limit get through.
	var ok atomic.Int64
	var wg sync.WaitGroup
	for range 1000 {
		wg.Go(func() {
			if th.reserve("k", now) == 0 {
				ok.Add(1)
			}
		})
	}
	wg.Wait()
	if ok.Load() != 3 {
		t.Errorf("%d reservations at one instant, want 3", ok.Load())
	}
	// Refusals are not counted: the wait stays 1 s.
	if d := th.reserve("k", now); d != time.Second {
		t.Errorf("wait after refusals %v, want 1s", d)
	}
	// A given-back attempt frees its place.
	th.cancel("k")
	if d := th.reserve("k", now); d != 0 {
		t.Errorf("after cancel: %v, want a reservation", d)
	}
	th.cancel("other") // nothing to give back: no effect, no panic
	if d := th.wait("other", now); d != 0 {
		t.Errorf("unknown key waits %v", d)
	}
}
