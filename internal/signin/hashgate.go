package signin

import (
	"context"
	"sync/atomic"
	"time"
)

// HashGate bounds how many password hashes run at once. Each argon2id
// check of a stored hash takes its memory parameter (64 MiB by default)
// for as long as it runs, so without a bound a few hundred parallel
// sign-ins, which cost an attacker nothing, take gigabytes.
//
// A check that finds every slot taken waits in a short queue for at most
// maxWait; when the queue is full too, or the wait runs out, it is refused
// at once, without hashing, and the caller answers 503 with Retry-After.
// Memory for hashing is therefore at most slots × the hash's memory, and
// a flood costs the server only the refusals.
type HashGate struct {
	slots    chan struct{} // a token in the channel is a hash running
	maxQueue int64
	maxWait  time.Duration
	queued   atomic.Int64
}

// NewHashGate returns a gate for slots hashes at once and at most queue
// more waiting, each for at most maxWait.
func NewHashGate(slots, queue int, maxWait time.Duration) *HashGate {
	return &HashGate{slots: make(chan struct{}, max(1, slots)), maxQueue: int64(max(0, queue)), maxWait: maxWait}
}

// Enter takes a slot, waiting in the queue if there is room. It reports
// false, having taken nothing, when the queue is full, the wait runs out
// or ctx ends first. After true the caller must call Leave.
func (g *HashGate) Enter(ctx context.Context) bool {
	select {
	case g.slots <- struct{}{}:
		return true
	default:
	}
	if g.queued.Add(1) > g.maxQueue {
		g.queued.Add(-1)
		return false
	}
	defer g.queued.Add(-1)
	timer := time.NewTimer(g.maxWait)
	defer timer.Stop()
	select {
	case g.slots <- struct{}{}:
		return true
	case <-timer.C:
		return false
	case <-ctx.Done():
		return false
	}
}

// Leave frees the slot taken by Enter.
func (g *HashGate) Leave() { <-g.slots }
