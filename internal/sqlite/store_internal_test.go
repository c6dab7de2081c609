package sqlite

import (
	"context"
	"errors"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"wardload/internal/wardload"
)

func mustOpen(t *testing.T, now wardload.Clock) *Store {
	t.Helper()
	ctx := context.Background()
	s, err := Open(ctx, Config{Path: filepath.Join(t.TempDir(), "w.db"), Now: now})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	if err := s.Migrate(ctx); err != nil {
		t.Fatal(err)
	}
	return s
}

// The service code checks references before writing, so the constraint
// paths of formatError are reached only by races or mistakes. Provoke each
// one directly on the writer.
func TestFormatError(t *testing.T) {
	s := mustOpen(t, nil)
	ctx := context.Background()
	now := formatTime(time.Now())
	if _, err := s.w.ExecContext(ctx, `INSERT INTO wards (code, name, time_zone, created_at) VALUES ('w1', 'W', 'UTC', ?)`, now); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name, sql string
		code      string
		field     string
	}{
		{"unique ward code", `INSERT INTO wards (code, name, time_zone, created_at) VALUES ('w1', 'X', 'UTC', '` + now + `')`, wardload.ECONFLICT, "code"},
		{"unique tier code per ward", `INSERT INTO tiers (ward_id, code, label) VALUES (1, 't', 'a'), (1, 't', 'b')`, wardload.ECONFLICT, "code"},
		{"foreign key", `INSERT INTO tiers (ward_id, code, label) VALUES (99, 't', 'a')`, wardload.ENOTFOUND, ""},
		{"check", `INSERT INTO users (name, role, password_hash, created_at) VALUES ('u', 'boss', 'h', '` + now + `')`, wardload.EINVALID, ""},
		{"not null", `INSERT INTO wards (code, name, time_zone, created_at) VALUES ('w2', NULL, 'UTC', '` + now + `')`, wardload.EINVALID, ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, raw := s.w.ExecContext(ctx, tc.sql)
			if raw == nil {
				t.Fatal("statement did not fail")
			}
			err := formatError(raw)
			if got := wardload.ErrorCode(err); got != tc.code {
				t.Fatalf("code = %s, want %s (driver: %v)", got, tc.code, raw)
			}
			if got := wardload.ErrorField(err); got != tc.field {
				t.Fatalf("field = %q, want %q", got, tc.field)
			}
			msg := strings.ToLower(wardload.ErrorMessage(err))
			for _, w := range []string{"constraint", "sqlite", "unique", "foreign", "failed:"} {
				if strings.Contains(msg, w) {
					t.Fatalf("message %q leaks driver text %q", msg, w)
				}
			}
		})
	}
	if formatError(nil) != nil {
		t.Fatal("formatError(nil) != nil")
	}
	other := errors.New("disk on fire")
	if err := formatError(other); wardload.ErrorCode(err) != wardload.EINTERNAL || wardload.ErrorMessage(err) != "Internal error." {
		t.Fatalf("unknown error became %v", err)
	}
}

// Pragmas are in the DSN so that every pooled connection has them; check
// on both pools, holding several read connections at once.
func TestPragmas(t *testing.T) {
	s := mustOpen(t, nil)
	ctx := context.Background()
	check := func(q querier, name string) {
		t.Helper()
		var mode string
		var fk, busy int
		if err := q.QueryRowContext(ctx, `PRAGMA journal_mode`).Scan(&mode); err != nil {
			t.Fatal(err)
		}
		if err := q.QueryRowContext(ctx, `PRAGMA foreign_keys`).Scan(&fk); err != nil {
			t.Fatal(err)
		}
		if err := q.QueryRowContext(ctx, `PRAGMA busy_timeout`).Scan(&busy); err != nil {
			t.Fatal(err)
		}
		if mode != "wal" || fk != 1 || busy != 5000 {
			t.Fatalf("%s: journal_mode=%s foreign_keys=%d busy_timeout=%d", name, mode, fk, busy)
		}
	}
	check(s.w, "writer")
	var conns []interface{ Close() error }
	for i := range 3 {
		c, err := s.r.Conn(ctx)
		if err != nil {
			t.Fatal(err)
		}
		conns = append(conns, c)
		check(c, "reader "+string(rune('0'+i)))
	}
	for _, c := range conns {
		c.Close()
	}
	if s.w.Stats().MaxOpenConnections != 1 {
		t.Fatalf("writer pool allows %d connections, want 1", s.w.Stats().MaxOpenConnections)
	}
}

// Times round-trip to the nanosecond and come back in UTC.
func TestTimeRoundTrip(t *testing.T) {
	at := time.Date(2026, 10, 25, 1, 30, 0, 1, time.FixedZone("IST", 3600))
	s := mustOpen(t, func() time.Time { return at })
	ctx := context.Background()
	w := &wardload.Ward{Code: "w1", Name: "W", TimeZone: "Europe/Dublin"}
	if err := s.CreateWard(ctx, w); err != nil {
		t.Fatal(err)
	}
	got, err := s.FindWardByID(ctx, w.ID)
	if err != nil {
		t.Fatal(err)
	}
	if !got.CreatedAt.Equal(at) || got.CreatedAt.Location() != time.UTC || got.CreatedAt.Nanosecond() != 1 {
		t.Fatalf("CreatedAt = %v, want %v in UTC", got.CreatedAt, at)
	}
}
