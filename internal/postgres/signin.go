package postgres

import (
	"context"
	"errors"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// FindSignInAttempts returns key's count, or a zero one.
func (s *Store) FindSignInAttempts(ctx context.Context, key string) (wardload.SignInAttempts, error) {
	c := wardload.SignInAttempts{Key: key}
	err := s.pool.QueryRow(ctx, `SELECT attempts, last_at FROM signin_attempts WHERE key = $1`, key).Scan(&c.Attempts, &c.Last)
	if errors.Is(err, pgx.ErrNoRows) {
		return c, nil
	}
	c.Last = c.Last.UTC()
	return c, err
}

// SwapSignInAttempts stores next if old is what is stored, in one
// statement: an INSERT that does nothing when another instance inserted
// first, or an UPDATE conditional on the old count and time, which
// PostgreSQL re-checks on the newest row version after waiting for a
// concurrent update, so of two swaps from the same old value one wins.
func (s *Store) SwapSignInAttempts(ctx context.Context, old, next wardload.SignInAttempts) (bool, error) {
	// TIMESTAMPTZ keeps microseconds: store next.Last as it will be read.
	last := next.Last.UTC().Truncate(time.Microsecond)
	if old.Last.IsZero() {
		tag, err := s.pool.Exec(ctx, `INSERT INTO signin_attempts (key, attempts, last_at) VALUES ($1, $2, $3)
			ON CONFLICT (key) DO NOTHING`, old.Key, next.Attempts, last)
		return tag.RowsAffected() == 1, err
	}
	tag, err := s.pool.Exec(ctx, `UPDATE signin_attempts SET attempts = $1, last_at = $2
		WHERE key = $3 AND attempts = $4 AND last_at = $5`, next.Attempts, last, old.Key, old.Attempts, old.Last.UTC())
	return tag.RowsAffected() == 1, err
}

// CancelSignInAttempt takes one attempt off key's count.
func (s *Store) CancelSignInAttempt(ctx context.Context, key string) error {
	_, err := s.pool.Exec(ctx, `UPDATE signin_attempts SET attempts = attempts - 1 WHERE key = $1 AND attempts > 0`, key)
	return err
}

// ClearSignInAttempts forgets key's count.
func (s *Store) ClearSignInAttempts(ctx context.Context, key string) error {
	_, err := s.pool.Exec(ctx, `DELETE FROM signin_attempts WHERE key = $1`, key)
	return err
}

// PurgeSignInAttempts deletes counts older than before, then all but the
// newest keep.
func (s *Store) PurgeSignInAttempts(ctx context.Context, before time.Time, keep int) (int, error) {
	var n int64
	err := s.inTx(ctx, func(tx pgx.Tx, _ time.Time) error {
		tag, err := tx.Exec(ctx, `DELETE FROM signin_attempts WHERE last_at < $1`, before.UTC())
		if err != nil {
			return err
		}
		n = tag.RowsAffected()
		tag, err = tx.Exec(ctx, `DELETE FROM signin_attempts WHERE key IN
			(SELECT key FROM signin_attempts ORDER BY last_at DESC, key OFFSET $1)`, max(keep, 0))
		n += tag.RowsAffected()
		return err
	})
	return int(n), err
}

// InstallSecret returns the secret called name, storing fresh first if
// there is none. Of instances starting together, the first insert wins
// and the others read its secret.
func (s *Store) InstallSecret(ctx context.Context, name string, fresh []byte) ([]byte, error) {
	var secret []byte
	err := s.inTx(ctx, func(tx pgx.Tx, _ time.Time) error {
		if _, err := tx.Exec(ctx, `INSERT INTO install_secrets (name, secret) VALUES ($1, $2)
			ON CONFLICT (name) DO NOTHING`, name, fresh); err != nil {
			return err
		}
		return tx.QueryRow(ctx, `SELECT secret FROM install_secrets WHERE name = $1`, name).Scan(&secret)
	})
	return secret, err
}
