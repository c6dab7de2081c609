//go:build linux

package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// Issue 15 item 4: a data directory wardload creates is 0700 and its
// database 0600 whatever the umask: a permissive one (0) does not widen
// them, and one that takes the owner's write bit (0277) does not narrow
// them into a directory wardload itself cannot use. Start-up says nothing.
func TestMigrateCreatesPrivateDataDir(t *testing.T) {
	for _, mask := range []int{0, 0o277} {
		old := syscall.Umask(mask)
		dir := filepath.Join(t.TempDir(), "data")
		code, _, errs := runStdin(t, "", "migrate", "--data-dir", dir)
		syscall.Umask(old)
		if code != exitOK {
			t.Fatalf("umask %#o: migrate: exit %d, stderr %q", mask, code, errs)
		}
		if strings.Contains(errs, "warning") {
			t.Errorf("umask %#o: fresh data directory: stderr %q, want no warning", mask, errs)
		}
		for p, want := range map[string]os.FileMode{dir: 0o700, filepath.Join(dir, "wardload.db"): 0o600} {
			fi, err := os.Stat(p)
			if err != nil {
				t.Fatal(err)
			}
			if got := fi.Mode().Perm(); got != want {
				t.Errorf("umask %#o: %s: mode %#o, want %#o", mask, p, got, want)
			}
		}
	}
}

// An existing data directory 0755 holding a database 0644 (made by hand,
// or by a version before the fix) gets one warning line each, naming the
// path, the mode and the chmod that fixes it, from migrate (stderr) and
// serve (the logger on stderr). The modes are not changed behind the
// operator's back, and the command still works.
func TestLooseDataModesWarn(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "data")
	if err := os.Mkdir(dir, 0o755); err != nil {
		t.Fatal(err)
	}
	db := filepath.Join(dir, "wardload.db")
	if err := os.WriteFile(db, nil, 0o644); err != nil {
		t.Fatal(err)
	}
	for _, p := range []struct {
		path string
		mode os.FileMode
	}{{dir, 0o755}, {db, 0o644}} {
		if err := os.Chmod(p.path, p.mode); err != nil { // whatever the umask
			t.Fatal(err)
		}
	}
	wantLines := []string{
		"data directory " + dir + " is open to other users (mode 0755)",
		"chmod 700 " + dir,
		"database file " + db + " is open to other users (mode 0644)",
		"chmod 600 " + db,
	}

	code, _, errs := runStdin(t, "", "migrate", "--data-dir", dir)
	if code != exitOK {
		t.Fatalf("migrate: exit %d, stderr %q", code, errs)
	}
	for _, w := range wantLines {
		if !strings.Contains(errs, w) {
			t.Errorf("migrate stderr %q lacks %q", errs, w)
		}
	}
	if n := strings.Count(errs, "wardload: warning: "); n != 2 {
		t.Errorf("migrate: %d warning lines, want 2 (directory, database):\n%s", n, errs)
	}

	// serve warns before it opens the database; a cancelled context makes
	// it stop right after, without listening.
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	var out, errb bytes.Buffer
	e := &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb, getenv: func(string) string { return "" }}
	run(ctx, []string{"serve", "--data-dir", dir, "--addr", "127.0.0.1:0"}, e)
	for _, w := range wantLines {
		if !strings.Contains(errb.String(), w) {
			t.Errorf("serve stderr %q lacks %q", errb.String(), w)
		}
	}
	if n := strings.Count(errb.String(), "level=WARN"); n != 2 || strings.Count(errb.String(), "is open to other users") != 2 {
		t.Errorf("serve stderr %q: want two warnings at level WARN, once per path; %d WARN lines", errb.String(), n)
	}

	for p, want := range map[string]os.FileMode{dir: 0o755, db: 0o644} {
		fi, err := os.Stat(p)
		if err != nil {
			t.Fatal(err)
		}
		if got := fi.Mode().Perm(); got != want {
			t.Errorf("%s: mode %#o changed, want the operator's %#o", p, got, want)
		}
	}

	// Fixed by hand, the warnings stop.
	os.Chmod(dir, 0o700)
	os.Chmod(db, 0o600)
	if _, _, errs := runStdin(t, "", "migrate", "--data-dir", dir); strings.Contains(errs, "warning") {
		t.Errorf("after chmod: stderr %q, want no warning", errs)
	}
}
