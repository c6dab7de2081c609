package stats

import "math"

// MaxBins caps the bin count: a heavy tail can make Freedman–Diaconis ask
// for millions of bins, which no display can use.
const MaxBins = 10_000

// Bin rules.
const (
	BinsFreedmanDiaconis = "freedman-diaconis"
	BinsSturges          = "sturges"
)

// Binning is a suggested histogram: Bins bins of equal Width starting at
// Start (the minimum), and the rule that chose them.
type Binning struct {
	Rule  string
	Bins  int
	Width float64
	Start float64
}

// BinsFor returns the histogram bins for n values with the given IQR and
// range:
//
//	Freedman–Diaconis  width = 2·IQR·n^(−1/3),  bins = ⌈(max − min)/width⌉
//	Sturges            bins = ⌈log₂ n + 1⌉,     width = (max − min)/bins
//
// Freedman–Diaconis is used when IQR > 0; Sturges when IQR is 0 (the rule
// would give zero-width bins). When max = min there is one bin of width 0.
// Bins is at least 1 and at most MaxBins (the width then grows to span the
// range in MaxBins bins). It panics if n < 1, iqr < 0 or max < min.
//
// References: Freedman, D. & Diaconis, P. (1981) "On the histogram as a
// density estimator: L2 theory", Z. Wahrscheinlichkeitstheorie 57, 453–476;
// Sturges, H. A. (1926) "The choice of a class interval", JASA 21, 65–66.
func BinsFor(n int, iqr, min, max float64) Binning {
	if n < 1 || !(iqr >= 0) || !(max >= min) {
		panic("stats: BinsFor: need n ≥ 1, iqr ≥ 0 and max ≥ min")
	}
	span := max - min
	if span == 0 {
		return Binning{Rule: BinsSturges, Bins: 1, Width: 0, Start: min}
	}
	if iqr > 0 {
		w := 2 * iqr * math.Pow(float64(n), -1.0/3)
		k := math.Max(1, math.Ceil(span/w))
		if k > MaxBins {
			return Binning{Rule: BinsFreedmanDiaconis, Bins: MaxBins, Width: span / MaxBins, Start: min}
		}
		return Binning{Rule: BinsFreedmanDiaconis, Bins: int(k), Width: w, Start: min}
	}
	k := int(math.Ceil(math.Log2(float64(n)) + 1))
	return Binning{Rule: BinsSturges, Bins: k, Width: span / float64(k), Start: min}
}

// Counts returns how many values of x fall in each of b's bins, with the
// bins closed on the right as in R's hist(right = TRUE, include.lowest =
// TRUE): the first bin is [Start, Start+Width], bin i > 0 is
// (Start+i·Width, Start+(i+1)·Width]. As in R, a value within
// 1e-7·Width of a break counts as on it, so that a break computed with
// rounding error does not move a value that lies on it to the next bin.
// Values below Start or above the last break are counted in below and
// above (none are when b was made by BinsFor from x's own range). A
// binning of Width 0 has one bin holding every value equal to Start.
// NaN values are counted in neither.
//
// Reference: R Core Team, hist.default (package graphics), whose counts
// come from findInterval on the breaks shifted by that fuzz.
func Counts(x []float64, b Binning) (counts []int, below, above int) {
	counts = make([]int, max(b.Bins, 1))
	if b.Width == 0 {
		for _, v := range x {
			switch {
			case v == b.Start:
				counts[0]++
			case v < b.Start:
				below++
			case v > b.Start:
				above++
			}
		}
		return counts, below, above
	}
	fuzz := 1e-7 * b.Width
	last := b.Start + float64(len(counts))*b.Width
	for _, v := range x {
		switch {
		case math.IsNaN(v):
			continue
		case v < b.Start-fuzz:
			below++
			continue
		case v > last+fuzz:
			above++
			continue
		}
		// The smallest i with v ≤ Start + (i+1)·Width + fuzz.
		i := int(math.Ceil((v-b.Start-fuzz)/b.Width)) - 1
		i = min(max(i, 0), len(counts)-1)
		counts[i]++
	}
	return counts, below, above
}
