// Package sqlite implements wardload.Store on an embedded SQLite database
// (modernc.org/sqlite, no cgo). It is the default store: one file in the
// data directory, no server to run.
package sqlite

import (
	"context"
	"database/sql"
	"errors"
	"fmt"
	"io/fs"
	"net/url"
	"os"
	"runtime"
	"slices"
	"time"

	"github.com/pressly/goose/v3"
	_ "modernc.org/sqlite" // registers the "sqlite" driver

	"wardload/internal/wardload"
	"wardload/migrations"
)

// Config configures Open.
type Config struct {
	// Path is the database file. ":memory:" gives a private in-memory
	// database (a single connection, so reads wait for writes).
	Path string
	// Now is the clock for created/entered/updated timestamps; nil means time.Now.
	Now wardload.Clock
}

// Store is a wardload.Store backed by SQLite.
//
// SQLite allows one writer at a time. Rather than let several pooled
// connections race for the write lock and spend busy_timeout waiting, all
// writes go through w, a pool of exactly one connection whose transactions
// BEGIN IMMEDIATE (so a transaction that reads before writing cannot fail
// to upgrade its lock). Reads use r, a separate pool that WAL lets run
// alongside the writer.
type Store struct {
	w   *sql.DB
	r   *readDB
	now wardload.Clock
}

var _ wardload.Store = (*Store)(nil)

// Open opens (creating if needed) the database at cfg.Path and checks that
// it can be reached. It does not migrate; call Migrate.
func Open(ctx context.Context, cfg Config) (*Store, error) {
	if cfg.Path == "" {
		return nil, errors.New("sqlite: database path is empty")
	}
	s := &Store{now: cfg.Now}
	if s.now == nil {
		s.now = time.Now
	}
	// Pragmas go in the DSN so that every pooled connection gets them,
	// not only the first one.
	q := url.Values{}
	q.Add("_pragma", "busy_timeout(5000)")
	q.Add("_pragma", "foreign_keys(ON)")
	if cfg.Path == ":memory:" {
		db, err := sql.Open("sqlite", ":memory:?"+q.Encode())
		if err != nil {
			return nil, fmt.Errorf("sqlite: open in-memory database: %w", err)
		}
		// Each connection to :memory: is its own database, so there must be
		// exactly one, kept forever.
		db.SetMaxOpenConns(1)
		db.SetMaxIdleConns(1)
		db.SetConnMaxLifetime(0)
		db.SetConnMaxIdleTime(0)
		s.w, s.r = db, newReadDB(db)
	} else {
		if err := createPrivate(cfg.Path); err != nil {
			return nil, fmt.Errorf("sqlite: create %s: %w", cfg.Path, err)
		}
		q.Add("_pragma", "journal_mode(WAL)")
		// The writer keeps its statement journals in memory: a statement
		// that writes many rows (an import's bulk INSERT) journals the
		// pages it changes so that it can be undone alone, and writing that
		// journal to a temporary file took a third of an import's time.
		// It holds one statement's pages, a few hundred kilobytes.
		wq := url.Values{"_pragma": append(slices.Clone(q["_pragma"]), "temp_store(MEMORY)"), "_txlock": {"immediate"}}
		w, err := sql.Open("sqlite", cfg.Path+"?"+wq.Encode())
		if err != nil {
			return nil, fmt.Errorf("sqlite: open %s: %w", cfg.Path, err)
		}
		w.SetMaxOpenConns(1)
		r, err := sql.Open("sqlite", cfg.Path+"?"+q.Encode())
		if err != nil {
			w.Close()
			return nil, fmt.Errorf("sqlite: open %s: %w", cfg.Path, err)
		}
		// Keep every reader open: each holds its prepared statements.
		n := max(4, runtime.NumCPU())
		r.SetMaxOpenConns(n)
		r.SetMaxIdleConns(n)
		s.w, s.r = w, newReadDB(r)
	}
	// sql.Open is lazy: connect now so that a bad path fails here, cleanly,
	// rather than on the first request. The writer goes first so that it
	// creates the file and switches it to WAL.
	if err := s.Ping(ctx); err != nil {
		s.Close()
		return nil, fmt.Errorf("sqlite: open %s: %w", cfg.Path, err)
	}
	return s, nil
}

// FileMode is the mode of a database file Open creates. The file holds
// password hashes, sessions and the audit log, so only its owner may read
// it.
const FileMode fs.FileMode = 0o600

// createPrivate creates the database file at path with FileMode when it
// does not exist yet, and leaves an existing file alone (the caller warns
// about its mode instead). Left to itself SQLite would create the file
// 0644 less the process umask. Its -wal and -shm files take the database
// file's permission bits whatever the umask (SQLite's unix VFS copies the
// mode and fchmods a new file to it), so they are 0600 too; the tests
// check all three.
func createPrivate(path string) error {
	f, err := os.OpenFile(path, os.O_RDWR|os.O_CREATE|os.O_EXCL, FileMode)
	if errors.Is(err, fs.ErrExist) {
		return nil
	}
	if err != nil {
		return err
	}
	// OpenFile's mode passes through the umask, which can only take bits
	// away; set it exactly so that a strict umask cannot leave the file
	// unwritable either.
	if err := f.Chmod(FileMode); err != nil {
		f.Close()
		os.Remove(path)
		return err
	}
	return f.Close()
}

// Migrate applies every pending migration in migrations/sqlite.
func (s *Store) Migrate(ctx context.Context) error {
	p, err := goose.NewProvider(goose.DialectSQLite3, s.w, migrations.SQLite)
	if err != nil {
		return fmt.Errorf("sqlite: migrations: %w", err)
	}
	if _, err := p.Up(ctx); err != nil {
		return fmt.Errorf("sqlite: migrate: %w", err)
	}
	return nil
}

// DB returns the writer pool, for the session store (scs sqlite3store):
// sessions are written on most requests, and sharing the single writer
// keeps SQLite to one writer rather than adding a second one.
func (s *Store) DB() *sql.DB { return s.w }

// Ping checks both pools.
func (s *Store) Ping(ctx context.Context) error {
	if err := s.w.PingContext(ctx); err != nil {
		return err
	}
	return s.r.PingContext(ctx)
}

// writeCheckBytes is how much room CheckWrite asks for: more than a census
// save with its projection and audit rows needs.
const writeCheckBytes = 64 << 10

// CheckWrite returns EFULL if the database cannot grow by writeCheckBytes:
// it creates a table and fills it in a transaction that it always rolls
// back, so nothing stays. It catches a page limit reached (max_page_count)
// at once; a full disk shows when the pages reach the file, which a real
// save does and this rolled-back check may not, so the server also counts
// saves that fail.
func (s *Store) CheckWrite(ctx context.Context) error {
	tx, err := s.w.BeginTx(ctx, nil)
	if err != nil {
		return formatError(err)
	}
	defer tx.Rollback()
	if _, err := tx.ExecContext(ctx, `CREATE TABLE wardload_write_check (b BLOB)`); err != nil {
		return formatError(err)
	}
	_, err = tx.ExecContext(ctx, `INSERT INTO wardload_write_check VALUES (zeroblob(?))`, writeCheckBytes)
	return formatError(err)
}

// Close closes both pools (one, for :memory:), statements first.
func (s *Store) Close() error {
	if s.r.DB == s.w {
		return s.r.Close()
	}
	return errors.Join(s.w.Close(), s.r.Close())
}
