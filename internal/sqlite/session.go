package sqlite

import (
	"context"
	"database/sql"
	"errors"
	"log/slog"
	"sync"
	"time"
)

// SessionStore keeps sign-in sessions in the sessions table (the layout of
// scs's sqlite3store, which both it and this store accept). It has the
// methods of scs.Store and scs.CtxStore without importing scs. The
// server wraps it in session.Hashed, so the token column holds the hash
// of each session token, never the token (migration 00004).
//
// Unlike sqlite3store on the writer pool, it reads sessions on the read
// pool, as a cached prepared statement, so the session lookup every page
// makes neither waits for the single writer nor re-parses its SQL. Commits
// and deletes go through the writer and are committed before they return,
// so the next request's read (a new WAL snapshot) sees them: a signed-out
// or replaced session is refused at once.
type SessionStore struct {
	s    *Store
	stop chan struct{}
	once sync.Once
}

// NewSessionStore returns the session store of s. A cleanup interval above
// zero deletes expired rows that often until StopCleanup.
func NewSessionStore(s *Store, cleanup time.Duration) *SessionStore {
	st := &SessionStore{s: s, stop: make(chan struct{})}
	if cleanup > 0 {
		go st.cleanup(cleanup)
	}
	return st
}

// expiryFormat is the text julianday() reads, as sqlite3store writes it.
const expiryFormat = "2006-01-02T15:04:05.999"

// FindCtx returns the data of an unexpired session token.
func (st *SessionStore) FindCtx(ctx context.Context, token string) ([]byte, bool, error) {
	var b []byte
	err := st.s.r.QueryRowContext(ctx, `SELECT data FROM sessions WHERE token = ? AND julianday('now') < expiry`, token).Scan(&b)
	if errors.Is(err, sql.ErrNoRows) {
		return nil, false, nil
	} else if err != nil {
		return nil, false, formatError(err)
	}
	return b, true, nil
}

// CommitCtx stores the session's data and expiry, replacing any row.
func (st *SessionStore) CommitCtx(ctx context.Context, token string, b []byte, expiry time.Time) error {
	_, err := st.s.w.ExecContext(ctx, `REPLACE INTO sessions (token, data, expiry) VALUES (?, ?, julianday(?))`,
		token, b, expiry.UTC().Format(expiryFormat))
	return formatError(err)
}

// DeleteCtx removes a session.
func (st *SessionStore) DeleteCtx(ctx context.Context, token string) error {
	_, err := st.s.w.ExecContext(ctx, `DELETE FROM sessions WHERE token = ?`, token)
	return formatError(err)
}

// Find is FindCtx without a context.
func (st *SessionStore) Find(token string) ([]byte, bool, error) {
	return st.FindCtx(context.Background(), token)
}

// Commit is CommitCtx without a context.
func (st *SessionStore) Commit(token string, b []byte, expiry time.Time) error {
	return st.CommitCtx(context.Background(), token, b, expiry)
}

// Delete is DeleteCtx without a context.
func (st *SessionStore) Delete(token string) error {
	return st.DeleteCtx(context.Background(), token)
}

// StopCleanup stops the cleanup goroutine; it may be called more than once.
func (st *SessionStore) StopCleanup() {
	st.once.Do(func() { close(st.stop) })
}

func (st *SessionStore) cleanup(every time.Duration) {
	t := time.NewTicker(every)
	defer t.Stop()
	for {
		select {
		case <-t.C:
			if _, err := st.s.w.Exec(`DELETE FROM sessions WHERE expiry < julianday('now')`); err != nil {
				slog.Warn("sqlite: delete expired sessions", "err", err)
			}
		case <-st.stop:
			return
		}
	}
}
