package postgres

import (
	"context"
	"errors"
	"fmt"
	"io"
	"net"
	"strings"
	"testing"

	"github.com/jackc/pgx/v5/pgconn"

	"wardload/internal/wardload"
)

// TestFormatError checks the SQLSTATE table without a database: the codes
// and constraint names are PostgreSQL's (Appendix A, "PostgreSQL Error
// Codes") and the migration's.
func TestFormatError(t *testing.T) {
	for _, tc := range []struct {
		name  string
		err   error
		code  string
		field string
	}{
		{"nil", nil, "", ""},
		{"unique ward code", &pgconn.PgError{Code: "23505", ConstraintName: "wards_code_key", Message: "duplicate key value violates unique constraint"}, wardload.ECONFLICT, "code"},
		{"unique tier code, wrapped", fmt.Errorf("insert: %w", &pgconn.PgError{Code: "23505", ConstraintName: "tiers_ward_id_code_key"}), wardload.ECONFLICT, "code"},
		{"unique token hash", &pgconn.PgError{Code: "23505", ConstraintName: "api_tokens_hash_key"}, wardload.ECONFLICT, "hash"},
		{"unique, unknown constraint", &pgconn.PgError{Code: "23505", ConstraintName: "something_else"}, wardload.ECONFLICT, ""},
		{"foreign key", &pgconn.PgError{Code: "23503", ConstraintName: "tiers_ward_id_fkey"}, wardload.ENOTFOUND, ""},
		{"check", &pgconn.PgError{Code: "23514", ConstraintName: "census_revision_check"}, wardload.EINVALID, ""},
		{"not null", &pgconn.PgError{Code: "23502"}, wardload.EINVALID, ""},
		{"serialization", &pgconn.PgError{Code: "40001"}, wardload.ECONFLICT, ""},
		{"disk full", &pgconn.PgError{Code: "53100", Message: "could not extend file"}, wardload.EFULL, ""},
		{"server shutting down", &pgconn.PgError{Code: "57P01"}, wardload.EUNAVAILABLE, ""},
		{"server starting up", &pgconn.PgError{Code: "57P03"}, wardload.EUNAVAILABLE, ""},
		{"too many connections", &pgconn.PgError{Code: "53300"}, wardload.EUNAVAILABLE, ""},
		{"connection exception class", &pgconn.PgError{Code: "08006"}, wardload.EUNAVAILABLE, ""},
		{"connection closed under a query", fmt.Errorf("find: %w", io.ErrUnexpectedEOF), wardload.EUNAVAILABLE, ""},
		{"network error", &net.OpError{Op: "read", Net: "tcp", Err: errors.New("connection reset by peer")}, wardload.EUNAVAILABLE, ""},
		{"back-off refusal", &errBackingOff{cause: errors.New("dial tcp: connection refused")}, wardload.EUNAVAILABLE, ""},
		{"client gone is not unavailable", fmt.Errorf("read: %w: %w", context.Canceled, io.ErrUnexpectedEOF), wardload.EINTERNAL, ""},
		{"syntax error stays internal", &pgconn.PgError{Code: "42601", Message: "syntax error at or near"}, wardload.EINTERNAL, ""},
		{"other error stays internal", errors.New("boom"), wardload.EINTERNAL, ""},
		{"app error passes through", wardload.FieldErrorf(wardload.EINVALID, "date", "Date is required."), wardload.EINVALID, "date"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := formatError(tc.err)
			if c := wardload.ErrorCode(got); c != tc.code {
				t.Fatalf("code = %q, want %q (%v)", c, tc.code, got)
			}
			if f := wardload.ErrorField(got); f != tc.field {
				t.Fatalf("field = %q, want %q", f, tc.field)
			}
			msg := wardload.ErrorMessage(got)
			for _, w := range []string{"constraint", "duplicate", "SQLSTATE", "pgx", "syntax", "_key", "_fkey"} {
				if strings.Contains(msg, w) {
					t.Fatalf("user message %q leaks driver text %q", msg, w)
				}
			}
			if tc.err != nil && msg == "" {
				t.Fatal("empty message")
			}
		})
	}
}
