package stats

import (
	"encoding/csv"
	"math"
	"math/rand/v2"
	"os"
	"slices"
	"strconv"
	"testing"

	"wardload/internal/wardload"
)

// Hollander & Wolfe (1973), Nonparametric Statistical Methods, p. 116:
// mucociliary efficiency in three groups of subjects, the worked example
// of R's ?kruskal.test. Reference values from R 4.2.2 (r-base-core,
// Debian 4.2.2.20221110-2):
//
//	x <- c(2.9, 3.0, 2.5, 2.6, 3.2); y <- c(3.8, 2.7, 4.0, 2.4); z <- c(2.8, 3.4, 3.7, 2.2, 2.0)
//	r <- kruskal.test(list(x, y, z)); print(r$statistic, digits = 15); print(r$p.value, digits = 15)
//
// H = 0.771428571428572, p = 0.679964773578894; tolerance 1e-12 relative.
func TestKruskalWallisHollanderWolfe(t *testing.T) {
	kw, err := KruskalWallisTest([][]float64{
		{2.9, 3.0, 2.5, 2.6, 3.2}, {3.8, 2.7, 4.0, 2.4}, {2.8, 3.4, 3.7, 2.2, 2.0}})
	if err != nil {
		t.Fatal(err)
	}
	near(t, "H", kw.H, 0.771428571428572, 1e-12)
	near(t, "p", kw.P, 0.679964773578894, 1e-12)
	near(t, "ε²", kw.EpsilonSquared, 0.771428571428572/13, 1e-12)
	if kw.DF != 2 || kw.N != 14 || kw.Ties != 1 {
		t.Errorf("df %d, N %d, tie correction %g", kw.DF, kw.N, kw.Ties)
	}
}

// With ties: R's airquality data (New York, May–September 1973; Chambers,
// Cleveland, Kleiner & Tukey (1983), Graphical Methods for Data Analysis),
// ozone by month, the 116 days with a reading, exported to
// testdata/airquality_ozone.csv by R 4.2.2. Reference from R 4.2.2:
//
//	r <- kruskal.test(Ozone ~ Month, data = airquality)
//
// H = 29.2665763061169, p = 6.90071411854678e-06; tolerance 1e-12
// relative (H) and 1e-9 (p).
func TestKruskalWallisAirqualityTies(t *testing.T) {
	f, err := os.Open("testdata/airquality_ozone.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	byMonth := map[string][]float64{}
	var months []string
	for _, row := range rows[1:] {
		v, err := strconv.ParseFloat(row[1], 64)
		if err != nil {
			t.Fatal(err)
		}
		if byMonth[row[0]] == nil {
			months = append(months, row[0])
		}
		byMonth[row[0]] = append(byMonth[row[0]], v)
	}
	var groups [][]float64
	for _, m := range months {
		groups = append(groups, byMonth[m])
	}
	kw, err := KruskalWallisTest(groups)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "H", kw.H, 29.2665763061169, 1e-12)
	near(t, "p", kw.P, 6.90071411854678e-06, 1e-9)
	if kw.DF != 4 || kw.N != 116 || kw.Ties >= 1 {
		t.Errorf("df %d, N %d, tie correction %g (the data have ties)", kw.DF, kw.N, kw.Ties)
	}
}

func TestKruskalWallisBadInput(t *testing.T) {
	for name, groups := range map[string][][]float64{
		"one group":  {{1, 2, 3}, {}},
		"all equal":  {{5, 5}, {5, 5, 5}},
		"not finite": {{1, math.NaN()}, {2}},
	} {
		if _, err := KruskalWallisTest(groups); wardload.ErrorCode(err) != wardload.EINVALID {
			t.Errorf("%s: %v", name, err)
		}
	}
}

// The median shift's 95% percentile-bootstrap interval covers the true
// difference of medians on about 95% of samples. Known truth: two
// lognormal tiers (invented; medians 60 and 90 minutes, log SD 0.5 and
// 0.6), 40 values each, 400 seeded samples with 1,000 replicates each.
// The share covering must lie in [0.90, 0.985]: the percentile interval
// of a median is known to run a little short at moderate n (Efron &
// Tibshirani 1993, §13.3), never this far.
func TestMedianShiftCoverage(t *testing.T) {
	const samples = 400
	covered := 0
	r := rand.New(rand.NewPCG(2026, 12))
	draw := func(median, sd float64) []float64 {
		x := make([]float64, 40)
		for i := range x {
			x[i] = median * math.Exp(sd*r.NormFloat64())
		}
		return x
	}
	for i := range samples {
		m, err := MedianShiftTest(draw(60, 0.5), draw(90, 0.6), 0.95, 1000, uint64(i))
		if err != nil {
			t.Fatal(err)
		}
		if m.Low <= 30 && 30 <= m.High {
			covered++
		}
	}
	share := float64(covered) / samples
	t.Logf("95%% interval covered the true shift of 30 minutes in %.1f%% of %d samples", 100*share, samples)
	if share < 0.90 || share > 0.985 {
		t.Errorf("coverage %.3f, want about 0.95", share)
	}
}

