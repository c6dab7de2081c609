package stats

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"wardload/internal/wardload"
)

// Decided-by values of Nurses.DecidedBy.
const (
	DecidedByCover = "cover"       // the simulated need at the cover level is higher
	DecidedByFloor = "ratio_floor" // the configured ratio floor is higher
	DecidedByBoth  = "both"        // they are equal
	// DecidedByInsufficient: too few observations to estimate care time;
	// the recommendation is the ratio floor, or none without a floor.
	DecidedByInsufficient = wardload.DeclinedDecision
)

// ceilTolerance is the relative slack of ceilNurses: a need of
// 7.0000000001 nurses is float noise from dividing minutes that add up to
// exactly 7 shifts, not a reason to call an eighth nurse. 1e-9 is far below
// any real difference in care minutes (a 1e-9 share of a shift is well
// under a millisecond) and far above double rounding error (about 1e-16).
const ceilTolerance = 1e-9

// ceilNurses rounds a nurse count up, treating values within a relative
// 1e-9 above an integer as that integer, and never below 0 (a normal
// quantile below zero minutes, possible for a cover level under 0.5, needs
// no nurses rather than a negative number):
//
//	max(0, ceil(x − 1e-9·max(1, |x|)))
func ceilNurses(x float64) int {
	return max(0, int(math.Ceil(x-float64(ceilTolerance*math.Max(1, math.Abs(x))))))
}

// Band is a central normal band of the shift's total care minutes.
type Band struct {
	Level float64 `json:"level"`
	Low   float64 `json:"low"`
	High  float64 `json:"high"`
}

// Simulation summarises the bootstrap totals. Quantiles are Hyndman & Fan
// type 7; standard errors are Monte Carlo errors of the simulation, not of
// the model, and are null when they cannot be formed.
type Simulation struct {
	Draws          int     `json:"draws"`
	Seed           uint64  `json:"seed"`
	Mean           float64 `json:"mean"`
	P10            float64 `json:"p10"`
	P50            float64 `json:"p50"`
	P90            float64 `json:"p90"`
	Cover          float64 `json:"cover"` // q-quantile at the cover level
	MeanSE         Number  `json:"mean_se"`
	P10SE          Number  `json:"p10_se"`
	P50SE          Number  `json:"p50_se"`
	P90SE          Number  `json:"p90_se"`
	CoverSE        Number  `json:"cover_se"`
	QuantileMethod string  `json:"quantile_method"`
}

// FloorUsed restates the ratio floor a projection applied, so every
// result shows it.
type FloorUsed struct {
	PatientsPerNurse     *float64           `json:"patients_per_nurse"` // ward-wide; null if only per tier
	TierPatientsPerNurse map[string]float64 `json:"tier_patients_per_nurse,omitempty"`
	ChargeNurseCounts    bool               `json:"charge_nurse_counts"`
	Nurses               int                `json:"nurses"`
	Description          string             `json:"description"`
}

// countAbove returns, for each of the ascending thresholds, how many
// values exceed it, in one pass over values with a binary search each
// (O(N log R) rather than O(N·R) for R thresholds).
func countAbove(values, thresholds []float64) []int {
	// hist[i] counts values above exactly the first i thresholds.
	hist := make([]int, len(thresholds)+1)
	for _, v := range values {
		hist[sort.SearchFloat64s(thresholds, v)]++
	}
	above := make([]int, len(thresholds))
	run := 0
	for i := len(thresholds) - 1; i >= 0; i-- {
		run += hist[i+1]
		above[i] = run
	}
	return above
}

// normalExceed returns P(T > x) for T ~ Normal(mu, sd²); a zero sd is a
// point mass at mu.
func normalExceed(x, mu, sd float64) float64 {
	if sd == 0 {
		if mu > x {
			return 1
		}
		return 0
	}
	return NormalUpperTail((x - mu) / sd)
}

// ratioFloor applies the configured floor to the census. Tiers with their
// own ratio are rounded up separately; the others are pooled under the
// ward ratio (one ceiling for the pool, as a ward-wide ratio counts all its
// patients together).
func ratioFloor(f *FloorSpec, tiers []TierSample, warnings *[]string) *FloorUsed {
	used := &FloorUsed{ChargeNurseCounts: f.ChargeNurseCounts}
	var parts []string
	for _, t := range tiers {
		if r, ok := f.TierPatientsPerNurse[t.Code]; ok {
			parts = append(parts, fmt.Sprintf("tier %s at most %g patients per nurse", t.Code, r))
			continue
		}
		if f.PatientsPerNurse == 0 && t.Patients > 0 {
			*warnings = append(*warnings, fmt.Sprintf(
				"Tier %s has no ratio floor configured; its patients add nothing to the floor.", t.Code))
		}
	}
	if len(f.TierPatientsPerNurse) > 0 {
		used.TierPatientsPerNurse = f.TierPatientsPerNurse
	}
	if r := f.PatientsPerNurse; r > 0 {
		used.PatientsPerNurse = &r
		parts = append([]string{fmt.Sprintf("at most %g patients per nurse", r)}, parts...)
	}
	if !f.ChargeNurseCounts {
		parts = append(parts, "plus 1 nurse in charge who does not count towards the ratio")
	} else {
		parts = append(parts, "the nurse in charge counts towards the ratio")
	}
	used.Nurses = floorNurses(f, tiers)
	used.Description = "Configured ratio floor: " + strings.Join(parts, "; ") + "."
	return used
}

// floorNurses is the headcount of the ratio floor f for the census tiers:
// each tier with its own ratio rounded up on its own, the others pooled
// under the ward ratio, plus 1 for a nurse in charge who does not count.
func floorNurses(f *FloorSpec, tiers []TierSample) int {
	n, pooled := 0, 0
	for _, t := range tiers {
		if r, ok := f.TierPatientsPerNurse[t.Code]; ok {
			n += ceilNurses(float64(t.Patients) / r)
			continue
		}
		pooled += t.Patients
	}
	if r := f.PatientsPerNurse; r > 0 {
		n += ceilNurses(float64(pooled) / r)
	}
	if !f.ChargeNurseCounts {
		n++
	}
	return n
}

// recommend sets the recommended headcount: the larger of the cover
// headcount head and n.Floor (when set), with which of them decided it
// (both when they are equal). It returns the recommendation.
func recommend(n *Nurses, head int) int {
	rec := head
	n.DecidedBy = DecidedByCover
	if n.Floor != nil {
		switch {
		case *n.Floor > head:
			rec = *n.Floor
			n.DecidedBy = DecidedByFloor
		case *n.Floor == head:
			n.DecidedBy = DecidedByBoth
		}
	}
	n.Recommended = &rec
	return rec
}
