package stats

import (
	"encoding/csv"
	"errors"
	"math/rand/v2"
	"os"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"wardload/internal/wardload"
)

// readReference reads a CSV written by a script in testdata/reference,
// skipping its '#' provenance line, as a slice of column-name → cell maps.
func readReference(t *testing.T, name string) []map[string]string {
	t.Helper()
	f, err := os.Open("../../testdata/reference/" + name)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	r := csv.NewReader(f)
	r.Comment = '#'
	recs, err := r.ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var out []map[string]string
	for _, rec := range recs[1:] {
		m := map[string]string{}
		for i, h := range recs[0] {
			m[h] = rec[i]
		}
		out = append(out, m)
	}
	if len(out) == 0 {
		t.Fatalf("%s has no rows", name)
	}
	return out
}

// floatList parses the space-separated numbers the R scripts write with %.17g.
func floatList(t *testing.T, s string) []float64 {
	t.Helper()
	var v []float64
	for f := range strings.FieldsSeq(s) {
		x, err := strconv.ParseFloat(f, 64)
		if err != nil {
			t.Fatal(err)
		}
		v = append(v, x)
	}
	return v
}

// Values from R 4.2.2 (Debian r-base-core), written by
// testdata/reference/quantiles.R to quantiles.csv:
//
//	hinges: fivenum(x)[c(2,3,4)]
//	hf6:    quantile(x, c(.25,.5,.75), type = 6)
//	hf7:    quantile(x, c(.25,.5,.75), type = 7)
func TestQuartilesMatchR(t *testing.T) {
	for _, row := range readReference(t, "quantiles.csv") {
		t.Run(row["case"]+"/"+row["convention"], func(t *testing.T) {
			x := floatList(t, row["data"])
			want := floatList(t, row["q1_median_q3"])
			q, err := QuartilesOf(x, row["convention"])
			if err != nil {
				t.Fatal(err)
			}
			if q.Convention != row["convention"] {
				t.Errorf("convention = %q", q.Convention)
			}
			for i, got := range []float64{q.Q1, q.Median, q.Q3} {
				if !scalar.EqualWithinAbsOrRel(got, want[i], 1e-12, 1e-12) {
					t.Errorf("quartile %d = %.17g, R says %.17g", i+1, got, want[i])
				}
			}
		})
	}
}

// Hand computations with the textbook definition of the "halves" method
// (median of the lower and of the upper half; for odd n the median itself
// belongs to neither half). No software reference was used.
func TestQuartilesHalvesByHand(t *testing.T) {
	for _, tc := range []struct {
		x           []float64
		q1, med, q3 float64
		explanation string
	}{
		{[]float64{2, 4, 4, 5, 7, 9, 10, 12, 30}, 4, 7, 11, "halves {2,4,4,5} and {9,10,12,30}"},
		{[]float64{10, 9, 8, 7, 6, 5, 4, 3, 2, 1}, 3, 5.5, 8, "halves {1..5} and {6..10}"},
		{[]float64{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11}, 3, 6, 9, "halves {1..5} and {7..11}"},
		{[]float64{4, 1, 3, 2}, 1.5, 2.5, 3.5, "halves {1,2} and {3,4}"},
		{[]float64{5, 1, 3}, 1, 3, 5, "halves {1} and {5}"},
		{[]float64{3, 1}, 1, 2, 3, "halves {1} and {3}"},
		{[]float64{7.5}, 7.5, 7.5, 7.5, "one value: defined as the value"},
	} {
		q, err := QuartilesOf(tc.x, wardload.QuartilesHalves)
		if err != nil {
			t.Fatal(err)
		}
		if q.Q1 != tc.q1 || q.Median != tc.med || q.Q3 != tc.q3 {
			t.Errorf("%v (%s): got %v %v %v, want %v %v %v", tc.x, tc.explanation, q.Q1, q.Median, q.Q3, tc.q1, tc.med, tc.q3)
		}
	}
}

// NIST/SEMATECH e-Handbook of Statistical Methods §7.2.6.2 (percentiles):
// the 90th percentile of 12 measurements by the p(n+1) rule is 95.19807
// (Y(11) + 0.7·(Y(12) − Y(11))). Data and result quoted from memory;
// cross-checked with R 4.2.2: quantile(x, .9, type = 6) = 95.198070000000001
// (printed by testdata/reference/quantiles.R, case nist12).
func TestHFQuantileNISTHandbook(t *testing.T) {
	x := []float64{95.1772, 95.1567, 95.1937, 95.1959, 95.1442, 95.0610,
		95.1591, 95.1195, 95.1065, 95.0925, 95.1990, 95.1682}
	slices.Sort(x)
	if got := HFQuantile(6, 0.9, x); !scalar.EqualWithinAbsOrRel(got, 95.19807, 1e-12, 1e-12) {
		t.Errorf("90th percentile = %.17g, want 95.19807", got)
	}
}

