package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// handCSV is the hand-checkable case of internal/stats TestProjectHand:
// tier a 10, 20, 30; tier b 50, 70; tier c one observation, census 0.
const handCSV = "tier,care_minutes,window_hours\na,10,8\na,20,8\na,30,8\nb,50,8\nb,70,8\nc,5,8\n"

func runProjectCLI(t *testing.T, stdin string, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errb bytes.Buffer
	e := &env{stdin: strings.NewReader(stdin), stdout: &out, stderr: &errb, getenv: func(string) string { return "" }}
	code = run(context.Background(), append([]string{"project"}, args...), e)
	return code, out.String(), errb.String()
}

// By hand (see internal/stats TestProjectHand): μ = 220, sd from R 4.2.2
// 42.81744192888376, floor ceil(5/4) + 1 = 3, recommended 3 by the floor.
func TestProjectCommandJSON(t *testing.T) {
	code, out, errs := runProjectCLI(t, handCSV, "-", "--census", "a=2,b=3", "--shift-hours", "8",
		"--direct-care", "0.5", "--patients-per-nurse", "4", "--json")
	if code != exitOK || errs != "" {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	dec := json.NewDecoder(strings.NewReader(out))
	var got struct {
		Expected   float64 `json:"expected_minutes"`
		SD         float64 `json:"sd_minutes"`
		Simulation struct {
			Draws int    `json:"draws"`
			Seed  uint64 `json:"seed"`
		} `json:"simulation"`
		Nurses struct {
			Floor       *int   `json:"floor"`
			Recommended int    `json:"recommended"`
			DecidedBy   string `json:"decided_by"`
		} `json:"nurses"`
		Bands     []stats.Band      `json:"bands"`
		Shortfall []stats.Shortfall `json:"shortfall"`
		Caution   string            `json:"caution"`
	}
	if err := dec.Decode(&got); err != nil {
		t.Fatal(err)
	}
	if err := dec.Decode(new(any)); !errors.Is(err, io.EOF) {
		t.Errorf("more than one JSON value on stdout: %v", err)
	}
	if got.Expected != 220 || math.Abs(got.SD-42.81744192888376) > 1e-12 {
		t.Errorf("expected %v, sd %.17g", got.Expected, got.SD)
	}
	if got.Simulation.Draws != 10000 || got.Simulation.Seed != 1 {
		t.Errorf("simulation defaults = %+v", got.Simulation)
	}
	if got.Nurses.Floor == nil || *got.Nurses.Floor != 3 || got.Nurses.Recommended != 3 || got.Nurses.DecidedBy != "ratio_floor" {
		t.Errorf("nurses = %+v", got.Nurses)
	}
	if len(got.Bands) != 2 || got.Bands[0].Level != 0.8 || got.Bands[1].Level != 0.9 {
		t.Errorf("default bands = %+v", got.Bands)
	}
	if got.Caution != stats.Caution || len(got.Shortfall) == 0 {
		t.Errorf("caution %q, %d shortfall rows", got.Caution, len(got.Shortfall))
	}
}

// Without --patients-per-nurse the floor is null; flags may come before FILE;
// the seed and draws given are used.
func TestProjectCommandNoFloorFlagsFirst(t *testing.T) {
	path := filepath.Join(t.TempDir(), "obs.csv")
	if err := os.WriteFile(path, []byte(handCSV), 0o600); err != nil {
		t.Fatal(err)
	}
	code, out, errs := runProjectCLI(t, "", "--census", "a=2,b=3", "--shift-hours", "8", "--direct-care", "0.5",
		"--json", "--draws", "500", "--seed", "9", path, "--nurses-from", "0", "--nurses-to", "1")
	if code != exitOK {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	var got map[string]any
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	nurses := got["nurses"].(map[string]any)
	if v, ok := nurses["floor"]; !ok || v != nil {
		t.Errorf("nurses.floor = %v, want null", v)
	}
	sim := got["simulation"].(map[string]any)
	if sim["draws"] != 500.0 || sim["seed"] != 9.0 {
		t.Errorf("simulation = %v", sim)
	}
	if rows := got["shortfall"].([]any); len(rows) != 2 {
		t.Errorf("shortfall rows = %v, want N = 0, 1", rows)
	}
}

// --window-hours scales every row: 4-hour windows on an 8-hour shift
// double the minutes, so μ = 440. No tier column: one tier named "all".
func TestProjectCommandWindowFlagNoTier(t *testing.T) {
	csv := "care_minutes\n10\n20\n30\n"
	code, out, errs := runProjectCLI(t, csv, "-", "--census", "all=2", "--shift-hours", "8",
		"--window-hours", "4", "--direct-care", "1", "--json")
	if code != exitOK {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	var got struct {
		ExpectedMinutes float64 `json:"expected_minutes"`
		Tiers           []struct {
			Code string `json:"code"`
		} `json:"tiers"`
		Warnings []string `json:"warnings"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	// tier all: y = 20, 40, 60, mean 40, n = 2 → 80.
	if got.ExpectedMinutes != 80 || len(got.Tiers) != 1 || got.Tiers[0].Code != "all" {
		t.Errorf("expected %v, tiers %+v", got.ExpectedMinutes, got.Tiers)
	}
	if !strings.Contains(strings.Join(got.Warnings, "\n"), "scaled to the shift") {
		t.Errorf("no scaling warning: %q", got.Warnings)
	}
}

func TestProjectCommandTable(t *testing.T) {
	code, out, errs := runProjectCLI(t, handCSV, "-", "--census", "a=2,b=3", "--shift-hours", "8",
		"--direct-care", "0.5", "--patients-per-nurse", "4")
	if code != exitOK || errs != "" {
		t.Fatalf("exit %d, stderr %q", code, errs)
	}
	for _, want := range []string{
		"Expected care minutes", "220.0", "80% normal band", "recommended", "decided by ratio floor",
		"Configured ratio floor: at most 4 patients per nurse", stats.Caution,
	} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
	_, out, _ = runProjectCLI(t, handCSV, "-", "--census", "a=2", "--shift-hours", "8", "--direct-care", "0.5")
	if !strings.Contains(out, "No ratio floor was given") {
		t.Errorf("table without floor does not say so:\n%s", out)
	}
	code, out, errs = runProjectCLI(t, "", "--help")
	if code != exitOK || out != "" || !strings.Contains(errs, "Usage: wardload project") || !strings.Contains(errs, "-census") {
		t.Errorf("--help: exit %d, stdout %q, stderr %q", code, out, errs)
	}
}

func TestProjectCommandBadInput(t *testing.T) {
	base := []string{"--shift-hours", "8", "--direct-care", "0.5"}
	tests := []struct {
		name  string
		stdin string
		args  []string
		code  int
		want  string // in the one stderr line
	}{
		{"no file", handCSV, append([]string{"--census", "a=1"}, base...), exitUsage, "exactly one FILE"},
		{"census missing", handCSV, append([]string{"-"}, base...), exitUsage, "--census is required"},
		{"census unknown tier", handCSV, append([]string{"-", "--census", "z=1"}, base...), exitUsage, `--census: tier "z" is not in the file`},
		{"census duplicate", handCSV, append([]string{"-", "--census", "a=1,a=2"}, base...), exitUsage, "--census: tier \"a\" is given twice"},
		{"census negative", handCSV, append([]string{"-", "--census", "a=-1"}, base...), exitUsage, "--census: the count for a is negative"},
		{"census fraction", handCSV, append([]string{"-", "--census", "a=1.5"}, base...), exitUsage, "--census: the count for a, \"1.5\", is not a whole number"},
		{"one observation for a used tier", "tier,care_minutes,window_hours\na,10,8\na,12,8\nb,3,8\n",
			append([]string{"-", "--census", "b=2"}, base...), exitUsage, "-: Tier b has patients but only one care observation"},
		{"shift hours missing", handCSV, []string{"-", "--census", "a=1", "--direct-care", "0.5"}, exitUsage, "--shift-hours is required"},
		{"shift hours 30", handCSV, []string{"-", "--census", "a=1", "--direct-care", "0.5", "--shift-hours", "30"}, exitUsage, "--shift-hours: "},
		{"direct care 0", handCSV, []string{"-", "--census", "a=1", "--direct-care", "0", "--shift-hours", "8"}, exitUsage, "--direct-care: "},
		{"cover 1.5", handCSV, append([]string{"-", "--census", "a=1", "--cover", "1.5"}, base...), exitUsage, "--cover: "},
		{"levels text", handCSV, append([]string{"-", "--census", "a=1", "--levels", "0.8,x"}, base...), exitUsage, "--levels: "},
		{"levels 1", handCSV, append([]string{"-", "--census", "a=1", "--levels", "1"}, base...), exitUsage, "--levels: "},
		{"draws 0", handCSV, append([]string{"-", "--census", "a=1", "--draws", "0"}, base...), exitUsage, "--draws: "},
		{"nurses half", handCSV, append([]string{"-", "--census", "a=1", "--nurses-to", "4"}, base...), exitUsage, "--nurses-from and --nurses-to"},
		{"ratio negative", handCSV, append([]string{"-", "--census", "a=1", "--patients-per-nurse", "-2"}, base...), exitUsage, "--patients-per-nurse: "},
		{"bad cell", "tier,care_minutes,window_hours\na,10,8\na,1O,8\n", append([]string{"-", "--census", "a=1"}, base...),
			exitUsage, `line 3, column "care_minutes"`},
		{"negative minutes", "tier,care_minutes,window_hours\na,10,8\na,-4,8\n", append([]string{"-", "--census", "a=1"}, base...),
			exitUsage, `line 3, column "care_minutes": care minutes must be at least 0`},
		{"bad window", "tier,care_minutes,window_hours\na,10,8\na,4,0\n", append([]string{"-", "--census", "a=1"}, base...),
			exitUsage, `line 3, column "window_hours"`},
		{"no window", "tier,care_minutes\na,10\na,4\n", append([]string{"-", "--census", "a=1"}, base...), exitUsage, "--window-hours"},
		{"no column", handCSV, append([]string{"-", "--census", "a=1", "--column", "minutes"}, base...), exitUsage, `no column "minutes"`},
		{"draws not a number", handCSV, append([]string{"-", "--census", "a=1", "--draws", "many"}, base...), exitUsage, "-draws"},
		{"unknown flag", handCSV, append([]string{"-", "--census", "a=1", "--beds", "3"}, base...), exitUsage, "-beds"},
		{"missing file", "", append([]string{filepath.Join(t.TempDir(), "nope.csv"), "--census", "a=1"}, base...), exitUsage, "cannot open the file"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := runProjectCLI(t, tc.stdin, tc.args...)
			if code != tc.code || out != "" {
				t.Errorf("exit %d (want %d), stdout %q", code, tc.code, out)
			}
			if !strings.Contains(errs, tc.want) || strings.Count(errs, "\n") != 1 || !strings.HasPrefix(errs, "wardload project: ") {
				t.Errorf("stderr %q, want one line containing %q", errs, tc.want)
			}
		})
	}
}

func TestParseCensus(t *testing.T) {
	known := []string{"t1", "t2", "t3"}
	good := []struct {
		in   string
		want map[string]int
	}{
		{"t1=4,t2=10", map[string]int{"t1": 4, "t2": 10}},
		{" t1 = 0 , t3=7", map[string]int{"t1": 0, "t3": 7}},
		{"t2=10000", map[string]int{"t2": 10000}},
	}
	for _, tc := range good {
		got, err := parseCensus(tc.in, known)
		if err != nil || len(got) != len(tc.want) {
			t.Errorf("parseCensus(%q) = %v, %v; want %v", tc.in, got, err, tc.want)
			continue
		}
		for k, v := range tc.want {
			if got[k] != v {
				t.Errorf("parseCensus(%q)[%s] = %d, want %d", tc.in, k, got[k], v)
			}
		}
	}
	for _, in := range []string{"", " ", "t1", "t1=", "=4", "t1=4,", "t1=4,t1=5", "t1=-1", "t1=+1", "t1=1.0",
		"t1=1e2", "t9=1", "t1=10001", "t1=99999999999999999999", "t1=4;t2=3", "t1=0x10"} {
		got, err := parseCensus(in, known)
		if err == nil || wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != "census" {
			t.Errorf("parseCensus(%q) = %v, %v; want EINVALID census", in, got, err)
		}
	}
}

// FuzzParseCensus: parseCensus never panics, and whatever it accepts is a
// count from 0 to stats.MaxPatients for a known tier.
func FuzzParseCensus(f *testing.F) {
	for _, s := range []string{"t1=4,t2=10", "t1=-1", "t1=4,t1=4", " t2 = 3 ", "x=1", "t1=1e3", "=", ",,"} {
		f.Add(s)
	}
	known := []string{"t1", "t2"}
	f.Fuzz(func(t *testing.T, s string) {
		counts, err := parseCensus(s, known)
		if err != nil {
			if wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != "census" {
				t.Fatalf("parseCensus(%q) error %v is not EINVALID census", s, err)
			}
			return
		}
		for k, n := range counts {
			if (k != "t1" && k != "t2") || n < 0 || n > stats.MaxPatients {
				t.Fatalf("parseCensus(%q) accepted %s=%d", s, k, n)
			}
		}
	})
}
