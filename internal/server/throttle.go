package server

import (
	"sync"
	"time"
)

// throttle slows down password guessing. It counts attempts per key (an
// account name, a client address, a device); from the after-th counted
// attempt on, the key must wait 2^(attempts-after) seconds after its latest
// attempt before the next one (1 s, 2 s, 4 s, ...) up to maxWait. A success
// clears the key. Attempts older than forget are forgotten.
//
// An attempt is counted when it is reserved, before the password is
// hashed, and in the same critical section as the check (reserve), so a
// burst of concurrent guesses cannot all pass the check before any of them
// is counted: at one instant exactly after attempts get through. An attempt
// that turns out not to be a failure (a success, or one refused before
// hashing because the server is busy) is given back with cancel.
//
// It lives in memory, so it is per process: after a restart, or across
// several wardload processes behind one address, each counts alone. That
// is enough to turn online guessing from thousands of tries a minute into
// a handful; it is not a lockout, so an attacker cannot lock staff out for
// long by failing on purpose.
type throttle struct {
	after   int // the attempt that starts the waiting
	maxWait time.Duration
	forget  time.Duration
	maxKeys int

	mu   sync.Mutex
	keys map[string]*throttleEntry
}

type throttleEntry struct {
	attempts int       // counted failures and reserved attempts
	last     time.Time // of the latest counted attempt
}

func newThrottle(after int, maxWait time.Duration) *throttle {
	return &throttle{after: after, maxWait: maxWait, forget: 24 * time.Hour, maxKeys: 100_000,
		keys: map[string]*throttleEntry{}}
}

// delay is the wait that n counted attempts impose after the latest one.
func (t *throttle) delay(n int) time.Duration {
	k := n - t.after
	switch {
	case k < 0:
		return 0
	case k >= 30: // 2^30 s is far past any sensible maxWait
		return t.maxWait
	}
	return min(time.Second<<k, t.maxWait)
}

// entry returns key's live entry at now, or nil. The caller holds mu.
func (t *throttle) entry(key string, now time.Time) *throttleEntry {
	e, ok := t.keys[key]
	if !ok || now.Sub(e.last) > t.forget {
		return nil
	}
	return e
}

// waitLocked is wait with mu held.
func (t *throttle) waitLocked(key string, now time.Time) time.Duration {
	e := t.entry(key, now)
	if e == nil {
		return 0
	}
	return max(0, e.last.Add(t.delay(e.attempts)).Sub(now))
}

// wait returns how long key must still wait at now; 0 means it may try.
func (t *throttle) wait(key string, now time.Time) time.Duration {
	t.mu.Lock()
	defer t.mu.Unlock()
	return t.waitLocked(key, now)
}

// reserve checks key and, if it may try at now, counts the attempt, all
// under one lock. It returns 0 when the attempt is reserved, otherwise how
// long key must still wait (and counts nothing).
func (t *throttle) reserve(key string, now time.Time) time.Duration {
	t.mu.Lock()
	defer t.mu.Unlock()
	if d := t.waitLocked(key, now); d > 0 {
		return d
	}
	t.countLocked(key, now)
	return 0
}

// fail counts a failed attempt of key at now without checking it.
func (t *throttle) fail(key string, now time.Time) {
	t.mu.Lock()
	defer t.mu.Unlock()
	t.countLocked(key, now)
}

func (t *throttle) countLocked(key string, now time.Time) {
	e := t.entry(key, now)
	if e == nil {
		if len(t.keys) >= t.maxKeys {
			t.prune(now)
		}
		e = &throttleEntry{}
		t.keys[key] = e
	}
	e.attempts++
	e.last = now
}

// cancel gives back one reserved attempt of key that was not a failure.
// The time of the latest attempt stays, which errs on the side of waiting.
func (t *throttle) cancel(key string) {
	t.mu.Lock()
	defer t.mu.Unlock()
	if e, ok := t.keys[key]; ok && e.attempts > 0 {
		e.attempts--
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
		if now.Sub(e.last) > t.forget || (len(t.keys) >= t.maxKeys && !now.Before(e.last.Add(t.delay(e.attempts)))) {
			delete(t.keys, k)
		}
	}
}
