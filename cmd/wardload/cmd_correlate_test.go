package main

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"testing"
)

// Anscombe (1973) set III, from R's datasets::anscombe (x3, y3). Expected
// values from R 4.2.2 (testdata/reference/relation.csv, case anscombe3):
// cor(x, y) = 0.81628673948959818, cor(x, y, method = "spearman") =
// 0.99090909090909096, coef(lm(y ~ x)) = 3.002454545454543,
// 0.4997272727272728, summary(lm(y ~ x))$r.squared = 0.66632404106655907,
// summary(lm(y ~ x))$sigma = 1.2363113513899961.
func anscombe3CSV() string {
	x := []float64{10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5}
	y := []float64{7.46, 6.77, 12.74, 7.11, 7.81, 8.84, 6.08, 5.39, 8.15, 6.42, 5.73}
	var b strings.Builder
	b.WriteString("dependency_score,care_minutes\n")
	for i := range x {
		fmt.Fprintf(&b, "%g,%g\n", x[i], y[i])
	}
	return b.String()
}

func TestCorrelateJSON(t *testing.T) {
	code, out, errOut := runCSVCommand(t, anscombe3CSV(), "correlate", "FILE", "--x", "dependency_score", "--y", "care_minutes", "--json")
	if code != 0 || errOut != "" {
		t.Fatalf("code %d stderr %q", code, errOut)
	}
	var got struct {
		N           int      `json:"n"`
		PearsonR    *float64 `json:"pearson_r"`
		SpearmanRho *float64 `json:"spearman_rho"`
		Intercept   *float64 `json:"intercept"`
		Slope       *float64 `json:"slope"`
		RSquared    *float64 `json:"r_squared"`
		ResidualSD  *float64 `json:"residual_sd"`
		Warnings    []string `json:"warnings"`
	}
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatal(err)
	}
	near := func(name string, p *float64, want float64) {
		if p == nil || math.Abs(*p-want) > 1e-12 {
			t.Errorf("%s = %v, want %.17g", name, p, want)
		}
	}
	if got.N != 11 {
		t.Errorf("n = %d", got.N)
	}
	near("pearson_r", got.PearsonR, 0.81628673948959818)
	near("spearman_rho", got.SpearmanRho, 0.99090909090909096)
	near("r_squared", got.RSquared, 0.66632404106655907)
	near("intercept", got.Intercept, 3.002454545454543)
	near("slope", got.Slope, 0.4997272727272728)
	near("residual_sd", got.ResidualSD, 1.2363113513899961)
	all := strings.Join(got.Warnings, "\n")
	if !strings.Contains(all, "Tukey fences") || !strings.Contains(all, "not causation") {
		t.Errorf("warnings:\n%s", all)
	}
}

func TestCorrelateUndefinedIsNull(t *testing.T) {
	code, out, _ := runCSVCommand(t, "a,b\n2,1\n2,2\n2,3\n", "correlate", "--x", "a", "--y", "b", "--json", "FILE")
	if code != 0 {
		t.Fatal(code)
	}
	for _, f := range []string{"pearson_r", "spearman_rho", "intercept", "slope", "r_squared", "residual_sd"} {
		if !strings.Contains(out, fmt.Sprintf("%q: null", f)) {
			t.Errorf("%s not null:\n%s", f, out)
		}
	}
}

func TestCorrelateTable(t *testing.T) {
	code, out, _ := runCSVCommand(t, anscombe3CSV(), "correlate", "FILE", "--x", "dependency_score", "--y", "care_minutes")
	if code != 0 {
		t.Fatal(code)
	}
	for _, want := range []string{"n = 11 pairs", "Pearson r", "0.816287", "Line: care_minutes = 3.00245 + 0.499727 × dependency_score", "Warnings:", "not causation"} {
		if !strings.Contains(out, want) {
			t.Errorf("lacks %q:\n%s", want, out)
		}
	}
}

func TestCorrelateBadInput(t *testing.T) {
	for _, tc := range []struct {
		name, csv string
		args      []string
		want      string
	}{
		{"missing --y", "a,b\n1,2\n", []string{"correlate", "FILE", "--x", "a"}, "--x and --y are required"},
		{"missing column", "a,b\n1,2\n", []string{"correlate", "FILE", "--x", "a", "--y", "c"}, `there is no column "c"`},
		{"non-numeric", "a,b\n1,2\n3,x\n", []string{"correlate", "FILE", "--x", "a", "--y", "b"}, `line 3, column "b": "x" is not a number.`},
		{"empty", "", []string{"correlate", "FILE", "--x", "a", "--y", "b", "--json"}, "The file is empty"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errOut := runCSVCommand(t, tc.csv, tc.args...)
			if code != 2 || out != "" || !strings.Contains(errOut, tc.want) {
				t.Errorf("code %d stdout %q stderr %q, want %q", code, out, errOut, tc.want)
			}
		})
	}
}
