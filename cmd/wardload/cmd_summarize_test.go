package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// runCSVCommand runs the CLI in-process on a CSV written to a temp file
// (the FILE argument is "FILE") and returns the exit code and streams.
func runCSVCommand(t *testing.T, csv string, args ...string) (int, string, string) {
	t.Helper()
	path := filepath.Join(t.TempDir(), "obs.csv")
	if err := os.WriteFile(path, []byte(csv), 0o600); err != nil {
		t.Fatal(err)
	}
	for i, a := range args {
		if a == "FILE" {
			args[i] = path
		}
	}
	var stdout, stderr bytes.Buffer
	code := run(context.Background(), args, &env{stdin: strings.NewReader(""), stdout: &stdout, stderr: &stderr, getenv: func(string) string { return "" }})
	return code, stdout.String(), stderr.String()
}

// Two tiers. t1 is R's tukey9 case: fivenum = 2 4 7 10 30, so IQR 6, inner
// fences −5 and 19, outer −14 and 28, and 30 (data row 9, file line 10) is
// extreme (R 4.2.2 boxplot.stats(x)$out = 30; testdata/reference/boxplot.csv).
// t2 has one value: SD undefined (null).
const twoTiers = "tier,care_minutes\n" +
	"t1,2\nt1,4\nt1,4\nt1,5\nt1,7\nt1,9\nt1,10\nt1,12\nt1,30\n" +
	"t2,40\n"

func TestSummarizeJSON(t *testing.T) {
	code, out, errOut := runCSVCommand(t, twoTiers, "summarize", "FILE", "--json")
	if code != 0 || errOut != "" {
		t.Fatalf("code %d, stderr %q", code, errOut)
	}
	var got struct {
		Quartiles string `json:"quartiles"`
		Tiers     []struct {
			Tier                                string
			N                                   int
			Min, Q1, Median, Q3, Max, IQR, Mean float64
			SD                                  *float64
			InnerFences                         struct{ Lower, Upper float64 } `json:"inner_fences"`
			OuterFences                         struct{ Lower, Upper float64 } `json:"outer_fences"`
			Outliers                            []struct {
				Row   int
				Value float64
				Kind  string
			}
		}
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	if got.Quartiles != "hinges" || len(got.Tiers) != 2 {
		t.Fatalf("%+v", got)
	}
	t1 := got.Tiers[0]
	if t1.Tier != "t1" || t1.N != 9 || t1.Min != 2 || t1.Q1 != 4 || t1.Median != 7 || t1.Q3 != 10 || t1.Max != 30 || t1.IQR != 6 {
		t.Errorf("t1 = %+v", t1)
	}
	if t1.InnerFences.Lower != -5 || t1.InnerFences.Upper != 19 || t1.OuterFences.Lower != -14 || t1.OuterFences.Upper != 28 {
		t.Errorf("t1 fences %+v %+v", t1.InnerFences, t1.OuterFences)
	}
	if len(t1.Outliers) != 1 || t1.Outliers[0].Row != 9 || t1.Outliers[0].Value != 30 || t1.Outliers[0].Kind != "extreme" {
		t.Errorf("t1 outliers %+v", t1.Outliers)
	}
	// R 4.2.2: sd(c(2,4,4,5,7,9,10,12,30)) = 8.4376800392314255. It agrees
	// to the last bit today; 1e-12 only allows for summing in another order
	// than R's, while n in place of n − 1 would move it by 0.5.
	if want := 8.4376800392314255; t1.SD == nil || math.Abs(*t1.SD-want) > 1e-12 {
		t.Errorf("t1 sd = %v, R %.17g", t1.SD, want)
	}
	t2 := got.Tiers[1]
	if t2.Tier != "t2" || t2.N != 1 || t2.SD != nil || t2.Mean != 40 || len(t2.Outliers) != 0 {
		t.Errorf("t2 = %+v", t2)
	}
	if !strings.Contains(out, `"sd": null`) || !strings.Contains(out, `"outliers": []`) {
		t.Errorf("undefined SD must be null and no outliers an empty list:\n%s", out)
	}
	if strings.Count(strings.TrimSpace(out), "\n{") != 0 || !strings.HasPrefix(out, "{") {
		t.Errorf("not exactly one JSON object:\n%s", out)
	}
}

// Quartiles under hf6 for t1: R 4.2.2 quantile(x, c(.25,.5,.75), type = 6)
// = 4 7 11 (testdata/reference/quantiles.csv, case tukey9).
func TestSummarizeConventionFlagAfterFile(t *testing.T) {
	code, out, _ := runCSVCommand(t, twoTiers, "summarize", "FILE", "--quartiles", "hf6", "--json")
	if code != 0 {
		t.Fatal(code)
	}
	if !strings.Contains(out, `"quartiles": "hf6"`) || !strings.Contains(out, `"q3": 11`) {
		t.Errorf("hf6 output:\n%s", out)
	}
}

func TestSummarizeTable(t *testing.T) {
	code, out, _ := runCSVCommand(t, twoTiers, "summarize", "--column", "care_minutes", "FILE")
	if code != 0 {
		t.Fatal(code)
	}
	for _, want := range []string{
		"Quartiles: hinges (Tukey's hinges",
		"inner lower", "-5", "19", "-14", "28",
		"Outside the fences, tier t1:",
		"extreme",
		"undefined", // SD of t2
	} {
		if !strings.Contains(out, want) {
			t.Errorf("table lacks %q:\n%s", want, out)
		}
	}
	// The outlier's row and file line are shown: row 9 is on line 10.
	if !strings.Contains(out, "  9    10     30  extreme") {
		t.Errorf("outlier line:\n%s", out)
	}
}

func TestSummarizeBadInput(t *testing.T) {
	for _, tc := range []struct {
		name, csv string
		args      []string
		want      string
	}{
		{"non-numeric", "tier,care_minutes\nt1,5\nt1,12x\n", []string{"summarize", "FILE"}, `line 3, column "care_minutes": "12x" is not a number.`},
		{"empty file", "", []string{"summarize", "FILE"}, "The file is empty"},
		{"missing column", "tier,minutes\nt1,5\n", []string{"summarize", "FILE"}, `there is no column "care_minutes"`},
		{"NaN text", "care_minutes\nNaN\n", []string{"summarize", "FILE", "--json"}, `line 2, column "care_minutes": "NaN" is not a number.`},
		{"unknown quartiles", "care_minutes\n1\n", []string{"summarize", "--quartiles", "hf9", "FILE"}, `--quartiles "hf9" is not a known convention`},
		{"no file", "", []string{"summarize"}, "exactly one FILE is required"},
		{"two files", "", []string{"summarize", "FILE", "other.csv"}, "exactly one FILE is required"},
		{"file missing", "", []string{"summarize", "/nonexistent/obs.csv"}, "cannot open /nonexistent/obs.csv"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errOut := runCSVCommand(t, tc.csv, tc.args...)
			if code != 2 || out != "" {
				t.Errorf("code %d, stdout %q", code, out)
			}
			if !strings.Contains(errOut, tc.want) {
				t.Errorf("stderr %q, want %q", errOut, tc.want)
			}
		})
	}
}

