package postgres

import (
	"context"
	"errors"
	"sync"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgconn"
)

// Back-off between connection attempts after one fails: doubling from
// reconnectMin, at most reconnectMax. While the database is away each
// request would otherwise dial it anew; with the back-off a request in
// the waiting time fails at once without touching the network.
const (
	reconnectMin = 100 * time.Millisecond
	reconnectMax = 2 * time.Second
)

// reconnect spaces out the pool's connection attempts after a failure.
// The pool calls before (BeforeConnect) and connected (AfterConnect);
// the store reports a failed attempt, which reaches it as the error of a
// query, through failed. It runs on real time, not the store's clock,
// which tests may stop.
type reconnect struct {
	mu    sync.Mutex
	fails int       // attempts failed in a row; 0 when healthy
	next  time.Time // no attempt before this while fails > 0
	cause error     // the last failure, for errBackingOff
}

// errBackingOff is the error of a connection not attempted because the
// last attempt failed a moment ago.
type errBackingOff struct{ cause error }

func (e *errBackingOff) Error() string {
	return "postgres: not reconnecting yet after: " + e.cause.Error()
}

func (e *errBackingOff) Unwrap() error { return e.cause }

// before refuses an attempt inside the back-off time. After it, one
// attempt goes ahead and the next is scheduled as if it would fail, so
// that only that one reaches the network until it succeeds.
func (g *reconnect) before(context.Context, *pgx.ConnConfig) error {
	g.mu.Lock()
	defer g.mu.Unlock()
	if g.fails == 0 {
		return nil
	}
	now := time.Now()
	if now.Before(g.next) {
		return &errBackingOff{cause: g.cause}
	}
	g.next = now.Add(g.delay())
	return nil
}

// connected ends the back-off.
func (g *reconnect) connected(context.Context, *pgx.Conn) error {
	g.mu.Lock()
	g.fails, g.cause = 0, nil
	g.mu.Unlock()
	return nil
}

// failed notes err if it is a failed connection attempt (not one refused
// by before). The many requests failing together at the start of an
// outage count once.
func (g *reconnect) failed(err error) {
	var ce *pgconn.ConnectError
	var bo *errBackingOff
	if !errors.As(err, &ce) || errors.As(err, &bo) || errors.Is(err, context.Canceled) {
		return
	}
	g.mu.Lock()
	defer g.mu.Unlock()
	g.cause = err
	now := time.Now()
	if g.fails > 0 && now.Before(g.next) {
		return
	}
	g.fails++
	g.next = now.Add(g.delay())
}

func (g *reconnect) delay() time.Duration {
	d := reconnectMin << min(g.fails, 16)
	return min(d, reconnectMax)
}