// The same input and seed give the same interval; the point estimate is
// the difference of the type 7 medians (R: median(y) − median(x) on
// airquality's June and May ozone gives 5, R 4.2.2).
func TestMedianShiftDeterministic(t *testing.T) {
	may := []float64{41, 36, 12, 18, 28, 23, 19, 8, 7, 16, 11, 14, 18, 14, 34, 6, 30, 11, 1, 11, 4, 32, 23, 45, 115, 37}
	june := []float64{29, 71, 39, 23, 21, 37, 20, 12, 13}
	a, err := MedianShiftTest(may, june, 0.95, 2000, 7)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := MedianShiftTest(may, june, 0.95, 2000, 7)
	if a != b {
		t.Errorf("not deterministic: %+v vs %+v", a, b)
	}
	near(t, "difference", a.Difference, 5, 1e-12)
	if !(a.Low < 0 && a.Difference < a.High) || a.Difference <= a.Low {
		t.Errorf("interval %g to %g around %g, want one that includes 0", a.Low, a.High, a.Difference)
	}
	if _, err := MedianShiftTest(nil, june, 0.95, 2000, 7); wardload.ErrorCode(err) != wardload.EINVALID {
		t.Errorf("empty tier: %v", err)
	}
	if _, err := MedianShiftTest(may, june, 1, 2000, 7); wardload.ErrorCode(err) != wardload.EINVALID {
		t.Errorf("level 1: %v", err)
	}
}

// near fails t unless got is within rel·|want| of want.
func near(t *testing.T, what string, got, want, rel float64) {
	t.Helper()
	if math.Abs(got-want) > rel*math.Abs(want) {
		t.Errorf("%s = %.15g, want %.15g (relative tolerance %g)", what, got, want, rel)
	}
}

// resampledMedian draws from exactly the distribution of a bootstrap
// resample's type 7 median. The reference is exact, not sampled: every one
// of the nⁿ equally likely resamples of a small sample with ties is
// enumerated and its median found by sorting (HFQuantile type 7). 100,000
// draws must put each median's share within 5 standard errors
// √(p(1−p)/100000) of its exact probability (one false alarm in about
// 1.7 million comparisons). Samples of 1 to 7 values, with ties.
func TestResampledMedianExact(t *testing.T) {
	const draws = 100_000
	for _, sorted := range [][]float64{{4}, {1, 2}, {1, 1, 3}, {1, 2, 2, 5}, {1, 2, 2, 4, 7}, {0, 1, 3, 3, 6, 8}, {1, 1, 2, 5, 5, 6, 9}} {
		n := len(sorted)
		exact := map[float64]float64{}
		total := 1
		for range n {
			total *= n
		}
		idx, re := make([]int, n), make([]float64, n)
		for range total {
			for i, j := range idx {
				re[i] = sorted[j]
			}
			slices.Sort(re)
			exact[HFQuantile(7, 0.5, re)] += 1 / float64(total)
			for i := range idx { // next index tuple, odometer order
				if idx[i]++; idx[i] < n {
					break
				}
				idx[i] = 0
			}
		}
		r := rand.New(rand.NewPCG(uint64(n), 9))
		got := map[float64]float64{}
		for range draws {
			got[resampledMedian(r, sorted)] += 1.0 / draws
		}
		for v := range got {
			if exact[v] == 0 {
				t.Fatalf("n %d (%v): drew median %g, which no resample has", n, sorted, v)
			}
		}
		for v, p := range exact {
			if se := math.Sqrt(p * (1 - p) / draws); math.Abs(got[v]-p) > 5*se+1e-9 {
				t.Errorf("n %d (%v): median %g drawn %.5f of the time, exactly %.5f", n, sorted, v, got[v], p)
			}
		}
	}
}
