package postgres

import (
	"context"
	"errors"
	"fmt"
	"io"
	"net"
	"strings"

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
	"shift_records_revision_key":                wardload.UniqueShiftRecordRevision,
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
	if wardload.ErrorCode(err) != wardload.EINTERNAL {
		return err // nil or an application error
	}
	if !errors.As(err, &pgErr) {
		if lostConnection(err) {
			return wardload.Unavailable(wardload.EUNAVAILABLE, err)
		}
		return err
	}
	if kind, ok := sqlstateKinds[pgErr.Code]; ok {
		return wardload.ConstraintError(kind, uniqueRules[pgErr.ConstraintName])
	}
	switch pgErr.Code {
	case "53100": // disk_full
		return wardload.Unavailable(wardload.EFULL, err)
	case "57P01", "57P02", "57P03", "53300": // admin_shutdown, crash_shutdown, cannot_connect_now, too_many_connections
		return wardload.Unavailable(wardload.EUNAVAILABLE, err)
	}
	if strings.HasPrefix(pgErr.Code, "08") { // connection_exception
		return wardload.Unavailable(wardload.EUNAVAILABLE, err)
	}
	// Keep the SQLSTATE for the log, never for the user.
	return fmt.Errorf("postgres: SQLSTATE %s: %w", pgErr.Code, err)
}

// lostConnection reports whether err means the database could not be
// reached or the connection broke: a failed connection attempt, one not
// made during the back-off, a network error, or a connection closed under
// a query. A request cancelled by its client is not one.
func lostConnection(err error) bool {
	if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
		return false
	}
	var ce *pgconn.ConnectError
	var bo *errBackingOff
	var ne *net.OpError
	return errors.As(err, &ce) || errors.As(err, &bo) || errors.As(err, &ne) ||
		errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF) ||
		errors.Is(err, pgconn.ErrConnClosed) || errors.Is(err, net.ErrClosed)
}
