package session

import (
	"context"
	"testing"
	"time"

	"github.com/alexedwards/scs/v2"
	"github.com/alexedwards/scs/v2/memstore"
)

// TestKey checks Key against the SHA-256 example of FIPS 180-2,
// Appendix B.1 (message "abc"), written as lower-case hex.
func TestKey(t *testing.T) {
	const want = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
	if got := Key("abc"); got != want {
		t.Errorf("Key(abc) = %s, want %s", got, want)
	}
}

// ctxStore is a store that takes a context, as the SQLite store does; it
// records the context value it was called with.
type ctxStore struct {
	*memstore.MemStore
	seen []any
}

type ctxKey struct{}

func (c *ctxStore) FindCtx(ctx context.Context, token string) ([]byte, bool, error) {
	c.seen = append(c.seen, ctx.Value(ctxKey{}))
	return c.MemStore.Find(token)
}

func (c *ctxStore) CommitCtx(ctx context.Context, token string, b []byte, expiry time.Time) error {
	c.seen = append(c.seen, ctx.Value(ctxKey{}))
	return c.MemStore.Commit(token, b, expiry)
}

func (c *ctxStore) DeleteCtx(ctx context.Context, token string) error {
	c.seen = append(c.seen, ctx.Value(ctxKey{}))
	return c.MemStore.Delete(token)
}

// TestHashedStore: a session is stored under Key(token) only; the token
// finds it, the stored key does not (it would be hashed again), and Delete
// by token removes it. Run on a store without contexts (memstore) and one
// with them, which must receive the caller's context.
func TestHashedStore(t *testing.T) {
	cs := &ctxStore{MemStore: memstore.NewWithCleanupInterval(0)}
	for _, tc := range []struct {
		name  string
		inner scs.Store
	}{
		{"plain", memstore.NewWithCleanupInterval(0)},
		{"ctx", cs},
	} {
		t.Run(tc.name, func(t *testing.T) {
			ctx := context.WithValue(context.Background(), ctxKey{}, "request")
			h := Hashed(tc.inner)
			const token = "3q2-7wAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA"
			if err := h.CommitCtx(ctx, token, []byte("data"), time.Now().Add(time.Hour)); err != nil {
				t.Fatal(err)
			}
			if _, ok, _ := tc.inner.Find(token); ok {
				t.Error("the inner store holds the plain token")
			}
			if b, ok, err := tc.inner.Find(Key(token)); err != nil || !ok || string(b) != "data" {
				t.Errorf("inner Find(Key(token)) = %q %v %v, want data", b, ok, err)
			}
			if b, ok, err := h.FindCtx(ctx, token); err != nil || !ok || string(b) != "data" {
				t.Errorf("FindCtx(token) = %q %v %v, want data", b, ok, err)
			}
			if _, ok, err := h.Find(Key(token)); err != nil || ok {
				t.Errorf("Find(stored key) = %v %v: the stored value works as a token", ok, err)
			}
			if err := h.DeleteCtx(ctx, token); err != nil {
				t.Fatal(err)
			}
			if _, ok, _ := tc.inner.Find(Key(token)); ok {
				t.Error("DeleteCtx(token) left the row")
			}
		})
	}
	// The context reached the ctx store on Commit, Find and Delete (the
	// Find(Key(token)) call above went through Find, without one).
	want := []any{"request", "request", nil, "request"}
	if len(cs.seen) != len(want) {
		t.Fatalf("ctx store calls %v, want %v", cs.seen, want)
	}
	for i := range want {
		if cs.seen[i] != want[i] {
			t.Errorf("call %d had context value %v, want %v", i, cs.seen[i], want[i])
		}
	}
}
