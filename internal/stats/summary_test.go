package stats

import (
	"encoding/binary"
	"math"
	"math/rand/v2"
	"os"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/floats/scalar"

	"wardload/internal/wardload"
)

// numAcc builds the NIST StRD univariate data sets NumAcc1–4 from their
// published constructions: NumAcc1 is 10000001, 10000003, 10000002;
// NumAcc2–4 are 1001 values, a centre c followed by 500 pairs c−0.1, c+0.1
// with c = 1.2, 1000000.2 and 10000000.2. (Checked value for value
// against the NIST .dat files.)
func numAcc(k int) []float64 {
	if k == 1 {
		return []float64{10000001, 10000003, 10000002}
	}
	// Decimal literals, not c ± 0.1: the data are the nearest doubles to
	// the published decimals.
	v := map[int][3]float64{
		2: {1.1, 1.2, 1.3},
		3: {1000000.1, 1000000.2, 1000000.3},
		4: {10000000.1, 10000000.2, 10000000.3},
	}[k]
	lo, c, hi := v[0], v[1], v[2]
	x := []float64{c}
	for range 500 {
		x = append(x, lo, hi)
	}
	return x
}

// Certified values from NIST StRD (Statistical Reference Datasets),
// univariate summary statistics, NumAcc1–4: sample mean and sample
// standard deviation (denominator n − 1), all certified exact. The data
// are decimal fractions that binary doubles cannot hold: 10000000.1 is off
// by up to 9.3e-10, i.e. ~1e-8 of the 0.1 spread, so the SD tolerance
// grows with the magnitude (R 4.2.2 sd() gives 0.10000000055879354 for
// NumAcc4 and 0.1000000000349246 for NumAcc3, within the same bounds).
func TestNumAccCertified(t *testing.T) {
	for _, tc := range []struct {
		k              int
		mean, sd       float64 // certified
		meanTol, sdTol float64 // relative
	}{
		{1, 10000002, 1, 1e-15, 1e-14},
		{2, 1.2, 0.1, 1e-15, 1e-13},
		{3, 1000000.2, 0.1, 1e-15, 1e-9},
		{4, 10000000.2, 0.1, 1e-15, 2e-8},
	} {
		x := numAcc(tc.k)
		mean, sd := MeanSD(x)
		if !scalar.EqualWithinRel(mean, tc.mean, tc.meanTol) || !scalar.EqualWithinRel(sd, tc.sd, tc.sdTol) {
			t.Errorf("NumAcc%d: mean %.17g sd %.17g, certified %v %v", tc.k, mean, sd, tc.mean, tc.sd)
		}
		s, err := Summarize(x, DefaultQuartiles)
		if err != nil {
			t.Fatal(err)
		}
		if s.Mean != mean || s.SD.Value != sd {
			t.Errorf("NumAcc%d: Summarize %v %v differs from MeanSD %v %v", tc.k, s.Mean, s.SD.Value, mean, sd)
		}
	}
}

// The one-pass textbook formula √((Σx² − n·x̄²)/(n − 1)) loses everything
// on NumAcc4 (Σx² ≈ 1e17, whose spacing of doubles is 16): it must miss
// the certified 0.1 by more than 10%, while MeanSD meets it (above).
func TestNaiveVarianceFailsNumAcc4(t *testing.T) {
	x := numAcc(4)
	n := float64(len(x))
	var s, s2 float64
	for _, v := range x {
		s += v
		s2 += v * v
	}
	m := s / n
	naive := math.Sqrt(math.Max(0, (s2-n*m*m)/(n-1)))
	if scalar.EqualWithinRel(naive, 0.1, 0.1) {
		t.Fatalf("naive SD %.17g unexpectedly close to 0.1; the test no longer shows cancellation", naive)
	}
	if _, sd := MeanSD(x); !scalar.EqualWithinRel(sd, 0.1, 2e-8) {
		t.Fatalf("MeanSD %.17g", sd)
	}
}

