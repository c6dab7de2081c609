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

// sqlstateKinds maps the SQLSTATEs of constraint and concurrency failures
// to the domain's kinds.
var sqlstateKinds = map[string]wardload.ConstraintKind{
	"23505": wardload.ConstraintUnique,      // unique_violation
	"23503": wardload.ConstraintReference,   // foreign_key_violation
	"23514": wardload.ConstraintRange,       // check_violation
	"23502": wardload.ConstraintRange,       // not_null_violation
	"40001": wardload.ConstraintConcurrency, // serialization_failure
	"40P01": wardload.ConstraintConcurrency, // deadlock_detected
}

// formatError maps driver errors to wardload errors by SQLSTATE, the one
// place that does so. Application errors pass through unchanged; anything
// else stays an internal error whose text ErrorMessage never shows.
func formatError(err error) error {
	var pgErr *pgconn.PgError
	// nil, an application error (its code is not EINTERNAL) and anything
	// not from the server pass through.
	if wardload.ErrorCode(err) != wardload.EINTERNAL || !errors.As(err, &pgErr) {
		return err
	}
	if kind, ok := sqlstateKinds[pgErr.Code]; ok {
		return wardload.ConstraintError(kind, uniqueRules[pgErr.ConstraintName])
	}
	// Keep the SQLSTATE for the log, never for the user.
	return fmt.Errorf("postgres: SQLSTATE %s: %w", pgErr.Code, err)
}
