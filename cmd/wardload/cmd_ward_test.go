package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

func TestWardAdd(t *testing.T) {
	dir := t.TempDir()
	code, out, errs := runCLI(t, dir, "", "ward", "add", "--code", "w4-north", "--name", "Ward 4 North (Medicine)",
		"--time-zone", "Europe/Dublin", "--beds", "28")
	want := "created ward w4-north: Ward 4 North (Medicine) (Europe/Dublin, 28 beds)\n" +
		"settings page: /wards/w4-north/settings (add shift patterns, acuity tiers and ratio floors there)\n" +
		"set-up checklist: /wards/w4-north/setup\n"
	if code != exitOK || out != want || errs != "" {
		t.Fatalf("ward add = %d, %q, %q; want 0, %q", code, out, errs, want)
	}

	ctx := context.Background()
	st := openTestStore(t, dir)
	w, err := st.FindWardByCode(ctx, "w4-north")
	if err != nil {
		t.Fatal(err)
	}
	if w.Name != "Ward 4 North (Medicine)" || w.TimeZone != "Europe/Dublin" {
		t.Errorf("stored ward = %+v", w)
	}
	s, err := st.FindSettings(ctx, w.ID)
	if err != nil {
		t.Fatal(err)
	}
	if s.Beds != 28 {
		t.Errorf("beds = %d, want 28", s.Beds)
	}
	action := "ward.create"
	es, _, err := st.FindAudit(ctx, wardload.AuditFilter{Action: &action})
	if err != nil {
		t.Fatal(err)
	}
	if len(es) != 1 || es[0].Actor != "cli" || es[0].EntityID != w.ID {
		t.Errorf("audit = %+v; want one ward.create by cli for ward %d", es, w.ID)
	}
}

// Without --beds the ward keeps the default settings: nothing is saved,
// so the settings page does not claim someone set them.
func TestWardAddWithoutBeds(t *testing.T) {
	dir := t.TempDir()
	code, out, errs := runCLI(t, dir, "", "ward", "add", "--code", "icu", "--name", "Intensive care", "--time-zone", "UTC")
	if code != exitOK || !strings.HasPrefix(out, "created ward icu: Intensive care (UTC)\n") || errs != "" {
		t.Fatalf("ward add = %d, %q, %q", code, out, errs)
	}
	ctx := context.Background()
	st := openTestStore(t, dir)
	w, err := st.FindWardByCode(ctx, "icu")
	if err != nil {
		t.Fatal(err)
	}
	s, err := st.FindSettings(ctx, w.ID)
	if err != nil {
		t.Fatal(err)
	}
	if s.Beds != 0 || !s.UpdatedAt.IsZero() {
		t.Errorf("settings = %+v; want defaults, never saved", s)
	}
}

// Every flag falls back to WARDLOAD_<FLAG>; the command line wins.
func TestWardAddFromEnvironment(t *testing.T) {
	dir := t.TempDir()
	vars := map[string]string{
		"WARDLOAD_CODE": "env-ward", "WARDLOAD_NAME": "From the environment",
		"WARDLOAD_TIME_ZONE": "Australia/Perth", "WARDLOAD_BEDS": "12", "WARDLOAD_DATA_DIR": dir,
	}
	var out, errb bytes.Buffer
	e := &env{stdin: strings.NewReader(""), stdout: &out, stderr: &errb, getenv: func(k string) string { return vars[k] }}
	if code := run(context.Background(), []string{"ward", "add", "--name", "Flag wins"}, e); code != exitOK {
		t.Fatalf("ward add from env = %d, %q", code, errb.String())
	}
	if want := "created ward env-ward: Flag wins (Australia/Perth, 12 beds)\n"; !strings.HasPrefix(out.String(), want) {
		t.Errorf("stdout = %q; want it to start %q", out.String(), want)
	}
}

