package postgres

import (
	"time"

	"github.com/alexedwards/scs/pgxstore"
)

// SessionStore keeps sign-in sessions in the sessions table with scs's
// pgxstore, on the store's pool, and maps its errors as the store does:
// when the database is away a session lookup fails with EUNAVAILABLE
// rather than an internal error. The server wraps it in session.Hashed,
// so the token column holds the hash of each session token, never the
// token (migration 00004).
type SessionStore struct {
	*pgxstore.PostgresStore
	p *pool
}

// NewSessionStore returns the session store of s. A cleanup interval above
// zero deletes expired rows that often until StopCleanup.
func NewSessionStore(s *Store, cleanup time.Duration) *SessionStore {
	return &SessionStore{PostgresStore: pgxstore.NewWithCleanupInterval(s.pool.Pool, cleanup), p: s.pool}
}

// Find returns the data of an unexpired session token.
func (st *SessionStore) Find(token string) ([]byte, bool, error) {
	b, ok, err := st.PostgresStore.Find(token)
	return b, ok, st.p.mapError(err)
}

// Commit stores the session's data and expiry.
func (st *SessionStore) Commit(token string, b []byte, expiry time.Time) error {
	return st.p.mapError(st.PostgresStore.Commit(token, b, expiry))
}

// Delete removes a session.
func (st *SessionStore) Delete(token string) error {
	return st.p.mapError(st.PostgresStore.Delete(token))
}

// All returns every unexpired session, keyed as stored (by token hash).
func (st *SessionStore) All() (map[string][]byte, error) {
	m, err := st.PostgresStore.All()
	return m, st.p.mapError(err)
}
