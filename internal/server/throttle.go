package server

import (
	"sync"
	"time"
)

// throttle slows down password guessing. It counts failed sign-ins per key
// (an account name, or a client address); from the after-th failure on, the
// key must wait 2^(failures-after) seconds before its next attempt (1 s,
// 2 s, 4 s, ...) up to maxWait. A success clears the key. Failures older than
// forget are forgotten.
//
// It lives in memory, so it is per process: after a restart, or across
// several wardload processes behind one address, each counts alone. That
// is enough to turn online guessing from thousands of tries a minute into
// a handful; it is not a lockout, so an attacker cannot lock staff out for
// long by failing on purpose.
type throttle struct {
	after   int // the failure that starts the waiting
	maxWait time.Duration
	forget  time.Duration
	maxKeys int

	mu   sync.Mutex
	keys map[string]*throttleEntry
}

type throttleEntry struct {
	failures int
	last     time.Time // of the last failure
	until    time.Time // no attempt before this
}

func newThrottle(after int, maxWait time.Duration) *throttle {
	return &throttle{after: after, maxWait: maxWait, forget: 24 * time.Hour, maxKeys: 100_000,
		keys: map[string]*throttleEntry{}}
}

// wait returns how long key must still wait at now; 0 means it may try.
func (t *throttle) wait(key string, now time.Time) time.Duration {
	t.mu.Lock()
	defer t.mu.Unlock()
	e, ok := t.keys[key]
	if !ok || now.Sub(e.last) > t.forget {
		return 0
	}
	if d := e.until.Sub(now); d > 0 {
		return d
	}
	return 0
}

// fail records a failed attempt of key at now.
func (t *throttle) fail(key string, now time.Time) {
	t.mu.Lock()
	defer t.mu.Unlock()
	e, ok := t.keys[key]
	if !ok || now.Sub(e.last) > t.forget {
		if len(t.keys) >= t.maxKeys {
			t.prune(now)
		}
		e = &throttleEntry{}
		t.keys[key] = e
	}
	e.failures++
	e.last = now
	if k := e.failures - t.after; k >= 0 {
		d := t.maxWait
		if k < 30 { // 2^30 s is far past any sensible maxWait
			d = min(time.Second<<k, t.maxWait)
		}
		e.until = now.Add(d)
	}
}

// succeed clears key.
func (t *throttle) succeed(key string) {
	t.mu.Lock()
	defer t.mu.Unlock()
	delete(t.keys, key)
}

// prune drops forgotten keys and, if an attack has filled the table with
// fresh ones, every key that is not currently waiting. Memory stays
// bounded; the cost is that some addresses start counting again.
func (t *throttle) prune(now time.Time) {
	for k, e := range t.keys {
		if now.Sub(e.last) > t.forget || (len(t.keys) >= t.maxKeys && !now.Before(e.until)) {
			delete(t.keys, k)
		}
	}
}
