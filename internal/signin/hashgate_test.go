package signin

import (
	"context"
	"runtime"
	"testing"
)

func TestHashGate(t *testing.T) {
	ctx := context.Background()
	g := NewHashGate(2, 1, 1<<62) // waits "forever": only a free slot or ctx ends a wait
	// Two separate calls: each takes a slot.
	if first, second := g.Enter(ctx), g.Enter(ctx); !first || !second {
		t.Fatal("two slots, two entries refused")
	}
	// Both slots taken. A waiter whose request ends gives up.
	gone, cancel := context.WithCancel(ctx)
	cancel()
	if g.Enter(gone) {
		t.Error("entered with an ended context while full")
	}
	// One may wait; while it does, the queue is full and the next is
	// refused at once.
	got := make(chan bool)
	go func() { got <- g.Enter(ctx) }()
	for g.queued.Load() != 1 {
		runtime.Gosched()
	}
	if g.Enter(ctx) {
		t.Error("entered past a full queue")
	}
	g.Leave()
	if !<-got {
		t.Error("the waiter did not get the freed slot")
	}
	if g.queued.Load() != 0 || len(g.slots) != 2 {
		t.Errorf("queued %d, slots taken %d; want 0 and 2", g.queued.Load(), len(g.slots))
	}
	// A wait that runs out is refused.
	short := NewHashGate(1, 1, 0)
	short.Enter(ctx)
	if short.Enter(ctx) {
		t.Error("entered a full gate with no time to wait")
	}
	// Zero or negative sizes still leave one slot and no queue.
	z := NewHashGate(0, -1, 0)
	if !z.Enter(ctx) || z.Enter(ctx) {
		t.Error("a zero-sized gate should hold exactly one")
	}
}
