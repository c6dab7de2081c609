package sqlite

import (
	"context"
	"database/sql"
	"errors"

	"wardload/internal/wardload"
)

// FindSettings returns the ward's saved settings or its defaults.
func (s *Store) FindSettings(ctx context.Context, wardID int64) (*wardload.Settings, error) {
	return findSettings(ctx, s.reader(ctx), wardID)
}

func findSettings(ctx context.Context, q querier, wardID int64) (*wardload.Settings, error) {
	if err := wardExists(ctx, q, wardID); err != nil {
		return nil, err
	}
	st := &wardload.Settings{WardID: wardID}
	var updated string
	err := q.QueryRowContext(ctx, `SELECT direct_care_fraction, cover_level, lookback_weeks, quartiles, beds,
		changeover_minutes, support_staff, escalation, updated_by, updated_at
		FROM ward_settings WHERE ward_id = ?`, wardID).Scan(
		&st.DirectCareFraction, &st.CoverLevel, &st.LookbackWeeks, &st.Quartiles, &st.Beds,
		&st.ChangeoverMinutes, &st.SupportStaff, &st.Escalation, &st.UpdatedBy, &updated)
	if errors.Is(err, sql.ErrNoRows) {
		return wardload.DefaultSettings(wardID), nil
	} else if err != nil {
		return nil, err
	}
	if st.UpdatedAt, err = parseTime(updated); err != nil {
		return nil, err
	}
	rows, err := q.QueryContext(ctx, `SELECT shift_id, COALESCE(tier_id, 0), patients_per_nurse, charge_nurse_counts
		FROM ratio_floors WHERE ward_id = ? ORDER BY position`, wardID)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	for rows.Next() {
		var f wardload.RatioFloor
		if err := rows.Scan(&f.ShiftID, &f.TierID, &f.PatientsPerNurse, &f.ChargeNurseCounts); err != nil {
			return nil, err
		}
		st.Floors = append(st.Floors, f)
	}
	return st, rows.Err()
}

// SaveSettings replaces the ward's settings and floors in one transaction.
func (s *Store) SaveSettings(ctx context.Context, st *wardload.Settings) error {
	if err := st.Validate(); err != nil {
		return err
	}
	return s.write(ctx, func(tx *Tx) error {
		before, err := findSettings(ctx, tx, st.WardID)
		if err != nil {
			return err
		}
		refs, err := loadWardRefs(ctx, tx, st.WardID)
		if err != nil {
			return err
		}
		if err := st.CheckRefs(refs); err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `INSERT INTO ward_settings
			(ward_id, direct_care_fraction, cover_level, lookback_weeks, quartiles, beds,
				changeover_minutes, support_staff, escalation, updated_by, updated_at)
			VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)
			ON CONFLICT (ward_id) DO UPDATE SET direct_care_fraction = excluded.direct_care_fraction,
				cover_level = excluded.cover_level, lookback_weeks = excluded.lookback_weeks,
				quartiles = excluded.quartiles, beds = excluded.beds,
				changeover_minutes = excluded.changeover_minutes, support_staff = excluded.support_staff,
				escalation = excluded.escalation, updated_by = excluded.updated_by, updated_at = excluded.updated_at`,
			st.WardID, st.DirectCareFraction, st.CoverLevel, st.LookbackWeeks, st.Quartiles, st.Beds,
			st.ChangeoverMinutes, boolInt(st.SupportStaff), st.Escalation, st.UpdatedBy, formatTime(tx.now)); err != nil {
			return err
		}
		if _, err := tx.ExecContext(ctx, `DELETE FROM ratio_floors WHERE ward_id = ?`, st.WardID); err != nil {
			return err
		}
		for i, f := range st.Floors {
			if _, err := tx.ExecContext(ctx, `INSERT INTO ratio_floors
				(ward_id, shift_id, tier_id, patients_per_nurse, charge_nurse_counts, position) VALUES (?, ?, ?, ?, ?, ?)`,
				st.WardID, f.ShiftID, nullID(f.TierID), f.PatientsPerNurse, boolInt(f.ChargeNurseCounts), i); err != nil {
				return err
			}
		}
		st.UpdatedAt = tx.now
		return tx.audit(wardload.ActionSettingsSave, before, st)
	})
}
