package simstudy

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"

	"gonum.org/v1/gonum/stat/distuv"

	"wardload/internal/stats"
)

// Method is a projection method under test: from a projection input it
// returns the recommended headcount, or ok false when it declines.
type Method struct {
	Name      string
	Recommend func(in stats.ProjectionInput) (nurses int, ok bool, err error)
}

// After is the current version (3), stats.Project. It declines when the
// projection says the data are insufficient or gives no recommendation.
var After = Method{Name: "v3 (after)", Recommend: func(in stats.ProjectionInput) (int, bool, error) {
	return recommend(stats.Project(in))
}}

// Previous is version 2, stats.ProjectV2, judged the same way.
var Previous = Method{Name: "v2 (previous)", Recommend: func(in stats.ProjectionInput) (int, bool, error) {
	return recommend(stats.ProjectV2(in))
}}

func recommend(p *stats.Projection, err error) (int, bool, error) {
	if err != nil {
		return 0, false, err
	}
	if !p.DataSufficient || p.Nurses.Recommended == nil {
		return 0, false, nil
	}
	return *p.Nurses.Recommended, true, nil
}

// Before is version 1, stats.ProjectV1: it ignores dates and shifts and
// never declines (it needs two observations per tier with patients, which
// every scenario has).
var Before = Method{Name: "v1 (before)", Recommend: func(in stats.ProjectionInput) (int, bool, error) {
	p, err := stats.ProjectV1(in)
	if err != nil {
		return 0, false, err
	}
	return p.Nurses.Recommended, true, nil
}}

// Config sets the size of a run.
type Config struct {
	Reps       int    // replications (histories) per scenario
	Draws      int    // simulation draws of each projection
	TruthDraws int    // Monte Carlo draws of the truth
	Seed       uint64 // base seed; each scenario derives its own (Scenario.Seed)
}

// Result is one method on one scenario.
type Result struct {
	Scenario *Scenario
	Method   string
	Oracle   int
	Reps     int
	Declined int
	// Shortfall and Recommended hold one entry per replication that did
	// not decline: the true shortfall at the recommendation and the
	// recommendation itself.
	Shortfall   []float64
	Recommended []int
}

// Run draws cfg.Reps histories of s and runs every method on each (the
// same history and projection seed for all methods, so before and after
// are paired). Replication i draws its history from PCG(seed, i) and gives
// the projection the seed splitmix(seed + i); the truth uses PCG(seed ⊕
// truthStream, c) for its chunks. An error of a method (it refused the
// input) stops the run.
func Run(s *Scenario, cfg Config, methods ...Method) ([]Result, error) {
	if err := s.validate(); err != nil {
		return nil, err
	}
	seed := s.Seed(cfg.Seed)
	truth := NewTruth(s, cfg.TruthDraws, seed^truthStream)
	oracle := truth.Oracle(s, Cover)

	type outcome struct {
		nurses []int
		ok     []bool
		err    error
	}
	outcomes := make([]outcome, cfg.Reps)
	next := make(chan int, cfg.Reps)
	for i := range cfg.Reps {
		next <- i
	}
	close(next)
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), max(cfg.Reps, 1)) {
		wg.Go(func() {
			for i := range next {
				r := rand.New(rand.NewPCG(seed, uint64(i)))
				in, _ := s.History(r, cfg.Draws, splitmix(seed+uint64(i)))
				o := outcome{nurses: make([]int, len(methods)), ok: make([]bool, len(methods))}
				for m, method := range methods {
					n, ok, err := method.Recommend(in)
					if err != nil {
						o.err = fmt.Errorf("scenario %s, replication %d, %s: %w", s.Name, i, method.Name, err)
						break
					}
					o.nurses[m], o.ok[m] = n, ok
				}
				outcomes[i] = o
			}
		})
	}
	wg.Wait()

	results := make([]Result, len(methods))
	for m, method := range methods {
		results[m] = Result{Scenario: s, Method: method.Name, Oracle: oracle, Reps: cfg.Reps}
	}
	for _, o := range outcomes {
		if o.err != nil {
			return nil, o.err
		}
		for m := range methods {
			res := &results[m]
			if !o.ok[m] {
				res.Declined++
				continue
			}
			res.Recommended = append(res.Recommended, o.nurses[m])
			res.Shortfall = append(res.Shortfall, truth.Exceed(s.Capacity(o.nurses[m])))
		}
	}
	return results, nil
}

