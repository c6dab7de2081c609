package sqlite

import (
	"context"
	"database/sql"
	"sync"
)

// maxCachedStmts bounds the read pool's statement cache. The finders build
// their SQL from a filter's set fields, so most texts recur; texts past the
// bound (say, many different LIMIT/OFFSET pages) simply run unprepared.
const maxCachedStmts = 256

// readDB is the read pool with a cache of prepared statements by SQL text.
// Parsing and planning a statement costs SQLite more than running one of
// the small lookups every page makes (session user, ward, revisions), so
// each text is prepared once per pooled connection (database/sql prepares
// a *sql.Stmt lazily on each connection it runs on) and then only
// rebound. Writes never come here; they use the single writer.
type readDB struct {
	*sql.DB
	mu    sync.Mutex
	stmts map[string]*sql.Stmt
}

func newReadDB(db *sql.DB) *readDB {
	return &readDB{DB: db, stmts: map[string]*sql.Stmt{}}
}

// stmt returns the prepared statement of query, preparing it on first
// use, or nil when the cache is full or preparing fails (the caller then
// runs query unprepared, which reports any error the usual way).
func (r *readDB) stmt(ctx context.Context, query string) *sql.Stmt {
	r.mu.Lock()
	st, ok := r.stmts[query]
	full := len(r.stmts) >= maxCachedStmts
	r.mu.Unlock()
	if ok || full {
		return st
	}
	st, err := r.DB.PrepareContext(ctx, query)
	if err != nil {
		return nil
	}
	r.mu.Lock()
	defer r.mu.Unlock()
	if prev, ok := r.stmts[query]; ok {
		// Another request prepared it meanwhile.
		st.Close()
		return prev
	}
	if len(r.stmts) >= maxCachedStmts {
		st.Close()
		return nil
	}
	r.stmts[query] = st
	return st
}

// QueryContext runs query as a cached prepared statement.
func (r *readDB) QueryContext(ctx context.Context, query string, args ...any) (*sql.Rows, error) {
	if st := r.stmt(ctx, query); st != nil {
		return st.QueryContext(ctx, args...)
	}
	return r.DB.QueryContext(ctx, query, args...)
}

// QueryRowContext runs query as a cached prepared statement.
func (r *readDB) QueryRowContext(ctx context.Context, query string, args ...any) *sql.Row {
	if st := r.stmt(ctx, query); st != nil {
		return st.QueryRowContext(ctx, args...)
	}
	return r.DB.QueryRowContext(ctx, query, args...)
}

// Close closes the cached statements and then the pool.
func (r *readDB) Close() error {
	r.mu.Lock()
	for q, st := range r.stmts {
		st.Close()
		delete(r.stmts, q)
	}
	r.mu.Unlock()
	return r.DB.Close()
}
