package main

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

// TestObservationsImport: the command line stores a file as one batch
// (from a file or standard input), and a file with a wrong line stores
// nothing and names the line, as the web import does.
func TestObservationsImport(t *testing.T) {
	dir := t.TempDir()
	st := seedExport(t, dir)
	w, err := st.FindWardByCode(context.Background(), "w3")
	if err != nil {
		t.Fatal(err)
	}
	count := func() int {
		t.Helper()
		_, n, err := st.FindObservations(context.Background(), wardload.ObservationFilter{WardID: &w.ID, IncludeExcluded: true})
		if err != nil {
			t.Fatal(err)
		}
		return n
	}
	before := count()
	good := "date,shift,tier,window_hours,care_minutes\n2026-03-01,Day,t1,12,55\n2026-03-01,Day,t2,12,120\n"
	file := filepath.Join(t.TempDir(), "obs.csv")
	if err := os.WriteFile(file, []byte(good), 0o600); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runCLI(t, dir, "", "observations", "import", "--ward", "w3", file)
	if code != exitOK || !strings.HasPrefix(out, "imported 2 observations for ward w3 (batch ") {
		t.Fatalf("import = %d, %q, %q", code, out, errs)
	}
	if n := count(); n != before+2 {
		t.Fatalf("observations %d → %d, want +2", before, n)
	}
	code, out, errs = runCLI(t, dir, good, "observations", "import", "--ward", "w3", "-")
	if code != exitOK || count() != before+4 {
		t.Fatalf("import from stdin = %d, %q, %q; %d observations", code, out, errs, count())
	}
	bad := good + "2026-03-01,Day,t9,12,30\n"
	code, _, errs = runCLI(t, dir, bad, "observations", "import", "--ward", "w3", "-")
	if code != exitUsage || !strings.Contains(errs, "line 4") || count() != before+4 {
		t.Errorf("bad file = %d, %q; %d observations, want %d", code, errs, count(), before+4)
	}
	code, _, errs = runCLI(t, dir, good, "observations", "import", "--ward", "nope", "-")
	if code != exitUsage || count() != before+4 {
		t.Errorf("unknown ward = %d, %q", code, errs)
	}
}
