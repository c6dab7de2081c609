package main

import (
	"context"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

// ward edit changes name, time zone and beds, each audited by cli; the
// code stays; list shows retired wards with their state, and retiring
// keeps the ward's census.
func TestWardEditRetireReinstate(t *testing.T) {
	dir := t.TempDir()
	if code, _, errs := runCLI(t, dir, "", "ward", "add", "--code", "w4", "--name", "Ward 4", "--time-zone", "UTC", "--beds", "20"); code != exitOK {
		t.Fatalf("ward add = %d %q", code, errs)
	}
	code, out, errs := runCLI(t, dir, "", "ward", "edit", "w4", "--name", "Ward 4 North", "--time-zone", "Europe/Dublin", "--beds", "24")
	if code != exitOK || out != "ward w4: Ward 4 North (Europe/Dublin, 24 beds)\n" || errs != "" {
		t.Fatalf("ward edit = %d %q %q", code, out, errs)
	}
	ctx := context.Background()
	st := openTestStore(t, dir)
	w, err := st.FindWardByCode(ctx, "w4")
	if err != nil {
		t.Fatal(err)
	}
	if w.Name != "Ward 4 North" || w.TimeZone != "Europe/Dublin" || w.Retired() {
		t.Errorf("stored = %+v", w)
	}
	if s, _ := st.FindSettings(ctx, w.ID); s.Beds != 24 {
		t.Errorf("beds = %d, want 24", s.Beds)
	}
	for _, action := range []string{"ward.update", "settings.save"} {
		es, _, err := st.FindAudit(ctx, wardload.AuditFilter{Action: &action})
		if err != nil || len(es) == 0 || es[0].Actor != "cli" {
			t.Errorf("audit %s = %+v, %v; want an entry by cli", action, es, err)
		}
	}
	// Only the name: the zone stays.
	if code, out, _ := runCLI(t, dir, "", "ward", "edit", "--name", "W4N", "w4"); code != exitOK || !strings.Contains(out, "(Europe/Dublin, 24 beds)") {
		t.Errorf("edit of the name only = %d %q", code, out)
	}

	code, out, errs = runCLI(t, dir, "", "ward", "retire", "w4")
	if code != exitOK || !strings.HasPrefix(out, "ward w4 retired ") || errs != "" {
		t.Fatalf("ward retire = %d %q %q", code, out, errs)
	}
	code, out, _ = runCLI(t, dir, "", "ward", "list")
	if code != exitOK || !strings.HasPrefix(out, "w4\tW4N\tretired 20") {
		t.Errorf("ward list after retiring = %d %q", code, out)
	}
	if code, out, _ = runCLI(t, dir, "", "ward", "list", "--active"); code != exitOK || out != "" {
		t.Errorf("ward list --active = %d %q, want nothing", code, out)
	}
	action := "ward.retire"
	if es, _, err := st.FindAudit(ctx, wardload.AuditFilter{Action: &action}); err != nil || len(es) != 1 || es[0].Actor != "cli" {
		t.Errorf("retire audit = %+v %v", es, err)
	}
	if code, out, _ = runCLI(t, dir, "", "ward", "reinstate", "w4"); code != exitOK || out != "ward w4 is in use again\n" {
		t.Errorf("ward reinstate = %d %q", code, out)
	}
	if _, out, _ = runCLI(t, dir, "", "ward", "list"); out != "w4\tW4N\tactive\n" {
		t.Errorf("ward list after reinstating = %q", out)
	}
}

// Bad input exits 2 naming the flag, and changes nothing.
func TestWardEditRejects(t *testing.T) {
	dir := t.TempDir()
	if code, _, errs := runCLI(t, dir, "", "ward", "add", "--code", "w4", "--name", "Ward 4", "--time-zone", "UTC", "--beds", "20"); code != exitOK {
		t.Fatalf("ward add = %d %q", code, errs)
	}
	for _, tc := range []struct {
		name   string
		args   []string
		stderr []string
	}{
		{"unknown zone", []string{"w4", "--time-zone", "Europe/Atlantis"}, []string{"--time-zone:", `Unknown time zone "Europe/Atlantis"`}},
		{"blank name", []string{"w4", "--name", " "}, []string{"--name:", "required"}},
		{"zero beds", []string{"w4", "--beds", "0"}, []string{"--beds:", "from 1 to 1000"}},
		{"absurd beds", []string{"w4", "--beds", "5000"}, []string{"--beds:", "from 1 to 1000"}},
		{"nothing to change", []string{"w4"}, []string{"nothing to change"}},
		{"unknown ward", []string{"nope", "--name", "X"}, []string{`no ward with code "nope"`}},
		{"upper case code", []string{"W4", "--name", "X"}, []string{`no ward with code "W4"`}},
		{"two codes", []string{"w4", "w5", "--name", "X"}, []string{"exactly one ward CODE"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runCLI(t, dir, "", append([]string{"ward", "edit"}, tc.args...)...)
			if code != exitUsage || out != "" || strings.Count(errs, "\n") != 1 {
				t.Fatalf("= %d, %q, %q; want exit 2, no output, one line on stderr", code, out, errs)
			}
			for _, s := range tc.stderr {
				if !strings.Contains(errs, s) {
					t.Errorf("stderr %q does not contain %q", errs, s)
				}
			}
		})
	}
	st := openTestStore(t, dir)
	w, err := st.FindWardByCode(context.Background(), "w4")
	if err != nil {
		t.Fatal(err)
	}
	s, _ := st.FindSettings(context.Background(), w.ID)
	if w.Name != "Ward 4" || w.TimeZone != "UTC" || s.Beds != 20 {
		t.Errorf("ward changed by refused edits: %+v, beds %d", w, s.Beds)
	}
	if code, _, errs := runCLI(t, dir, "", "ward", "retire", "nope"); code != exitUsage || !strings.Contains(errs, `no ward with code "nope"`) {
		t.Errorf("retire unknown = %d %q", code, errs)
	}
}
