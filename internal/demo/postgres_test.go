package demo_test

import (
	"context"
	"crypto/rand"
	"encoding/hex"
	"os"
	"slices"
	"testing"
	"time"

	"github.com/jackc/pgx/v5"

	"wardload/internal/postgres"
	"wardload/internal/wardload"
)

// mustOpenPostgres opens a migrated PostgreSQL store in a schema of its own,
// dropped at the end of the test. Without WARDLOAD_TEST_DATABASE_URL the
// test skips, except under CI=true, where it fails.
func mustOpenPostgres(t *testing.T) wardload.Store {
	t.Helper()
	url := os.Getenv("WARDLOAD_TEST_DATABASE_URL")
	if url == "" {
		if os.Getenv("CI") == "true" {
			t.Fatal("WARDLOAD_TEST_DATABASE_URL must be set when CI=true")
		}
		t.Skip("PostgreSQL demo test skipped: set WARDLOAD_TEST_DATABASE_URL")
	}
	ctx := context.Background()
	b := make([]byte, 8)
	if _, err := rand.Read(b); err != nil {
		t.Fatal(err)
	}
	schema := pgx.Identifier{"demo_" + hex.EncodeToString(b)}
	conn, err := pgx.Connect(ctx, url)
	if err != nil {
		t.Fatalf("connect: %v", err)
	}
	defer conn.Close(ctx)
	if _, err := conn.Exec(ctx, "CREATE SCHEMA "+schema.Sanitize()); err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() {
		c, err := pgx.Connect(context.Background(), url)
		if err != nil {
			t.Errorf("cleanup: %v", err)
			return
		}
		defer c.Close(context.Background())
		if _, err := c.Exec(context.Background(), "DROP SCHEMA "+schema.Sanitize()+" CASCADE"); err != nil {
			t.Errorf("cleanup: %v", err)
		}
	})
	st, err := postgres.Open(ctx, postgres.Config{URL: url, Now: func() time.Time { return now }, Schema: schema[0]})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { st.Close() })
	if err := st.Migrate(ctx); err != nil {
		t.Fatal(err)
	}
	return st
}

// TestSeedPostgres runs the scenario checks on PostgreSQL, the backend of
// the docker compose set-up, and checks it holds the same data as SQLite.
func TestSeedPostgres(t *testing.T) {
	t.Parallel() // the seeds are independent; PostgreSQL's mostly waits
	pg := mustOpenPostgres(t)
	checkSeed(t, pg)

	lite, res := mustSeeded(t)
	again, err := pg.FindWardByCode(context.Background(), res.Ward.Code)
	if err != nil {
		t.Fatal(err)
	}
	if a, b := dump(t, lite, res.Ward.ID), dump(t, pg, again.ID); !slices.Equal(a, b) {
		t.Errorf("SQLite and PostgreSQL hold different demo data (%d vs %d rows)", len(a), len(b))
	}
}
