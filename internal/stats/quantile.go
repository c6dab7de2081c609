package stats

import (
	"math"
	"math/bits"
	"math/rand/v2"
	"slices"

	"wardload/internal/wardload"
)

// DefaultQuartiles is the convention used when a ward has not chosen one:
// Tukey's hinges. They are what R's fivenum and boxplot.stats use, so the
// box, the 1.5·IQR fences and the flagged points match a boxplot drawn in
// R; they are order statistics or midpoints of two, so they never invent a
// value between distant points, and they are robust in Tukey's sense.
const DefaultQuartiles = wardload.QuartilesHinges

// Quartiles are the first quartile, the median and the third quartile of a
// sample under the named convention (one of the wardload.Quartiles*
// constants), which every output shows next to the values.
type Quartiles struct {
	Convention string
	Q1         float64
	Median     float64
	Q3         float64
}

// QuartilesOf returns the quartiles of x under convention, with xₖ the k-th
// smallest value (1-based) and n = len(x):
//
//	hinges  Tukey (1977) hinges as R's fivenum:
//	          m = ⌊(n+3)/2⌋ / 2,  d = (m, (n+1)/2, n+1−m),
//	          q = (x⌊d⌋ + x⌈d⌉) / 2
//	hf6     Hyndman & Fan (1996) type 6, the p(n+1) rule of the NIST/
//	        SEMATECH e-Handbook §7.2.6.2: see HFQuantile
//	hf7     Hyndman & Fan (1996) type 7, R's and numpy's default: see HFQuantile
//	halves  the median of the lower half x₁…x_⌊n/2⌋ and of the upper half
//	        x_(n−⌊n/2⌋+1)…xₙ; when n is odd the median is in neither half
//	        (the "exclusive" textbook method, e.g. Moore & McCabe)
//
// The median is the usual sample median under every convention. For n = 1
// all three quartiles are the single value (R's fivenum does the same;
// for halves this extends the definition, whose halves are empty).
//
// x is not modified and the cost is O(n), not a sort: see orderStats.
// QuartilesOf returns EINVALID for an empty x or an unknown convention and
// panics if x contains NaN or ±Inf.
//
// References: Hyndman, R. J. & Fan, Y. (1996) "Sample quantiles in
// statistical packages", The American Statistician 50(4), 361–365;
// Tukey, J. W. (1977) Exploratory Data Analysis, Addison-Wesley.
func QuartilesOf(x []float64, convention string) (Quartiles, error) {
	if !wardload.ValidQuartiles(convention) {
		return Quartiles{}, errConvention(convention)
	}
	if len(x) == 0 {
		return Quartiles{}, errNoValues()
	}
	q, _ := quartilesScan(x, convention)
	return q, nil
}

func errConvention(name string) error {
	return wardload.FieldErrorf(wardload.EINVALID, "quartiles", "Unknown quartile convention %q (use hinges, hf6, hf7 or halves).", name)
}

// HFQuantile returns the p-quantile of sorted under Hyndman & Fan (1996)
// type 6 or 7. With 1-based order statistics xₖ, n = len(sorted):
//
//	type 6: h = (n+1)·p        (NIST/SEMATECH e-Handbook §7.2.6.2)
//	type 7: h = (n−1)·p + 1    (R quantile default, numpy "linear")
//	Q(p) = x⌊h⌋ + (h − ⌊h⌋)·(x⌊h⌋+1 − x⌊h⌋),  h clamped to [1, n]
//
// It panics if typ is not 6 or 7, p is outside [0, 1], sorted is empty,
// contains NaN or is not in ascending order.
func HFQuantile(typ int, p float64, sorted []float64) float64 {
	if typ != 6 && typ != 7 {
		panic("stats: HFQuantile: type must be 6 or 7")
	}
	if !(p >= 0 && p <= 1) {
		panic("stats: HFQuantile: p outside [0, 1]")
	}
	if len(sorted) == 0 {
		panic("stats: HFQuantile: no values")
	}
	for i, v := range sorted {
		if v != v || (i > 0 && v < sorted[i-1]) {
			panic("stats: HFQuantile: input is not sorted or contains NaN")
		}
	}
	return hfPos(typ, p, len(sorted)).eval(sorted)
}

// pos is a quantile as a 0-based order statistic j plus weight w towards
// the next one: (1−w)·x[j] + w·x[j+1].
type pos struct {
	j int
	w float64
}

func (p pos) eval(a []float64) float64 {
	if p.w == 0 {
		return a[p.j]
	}
	return p.between(a[p.j], a[p.j+1])
}

// between interpolates between the order statistics at j and j+1.
func (p pos) between(lo, hi float64) float64 {
	if lo == hi {
		return lo
	}
	return (1-p.w)*lo + p.w*hi
}

// hfPos places Hyndman & Fan types 6 and 7 (see HFQuantile).
func hfPos(typ int, p float64, n int) pos {
	var h float64
	if typ == 6 {
		h = float64(n+1) * p
	} else {
		h = float64(n-1)*p + 1
	}
	if h <= 1 {
		return pos{0, 0}
	}
	if h >= float64(n) {
		return pos{n - 1, 0}
	}
	f := math.Floor(h)
	return pos{int(f) - 1, h - f}
}

