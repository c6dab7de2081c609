package server

import (
	"context"
	"errors"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"sync"
	"testing"
	"time"

	"wardload/internal/demo"
	"wardload/internal/sqlite"
	"wardload/internal/wardload"
)

// demoNow is when the demo template is seeded: the fixtures' clock.
var demoNow = time.Date(2026, 3, 2, 9, 0, 0, 0, time.UTC)

// demoTemplate is a SQLite file holding the seeded demo, built once per
// test binary: seeding takes seconds, copying the file milliseconds.
var demoTemplate struct {
	once sync.Once
	dir  string // removed by TestMain
	err  error
}

// MustOpenDemo returns a migrated SQLite store, as MustOpenSQLite does,
// already holding the demo ward seeded for demoNow, and that ward.
func MustOpenDemo(tb testing.TB) (*sqlite.Store, *wardload.Ward) {
	tb.Helper()
	demoTemplate.once.Do(func() { demoTemplate.dir, demoTemplate.err = buildDemoTemplate() })
	if demoTemplate.err != nil {
		tb.Fatalf("demo template: %v", demoTemplate.err)
	}
	dir := tb.TempDir()
	if err := copyDir(demoTemplate.dir, dir); err != nil {
		tb.Fatal(err)
	}
	st := mustOpenSQLiteAt(tb, filepath.Join(dir, "wardload.db"))
	w, err := st.FindWardByCode(context.Background(), demo.WardCode)
	if err != nil {
		tb.Fatal(err)
	}
	return st, w
}

// buildDemoTemplate seeds the demo into a new SQLite file and closes it.
func buildDemoTemplate() (string, error) {
	dir, err := os.MkdirTemp("", "wardload-demo-")
	if err != nil {
		return "", err
	}
	ctx := context.Background()
	st, err := sqlite.Open(ctx, sqlite.Config{Path: filepath.Join(dir, "wardload.db"), Now: func() time.Time { return demoNow }})
	if err != nil {
		return dir, err
	}
	err = st.Migrate(ctx)
	if err == nil {
		_, err = demo.Seed(ctx, st, demoNow, testPassword)
	}
	return dir, errors.Join(err, st.Close())
}

// copyDir copies the regular files of src (the database and any WAL file
// Close left behind) into dst.
func copyDir(src, dst string) error {
	entries, err := os.ReadDir(src)
	if err != nil {
		return err
	}
	for _, e := range entries {
		if !e.Type().IsRegular() {
			continue
		}
		if err := copyFile(filepath.Join(src, e.Name()), filepath.Join(dst, e.Name())); err != nil {
			return err
		}
	}
	return nil
}

func copyFile(src, dst string) error {
	in, err := os.Open(src)
	if err != nil {
		return err
	}
	defer in.Close()
	out, err := os.OpenFile(dst, os.O_WRONLY|os.O_CREATE|os.O_EXCL, fs.FileMode(0o600))
	if err != nil {
		return err
	}
	_, err = io.Copy(out, in)
	return errors.Join(err, out.Close())
}
