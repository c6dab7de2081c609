package sqlite

import (
	"context"

	"wardload/internal/wardload"
)

// WardVersion counts the ward's audit rows (index audit_log_ward_idx).
func (s *Store) WardVersion(ctx context.Context, wardID int64) (wardload.WardVersion, error) {
	var v wardload.WardVersion
	err := s.reader(ctx).QueryRowContext(ctx, `SELECT COUNT(*), COALESCE(MAX(id), 0) FROM audit_log WHERE ward_id = ?`, wardID).
		Scan(&v.Entries, &v.LastID)
	return v, err
}
