// Package pool sizes a float pool of nurses for wards whose shifts run at
// the same time, from each ward's law of the headcount it needs (the
// shortfall table a stored projection holds), by risk pooling: floats go
// where they are needed, so only the hospital's total unmet need has to be
// covered, not each ward's own tail. It is pure: no I/O, no clock, seeded
// randomness. It imports the standard library, gonum (through
// internal/stats) and the domain's error type only.
//
// Every figure is an estimate that defers to local staffing law,
// collective agreements and licensed clinical judgement.
package pool

import (
	"math"

	"wardload/internal/wardload"
)

// probTol is the slack in comparing a probability with 1 − cover or in
// checking that a law sums to 1: rounding in sums of a few hundred terms,
// far below any Monte Carlo error.
const probTol = 1e-12

// MaxHeadcount bounds a headcount in a Need (a law with a support beyond
// it is a typing error, not a ward).
const MaxHeadcount = 1000

// Need is the law of the headcount one ward needs on one shift:
//
//	P(need = From + i) = PMF[i],  i = 0 … len(PMF)−1
//	P(need > From + len(PMF) − 1) = Beyond   (where it lies is unknown)
//
// Beyond is mass the source could not place (a shortfall table stops a few
// nurses above the recommendation); every calculation here counts it as
// short whatever the floats, so results err on the side of more floats.
type Need struct {
	Ward   string
	Floor  int // the ratio floor's headcount; 0 without one. The need is never below it.
	From   int
	PMF    []float64
	Beyond float64
}

// Last is the largest headcount with a known mass.
func (n Need) Last() int { return n.From + len(n.PMF) - 1 }

// Above returns P(need > m), Beyond included.
func (n Need) Above(m int) float64 {
	p := n.Beyond
	for i := len(n.PMF) - 1; i >= 0 && n.From+i > m; i-- {
		p += n.PMF[i]
	}
	return min(1, p)
}

// NewNeed checks a law given directly: From ≥ 0, From + len(pmf) − 1 ≤
// MaxHeadcount, every mass finite and ≥ 0, Beyond in [0, 1], and
// Σ pmf + Beyond = 1 within 1e-12 per term. The floor, if any, is applied
// as in ApplyFloor. Returns EINVALID naming "need" otherwise.
func NewNeed(ward string, from int, pmf []float64, beyond float64, floor int) (Need, error) {
	if from < 0 || len(pmf) == 0 || from+len(pmf)-1 > MaxHeadcount || floor < 0 || floor > MaxHeadcount {
		return Need{}, wardload.FieldErrorf(wardload.EINVALID, "need",
			"Ward %s: the headcounts of its need must lie between 0 and %d.", ward, MaxHeadcount)
	}
	sum := beyond
	for _, p := range pmf {
		if !(p >= 0) || math.IsInf(p, 0) {
			return Need{}, wardload.FieldErrorf(wardload.EINVALID, "need", "Ward %s: a chance in its need is not a probability.", ward)
		}
		sum += p
	}
	if !(beyond >= 0 && beyond <= 1) || math.Abs(sum-1) > probTol*float64(len(pmf)+1)*10 {
		return Need{}, wardload.FieldErrorf(wardload.EINVALID, "need", "Ward %s: the chances of its need do not add up to 1.", ward)
	}
	n := Need{Ward: ward, From: from, PMF: append([]float64(nil), pmf...), Beyond: beyond}
	return n.ApplyFloor(floor), nil
}

// ApplyFloor returns the law of max(need, floor): the mass of every
// headcount below the floor moves to the floor, since a ward is never
// staffed below its ratio floor whatever its care time says. Beyond is
// unchanged (it lies above the table, and so at or above the floor or
// unknown).
func (n Need) ApplyFloor(floor int) Need {
	out := Need{Ward: n.Ward, Floor: max(n.Floor, floor), Beyond: n.Beyond}
	if floor <= n.From {
		out.From, out.PMF = n.From, append([]float64(nil), n.PMF...)
		return out
	}
	out.From = floor
	last := max(n.Last(), floor)
	out.PMF = make([]float64, last-floor+1)
	for i, p := range n.PMF {
		out.PMF[max(0, n.From+i-floor)] += p
	}
	return out
}

// FromShortfall turns a projection's shortfall table into a Need: rows
// nurses[i] (consecutive, ascending) with shortfall[i] = P(care time of the
// shift exceeds what nurses[i] nurses give) = P(D > nurses[i]), D the
// headcount care time needs. Then, with a = nurses[0] and b the last row,
//
//	P(need = a)       = 1 − shortfall[0]          (all of D ≤ a placed at a)
//	P(need = n)       = shortfall[n−a−1] − shortfall[n−a],  a < n ≤ b
//	Beyond = P(D > b) = shortfall[last]
//
// and finally need = max(D, floor) (ApplyFloor). Placing D ≤ a at a
// overstates the need of a ward that could do with fewer than a nurses,
// which never lowers the pool. Preconditions: equal lengths ≥ 1,
// consecutive headcounts ≥ 0, chances in [0, 1] and not increasing (a
// stored table may rise by rounding only, < 1e-12). Returns EINVALID
// naming "need" otherwise.
func FromShortfall(ward string, nurses []int, shortfall []float64, floor int) (Need, error) {
	bad := func(format string, args ...any) (Need, error) {
		return Need{}, wardload.FieldErrorf(wardload.EINVALID, "need", "Ward %s: "+format, append([]any{ward}, args...)...)
	}
	if len(nurses) == 0 || len(nurses) != len(shortfall) {
		return bad("its projection has no shortfall table.")
	}
	pmf := make([]float64, len(nurses))
	prev := 1.0
	for i, s := range shortfall {
		if i > 0 && nurses[i] != nurses[i-1]+1 {
			return bad("the shortfall table's headcounts are not consecutive.")
		}
		if !(s >= 0 && s <= 1) || s > prev+probTol {
			return bad("the shortfall table's chances are not falling probabilities.")
		}
		s = min(s, prev)
		pmf[i] = prev - s
		prev = s
	}
	return NewNeed(ward, nurses[0], pmf, prev, floor)
}

// excess returns the law of max(0, need − staff) as masses on 0, 1, …
// (Beyond stays apart: it is unbounded).
func excess(n Need, staff int) []float64 {
	out := make([]float64, max(1, n.Last()-staff+1))
	for i, p := range n.PMF {
		out[max(0, n.From+i-staff)] += p
	}
	return out
}