// Tukey's example-style sample. Quartiles: R 4.2.2 fivenum(x) = 2 4 7 10 30
// (quantiles.csv, case tukey9); mean, sd: R 4.2.2 mean(x) =
// 9.2222222222222214, sd(x) = 8.4376800392314255, sd(x)/sqrt(9) =
// 2.812560013077142. Fences by hand: IQR 6, inner −5 and 19, outer −14 and
// 28, so 30 (index 8) is extreme. FD bins by hand: width 2·6·9^(−1/3).
func TestSummarizeTukey9(t *testing.T) {
	x := []float64{2, 4, 4, 5, 7, 9, 10, 12, 30}
	s, err := Summarize(x, wardload.QuartilesHinges)
	if err != nil {
		t.Fatal(err)
	}
	eq := func(name string, got, want float64) {
		t.Helper()
		if !scalar.EqualWithinAbsOrRel(got, want, 1e-12, 1e-12) {
			t.Errorf("%s = %.17g, want %.17g", name, got, want)
		}
	}
	if s.Quartiles != "hinges" || s.N != 9 {
		t.Errorf("quartiles %q n %d", s.Quartiles, s.N)
	}
	eq("min", s.Min, 2)
	eq("q1", s.Q1, 4)
	eq("median", s.Median, 7)
	eq("q3", s.Q3, 10)
	eq("max", s.Max, 30)
	eq("iqr", s.IQR, 6)
	eq("inner lower", s.InnerFences.Lower, -5)
	eq("inner upper", s.InnerFences.Upper, 19)
	eq("outer lower", s.OuterFences.Lower, -14)
	eq("outer upper", s.OuterFences.Upper, 28)
	eq("mean", s.Mean, 9.2222222222222214)
	eq("sd", s.SD.Value, 8.4376800392314255)
	eq("se", s.SE.Value, 2.812560013077142)
	if !s.SD.Defined || !s.SE.Defined {
		t.Error("SD/SE undefined")
	}
	if len(s.Outliers) != 1 || s.Outliers[0] != (Outlier{Index: 8, Value: 30, Kind: OutlierExtreme}) {
		t.Errorf("outliers = %+v", s.Outliers)
	}
	w := 12 / math.Cbrt(9)
	if s.Bins.Rule != BinsFreedmanDiaconis || s.Bins.Bins != int(math.Ceil(28/w)) || !scalar.EqualWithinAbsOrRel(s.Bins.Width, w, 1e-12, 1e-12) || s.Bins.Start != 2 {
		t.Errorf("bins = %+v", s.Bins)
	}
}

// A value exactly on a fence is not outside it. With 9 values the hinges
// are the 3rd and 7th smallest (3 and 7 here), so IQR = 4, inner fences
// −3 and 13, outer fences −9 and 19, whatever the extremes are. Hand
// computation from Tukey's definitions.
func TestFenceBoundaries(t *testing.T) {
	mid := []float64{2, 3, 4, 5, 6, 7, 8}
	for _, tc := range []struct {
		name   string
		lo, hi float64
		want   []Outlier
	}{
		{"on inner fences", -3, 13, nil},
		{"just outside inner", -3.5, 13.5, []Outlier{{0, -3.5, OutlierMild}, {8, 13.5, OutlierMild}}},
		{"on outer fences", -9, 19, []Outlier{{0, -9, OutlierMild}, {8, 19, OutlierMild}}},
		{"beyond outer", -9.5, 19.5, []Outlier{{0, -9.5, OutlierExtreme}, {8, 19.5, OutlierExtreme}}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			x := append(append([]float64{tc.lo}, mid...), tc.hi)
			s, err := Summarize(x, wardload.QuartilesHinges)
			if err != nil {
				t.Fatal(err)
			}
			if s.InnerFences != (Fences{-3, 13}) || s.OuterFences != (Fences{-9, 19}) {
				t.Fatalf("fences %+v %+v", s.InnerFences, s.OuterFences)
			}
			if !slices.Equal(s.Outliers, tc.want) {
				t.Errorf("outliers = %+v, want %+v", s.Outliers, tc.want)
			}
		})
	}
}

// With hinges, the flagged points and the box must be R's:
// R 4.2.2 boxplot.stats(x)$out and $stats[2:4] (boxplot.csv, written by
// testdata/reference/quantiles.R).
func TestOutliersMatchRBoxplotStats(t *testing.T) {
	for _, row := range readReference(t, "boxplot.csv") {
		x := floatList(t, row["data"])
		stats := floatList(t, row["stats"])
		out := floatList(t, row["out"])
		s, err := Summarize(x, wardload.QuartilesHinges)
		if err != nil {
			t.Fatal(err)
		}
		if s.Q1 != stats[1] || s.Median != stats[2] || s.Q3 != stats[3] {
			t.Errorf("%s: box %v %v %v, R %v", row["case"], s.Q1, s.Median, s.Q3, stats[1:4])
		}
		var got []float64
		for _, o := range s.Outliers {
			got = append(got, o.Value)
			if x[o.Index] != o.Value {
				t.Errorf("%s: index %d holds %v, not %v", row["case"], o.Index, x[o.Index], o.Value)
			}
		}
		if !slices.Equal(got, out) {
			t.Errorf("%s: outliers %v, R %v", row["case"], got, out)
		}
	}
}

func TestSummarizeOneValueAndEmpty(t *testing.T) {
	s, err := Summarize([]float64{42}, wardload.QuartilesHF7)
	if err != nil {
		t.Fatal(err)
	}
	if s.N != 1 || s.Min != 42 || s.Q1 != 42 || s.Median != 42 || s.Q3 != 42 || s.Max != 42 || s.IQR != 0 || s.Mean != 42 {
		t.Errorf("one value: %+v", s)
	}
	if s.SD.Defined || s.SE.Defined || len(s.Outliers) != 0 || s.Bins.Bins != 1 {
		t.Errorf("one value: SD %v SE %v outliers %v bins %+v", s.SD, s.SE, s.Outliers, s.Bins)
	}
	if b, _ := s.SD.MarshalJSON(); string(b) != "null" {
		t.Errorf("undefined SD marshals as %s", b)
	}
	if _, err := Summarize(nil, wardload.QuartilesHF7); wardload.ErrorCode(err) != wardload.EINVALID {
		t.Errorf("empty: %v", err)
	}
	if _, err := Summarize([]float64{1}, "median"); wardload.ErrorField(err) != "quartiles" {
		t.Errorf("unknown convention: %v", err)
	}
}

