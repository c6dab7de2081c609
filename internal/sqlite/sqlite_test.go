package sqlite_test

import (
	"context"
	"os"
	"path/filepath"
	"testing"

	"wardload/internal/sqlite"
	"wardload/internal/storetest"
	"wardload/internal/wardload"
)

// MustOpen returns a migrated store on a fresh file in t.TempDir().
func MustOpen(tb testing.TB, now wardload.Clock) *sqlite.Store {
	tb.Helper()
	ctx := context.Background()
	s, err := sqlite.Open(ctx, sqlite.Config{Path: filepath.Join(tb.TempDir(), "wardload.db"), Now: now})
	if err != nil {
		tb.Fatal(err)
	}
	tb.Cleanup(func() { s.Close() })
	if err := s.Migrate(ctx); err != nil {
		tb.Fatal(err)
	}
	return s
}

func TestStore(t *testing.T) {
	storetest.Run(t, func(t *testing.T, now wardload.Clock) wardload.Store { return MustOpen(t, now) })
}

// The in-memory database is a single connection; the suite must pass on it too.
func TestStoreInMemory(t *testing.T) {
	storetest.Run(t, func(t *testing.T, now wardload.Clock) wardload.Store {
		ctx := context.Background()
		s, err := sqlite.Open(ctx, sqlite.Config{Path: ":memory:", Now: now})
		if err != nil {
			t.Fatal(err)
		}
		t.Cleanup(func() { s.Close() })
		if err := s.Migrate(ctx); err != nil {
			t.Fatal(err)
		}
		return s
	})
}

func TestOpenBadPath(t *testing.T) {
	ctx := context.Background()
	missing := filepath.Join(t.TempDir(), "no", "such", "dir", "wardload.db")
	if s, err := sqlite.Open(ctx, sqlite.Config{Path: missing}); err == nil {
		s.Close()
		t.Fatal("Open in a missing directory: err = nil")
	}
	if _, err := sqlite.Open(ctx, sqlite.Config{}); err == nil {
		t.Fatal("Open with an empty path: err = nil")
	}
	if os.Geteuid() != 0 { // root ignores directory permissions
		ro := filepath.Join(t.TempDir(), "ro")
		if err := os.Mkdir(ro, 0o500); err != nil {
			t.Fatal(err)
		}
		if s, err := sqlite.Open(ctx, sqlite.Config{Path: filepath.Join(ro, "wardload.db")}); err == nil {
			s.Close()
			t.Fatal("Open in a read-only directory: err = nil")
		}
	}
}

func TestMigrateTwice(t *testing.T) {
	s := MustOpen(t, nil)
	if err := s.Migrate(context.Background()); err != nil {
		t.Fatalf("second Migrate: %v", err)
	}
	// The session table scs sqlite3store expects is there.
	if _, err := s.DB().Exec(`INSERT INTO sessions (token, data, expiry) VALUES ('t', x'00', 1.5)`); err != nil {
		t.Fatalf("sessions table: %v", err)
	}
}