func TestWardAddRejects(t *testing.T) {
	ok := []string{"--name", "Ward 9", "--time-zone", "Europe/London"}
	for _, tc := range []struct {
		name   string
		args   []string
		stderr []string // each must appear
	}{
		{"duplicate code", append([]string{"--code", "taken"}, ok...), []string{"--code:", "already exists"}},
		{"unknown zone", []string{"--code", "w9", "--name", "Ward 9", "--time-zone", "Europe/Atlantis"}, []string{"--time-zone:", `Unknown time zone "Europe/Atlantis"`}},
		{"local zone", []string{"--code", "w9", "--name", "Ward 9", "--time-zone", "Local"}, []string{"--time-zone:", "IANA name"}},
		{"no zone", []string{"--code", "w9", "--name", "Ward 9"}, []string{"--time-zone:", "required"}},
		{"upper case code", append([]string{"--code", "W9"}, ok...), []string{"--code:", "lowercase"}},
		{"code with space", append([]string{"--code", "w 9"}, ok...), []string{"--code:", "lowercase"}},
		{"no code", ok, []string{"--code:", "lowercase"}},
		{"blank name", []string{"--code", "w9", "--name", "  ", "--time-zone", "UTC"}, []string{"--name:", "required"}},
		{"long name", []string{"--code", "w9", "--name", strings.Repeat("n", 121), "--time-zone", "UTC"}, []string{"--name:", "at most 120"}},
		{"name with newline", []string{"--code", "w9", "--name", "Ward\n9", "--time-zone", "UTC"}, []string{"--name:", "one line"}},
		{"negative beds", append([]string{"--code", "w9", "--beds", "-1"}, ok...), []string{"--beds:", "from 1 to 1000"}},
		{"zero beds", append([]string{"--code", "w9", "--beds", "0"}, ok...), []string{"--beds:", "from 1 to 1000"}},
		{"too many beds", append([]string{"--code", "w9", "--beds", "1001"}, ok...), []string{"--beds:", "1000"}},
		{"beds not a number", append([]string{"--code", "w9", "--beds", "ten"}, ok...), []string{"-beds", "invalid value"}},
		{"positional argument", append([]string{"--code", "w9", "extra"}, ok...), []string{"takes no arguments"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			st := openTestStore(t, dir)
			ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
			if err := st.CreateWard(ctx, &wardload.Ward{Code: "taken", Name: "Taken", TimeZone: "UTC"}); err != nil {
				t.Fatal(err)
			}
			code, out, errs := runCLI(t, dir, "", append([]string{"ward", "add"}, tc.args...)...)
			if code != exitUsage || out != "" || strings.Count(errs, "\n") != 1 {
				t.Fatalf("= %d, %q, %q; want exit 2, no output, one line on stderr", code, out, errs)
			}
			for _, s := range tc.stderr {
				if !strings.Contains(errs, s) {
					t.Errorf("stderr %q does not contain %q", errs, s)
				}
			}
			if _, n, err := st.FindWards(context.Background(), wardload.WardFilter{}); err != nil || n != 1 {
				t.Errorf("wards after refused add = %d, %v; want only the one made before", n, err)
			}
		})
	}
}

// Bad input is refused before the database is opened, so a mistyped
// first command leaves no database behind.
func TestWardAddBadInputCreatesNoDatabase(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "data")
	code, _, errs := runCLI(t, dir, "", "ward", "add", "--code", "w1", "--name", "Ward 1", "--time-zone", "Mars/Olympus")
	if code != exitUsage || !strings.Contains(errs, "--time-zone") {
		t.Fatalf("= %d, %q; want exit 2 naming --time-zone", code, errs)
	}
	if _, err := os.Stat(dir); !os.IsNotExist(err) {
		t.Errorf("data directory after refused add: %v; want none", err)
	}
}

func TestWardAddHelp(t *testing.T) {
	code, out, errs := runCLI(t, t.TempDir(), "", "ward", "add", "--help")
	if code != exitOK || errs != "" {
		t.Fatalf("--help = %d, stderr %q", code, errs)
	}
	for _, s := range []string{"Usage: wardload ward add", "-code", "-name", "-time-zone", "-beds", "WARDLOAD_<FLAG>"} {
		if !strings.Contains(out, s) {
			t.Errorf("help does not mention %q:\n%s", s, out)
		}
	}
}