// Summarize works on a copy: the caller's slice keeps its order and values
// (the selection reorders only the copy).
func TestSummarizeDoesNotMutate(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	x := make([]float64, 1000)
	for i := range x {
		x[i] = rng.ExpFloat64()
	}
	orig := slices.Clone(x)
	for _, conv := range []string{wardload.QuartilesHinges, wardload.QuartilesHF6, wardload.QuartilesHF7, wardload.QuartilesHalves} {
		if _, err := Summarize(x, conv); err != nil {
			t.Fatal(err)
		}
		if _, err := QuartilesOf(x, conv); err != nil {
			t.Fatal(err)
		}
		if !floats.Same(x, orig) {
			t.Fatalf("%s: input was modified", conv)
		}
	}
}

// benchData returns the benchmark's 10,000,000 values: the file named by
// WARDLOAD_BENCH_DATA (little-endian float64s, as bench/summary.sh writes
// from R, so Go and R time the same data), else a seeded lognormal(3, 0.6)
// draw of the same size.
func benchData(b *testing.B) []float64 {
	if path := os.Getenv("WARDLOAD_BENCH_DATA"); path != "" {
		raw, err := os.ReadFile(path)
		if err != nil {
			b.Fatal(err)
		}
		x := make([]float64, len(raw)/8)
		for i := range x {
			x[i] = math.Float64frombits(binary.LittleEndian.Uint64(raw[8*i:]))
		}
		return x
	}
	rng := rand.New(rand.NewPCG(20261201, 1))
	x := make([]float64, 10_000_000)
	for i := range x {
		x[i] = math.Exp(3 + 0.6*rng.NormFloat64())
	}
	return x
}

func BenchmarkSummary10M(b *testing.B) {
	x := benchData(b)
	// Bytes allocated per summary, against the input's own size: the issue
	// allows at most one extra copy of the input (bench/summary.sh checks).
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if _, err := Summarize(x, DefaultQuartiles); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(8*len(x)), "input-bytes") // after ResetTimer, which drops reported metrics
}

// NIST StRD univariate summary statistics, certified values (sample mean;
// sample standard deviation with denominator n − 1), given to 15
// significant digits. The data in testdata/reference/strd/ are copied
// value for value from NIST's .dat files. R 4.2.2 mean/sd on the same
// files agree to ≤ 1.4e-13 relative.
func TestStRDUnivariateCertified(t *testing.T) {
	for _, tc := range []struct {
		name     string
		n        int
		mean, sd float64
	}{
		{"PiDigits", 5000, 4.53480000000000, 2.86733906028871},
		{"Lew", 200, -177.435000000000, 277.332168044316},
		{"Lottery", 218, 518.958715596330, 291.699727470969},
		{"Mavro", 50, 2.00185600000000, 0.000429123454003053},
		{"Michelso", 100, 299.852400000000, 0.0790105478190518},
	} {
		raw, err := os.ReadFile("../../testdata/reference/strd/" + tc.name + ".txt")
		if err != nil {
			t.Fatal(err)
		}
		var x []float64
		for line := range strings.SplitSeq(string(raw), "\n") {
			if line = strings.TrimSpace(line); line != "" && !strings.HasPrefix(line, "#") {
				v, err := strconv.ParseFloat(line, 64)
				if err != nil {
					t.Fatal(err)
				}
				x = append(x, v)
			}
		}
		if len(x) != tc.n {
			t.Fatalf("%s: %d values, want %d", tc.name, len(x), tc.n)
		}
		s, err := Summarize(x, DefaultQuartiles)
		if err != nil {
			t.Fatal(err)
		}
		if !scalar.EqualWithinAbsOrRel(s.Mean, tc.mean, 1e-14, 1e-13) || !scalar.EqualWithinRel(s.SD.Value, tc.sd, 1e-12) {
			t.Errorf("%s: mean %.15g sd %.15g, certified %.15g %.15g", tc.name, s.Mean, s.SD.Value, tc.mean, tc.sd)
		}
	}
}

func TestNumberJSONRoundTrip(t *testing.T) {
	for _, n := range []Number{Undefined, Defined(0), Defined(-1.5e-300), Defined(0.1 + 0.2)} {
		b, err := n.MarshalJSON()
		if err != nil {
			t.Fatal(err)
		}
		var back Number
		if err := back.UnmarshalJSON(b); err != nil {
			t.Fatal(err)
		}
		if back != n {
			t.Errorf("%s round-tripped to %v", b, back)
		}
	}
}
