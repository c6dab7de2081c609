package pool

import (
	"math"

	"wardload/internal/wardload"
)

// Ward is one ward in the pool: its need and the nurses it has (on duty,
// or planned) before any float is sent.
type Ward struct {
	Need  Need
	Staff int
}

// Result is the float pool for a set of wards at one cover level.
type Result struct {
	Method string  // "exact" (convolution) or "simulation"
	Rho    float64 // common correlation of the wards' needs (0: independent)
	Cover  float64
	Floats int // F: the smallest pool with P(short) ≤ 1 − cover
	// Short is P(Σ_w max(0, need_w − staff_w) > F): the chance that some
	// ward is still short after the floats are deployed. ShortFewer is the
	// same with F − 1 floats (above 1 − cover; NaN when F = 0).
	Short, ShortFewer float64
	// ShortLow and ShortHigh bound Short: equal to it for "exact"; the
	// 95% Wilson interval for "simulation".
	ShortLow, ShortHigh float64
	Draws, ShortDraws   int // simulation only: draws, and how many were short at F
	// Unplaced is P(some ward's need lies beyond its table), counted as
	// short whatever F (see Need.Beyond).
	Unplaced float64
	// Buffers[w] is ward w's own buffer (Buffer): the extra nurses it
	// would need if it were staffed alone to the cover level;
	// SumBuffers = Σ Buffers and Gain = SumBuffers − Floats.
	Buffers    []int
	SumBuffers int
	Gain       int
	// AnyShortBuffered is the chance that some ward is short when every
	// ward has its own buffer and no pool: 1 − Π_w (1 − P(need_w > staff_w
	// + b_w)) for independent wards; simulated under Rho otherwise.
	AnyShortBuffered float64
}

// Buffer returns the smallest b ≥ 0 with
//
//	P(need > staff + b) ≤ 1 − cover
//
// (Beyond counted as above): the newsvendor's critical-fractile headcount
// at service level `cover` (Porteus, E. L. (2002), Foundations of
// Stochastic Inventory Theory, ch. 1), less the staff the ward has. It
// returns EINVALID naming "cover" when Beyond alone exceeds 1 − cover, so
// no headcount in the law reaches the level.
func Buffer(w Ward, cover float64) (int, error) {
	if err := checkCover(cover); err != nil {
		return 0, err
	}
	if w.Need.Beyond > 1-cover+probTol {
		return 0, unreachable(w.Need.Ward)
	}
	for m := max(w.Staff, w.Need.From-1); ; m++ {
		if w.Need.Above(m) <= 1-cover+probTol {
			return m - w.Staff, nil
		}
	}
}

// Exact returns the float pool of independent wards by convolution. With
// X_w = max(0, need_w − staff_w) and S = Σ_w X_w (floats go where they are
// needed, and any float can work on any ward of the set),
//
//	c(s)         = (p_1 * p_2 * … * p_W)(s)   (discrete convolution of the X_w masses)
//	P(short | F) = 1 − Σ_{s ≤ F} c(s)
//	F            = min{ F ≥ 0 : P(short | F) ≤ 1 − cover }
//
// where p_w holds the masses of X_w whose need is placed (they sum to
// 1 − Beyond_w), so the mass U = 1 − Π_w (1 − Beyond_w) of some need lying
// beyond its table is counted as short for every F. This is the newsvendor critical fractile applied
// to the pooled shortfall, the risk-pooling argument of Eppen, G. D.
// (1979), "Effects of centralization on expected costs in a
// multi-location newsvendor problem", Management Science 25(5), 498–501:
// the pooled quantile of a sum grows like the square root of the number
// of independent locations, the sum of separate quantiles like the number.
// Preconditions: at least one ward, staff ≥ 0, cover in [0.5, 0.999].
// Returns EINVALID naming "cover" when U > 1 − cover (no pool reaches the
// level with these tables), or "wards"/"staff" for bad input.
func Exact(wards []Ward, cover float64) (*Result, error) {
	if err := checkWards(wards, cover); err != nil {
		return nil, err
	}
	sum := []float64{1}
	placed := 1.0
	for _, w := range wards {
		sum = convolve(sum, excess(w.Need, w.Staff))
		placed *= 1 - w.Need.Beyond
	}
	res := &Result{Method: "exact", Cover: cover, Unplaced: 1 - placed, ShortFewer: math.NaN()}
	if res.Unplaced > 1-cover+probTol {
		return nil, unreachable("")
	}
	// short(F) = 1 − Σ_{s ≤ F} c(s), accumulated upwards; the masses in
	// sum already carry the factor Π(1 − Beyond_w).
	cdf := 0.0
	for f, p := range sum {
		cdf += p
		short := max(0, 1-cdf)
		if short <= 1-cover+probTol {
			res.Floats, res.Short = f, short
			break
		}
		res.ShortFewer = short
	}
	res.ShortLow, res.ShortHigh = res.Short, res.Short
	anyOK := 1.0
	for _, w := range wards {
		b, err := Buffer(w, cover)
		if err != nil {
			return nil, err
		}
		res.Buffers = append(res.Buffers, b)
		res.SumBuffers += b
		anyOK *= 1 - w.Need.Above(w.Staff+b)
	}
	res.AnyShortBuffered = 1 - anyOK
	res.Gain = res.SumBuffers - res.Floats
	return res, nil
}

// convolve returns the law of the sum of two independent variables on
// 0, 1, … with laws a and b:  c[k] = Σ_i a[i]·b[k−i].
func convolve(a, b []float64) []float64 {
	c := make([]float64, len(a)+len(b)-1)
	for i, x := range a {
		if x == 0 {
			continue
		}
		for j, y := range b {
			c[i+j] += x * y
		}
	}
	return c
}

// MinCover and MaxCover bound the cover level, as a projection's.
const (
	MinCover = 0.5
	MaxCover = 0.999
)

func checkCover(cover float64) error {
	if !(cover >= MinCover && cover <= MaxCover) {
		return wardload.FieldErrorf(wardload.EINVALID, "cover", "The cover level must be between %g and %g.", MinCover, MaxCover)
	}
	return nil
}

func checkWards(wards []Ward, cover float64) error {
	if err := checkCover(cover); err != nil {
		return err
	}
	if len(wards) == 0 {
		return wardload.FieldErrorf(wardload.EINVALID, "wards", "Name at least one ward.")
	}
	for _, w := range wards {
		if w.Staff < 0 || w.Staff > MaxHeadcount {
			return wardload.FieldErrorf(wardload.EINVALID, "staff", "Ward %s: staff must be between 0 and %d.", w.Need.Ward, MaxHeadcount)
		}
		if len(w.Need.PMF) == 0 {
			return wardload.FieldErrorf(wardload.EINVALID, "need", "Ward %s has no need to pool.", w.Need.Ward)
		}
	}
	return nil
}

func unreachable(ward string) error {
	who := "the wards' shortfall tables stop"
	if ward != "" {
		who = "ward " + ward + "'s shortfall table stops"
	}
	return wardload.FieldErrorf(wardload.EINVALID, "cover",
		"No pool reaches this cover level: %s before the chance left beyond them falls under 1 − cover. Choose a lower cover level.", who)
}
