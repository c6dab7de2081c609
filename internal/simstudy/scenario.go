// Package simstudy is the simulation battery that checks the projection's
// cover promise against known truth (issue 8, item 6). Each Scenario is an
// invented ward whose per-patient care-time distributions are known; a
// replication draws an observation history from it, runs a projection
// method on that history, and measures the true chance that the next
// shift's care does not fit under the recommended headcount. Run averages
// that over replications and compares the recommendation with the oracle,
// the smallest headcount that truly meets the cover level.
//
// Everything is seeded: the same Config gives the same table.
package simstudy

import (
	"fmt"
	"hash/fnv"
	"math"

	"wardload/internal/stats"
)

// Fixed conditions of every scenario (the brief of issue 8, item 6): a
// 12-hour shift observed over its whole length, 80% of a nurse's time
// given to direct care (our choice for the battery, not a standard), a
// cover level of 0.9 and a 90% band.
const (
	ShiftHours         = 12.0
	DirectCareFraction = 0.8
	Cover              = 0.9
	// ProjectedDate is the date of the projected shift; observation dates
	// count back from it.
	ProjectedDate = "2026-03-02"
	// DefaultLookbackDays is ten weeks.
	DefaultLookbackDays = 70
	// MinGroup and MaxGroup bound the observations one dated shift holds.
	MinGroup, MaxGroup = 2, 6
)

// ShiftNames are the two 12-hour shifts of a day.
var ShiftNames = []string{"Day", "Night"}

// TierSpec is one tier of a scenario: its census on the projected shift,
// how many observations its history holds, and the true distribution of
// one patient's care minutes per shift at the projected date.
type TierSpec struct {
	Code     string
	Patients int
	Obs      int
	Dist     Dist
}

// Scenario is an invented ward with known truth. The care minutes of
// patient i of tier k on shift occurrence g, t_g days before the projected
// date (t_g ≤ 0), are
//
//	y = Y_ki · e^(b_g) · (1 + Drift)^(t_g/28),   Y_ki ~ Dist_k,  b_g ~ N(0, ShiftSD²)
//
// so at the projected date (t = 0) the drift factor is 1 and the next
// shift's total is e^b · Σ_k Σ_{i≤n_k} Y_ki with a fresh b.
type Scenario struct {
	Name  string
	About string
	Tiers []TierSpec
	// ShiftSD is τ, the SD of the log-scale effect every patient of one
	// shift shares; 0: none.
	ShiftSD float64
	// Drift is the relative rise of care time per 28 days (0.15: 15%).
	Drift float64
	// LookbackDays is the span the history's dates are drawn from (1 to
	// LookbackDays days before the projected date); 0 means
	// DefaultLookbackDays.
	LookbackDays int
	// Floor is the ratio floor given to the methods; nil: none.
	Floor *stats.FloorSpec
	// EntryError plants one entry error: one observation of a tier with
	// patients is multiplied by 60.
	EntryError bool
}

// InCharge is 1 when the floor says the nurse in charge does not count
// towards the ratio and so gives no direct care, else 0. It is a fact of
// the ward, the same for every method judged.
func (s *Scenario) InCharge() int {
	if s.Floor != nil && !s.Floor.ChargeNurseCounts {
		return 1
	}
	return 0
}

// Lookback is LookbackDays or its default.
func (s *Scenario) Lookback() int {
	if s.LookbackDays > 0 {
		return s.LookbackDays
	}
	return DefaultLookbackDays
}

// Plentiful reports whether every tier with patients has at least
// stats.LowObservations (30) observations: there the recommendation must be
// close to the oracle and the projection must never decline.
func (s *Scenario) Plentiful() bool {
	for _, t := range s.Tiers {
		if t.Patients > 0 && t.Obs < stats.LowObservations {
			return false
		}
	}
	return true
}

// Census is the total number of patients.
func (s *Scenario) Census() int {
	n := 0
	for _, t := range s.Tiers {
		n += t.Patients
	}
	return n
}

