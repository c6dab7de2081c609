package sqlite

import (
	"context"
	"database/sql"
	"errors"
	"time"

	"wardload/internal/wardload"
)

// FindSignInAttempts returns key's count, or a zero one. It reads on the
// read pool, so that a flood of throttled attempts does not queue behind
// (or hold up) the single writer; a count read just before another
// instance's write only makes the following swap fail and be retried.
func (s *Store) FindSignInAttempts(ctx context.Context, key string) (wardload.SignInAttempts, error) {
	c := wardload.SignInAttempts{Key: key}
	var last string
	err := s.reader(ctx).QueryRowContext(ctx, `SELECT attempts, last_at FROM signin_attempts WHERE key = ?`, key).Scan(&c.Attempts, &last)
	if errors.Is(err, sql.ErrNoRows) {
		return c, nil
	}
	if err != nil {
		return c, formatError(err)
	}
	c.Last, err = parseTime(last)
	return c, err
}

// SwapSignInAttempts stores next if old is what is stored: an INSERT that
// does nothing when a row exists, or an UPDATE conditional on the old
// count and time, each one statement on the single writer.
func (s *Store) SwapSignInAttempts(ctx context.Context, old, next wardload.SignInAttempts) (bool, error) {
	var res sql.Result
	var err error
	if old.Last.IsZero() {
		res, err = s.w.ExecContext(ctx, `INSERT INTO signin_attempts (key, attempts, last_at) VALUES (?, ?, ?)
			ON CONFLICT (key) DO NOTHING`, old.Key, next.Attempts, formatTime(next.Last))
	} else {
		res, err = s.w.ExecContext(ctx, `UPDATE signin_attempts SET attempts = ?, last_at = ?
			WHERE key = ? AND attempts = ? AND last_at = ?`,
			next.Attempts, formatTime(next.Last), old.Key, old.Attempts, formatTime(old.Last))
	}
	if err != nil {
		return false, formatError(err)
	}
	n, err := res.RowsAffected()
	return n == 1, formatError(err)
}

// CancelSignInAttempt takes one attempt off key's count.
func (s *Store) CancelSignInAttempt(ctx context.Context, key string) error {
	_, err := s.w.ExecContext(ctx, `UPDATE signin_attempts SET attempts = attempts - 1 WHERE key = ? AND attempts > 0`, key)
	return formatError(err)
}

// ClearSignInAttempts forgets key's count.
func (s *Store) ClearSignInAttempts(ctx context.Context, key string) error {
	_, err := s.w.ExecContext(ctx, `DELETE FROM signin_attempts WHERE key = ?`, key)
	return formatError(err)
}

// PurgeSignInAttempts deletes counts older than before, then all but the
// newest keep.
func (s *Store) PurgeSignInAttempts(ctx context.Context, before time.Time, keep int) (int, error) {
	var n int64
	err := s.write(ctx, func(tx *Tx) error {
		res, err := tx.ExecContext(ctx, `DELETE FROM signin_attempts WHERE last_at < ?`, formatTime(before))
		if err != nil {
			return err
		}
		old, err := res.RowsAffected()
		if err != nil {
			return err
		}
		res, err = tx.ExecContext(ctx, `DELETE FROM signin_attempts WHERE key IN
			(SELECT key FROM signin_attempts ORDER BY last_at DESC, key LIMIT -1 OFFSET ?)`, max(keep, 0))
		if err != nil {
			return err
		}
		extra, err := res.RowsAffected()
		n = old + extra
		return err
	})
	return int(n), err
}

// InstallSecret returns the secret called name, storing fresh first if
// there is none.
func (s *Store) InstallSecret(ctx context.Context, name string, fresh []byte) ([]byte, error) {
	var secret []byte
	err := s.write(ctx, func(tx *Tx) error {
		if _, err := tx.ExecContext(ctx, `INSERT INTO install_secrets (name, secret) VALUES (?, ?)
			ON CONFLICT (name) DO NOTHING`, name, fresh); err != nil {
			return err
		}
		return tx.QueryRowContext(ctx, `SELECT secret FROM install_secrets WHERE name = ?`, name).Scan(&secret)
	})
	return secret, err
}
