package postgres

import (
	"errors"
	"fmt"

	"github.com/jackc/pgx/v5/pgconn"

	"wardload/internal/wardload"
)

// uniqueRules names, for each unique constraint, the domain's unique
// rule, whose error says what a user reads. Constraint names are fixed in
// the migrations.
var uniqueRules = map[string]string{
	"wards_code_key":                            wardload.UniqueWardCode,
	"tiers_ward_id_code_key":                    wardload.UniqueTierCode,
	"shift_patterns_ward_id_name_key":           wardload.UniqueShiftName,
	"users_name_key":                            wardload.UniqueUserName,
	"api_tokens_name_key":                       wardload.UniqueTokenName,
	"api_tokens_hash_key":                       wardload.UniqueTokenHash,
	"census_ward_id_date_shift_id_revision_key": wardload.UniqueCensusRevision,
	"ratio_floors_key_idx":                      wardload.UniqueRatioFloor,
}

// formatError maps driver errors to wardload errors by SQLSTATE, the one
// place that does so. Application errors pass through unchanged; anything
// else stays an internal error whose text ErrorMessage never shows.
func formatError(err error) error {
	if err == nil {
		return nil
	}
	var appErr *wardload.Error
	if errors.As(err, &appErr) {
		return err
	}
	var pgErr *pgconn.PgError
	if !errors.As(err, &pgErr) {
		return err
	}
	switch pgErr.Code {
	case "23505": // unique_violation
		return wardload.UniqueError(uniqueRules[pgErr.ConstraintName])
	case "23503": // foreign_key_violation
		return wardload.ReferenceError()
	case "23514", "23502": // check_violation, not_null_violation
		return wardload.RangeError()
	case "40001", "40P01": // serialization_failure, deadlock_detected
		return wardload.ConcurrencyError()
	}
	// Keep the SQLSTATE for the log, never for the user.
	return fmt.Errorf("postgres: SQLSTATE %s: %w", pgErr.Code, err)
}

func notFound(what string) error {
	return wardload.Errorf(wardload.ENOTFOUND, "%s not found.", what)
}