// ObsText says the observations per tier, "40" or "8/8/30".
func (s *Scenario) ObsText() string {
	text, same := "", true
	for i, t := range s.Tiers {
		if i > 0 {
			text += "/"
			same = same && t.Obs == s.Tiers[0].Obs
		}
		text += fmt.Sprint(t.Obs)
	}
	if same && len(s.Tiers) > 0 {
		return fmt.Sprint(s.Tiers[0].Obs)
	}
	return text
}

// Seed is the scenario's own seed, derived from the base seed and its
// name, so a scenario run alone gives the same numbers as in the full
// battery.
func (s *Scenario) Seed(base uint64) uint64 {
	h := fnv.New64a()
	h.Write([]byte(s.Name))
	return h.Sum64() ^ base
}

// validate checks that the scenario can be drawn: tier codes, counts, and
// enough dated shift occurrences for its observations in groups of at
// least MinGroup.
func (s *Scenario) validate() error {
	if len(s.Tiers) == 0 {
		return fmt.Errorf("scenario %s: no tiers", s.Name)
	}
	total := 0
	seen := map[string]bool{}
	for _, t := range s.Tiers {
		if t.Code == "" || seen[t.Code] || t.Patients < 0 || t.Obs < 0 || t.Dist == nil {
			return fmt.Errorf("scenario %s: bad tier %q", s.Name, t.Code)
		}
		if t.Patients > 0 && t.Obs < 2 {
			return fmt.Errorf("scenario %s: tier %s has patients and fewer than 2 observations", s.Name, t.Code)
		}
		seen[t.Code] = true
		total += t.Obs
	}
	if total < MinGroup {
		return fmt.Errorf("scenario %s: fewer than %d observations", s.Name, MinGroup)
	}
	if groups := total / MinGroup; groups > len(ShiftNames)*s.Lookback() {
		return fmt.Errorf("scenario %s: %d observations may need %d shifts, the lookback has %d", s.Name, total, groups, len(ShiftNames)*s.Lookback())
	}
	if s.ShiftSD < 0 || s.Drift <= -1 || math.IsNaN(s.ShiftSD+s.Drift) {
		return fmt.Errorf("scenario %s: bad shift effect or drift", s.Name)
	}
	return nil
}

// Tier distributions of the battery, per patient per 12-hour shift. The
// numbers are invented to look like a general ward (a low, a middle and a
// high acuity tier with means near 60, 120 and 240 minutes), not taken
// from any source.
var (
	lowLogNormal  = LogNormal{MeanLog: math.Log(50), SDLog: 0.5}
	midLogNormal  = LogNormal{MeanLog: math.Log(100), SDLog: 0.6}
	highLogNormal = LogNormal{MeanLog: math.Log(200), SDLog: 0.7}

	lowGamma  = Gamma{Shape: 2, Scale: 30}
	midGamma  = Gamma{Shape: 3, Scale: 40}
	highGamma = Gamma{Shape: 4, Scale: 60}

	// Two kinds of patient in one tier (for example post-operative day 1
	// and day 3): bimodal.
	lowMixture  = Mixture{P: 0.8, A: LogNormal{math.Log(40), 0.3}, B: LogNormal{math.Log(120), 0.3}}
	midMixture  = Mixture{P: 0.7, A: LogNormal{math.Log(80), 0.3}, B: LogNormal{math.Log(220), 0.3}}
	highMixture = Mixture{P: 0.6, A: LogNormal{math.Log(180), 0.3}, B: LogNormal{math.Log(330), 0.25}}

	lowLogT  = LogT{Loc: math.Log(50), Scale: 0.4, DF: 3, Max: 1440}
	midLogT  = LogT{Loc: math.Log(100), Scale: 0.4, DF: 3, Max: 1440}
	highLogT = LogT{Loc: math.Log(200), Scale: 0.4, DF: 3, Max: 1440}
)