// medianPos is the usual median of n values starting at index off.
func medianPos(off, n int) pos {
	if n%2 == 1 {
		return pos{off + n/2, 0}
	}
	return pos{off + n/2 - 1, 0.5}
}

// quartilePositions returns where Q1, the median and Q3 lie in the sorted
// order of n ≥ 1 values under convention.
func quartilePositions(convention string, n int) [3]pos {
	med := medianPos(0, n)
	switch convention {
	case wardload.QuartilesHinges:
		// d = ⌊(n+3)/2⌋/2 is an integer or a half; ⌊d⌋ and ⌈d⌉ are 1-based.
		h := (n + 3) / 2 // 2·d
		lo := pos{h/2 - 1, 0}
		hi := pos{n - h/2, 0} // n+1−d, 0-based: n − ⌈d⌉ … n − ⌊d⌋
		if h%2 == 1 {
			lo.w = 0.5
			hi = pos{n - h/2 - 1, 0.5}
		}
		return [3]pos{lo, med, hi}
	case wardload.QuartilesHF6, wardload.QuartilesHF7:
		typ := 6
		if convention == wardload.QuartilesHF7 {
			typ = 7
		}
		return [3]pos{hfPos(typ, 0.25, n), med, hfPos(typ, 0.75, n)}
	case wardload.QuartilesHalves:
		if n == 1 {
			return [3]pos{med, med, med}
		}
		m := n / 2
		return [3]pos{medianPos(0, m), med, medianPos(n-m, m)}
	}
	panic("stats: unknown quartile convention " + convention)
}

// quartilesScan returns the quartiles of x under convention, and the
// sum, minimum and maximum of x from the same pass. x is not modified.
func quartilesScan(x []float64, convention string) (Quartiles, scan) {
	ps := quartilePositions(convention, len(x))
	ks := make([]int, 0, 6)
	for _, p := range ps {
		ks = append(ks, p.j)
		if p.w != 0 {
			ks = append(ks, p.j+1)
		}
	}
	slices.Sort(ks)
	ks = slices.Compact(ks)
	vals, sc := orderStats(x, ks)
	var q [3]float64
	for i, p := range ps {
		j, _ := slices.BinarySearch(ks, p.j)
		if p.w == 0 {
			q[i] = vals[j]
		} else {
			q[i] = p.between(vals[j], vals[j+1])
		}
	}
	return Quartiles{Convention: convention, Q1: q[0], Median: q[1], Q3: q[2]}, sc
}

// multiSelect reorders a so that a[k−off] holds the (k+1)-th smallest
// value for every k in ks (ascending, absolute indices; a starts at off).
// It partitions once and recurses only into the sides that still hold a
// wanted index, so a few order statistics cost O(n). Past depth limit it
// sorts the remaining range, which bounds the worst case at O(n log n)
// (Musser 1997, "Introspective sorting and selection algorithms").
func multiSelect(a []float64, off int, ks []int, depth int) {
	for len(ks) > 0 {
		if len(a) <= 24 || depth == 0 {
			slices.Sort(a)
			return
		}
		depth--
		p := partition(a)
		at := p + off
		i, _ := slices.BinarySearch(ks, at)
		left, right := ks[:i], ks[i:]
		if len(right) > 0 && right[0] == at {
			right = right[1:]
		}
		// Recurse into the smaller side, loop on the larger.
		if len(left) > 0 && len(right) > 0 && p < len(a)-p {
			multiSelect(a[:p], off, left, depth)
			a, off, ks = a[p+1:], at+1, right
		} else if len(left) > 0 && len(right) > 0 {
			multiSelect(a[p+1:], at+1, right, depth)
			a, ks = a[:p], left
		} else if len(left) > 0 {
			a, ks = a[:p], left
		} else {
			a, off, ks = a[p+1:], at+1, right
		}
	}
}

// partition moves a median-of-three pivot to its sorted place p so that
// a[:p] ≤ a[p] ≤ a[p+1:], and returns p. Values equal to the pivot stop
// both scans, so a column of many equal values (whole care minutes) still
// splits near the middle.
func partition(a []float64) int {
	n := len(a)
	m := n / 2
	if a[m] < a[0] {
		a[m], a[0] = a[0], a[m]
	}
	if a[n-1] < a[0] {
		a[n-1], a[0] = a[0], a[n-1]
	}
	if a[n-1] < a[m] {
		a[n-1], a[m] = a[m], a[n-1]
	}
	a[0], a[m] = a[m], a[0] // median of the three to the front
	pivot := a[0]
	i, j := 1, n-1
	for {
		for i <= j && a[i] < pivot {
			i++
		}
		for i <= j && a[j] > pivot {
			j--
		}
		if i >= j {
			break
		}
		a[i], a[j] = a[j], a[i]
		i++
		j--
	}
	a[0], a[j] = a[j], a[0]
	return j
}

// scan is what the pass that finds the order statistics also collects.
type scan struct {
	sum, min, max float64
}