// Selection must give exactly what a full sort gives, for every
// convention, on orders that defeat naive pivots and on heavy ties.
// Invented data (property test).
func TestSelectionMatchesSort(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	var inputs [][]float64
	// From bandMinN on, orderStats samples first; 70001 and 100000 test
	// that path, and all-equal or few-valued inputs its fallback.
	for _, n := range []int{1, 2, 3, 5, 24, 25, 26, 100, 1001, 5000, bandMinN, 70001, 100000} {
		rnd := make([]float64, n)
		ties := make([]float64, n)
		for i := range rnd {
			rnd[i] = rng.NormFloat64()
			ties[i] = float64(rng.IntN(4))
		}
		asc := make([]float64, n)
		pipe := make([]float64, n)
		for i := range asc {
			asc[i] = float64(i)
			pipe[i] = float64(min(i, n-i))
		}
		desc := slices.Clone(asc)
		slices.Reverse(desc)
		inputs = append(inputs, rnd, ties, asc, desc, pipe, make([]float64, n))
	}
	for _, x := range inputs {
		sorted := slices.Clone(x)
		slices.Sort(sorted)
		for _, conv := range []string{wardload.QuartilesHinges, wardload.QuartilesHF6, wardload.QuartilesHF7, wardload.QuartilesHalves} {
			q, err := QuartilesOf(x, conv)
			if err != nil {
				t.Fatal(err)
			}
			ps := quartilePositions(conv, len(x))
			want := []float64{ps[0].eval(sorted), ps[1].eval(sorted), ps[2].eval(sorted)}
			if q.Q1 != want[0] || q.Median != want[1] || q.Q3 != want[2] {
				t.Fatalf("n=%d %s: selection %v %v %v, sort %v", len(x), conv, q.Q1, q.Median, q.Q3, want)
			}
		}
	}
}

func TestQuartilesErrors(t *testing.T) {
	_, err := QuartilesOf(nil, wardload.QuartilesHinges)
	if wardload.ErrorCode(err) != wardload.EINVALID {
		t.Errorf("empty: %v", err)
	}
	_, err = QuartilesOf([]float64{1}, "hf8")
	var we *wardload.Error
	if !errors.As(err, &we) || we.Code != wardload.EINVALID || we.Field != "quartiles" {
		t.Errorf("unknown convention: %v", err)
	}
}

func TestQuantilePanics(t *testing.T) {
	for name, f := range map[string]func(){
		"NaN input":     func() { _, _ = QuartilesOf([]float64{1, zero() / zero()}, wardload.QuartilesHF7) },
		"unsorted":      func() { HFQuantile(7, 0.5, []float64{2, 1}) },
		"p above 1":     func() { HFQuantile(6, 1.5, []float64{1, 2}) },
		"type 5":        func() { HFQuantile(5, 0.5, []float64{1, 2}) },
		"empty sorted":  func() { HFQuantile(7, 0.5, nil) },
		"MeanSD of one": func() { MeanSD([]float64{1}) },
	} {
		t.Run(name, func(t *testing.T) {
			defer func() {
				if recover() == nil {
					t.Error("no panic")
				}
			}()
			f()
		})
	}
}

func zero() float64 { return 0 }

// The sampled path must really be taken on ordinary data (else the
// benchmark would time the fallback) and must give up, not fail, when the
// brackets hold too much (all values equal). Invented data.
func TestOrderStatsSampledPath(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	x := make([]float64, 200_000)
	for i := range x {
		x[i] = rng.ExpFloat64()
	}
	ks := []int{49_999, 50_000, 99_999, 100_000, 149_999, 150_000}
	vals, sc, ok := orderStatsSampled(x, ks)
	if !ok {
		t.Fatal("sampled path fell back on exponential data")
	}
	sorted := slices.Clone(x)
	slices.Sort(sorted)
	for i, k := range ks {
		if vals[i] != sorted[k] {
			t.Errorf("rank %d: %v, sorted %v", k, vals[i], sorted[k])
		}
	}
	if sc.min != sorted[0] || sc.max != sorted[len(x)-1] {
		t.Errorf("min/max %v %v", sc.min, sc.max)
	}
	if _, _, ok := orderStatsSampled(make([]float64, 200_000), ks); ok {
		t.Error("all-equal input should exceed the budget and fall back")
	}
}
