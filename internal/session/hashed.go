package session

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"time"

	"github.com/alexedwards/scs/v2"
)

// Key is what a session is stored under: the hex SHA-256 of its token,
// never the token itself. Anyone who can read the sessions table (a
// backup, a copy of the SQLite file, a database account) then holds only
// hashes, which the server hashes again when they come back as a cookie,
// so they sign nobody in.
//
// A fast unsalted hash is enough here, unlike for passwords: scs's tokens
// are 32 bytes from crypto/rand, so there is nothing to guess and nothing
// a precomputed table could cover, and a slow hash would only cost time on
// every request. NIST SP 800-63B §7.1 asks session secrets to come from an
// approved random bit generator with at least 64 bits of entropy, and the
// OWASP Session Management Cheat Sheet likewise asks at least 64 bits
// (both from memory, not checked against the text here); 256 bits is far
// beyond either. API token secrets, also 32 random bytes, are stored the
// same way (server.TokenHash).
func Key(token string) string {
	sum := sha256.Sum256([]byte(token))
	return hex.EncodeToString(sum[:])
}

// HashedStore keeps sessions in another scs store under Key(token). It is
// a CtxStore: the request's context reaches the store when the store
// takes one. It is deliberately not an IterableStore, whose All would hand
// out keys as if they were tokens.
type HashedStore struct {
	store scs.Store
}

var _ scs.CtxStore = (*HashedStore)(nil)

// Hashed wraps store.
func Hashed(store scs.Store) *HashedStore { return &HashedStore{store: store} }

// FindCtx returns the data of the session of token.
func (h *HashedStore) FindCtx(ctx context.Context, token string) ([]byte, bool, error) {
	if c, ok := h.store.(scs.CtxStore); ok {
		return c.FindCtx(ctx, Key(token))
	}
	return h.store.Find(Key(token))
}

// CommitCtx stores the session of token.
func (h *HashedStore) CommitCtx(ctx context.Context, token string, b []byte, expiry time.Time) error {
	if c, ok := h.store.(scs.CtxStore); ok {
		return c.CommitCtx(ctx, Key(token), b, expiry)
	}
	return h.store.Commit(Key(token), b, expiry)
}

// DeleteCtx removes the session of token.
func (h *HashedStore) DeleteCtx(ctx context.Context, token string) error {
	if c, ok := h.store.(scs.CtxStore); ok {
		return c.DeleteCtx(ctx, Key(token))
	}
	return h.store.Delete(Key(token))
}

// Find is FindCtx without a context.
func (h *HashedStore) Find(token string) ([]byte, bool, error) {
	return h.FindCtx(context.Background(), token)
}

// Commit is CommitCtx without a context.
func (h *HashedStore) Commit(token string, b []byte, expiry time.Time) error {
	return h.CommitCtx(context.Background(), token, b, expiry)
}

// Delete is DeleteCtx without a context.
func (h *HashedStore) Delete(token string) error {
	return h.DeleteCtx(context.Background(), token)
}