// truthStream separates the truth's random streams from the histories'.
const truthStream = 0x7275746873747265

// splitmix is SplitMix64's output function (Steele, Lea & Flood 2014,
// "Fast splittable pseudorandom number generators", OOPSLA), used to give
// each replication an unrelated projection seed.
func splitmix(x uint64) uint64 {
	x += 0x9e3779b97f4a7c15
	x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9
	x = (x ^ (x >> 27)) * 0x94d049bb133111eb
	return x ^ (x >> 31)
}

// DeclinedShare is the share of replications that declined.
func (r *Result) DeclinedShare() float64 {
	if r.Reps == 0 {
		return math.NaN()
	}
	return float64(r.Declined) / float64(r.Reps)
}

// MeanShortfall is the mean true shortfall over replications that did not
// decline, with its standard error sd/√R (n−1 SD); NaN when all declined
// (the SE also when only one did not).
func (r *Result) MeanShortfall() (mean, se float64) { return meanSE(r.Shortfall) }

// MeanRecommended is the mean recommended headcount over replications
// that did not decline, with its standard error.
func (r *Result) MeanRecommended() (mean, se float64) {
	x := make([]float64, len(r.Recommended))
	for i, n := range r.Recommended {
		x[i] = float64(n)
	}
	return meanSE(x)
}

func meanSE(x []float64) (mean, se float64) {
	if len(x) == 0 {
		return math.NaN(), math.NaN()
	}
	for _, v := range x {
		mean += v
	}
	mean /= float64(len(x))
	if len(x) < 2 {
		return mean, math.NaN()
	}
	var ss float64
	for _, v := range x {
		ss += (v - mean) * (v - mean)
	}
	return mean, math.Sqrt(ss / float64(len(x)-1) / float64(len(x)))
}

// The pass rule of issue 8, item 6, at cover level q:
//
//   - the mean true shortfall at the recommendation is at most
//     (1 − q) + ShortfallMargin;
//   - where every tier with patients has ≥ 30 observations (Plentiful),
//     the mean recommendation is at most OracleMargin nurses above the
//     oracle, and no replication declines.
//
// The oracle margin is one-sided. The issue states it as "within 0.6
// nurses ... (no wasting nurses to look safe)": its purpose is to catch
// waste. A mean below the oracle is already judged by the shortfall rule.
// In shift-effect, for example, the oracle of 6 sits on a jump: 5 nurses
// are short on about 11% of shifts, 6 on about 3%. A method that picks 5
// on some histories keeps the promise (0.09) and is not wasting nurses.
const (
	ShortfallMargin = 0.02
	OracleMargin    = 0.6
)

// Failures returns the parts of the pass rule r breaks, as sentences; none
// means it passes. With confidence 0 the rule is applied to the point
// estimates (the bench). With confidence c in (0, 1) a mean fails only if
// its one-sided c-level Student-t bound, mean ∓ t_{c,R−1}·SE, is still
// beyond the limit: the replications are a random sample, and this says
// "the rule is broken beyond the Monte Carlo error of R replications"
// (the quick test, with few replications). The limits themselves never
// move. A scenario where every replication declined has no shortfall to
// judge; declining there breaks the rule only where the scenario is
// plentiful.
func (r *Result) Failures(cover, confidence float64) []string {
	var out []string
	slack := func(se float64, n int) float64 {
		if confidence == 0 || n < 2 || math.IsNaN(se) {
			return 0
		}
		return distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(n - 1)}.Quantile(confidence) * se
	}
	limit := 1 - cover + ShortfallMargin
	if mean, se := r.MeanShortfall(); !math.IsNaN(mean) && mean-slack(se, len(r.Shortfall)) > limit+exceedSlack {
		out = append(out, fmt.Sprintf("mean true shortfall %.3f (SE %.3f) is above %.2f", mean, se, limit))
	}
	if !r.Scenario.Plentiful() {
		return out
	}
	if r.Declined > 0 {
		out = append(out, fmt.Sprintf("declined %d of %d replications with ≥ %d observations in every tier", r.Declined, r.Reps, stats.LowObservations))
	}
	if mean, se := r.MeanRecommended(); !math.IsNaN(mean) && mean-float64(r.Oracle)-slack(se, len(r.Recommended)) > OracleMargin {
		out = append(out, fmt.Sprintf("mean recommended %.2f (SE %.2f) is more than %.1f above the oracle %d", mean, se, OracleMargin, r.Oracle))
	}
	return out
}
