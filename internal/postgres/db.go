// Package postgres implements wardload.Store on PostgreSQL with pgx.
//
// SQL is written by hand with $n placeholders. Every change runs in one
// transaction together with its audit row, and every driver error passes
// through formatError so that no driver text reaches a user.
package postgres

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"net"
	"strings"
	"time"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgconn"
	"github.com/jackc/pgx/v5/pgxpool"
	"github.com/jackc/pgx/v5/stdlib"
	"github.com/pressly/goose/v3"
	"github.com/pressly/goose/v3/lock"

	"wardload/internal/wardload"
	"wardload/migrations"
)

// Config is what Open needs.
type Config struct {
	URL string         // postgres:// URL or key=value DSN
	Now wardload.Clock // nil means time.Now
	// Schema, when set, becomes the connections' search_path, so that all
	// tables (goose's version table included) live in that schema. Tests
	// use one schema per test; "" keeps the server's default.
	Schema string
}

// Store is a wardload.Store backed by a pgx connection pool.
type Store struct {
	pool    *pool
	connCfg *pgx.ConnConfig // for the database/sql handle goose needs
	now     wardload.Clock
}

var _ wardload.Store = (*Store)(nil)

// connectTimeout bounds Open when the server does not answer, so that a
// wrong host fails in seconds rather than at the OS TCP timeout.
const connectTimeout = 5 * time.Second

// Open connects to PostgreSQL and checks the connection. It does not
// migrate; call Migrate. Errors are one line and never include the
// password from the URL.
func Open(ctx context.Context, cfg Config) (*Store, error) {
	pcfg, err := pgxpool.ParseConfig(cfg.URL)
	if err != nil {
		// pgx's parse errors can quote the URL, password included.
		return nil, errors.New("postgres: the database URL is not valid")
	}
	if pcfg.ConnConfig.ConnectTimeout == 0 {
		pcfg.ConnConfig.ConnectTimeout = connectTimeout
	}
	if cfg.Schema != "" {
		pcfg.ConnConfig.RuntimeParams["search_path"] = pgx.Identifier{cfg.Schema}.Sanitize()
	}
	rc := &reconnect{}
	pcfg.BeforeConnect, pcfg.AfterConnect = rc.before, rc.connected
	pgxp, err := pgxpool.NewWithConfig(ctx, pcfg)
	if err != nil {
		return nil, connectError(pcfg.ConnConfig, err)
	}
	if err := pgxp.Ping(ctx); err != nil {
		pgxp.Close()
		return nil, connectError(pcfg.ConnConfig, err)
	}
	now := cfg.Now
	if now == nil {
		now = time.Now
	}
	return &Store{pool: &pool{Pool: pgxp, reconnect: rc}, connCfg: pcfg.ConnConfig, now: now}, nil
}

// connectError describes a failed connection by host, port, database and
// the root cause only (e.g. "connection refused"), on one line.
func connectError(cc *pgx.ConnConfig, err error) error {
	where := fmt.Sprintf("%s database %q", net.JoinHostPort(cc.Host, fmt.Sprint(cc.Port)), cc.Database)
	var pgErr *pgconn.PgError
	if errors.As(err, &pgErr) {
		return fmt.Errorf("postgres: cannot connect to %s: %s (SQLSTATE %s)", where, pgErr.Message, pgErr.Code)
	}
	for _, c := range []error{context.DeadlineExceeded, context.Canceled} {
		if errors.Is(err, c) {
			return fmt.Errorf("postgres: cannot connect to %s: %w", where, c)
		}
	}
	// A network failure: the OS reason ("connect: connection refused") is
	// the useful part; pgconn's wrapping repeats the address.
	var opErr *net.OpError
	if errors.As(err, &opErr) && opErr.Err != nil {
		return fmt.Errorf("postgres: cannot connect to %s: %v", where, opErr.Err)
	}
	// pgx joins the errors of each attempt (TLS, then plain) with newlines.
	msg := strings.Join(strings.Fields(strings.ReplaceAll(err.Error(), "\n", "; ")), " ")
	return fmt.Errorf("postgres: cannot connect to %s: %s", where, msg)
}

// Migrate applies all pending embedded migrations with goose. It uses its
// own short-lived database/sql handle built from the same connection
// settings, so a Config.Schema applies to the migrations too.
func (s *Store) Migrate(ctx context.Context) error {
	fsys, err := fs.Sub(migrations.Postgres, "postgres")
	if err != nil {
		return fmt.Errorf("postgres: migrations: %w", err)
	}
	db := stdlib.OpenDB(*s.connCfg.Copy())
	defer db.Close()
	// An advisory lock, so instances starting together migrate once; the
	// others retry each second for up to five minutes (goose's default
	// total, with a shorter period than its 5 s so waiters start sooner).
	locker, err := lock.NewPostgresSessionLocker(lock.WithLockTimeout(1, 300))
	if err != nil {
		return fmt.Errorf("postgres: migrations: %w", err)
	}
	p, err := goose.NewProvider(goose.DialectPostgres, db, fsys, goose.WithSessionLocker(locker))
	if err != nil {
		return fmt.Errorf("postgres: migrations: %w", err)
	}
	if _, err := p.Up(ctx); err != nil {
		return fmt.Errorf("postgres: migrate: %w", err)
	}
	return nil
}

// Pool returns the connection pool, e.g. for the scs session store.
func (s *Store) Pool() *pgxpool.Pool { return s.pool.Pool }

// Ping returns EUNAVAILABLE if the database cannot be reached.
func (s *Store) Ping(ctx context.Context) error {
	return s.pool.Ping(ctx)
}

// Close releases the pool.
func (s *Store) Close() error {
	s.pool.Close()
	return nil
}

// stamp is the store's one timestamp for a transaction, in UTC and
// truncated to microseconds because that is what TIMESTAMPTZ keeps: the
// value a caller gets back equals the value read later.
func (s *Store) stamp() time.Time { return s.now().UTC().Truncate(time.Microsecond) }

// inTx runs fn in a transaction with one fixed timestamp and commits if fn
// returns nil. Errors come back through formatError.
func (s *Store) inTx(ctx context.Context, fn func(tx pgx.Tx, now time.Time) error) error {
	tx, err := s.pool.Begin(ctx)
	if err != nil {
		return formatError(err)
	}
	defer tx.Rollback(ctx) // no-op after Commit
	if err := fn(tx, s.stamp()); err != nil {
		return formatError(err)
	}
	return formatError(tx.Commit(ctx))
}

// inSnapshot runs fn in a read-only REPEATABLE READ transaction, so that a
// finder reading several tables sees them at one moment.
func (s *Store) inSnapshot(ctx context.Context, fn func(tx pgx.Tx) error) error {
	tx, err := s.pool.BeginTx(ctx, pgx.TxOptions{IsoLevel: pgx.RepeatableRead, AccessMode: pgx.ReadOnly})
	if err != nil {
		return formatError(err)
	}
	defer tx.Rollback(ctx)
	if err := fn(tx); err != nil {
		return formatError(err)
	}
	return formatError(tx.Commit(ctx))
}
