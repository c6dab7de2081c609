package main

import (
	"context"
	"crypto/rand"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"wardload/internal/demo"
)

// Seeding the demo costs seconds of CPU (every census is projected), and
// most end-to-end tests only need a seeded database to serve. So the demo
// is seeded at most once per test binary and store kind, as `serve --demo`
// would on first start (same code, time.Now as the clock, the tests'
// cheap password parameters), and each test gets a copy: the SQLite file
// copied into its own data directory, or a PostgreSQL database created
// from a template database. TestServeDemo still seeds through
// `serve --demo` itself, since printing the passwords is what it checks.

// demoAccounts maps each demo account's name to its password.
type demoAccounts map[string]string

var demoSQLite struct {
	once     sync.Once
	dir      string
	accounts demoAccounts
	err      error
}

// mustDemoDataDir returns a new data directory holding a copy of the
// demo's SQLite database, and the demo accounts' passwords.
func mustDemoDataDir(tb testing.TB) (string, demoAccounts) {
	tb.Helper()
	demoSQLite.once.Do(func() {
		demoSQLite.dir, demoSQLite.err = os.MkdirTemp("", "wardload-demo-")
		if demoSQLite.err == nil {
			demoSQLite.accounts, demoSQLite.err = seedDemo(&storeOptions{DataDir: demoSQLite.dir})
		}
	})
	if demoSQLite.err != nil {
		tb.Fatalf("seed the demo template: %v", demoSQLite.err)
	}
	dir := tb.TempDir()
	entries, err := os.ReadDir(demoSQLite.dir)
	if err != nil {
		tb.Fatal(err)
	}
	for _, e := range entries { // the database and any WAL file Close left
		if e.Type().IsRegular() {
			if err := copyFile(filepath.Join(demoSQLite.dir, e.Name()), filepath.Join(dir, e.Name())); err != nil {
				tb.Fatal(err)
			}
		}
	}
	return dir, demoSQLite.accounts
}

var demoPostgres struct {
	once     sync.Once
	mu       sync.Mutex // CREATE DATABASE … TEMPLATE needs the template idle
	name     string     // the template database, dropped by TestMain
	accounts demoAccounts
	err      error
}

// mustDemoDatabase returns the URL of a new PostgreSQL database holding
// the demo, dropped when the test ends, and the accounts' passwords. Like
// mustCreateDatabase it skips without WARDLOAD_TEST_DATABASE_URL (fails
// under CI=true).
func mustDemoDatabase(tb testing.TB) (string, demoAccounts) {
	tb.Helper()
	base := testDatabaseURL(tb) // before once: a skip must not spend it
	demoPostgres.once.Do(func() {
		name := "wardload_demo_tpl_" + strings.ToLower(rand.Text()[:12])
		var tpl string
		if tpl, demoPostgres.err = createDatabase(base, name, ""); demoPostgres.err == nil {
			demoPostgres.name = name
			demoPostgres.accounts, demoPostgres.err = seedDemo(&storeOptions{DB: tpl})
		}
	})
	if demoPostgres.err != nil {
		tb.Fatalf("seed the demo template database: %v", demoPostgres.err)
	}
	demoPostgres.mu.Lock()
	defer demoPostgres.mu.Unlock()
	return mustCreateDatabaseFrom(tb, demoPostgres.name), demoPostgres.accounts
}

// seedDemo opens (and migrates) the store of so, seeds the demo and closes it.
func seedDemo(so *storeOptions) (demoAccounts, error) {
	ctx := context.Background()
	st, err := openStore(ctx, so, true)
	if err != nil {
		return nil, err
	}
	res, err := demo.Seed(ctx, st.Store, time.Now(), testPassword)
	if err == nil && !res.Created {
		err = errors.New("demo already present in a new database")
	}
	if err = errors.Join(err, st.Close()); err != nil {
		return nil, err
	}
	accounts := demoAccounts{}
	for _, a := range res.Accounts {
		accounts[a.Name] = a.Password
	}
	return accounts, nil
}

// dropDemoTemplate drops the template database, if one was made.
func dropDemoTemplate() error {
	if demoPostgres.name == "" {
		return nil
	}
	return dropDatabase(os.Getenv("WARDLOAD_TEST_DATABASE_URL"), demoPostgres.name)
}

func TestMain(m *testing.M) {
	code := m.Run()
	if demoSQLite.dir != "" {
		os.RemoveAll(demoSQLite.dir)
	}
	if err := dropDemoTemplate(); err != nil {
		fmt.Fprintf(os.Stderr, "drop the demo template database: %v\n", err)
		code = max(code, 1)
	}
	os.Exit(code)
}

// copyFile copies src to the new file dst, readable by its owner only
// (as serve wants the database file).
func copyFile(src, dst string) error {
	in, err := os.Open(src)
	if err != nil {
		return err
	}
	defer in.Close()
	out, err := os.OpenFile(dst, os.O_WRONLY|os.O_CREATE|os.O_EXCL, 0o600)
	if err != nil {
		return err
	}
	_, err = io.Copy(out, in)
	return errors.Join(err, out.Close())
}
