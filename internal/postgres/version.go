package postgres

import (
	"context"

	"wardload/internal/wardload"
)

// WardVersion counts the ward's audit rows (index audit_log_ward_idx).
func (s *Store) WardVersion(ctx context.Context, wardID int64) (wardload.WardVersion, error) {
	var v wardload.WardVersion
	err := s.pool.QueryRow(ctx, `SELECT count(*), COALESCE(max(id), 0) FROM audit_log WHERE ward_id = $1`, wardID).
		Scan(&v.Entries, &v.LastID)
	return v, formatError(err)
}
