package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// TestExportObservations: the export is what the import reads (a round
// trip doubles every row and nothing else), and `summarize` on it gives
// the figures of the stored included observations, so a manager can check
// the review page's numbers outside wardload. Invented data (seedExport).
func TestExportObservations(t *testing.T) {
	dir := t.TempDir()
	st := seedExport(t, dir)
	ctx := context.Background()
	w, err := st.FindWardByCode(ctx, "w3")
	if err != nil {
		t.Fatal(err)
	}
	stored, _, err := st.FindObservations(ctx, wardload.ObservationFilter{WardID: &w.ID})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := st.ExcludeObservation(wardload.WithActor(ctx, wardload.Actor{Name: "test"}), stored[3].ID, "entered twice", 0); err != nil {
		t.Fatal(err)
	}
	stored, _, err = st.FindObservations(ctx, wardload.ObservationFilter{WardID: &w.ID})
	if err != nil {
		t.Fatal(err)
	}
	tiers, err := st.FindTiers(ctx, w.ID)
	if err != nil {
		t.Fatal(err)
	}

	code, out, errs := runCLI(t, dir, "", "export", "observations", "--ward", "w3")
	if code != exitOK || !strings.Contains(errs, "exported 55 observations of ward w3") {
		t.Fatalf("export = %d, %q", code, errs)
	}
	if !strings.HasPrefix(out, "date,shift,tier,window_hours,care_minutes\r\n") {
		t.Fatalf("export starts %q", out[:min(len(out), 80)])
	}

	// summarize on the file against stats.Summarize on the store's values.
	var sumOut, sumErr bytes.Buffer
	e := &env{stdin: strings.NewReader(out), stdout: &sumOut, stderr: &sumErr, getenv: func(string) string { return "" }}
	if code := run(ctx, []string{"summarize", "--json", "-"}, e); code != exitOK {
		t.Fatalf("summarize = %d, %q", code, sumErr.String())
	}
	var got struct {
		Tiers []struct {
			Tier                      string
			N                         int
			Q1, Median, Q3, Mean, IQR float64
		}
	}
	if err := json.Unmarshal(sumOut.Bytes(), &got); err != nil {
		t.Fatal(err)
	}
	if len(got.Tiers) != len(tiers) {
		t.Fatalf("summarize found %d tiers, want %d", len(got.Tiers), len(tiers))
	}
	for i, tr := range tiers {
		var x []float64
		for _, o := range stored {
			if o.TierID == tr.ID {
				x = append(x, o.CareMinutes)
			}
		}
		want, err := stats.Summarize(x, stats.DefaultQuartiles)
		if err != nil {
			t.Fatal(err)
		}
		g := got.Tiers[i]
		if g.Tier != tr.Code || g.N != want.N || g.Q1 != want.Q1 || g.Median != want.Median || g.Q3 != want.Q3 || g.Mean != want.Mean {
			t.Errorf("tier %s: summarize on export %+v, store %d %v %v %v %v", tr.Code, g, want.N, want.Q1, want.Median, want.Q3, want.Mean)
		}
	}

	// Round trip through the verb-first import: every row twice.
	file := filepath.Join(t.TempDir(), "obs.csv")
	if code, _, errs := runCLI(t, dir, "", "export", "observations", "--ward", "w3", "--output", file); code != exitOK {
		t.Fatalf("export --output = %d, %q", code, errs)
	}
	if b, err := os.ReadFile(file); err != nil || string(b) != out {
		t.Fatalf("--output file differs from stdout (%v)", err)
	}
	if code, _, errs := runCLI(t, dir, "", "import", "observations", "--ward", "w3", file); code != exitOK {
		t.Fatalf("import of the export = %d, %q", code, errs)
	}
	_, again, _ := runCLI(t, dir, "", "export", "observations", "--ward", "w3")
	lines := strings.Split(strings.TrimSuffix(out, "\r\n"), "\r\n")
	want := lines[:1]
	for _, l := range lines[1:] {
		want = append(want, l, l) // same date and ID order: originals first, copies after
	}
	gotLines := strings.Split(strings.TrimSuffix(again, "\r\n"), "\r\n")
	if len(gotLines) != len(want) {
		t.Fatalf("after the round trip %d lines, want %d", len(gotLines), len(want))
	}
	count := map[string]int{}
	for _, l := range gotLines[1:] {
		count[l]++
	}
	for _, l := range lines[1:] {
		if count[l] < 2 {
			t.Errorf("line %q appears %d times after the round trip, want 2", l, count[l])
		}
	}

	// The review state, and the usage errors.
	_, withReview, _ := runCLI(t, dir, "", "export", "observations", "--ward", "w3", "--include-excluded", "--from", "2026-02-24", "--to", "2026-02-24")
	if !strings.HasPrefix(withReview, "date,shift,tier,window_hours,care_minutes,excluded,excluded_reason,excluded_by,excluded_at\r\n") ||
		!strings.Contains(withReview, ",true,entered twice,") {
		t.Errorf("with review state:\n%s", withReview)
	}
	for _, args := range [][]string{
		{"--ward", "nope"},
		{},
		{"--ward", "w3", "--from", "2026-03-02", "--to", "2026-03-01"},
		{"--ward", "w3", "--from", "March"},
	} {
		if code, _, errs := runCLI(t, dir, "", append([]string{"export", "observations"}, args...)...); code != exitUsage || errs == "" {
			t.Errorf("export observations %q = %d, %q; want usage error", args, code, errs)
		}
	}
}
