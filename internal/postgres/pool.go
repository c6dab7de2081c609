package postgres

import (
	"context"

	"github.com/jackc/pgx/v5"
	"github.com/jackc/pgx/v5/pgconn"
	"github.com/jackc/pgx/v5/pgxpool"
)

// pool is the connection pool whose errors pass through formatError, so
// that a finder reading outside a transaction fails with the same codes
// as a change (EUNAVAILABLE when the database is away), and whose failed
// connection attempts reach the back-off.
type pool struct {
	*pgxpool.Pool
	reconnect *reconnect
}

func (p *pool) mapError(err error) error {
	if err != nil {
		p.reconnect.failed(err)
	}
	return formatError(err)
}

func (p *pool) Exec(ctx context.Context, sql string, args ...any) (pgconn.CommandTag, error) {
	tag, err := p.Pool.Exec(ctx, sql, args...)
	return tag, p.mapError(err)
}

func (p *pool) Query(ctx context.Context, sql string, args ...any) (pgx.Rows, error) {
	rows, err := p.Pool.Query(ctx, sql, args...)
	if err != nil {
		return rows, p.mapError(err)
	}
	return mappedRows{rows, p}, nil
}

func (p *pool) QueryRow(ctx context.Context, sql string, args ...any) pgx.Row {
	return mappedRow{p.Pool.QueryRow(ctx, sql, args...), p}
}

func (p *pool) Begin(ctx context.Context) (pgx.Tx, error) {
	tx, err := p.Pool.Begin(ctx)
	return tx, p.mapError(err)
}

func (p *pool) BeginTx(ctx context.Context, opts pgx.TxOptions) (pgx.Tx, error) {
	tx, err := p.Pool.BeginTx(ctx, opts)
	return tx, p.mapError(err)
}

func (p *pool) Ping(ctx context.Context) error { return p.mapError(p.Pool.Ping(ctx)) }

type mappedRow struct {
	pgx.Row
	p *pool
}

func (r mappedRow) Scan(dest ...any) error { return r.p.mapError(r.Row.Scan(dest...)) }

type mappedRows struct {
	pgx.Rows
	p *pool
}

func (r mappedRows) Err() error { return r.p.mapError(r.Rows.Err()) }