// ward builds the three tiers low/mid/high with the given census and
// observations, from the "standard ward" distributions (lognormal low,
// gamma middle, mixture high) unless dists are given.
func ward(patients [3]int, obs [3]int, dists ...Dist) []TierSpec {
	if dists == nil {
		dists = []Dist{lowLogNormal, midGamma, highMixture}
	}
	codes := []string{"low", "mid", "high"}
	tiers := make([]TierSpec, 3)
	for k := range tiers {
		tiers[k] = TierSpec{Code: codes[k], Patients: patients[k], Obs: obs[k], Dist: dists[k]}
	}
	return tiers
}

func each(m int) [3]int { return [3]int{m, m, m} }

// standardCensus is 16 patients: 6 low, 6 middle, 4 high.
var standardCensus = [3]int{6, 6, 4}

// Scenarios returns the battery, in table order. Each call builds fresh
// values.
func Scenarios() []*Scenario {
	return []*Scenario{
		{Name: "gamma", About: "gamma tiers, 40 obs", Tiers: ward(standardCensus, each(40), lowGamma, midGamma, highGamma)},
		{Name: "lognormal", About: "lognormal tiers, 40 obs", Tiers: ward(standardCensus, each(40), lowLogNormal, midLogNormal, highLogNormal)},
		{Name: "mixture", About: "two-component mixture tiers, 40 obs", Tiers: ward(standardCensus, each(40), lowMixture, midMixture, highMixture)},
		{Name: "heavy-tail", About: "log-t (3 df) tiers, capped at 1440 min, 40 obs", Tiers: ward(standardCensus, each(40), lowLogT, midLogT, highLogT)},
		{Name: "tiny-2", About: "2 obs per tier", Tiers: ward(standardCensus, each(2))},
		{Name: "tiny-3", About: "3 obs per tier", Tiers: ward(standardCensus, each(3))},
		{Name: "tiny-5", About: "5 obs per tier", Tiers: ward(standardCensus, each(5))},
		{Name: "tiny-8", About: "8 obs per tier", Tiers: ward(standardCensus, each(8))},
		{Name: "plentiful-30", About: "30 obs per tier", Tiers: ward(standardCensus, each(30))},
		{Name: "plentiful-60", About: "60 obs per tier", Tiers: ward(standardCensus, each(60))},
		{Name: "plentiful-200", About: "200 obs per tier over 22 weeks", Tiers: ward(standardCensus, each(200)), LookbackDays: 154},
		{Name: "census-40-obs8", About: "40 patients on 8 obs per tier", Tiers: ward([3]int{16, 14, 10}, each(8))},
		{Name: "census-40", About: "40 patients, 40 obs per tier", Tiers: ward([3]int{16, 14, 10}, each(40))},
		{Name: "census-100", About: "100 patients, 60 obs per tier", Tiers: ward([3]int{40, 35, 25}, each(60))},
		{Name: "one-patient", About: "1 patient (middle tier), 30 obs per tier", Tiers: ward([3]int{0, 1, 0}, each(30))},
		{Name: "shift-effect", About: "shift-level effect τ = 0.25, 40 obs", Tiers: ward(standardCensus, each(40)), ShiftSD: 0.25},
		{Name: "drift", About: "care time +15% per 4 weeks over 10 weeks, 40 obs", Tiers: ward(standardCensus, each(40)), Drift: 0.15},
		{Name: "charge-nurse", About: "nurse in charge does not count (floor 50 patients/nurse), 40 obs", Tiers: ward(standardCensus, each(40)),
			Floor: &stats.FloorSpec{PatientsPerNurse: 50, ChargeNurseCounts: false}},
		{Name: "entry-error", About: "one observation ×60, 40 obs", Tiers: ward(standardCensus, each(40)), EntryError: true},
	}
}

// Find returns the scenario with the given name, or nil.
func Find(name string) *Scenario {
	for _, s := range Scenarios() {
		if s.Name == name {
			return s
		}
	}
	return nil
}
