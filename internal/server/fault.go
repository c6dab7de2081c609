package server

import (
	"log/slog"
	"sync"
	"time"

	"wardload/internal/wardload"
)

// faultLog logs a failure that repeats, such as the database being away,
// once per interval with the number of requests it failed, rather than
// once per request: in a ten-second outage at fifty connections the log
// would otherwise gain tens of thousands of identical lines. The first
// failure after a quiet interval is logged at once; failures within the
// interval are counted and logged together when it ends. It runs on real
// time, like the server's timeouts, not the injected clock.
type faultLog struct {
	log   *slog.Logger
	every time.Duration

	mu     sync.Mutex
	faults map[string]*fault
}

// fault is one code's failures since its last log line.
type fault struct {
	loggedAt time.Time
	count    int   // failures not yet logged
	last     error // the newest of them
	timer    *time.Timer
}

func newFaultLog(log *slog.Logger, every time.Duration) *faultLog {
	return &faultLog{log: log, every: every, faults: map[string]*fault{}}
}

// note counts one failure of code (EUNAVAILABLE, EFULL).
func (f *faultLog) note(code string, err error) {
	f.mu.Lock()
	defer f.mu.Unlock()
	ft := f.faults[code]
	if ft == nil {
		ft = &fault{}
		f.faults[code] = ft
	}
	ft.count++
	ft.last = err
	if wait := f.every - time.Since(ft.loggedAt); wait > 0 {
		if ft.timer == nil {
			ft.timer = time.AfterFunc(wait, func() { f.flush(code) })
		}
		return
	}
	f.write(code, ft)
}

// flush logs code's failures counted since its last line, if any.
func (f *faultLog) flush(code string) {
	f.mu.Lock()
	defer f.mu.Unlock()
	if ft := f.faults[code]; ft != nil && ft.count > 0 {
		f.write(code, ft)
	}
}

// flushAll logs every count still pending, at shutdown.
func (f *faultLog) flushAll() {
	f.mu.Lock()
	defer f.mu.Unlock()
	for code, ft := range f.faults {
		if ft.timer != nil {
			ft.timer.Stop()
		}
		if ft.count > 0 {
			f.write(code, ft)
		}
	}
}

func (f *faultLog) write(code string, ft *fault) {
	msg := "database unavailable"
	if code == wardload.EFULL {
		msg = "database full"
	}
	f.log.Error(msg, "code", code, "failures", ft.count, "interval", f.every.String(), "err", ft.last)
	ft.loggedAt, ft.count, ft.last, ft.timer = time.Now(), 0, nil, nil
}

// writeHealth remembers that a write failed for lack of space, so that
// /readyz reports not ready while writes fail (a ping still succeeds then)
// until a write check passes, or, for a store without one, until
// ReadyHold has passed without another such failure.
type writeHealth struct {
	mu       sync.Mutex
	failedAt time.Time
}

func (h *writeHealth) failed(now time.Time) {
	h.mu.Lock()
	h.failedAt = now
	h.mu.Unlock()
}

// since returns when the last failure was, zero if writes are healthy.
func (h *writeHealth) since() time.Time {
	h.mu.Lock()
	defer h.mu.Unlock()
	return h.failedAt
}

// recovered clears a failure noted at t (and not one noted later).
func (h *writeHealth) recovered(t time.Time) {
	h.mu.Lock()
	if h.failedAt.Equal(t) {
		h.failedAt = time.Time{}
	}
	h.mu.Unlock()
}
