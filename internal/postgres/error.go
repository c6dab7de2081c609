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

// uniqueFields names, for each unique constraint, the input that clashed
// and the message a user sees. Constraint names are fixed in the migrations.
var uniqueFields = map[string]struct{ field, msg string }{
	// Wording as internal/sqlite's, so users read the same on either backend.
	"wards_code_key":                            {"code", "A ward with this code already exists."},
	"tiers_ward_id_code_key":                    {"code", "The ward already has a tier with this code."},
	"shift_patterns_ward_id_name_key":           {"name", "The ward already has a shift with this name."},
	"users_name_key":                            {"name", "A user with this name already exists."},
	"api_tokens_name_key":                       {"name", "A token with this name already exists."},
	"api_tokens_hash_key":                       {"hash", "This token secret is already in use; generate a new one."},
	"census_ward_id_date_shift_id_revision_key": {"", "Someone else saved this census at the same moment; please try again."},
	"ratio_floors_key_idx":                      {"floors", "A shift has two ratio floors for the same tier."},
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
		if lostConnection(err) {
			return wardload.Unavailable(wardload.EUNAVAILABLE, err)
		}
		return err
	}
	switch pgErr.Code {
	case "23505": // unique_violation
		if u, ok := uniqueFields[pgErr.ConstraintName]; ok {
			return wardload.FieldErrorf(wardload.ECONFLICT, u.field, "%s", u.msg)
		}
		return wardload.Errorf(wardload.ECONFLICT, "This entry already exists.")
	case "23503": // foreign_key_violation
		return wardload.Errorf(wardload.ENOTFOUND, "A ward, tier, shift or user referred to does not exist.")
	case "23514", "23502": // check_violation, not_null_violation
		return wardload.Errorf(wardload.EINVALID, "A value is missing or out of range.")
	case "40001", "40P01": // serialization_failure, deadlock_detected
		return wardload.Errorf(wardload.ECONFLICT, "A concurrent change won; please try again.")
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

func notFound(what string) error {
	return wardload.Errorf(wardload.ENOTFOUND, "%s not found.", what)
}
