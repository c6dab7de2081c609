//go:build linux

package sqlite_test

import (
	"context"
	"os"
	"path/filepath"
	"syscall"
	"testing"

	"wardload/internal/sqlite"
	"wardload/internal/wardload"
)

// Issue 15 item 4: the database, its WAL and its shared-memory file are
// created 0600 whatever the process umask. With umask 0 SQLite on its own
// creates the database 0644, readable by every local user. Linux only:
// the test sets the umask with syscall.Umask.
func TestOpenCreatesPrivateFiles(t *testing.T) {
	old := syscall.Umask(0)
	t.Cleanup(func() { syscall.Umask(old) })

	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "wardload.db")
	s, err := sqlite.Open(ctx, sqlite.Config{Path: path})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if err := s.Migrate(ctx); err != nil {
		t.Fatal(err)
	}
	w := &wardload.Ward{Code: "w1", Name: "Ward 1", TimeZone: "UTC"}
	if err := s.CreateWard(wardload.WithActor(ctx, wardload.Actor{Name: "test"}), w); err != nil {
		t.Fatal(err)
	}
	// The files exist while the store is open; stat them before Close,
	// whose checkpoint removes -wal and -shm.
	for _, p := range []string{path, path + "-wal", path + "-shm"} {
		fi, err := os.Stat(p)
		if err != nil {
			t.Errorf("%s: %v", filepath.Base(p), err)
			continue
		}
		if got := fi.Mode().Perm(); got != 0o600 {
			t.Errorf("%s: mode %#o, want 0600", filepath.Base(p), got)
		}
	}
}

// An existing database file keeps its mode: Open does not change what the
// operator set (the commands warn about a loose mode instead), and it
// still opens.
func TestOpenLeavesExistingFileMode(t *testing.T) {
	ctx := context.Background()
	path := filepath.Join(t.TempDir(), "wardload.db")
	if err := os.WriteFile(path, nil, 0o640); err != nil {
		t.Fatal(err)
	}
	if err := os.Chmod(path, 0o640); err != nil {
		t.Fatal(err)
	}
	s, err := sqlite.Open(ctx, sqlite.Config{Path: path})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if err := s.Migrate(ctx); err != nil {
		t.Fatal(err)
	}
	fi, err := os.Stat(path)
	if err != nil {
		t.Fatal(err)
	}
	if got := fi.Mode().Perm(); got != 0o640 {
		t.Errorf("mode %#o, want the existing 0640", got)
	}
}