// with returns the totals with v added. It panics if v is NaN or ±Inf
// (v−v is then NaN, not 0). A value in and out, not a pointer, so that
// once inlined the totals stay in registers in the callers' loops.
func (sc scan) with(v float64) scan {
	if v-v != 0 {
		panic("stats: value is NaN or infinite")
	}
	return scan{sum: sc.sum + v, min: min(sc.min, v), max: max(sc.max, v)}
}

// bandMinN is the size from which orderStats samples first: below it a
// copy and selection are fast enough and sampling does not pay.
const bandMinN = 1 << 16

// orderStats returns the values of the order statistics at the 0-based
// ranks ks (ascending, distinct) of x, without modifying x, and the scan
// totals. It panics if x holds NaN or ±Inf.
//
// Small inputs are copied and partially ordered by selection (Hoare 1961,
// "Algorithm 65: Find"). Large ones first take the sampling step of
// Floyd & Rivest (1975, "Algorithm 489: SELECT", CACM 18(3)): a seeded
// sample brackets each wanted rank between two values, one pass counts
// the values below each bracket and keeps only those inside, and the
// selection runs on those few. The counts prove that each rank did fall in
// its bracket; if one did not (chance, or adversarial order), the plain
// path runs instead, so the result is always exact. Either way at most one
// copy of x is held.
func orderStats(x []float64, ks []int) ([]float64, scan) {
	if len(x) >= bandMinN {
		if vals, sc, ok := orderStatsSampled(x, ks); ok {
			return vals, sc
		}
	}
	work := make([]float64, len(x))
	sc := scan{min: x[0], max: x[0]}
	for i, v := range x {
		sc = sc.with(v)
		work[i] = v
	}
	multiSelect(work, 0, ks, 2*bits.Len(uint(len(work))))
	vals := make([]float64, len(ks))
	for i, k := range ks {
		vals[i] = work[k]
	}
	return vals, sc
}

// band is a bracket [lo, hi] of values that should hold the ranks ks.
type band struct {
	lo, hi float64
	ks     []int
	keep   []float64
}

func orderStatsSampled(x []float64, ks []int) ([]float64, scan, bool) {
	const size = 1 << 15
	// ±5 standard deviations of a sample rank (at most √size/2) either
	// side: a miss is very unlikely and only costs the plain path.
	const spread = 5 * 91
	n := len(x)
	rng := rand.New(rand.NewPCG(19751, 489))
	sample := make([]float64, size)
	for i := range sample {
		sample[i] = x[rng.IntN(n)]
	}
	slices.Sort(sample)
	var bands []band
	for _, k := range ks {
		c := int(float64(k) / float64(n) * size)
		lo, hi := sample[max(c-spread, 0)], sample[min(c+spread, size-1)]
		if m := len(bands) - 1; m >= 0 && lo <= bands[m].hi {
			bands[m].hi = max(bands[m].hi, hi)
			bands[m].ks = append(bands[m].ks, k)
			continue
		}
		bands = append(bands, band{lo: lo, hi: hi, ks: []int{k}})
	}
	if len(bands) > 3 {
		return nil, scan{}, false
	}
	// Unused brackets sit at +Inf so that no finite value reaches them.
	var lo [3]float64
	top := [4]float64{math.Inf(-1), math.Inf(1), math.Inf(1), math.Inf(1)}
	for i := range lo {
		lo[i] = math.Inf(1)
		if i < len(bands) {
			lo[i], top[i+1] = bands[i].lo, bands[i].hi
			bands[i].keep = make([]float64, 0, n/size*(2*spread+1)*5/4+64)
		}
	}
	lo0, lo1, lo2 := lo[0], lo[1], lo[2]
	budget := n / 4       // values kept before giving up for the plain path
	var at0, at1, at2 int // values ≥ each bracket's lower end
	sc := scan{min: x[0], max: x[0]}
	for _, v := range x {
		sc = sc.with(v)
		// Comparisons turned into counts rather than branches keep the
		// CPU from mispredicting on every value; only the rare "inside a
		// bracket" case branches. k brackets start at or below v, so v
		// is inside bracket k−1 when it is also ≤ that bracket's top.
		a0, a1, a2 := b2i(v >= lo0), b2i(v >= lo1), b2i(v >= lo2)
		at0 += a0
		at1 += a1
		at2 += a2
		k := a0 + a1 + a2
		if v <= top[k] {
			b := &bands[k-1]
			b.keep = append(b.keep, v)
			if budget--; budget < 0 {
				return nil, scan{}, false
			}
		}
	}
	atLeast := [3]int{at0, at1, at2}
	vals := make([]float64, 0, len(ks))
	for i := range bands {
		below := n - atLeast[i] // values under bracket i
		b := &bands[i]
		if b.ks[0] < below || b.ks[len(b.ks)-1] >= below+len(b.keep) {
			return nil, scan{}, false
		}
		multiSelect(b.keep, below, b.ks, 2*bits.Len(uint(len(b.keep))))
		for _, k := range b.ks {
			vals = append(vals, b.keep[k-below])
		}
	}
	return vals, sc, true
}

func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}
