package sqlite_test

import (
	"bytes"
	"context"
	"path/filepath"
	"testing"
	"time"

	"github.com/pressly/goose/v3"

	"wardload/internal/sqlite"
	"wardload/migrations"
)

// TestSessionStore: a committed session is found, a replaced one gives the
// new data, an expired or deleted one is not found, and cleanup removes
// expired rows.
func TestSessionStore(t *testing.T) {
	ctx := context.Background()
	st, err := sqlite.Open(ctx, sqlite.Config{Path: filepath.Join(t.TempDir(), "wardload.db")})
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	if err := st.Migrate(ctx); err != nil {
		t.Fatal(err)
	}
	ss := sqlite.NewSessionStore(st, 0)
	defer ss.StopCleanup()
	find := func(token string) ([]byte, bool) {
		t.Helper()
		b, ok, err := ss.FindCtx(ctx, token)
		if err != nil {
			t.Fatal(err)
		}
		return b, ok
	}
	later := time.Now().Add(time.Hour)
	if err := ss.CommitCtx(ctx, "a", []byte("one"), later); err != nil {
		t.Fatal(err)
	}
	if b, ok := find("a"); !ok || !bytes.Equal(b, []byte("one")) {
		t.Fatalf("find a = %q, %v; want one, true", b, ok)
	}
	if err := ss.Commit("a", []byte("two"), later); err != nil {
		t.Fatal(err)
	}
	if b, ok := find("a"); !ok || !bytes.Equal(b, []byte("two")) {
		t.Fatalf("find replaced a = %q, %v; want two, true", b, ok)
	}
	if err := ss.CommitCtx(ctx, "old", []byte("x"), time.Now().Add(-time.Second)); err != nil {
		t.Fatal(err)
	}
	if _, ok := find("old"); ok {
		t.Error("an expired session was found")
	}
	if err := ss.DeleteCtx(ctx, "a"); err != nil {
		t.Fatal(err)
	}
	if _, ok := find("a"); ok {
		t.Error("a deleted session was found")
	}
	if _, ok := find("never"); ok {
		t.Error("an unknown token was found")
	}

	// Cleanup runs on its ticker; the expired row must go, a live one stay.
	if err := ss.CommitCtx(ctx, "live", []byte("y"), later); err != nil {
		t.Fatal(err)
	}
	cs := sqlite.NewSessionStore(st, 10*time.Millisecond)
	defer cs.StopCleanup()
	deadline := time.Now().Add(5 * time.Second)
	for {
		var n int
		if err := st.DB().QueryRowContext(ctx, `SELECT COUNT(*) FROM sessions WHERE token = 'old'`).Scan(&n); err != nil {
			t.Fatal(err)
		}
		if n == 0 {
			break
		}
		if time.Now().After(deadline) {
			t.Fatal("cleanup did not remove the expired session")
		}
		time.Sleep(10 * time.Millisecond)
	}
	if _, ok := find("live"); !ok {
		t.Error("cleanup removed a live session")
	}
}

// TestSessionHashMigration: migration 00004 deletes the sessions stored
// before tokens were hashed, since each such row holds a live token in
// plain text; a database migrated from version 2 has no session left.
func TestSessionHashMigration(t *testing.T) {
	ctx := context.Background()
	st, err := sqlite.Open(ctx, sqlite.Config{Path: filepath.Join(t.TempDir(), "wardload.db")})
	if err != nil {
		t.Fatal(err)
	}
	defer st.Close()
	p, err := goose.NewProvider(goose.DialectSQLite3, st.DB(), migrations.SQLite)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := p.UpTo(ctx, 2); err != nil {
		t.Fatal(err)
	}
	if _, err := st.DB().ExecContext(ctx, `INSERT INTO sessions (token, data, expiry) VALUES ('plain-token', x'00', julianday('now', '+1 hour'))`); err != nil {
		t.Fatal(err)
	}
	if err := st.Migrate(ctx); err != nil {
		t.Fatal(err)
	}
	var n int
	if err := st.DB().QueryRowContext(ctx, `SELECT COUNT(*) FROM sessions`).Scan(&n); err != nil {
		t.Fatal(err)
	}
	if n != 0 {
		t.Errorf("%d sessions left after migration 00004, want 0", n)
	}
}
