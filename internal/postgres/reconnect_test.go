package postgres

import (
	"errors"
	"strings"
	"testing"

	"github.com/jackc/pgx/v5/pgconn"
)

// TestReconnectBacksOff: after a failed connection attempt the next ones
// are refused at once, without reaching the network, until the back-off
// time has passed; the refusal names the first failure once, however many
// refusals follow; a success ends the back-off.
func TestReconnectBacksOff(t *testing.T) {
	g := &reconnect{}
	if err := g.before(t.Context(), nil); err != nil {
		t.Fatalf("healthy: %v", err)
	}
	// A real failed attempt: nothing listens on port 1.
	_, refused := pgconn.Connect(t.Context(), "postgres://x@127.0.0.1:1/x?sslmode=disable&connect_timeout=2")
	var ce *pgconn.ConnectError
	if !errors.As(refused, &ce) {
		t.Fatalf("connect to port 1: %v, want a ConnectError", refused)
	}
	g.failed(refused)
	var last error
	for range 1000 {
		last = g.before(t.Context(), nil)
		var bo *errBackingOff
		if !errors.As(last, &bo) {
			t.Fatalf("attempt inside the back-off: %v, want errBackingOff", last)
		}
		g.failed(last) // the store reports every error it sees
	}
	if n := strings.Count(last.Error(), "not reconnecting yet"); n != 1 {
		t.Errorf("refusal nests %d times: %.200s", n, last.Error())
	}
	if !lostConnection(last) {
		t.Error("a refusal in the back-off is not mapped to EUNAVAILABLE")
	}
	if g.fails != 1 {
		t.Errorf("fails = %d after one failed attempt, want 1", g.fails)
	}
	g.connected(t.Context(), nil)
	if err := g.before(t.Context(), nil); err != nil {
		t.Errorf("after a success: %v", err)
	}
}
