package postgres

import (
	"context"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// CreateObservations stores obs as one import batch, all or nothing, with
// the checks and messages of wardload.Import.
func (s *Store) CreateObservations(ctx context.Context, obs []*wardload.Observation) (string, error) {
	im, err := wardload.NewImport(obs)
	if err != nil {
		return "", err
	}
	return im.Result(s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		if err := im.CheckRefs(func(id int64) (*wardload.WardRefs, error) { return loadWardRefs(ctx, tx, id, "") }); err != nil {
			return err
		}
		if err := insertObservations(ctx, tx, obs, im.BatchID(), now); err != nil {
			return err
		}
		im.Stored(now)
		return audit(ctx, tx, now, wardload.ActionObservationImport, nil, im)
	}))
}

// insertObservations stores the rows and their factors in two pipelined
// batches rather than a round trip per row, since imports can be large.
func insertObservations(ctx context.Context, tx pgx.Tx, obs []*wardload.Observation, batch string, now time.Time) error {
	b := &pgx.Batch{}
	for _, o := range obs {
		b.Queue(`INSERT INTO observations (ward_id, tier_id, date, shift_id, window_hours, care_minutes, entered_by, entered_at, batch_id)
			VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9) RETURNING id`,
			o.WardID, o.TierID, dateArg(o.Date), o.ShiftID, o.WindowHours, o.CareMinutes, o.EnteredBy, now, batch,
		).QueryRow(func(r pgx.Row) error { return r.Scan(&o.ID) })
	}
	if err := tx.SendBatch(ctx, b).Close(); err != nil {
		return err
	}
	b = &pgx.Batch{}
	for _, o := range obs {
		for name, v := range o.Factors {
			b.Queue(`INSERT INTO observation_factors (observation_id, name, value) VALUES ($1, $2, $3)`, o.ID, name, v)
		}
	}
	if b.Len() == 0 {
		return nil
	}
	return tx.SendBatch(ctx, b).Close()
}

// idSet runs a query of one BIGINT column and returns the values as a set.
func idSet(ctx context.Context, q querier, sql string, args ...any) (map[int64]bool, error) {
	rows, err := q.Query(ctx, sql, args...)
	if err != nil {
		return nil, err
	}
	ids, err := pgx.CollectRows(rows, pgx.RowTo[int64])
	if err != nil {
		return nil, err
	}
	set := make(map[int64]bool, len(ids))
	for _, id := range ids {
		set[id] = true
	}
	return set, nil
}
