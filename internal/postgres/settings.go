package postgres

import (
	"context"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/wardload"
)

// FindSettings returns the ward's settings, or DefaultSettings if none were
// saved yet. Returns ENOTFOUND for an unknown ward.
func (s *Store) FindSettings(ctx context.Context, wardID int64) (*wardload.Settings, error) {
	var out *wardload.Settings
	err := s.inSnapshot(ctx, func(tx pgx.Tx) error {
		var err error
		out, err = findSettings(ctx, tx, wardID)
		return err
	})
	return out, err
}

func findSettings(ctx context.Context, tx pgx.Tx, wardID int64) (*wardload.Settings, error) {
	if err := wardExists(ctx, tx, wardID); err != nil {
		return nil, err
	}
	st := wardload.Settings{WardID: wardID}
	err := tx.QueryRow(ctx, `
		SELECT direct_care_fraction, cover_level, lookback_weeks, quartiles, beds,
			changeover_minutes, support_staff, escalation, updated_by, updated_at
		FROM ward_settings WHERE ward_id = $1`, wardID,
	).Scan(&st.DirectCareFraction, &st.CoverLevel, &st.LookbackWeeks, &st.Quartiles, &st.Beds,
		&st.ChangeoverMinutes, &st.SupportStaff, &st.Escalation, &st.UpdatedBy, &st.UpdatedAt)
	if err == pgx.ErrNoRows {
		return wardload.DefaultSettings(wardID), nil
	} else if err != nil {
		return nil, err
	}
	st.UpdatedAt = st.UpdatedAt.UTC()
	rows, err := tx.Query(ctx, `
		SELECT shift_id, coalesce(tier_id, 0), patients_per_nurse, charge_nurse_counts
		FROM ratio_floors WHERE ward_id = $1 ORDER BY id`, wardID)
	if err != nil {
		return nil, err
	}
	st.Floors, err = pgx.CollectRows(rows, func(r pgx.CollectableRow) (wardload.RatioFloor, error) {
		var f wardload.RatioFloor
		err := r.Scan(&f.ShiftID, &f.TierID, &f.PatientsPerNurse, &f.ChargeNurseCounts)
		return f, err
	})
	if len(st.Floors) == 0 {
		st.Floors = nil
	}
	return &st, err
}

// SaveSettings replaces the ward's settings, floors included, and sets UpdatedAt.
func (s *Store) SaveSettings(ctx context.Context, st *wardload.Settings) error {
	if err := st.Validate(); err != nil {
		return err
	}
	return s.inTx(ctx, func(tx pgx.Tx, now time.Time) error {
		before, err := findSettings(ctx, tx, st.WardID)
		if err != nil {
			return err
		}
		refs, err := loadWardRefs(ctx, tx, st.WardID, "")
		if err != nil {
			return err
		}
		if err := st.CheckRefs(refs); err != nil {
			return err
		}
		if _, err := tx.Exec(ctx, `
			INSERT INTO ward_settings (ward_id, direct_care_fraction, cover_level, lookback_weeks, quartiles, beds,
				changeover_minutes, support_staff, escalation, updated_by, updated_at)
			VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11)
			ON CONFLICT (ward_id) DO UPDATE SET direct_care_fraction = excluded.direct_care_fraction,
				cover_level = excluded.cover_level, lookback_weeks = excluded.lookback_weeks,
				quartiles = excluded.quartiles, beds = excluded.beds,
				changeover_minutes = excluded.changeover_minutes, support_staff = excluded.support_staff,
				escalation = excluded.escalation, updated_by = excluded.updated_by, updated_at = excluded.updated_at`,
			st.WardID, st.DirectCareFraction, st.CoverLevel, st.LookbackWeeks, st.Quartiles, st.Beds,
			st.ChangeoverMinutes, st.SupportStaff, st.Escalation, st.UpdatedBy, now); err != nil {
			return err
		}
		if _, err := tx.Exec(ctx, `DELETE FROM ratio_floors WHERE ward_id = $1`, st.WardID); err != nil {
			return err
		}
		for _, f := range st.Floors {
			var tier *int64
			if f.TierID != 0 {
				tier = &f.TierID
			}
			if _, err := tx.Exec(ctx, `
				INSERT INTO ratio_floors (ward_id, shift_id, tier_id, patients_per_nurse, charge_nurse_counts)
				VALUES ($1, $2, $3, $4, $5)`, st.WardID, f.ShiftID, tier, f.PatientsPerNurse, f.ChargeNurseCounts); err != nil {
				return err
			}
		}
		st.UpdatedAt = now
		return audit(ctx, tx, now, wardload.ActionSettingsSave, before, st)
	})
}