// A file without a tier column is one group, named "all" as in project.
func TestSummarizeWithoutTierColumn(t *testing.T) {
	code, out, errOut := runCSVCommand(t, "care_minutes\n1\n2\n3\n", "summarize", "FILE", "--json")
	if code != 0 || errOut != "" {
		t.Fatalf("code %d, stderr %q", code, errOut)
	}
	var got struct {
		Tiers []struct{ Tier string }
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil || len(got.Tiers) != 1 || got.Tiers[0].Tier != "all" {
		t.Errorf("tiers %+v (%v), want one named all", got.Tiers, err)
	}
}

// Every flag falls back to WARDLOAD_<FLAG>; the command line wins, and a
// value the flag refuses names the variable.
func TestFlagsFallBackToEnvironment(t *testing.T) {
	path := filepath.Join(t.TempDir(), "obs.csv")
	if err := os.WriteFile(path, []byte("care_minutes\n1\n2\n3\n4\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	runWith := func(vars map[string]string, args ...string) (int, string, string) {
		var stdout, stderr bytes.Buffer
		e := &env{stdin: strings.NewReader(""), stdout: &stdout, stderr: &stderr, getenv: func(k string) string { return vars[k] }}
		return run(context.Background(), args, e), stdout.String(), stderr.String()
	}
	quartiles := func(out string) string {
		var got struct{ Quartiles string }
		_ = json.Unmarshal([]byte(out), &got)
		return got.Quartiles
	}
	env := map[string]string{"WARDLOAD_QUARTILES": "hf7", "WARDLOAD_JSON": "true"}
	if code, out, errs := runWith(env, "summarize", path); code != 0 || quartiles(out) != "hf7" {
		t.Errorf("from the environment: %d %q %q, want hf7 as JSON", code, out, errs)
	}
	if code, out, _ := runWith(env, "summarize", path, "--quartiles", "hf6"); code != 0 || quartiles(out) != "hf6" {
		t.Errorf("the command line must win: %d %q", code, out)
	}
	code, out, errs := runWith(map[string]string{"WARDLOAD_JSON": "maybe"}, "summarize", path)
	if code != exitUsage || out != "" || !strings.Contains(errs, "WARDLOAD_JSON") || strings.Count(errs, "\n") != 1 {
		t.Errorf("bad environment value: %d %q %q", code, out, errs)
	}
}
