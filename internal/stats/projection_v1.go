package stats

import (
	"fmt"
	"math"

	"wardload/internal/wardload"
)

// MethodVersionV1 is the first workload model: a normal analytic model
// beside a two-level bootstrap that decided the headcount. It is frozen so
// that projections stored under it recompute byte for byte (Recompute);
// new projections use Project (MethodVersion). Do not change anything in
// this file.
const MethodVersionV1 = "wardload-model/1"

// cautionV1 is the caution text version 1 stored with its results.
const cautionV1 = "This is a statistical estimate of care workload from past timed observations, not a staffing decision. " +
	"Local staffing law, collective agreements and the judgement of licensed clinical staff come first. " +
	"The ratio floor shown is the one configured in wardload; check it against the rules that apply to your ward and shift."

// v1NurseHours are nurse hours needed on the shift: care minutes ÷ 60 ÷
// direct-care fraction.
type v1NurseHours struct {
	Expected       float64 `json:"expected"`        // at the expected total
	Cover          float64 `json:"cover"`           // at the normal q-quantile μ + z_q·sd
	CoverSimulated float64 `json:"cover_simulated"` // at the bootstrap q-quantile
}

// v1Nurses are headcounts: nurse hours ÷ shift hours, unrounded and rounded
// up (see ceilNurses).
type v1Nurses struct {
	ExpectedUnrounded       float64 `json:"expected_unrounded"`
	Expected                int     `json:"expected"`
	CoverUnrounded          float64 `json:"cover_unrounded"`
	Cover                   int     `json:"cover"`
	CoverSimulatedUnrounded float64 `json:"cover_simulated_unrounded"`
	CoverSimulated          int     `json:"cover_simulated"`
	Floor                   *int    `json:"floor"` // null when no ratio floor is configured
	Recommended             int     `json:"recommended"`
	DecidedBy               string  `json:"decided_by"`
}

// v1Shortfall is the chance that the shift's care minutes exceed what a
// headcount can give.
type v1Shortfall struct {
	Nurses               int     `json:"nurses"`
	CapacityMinutes      float64 `json:"capacity_minutes"`      // nurses × shift hours × 60 × direct-care fraction
	Probability          float64 `json:"probability"`           // normal model
	SimulatedProbability float64 `json:"simulated_probability"` // share of bootstrap totals above capacity
	SimulatedSE          float64 `json:"simulated_se"`          // √(p(1−p)/draws)
}

// ProjectionV1 is the workload model's result for one shift. Its JSON form
// is what `wardload project --json` prints.
type ProjectionV1 struct {
	MethodVersion      string        `json:"method_version"`
	ShiftHours         float64       `json:"shift_hours"`
	DirectCareFraction float64       `json:"direct_care_fraction"`
	CoverLevel         float64       `json:"cover_level"`
	Patients           int           `json:"patients"`
	ExpectedMinutes    float64       `json:"expected_minutes"`
	VariancePatient    float64       `json:"variance_patient"`
	VarianceEstimate   float64       `json:"variance_estimate"`
	SDMinutes          float64       `json:"sd_minutes"`
	CoverMinutes       float64       `json:"cover_minutes"` // μ + z_q·sd
	Tiers              []TierMoments `json:"tiers"`
	Bands              []Band        `json:"bands"`
	Simulation         Simulation    `json:"simulation"`
	NurseHours         v1NurseHours  `json:"nurse_hours"`
	Nurses             v1Nurses      `json:"nurses"`
	Floor              *FloorUsed    `json:"floor_used"` // null when no floor is configured
	Shortfall          []v1Shortfall `json:"shortfall"`
	Warnings           []string      `json:"warnings"`
	Caution            string        `json:"caution"`
}

// Project estimates the direct care minutes of one shift and the nurses
// they need. With y the per-patient shift minutes (ShiftMinutes), μ and
// sd from WorkloadMoments, q the cover level, f the direct-care fraction
// and h the shift hours:
//
//	band(L)        = μ ± Φ⁻¹((1+L)/2)·sd                       (normal approximation)
//	cover minutes  = μ + Φ⁻¹(q)·sd,   simulated: type-7 q-quantile of BootstrapTotals
//	nurse hours    = minutes ÷ 60 ÷ f
//	nurses         = nurse hours ÷ h,  rounded up by ceil(x − 1e-9·max(1,|x|))
//	floor          = Σ_k ceil(n_k ÷ r_k) + ceil(pooled ÷ r) [+ 1 if the nurse in charge does not count]
//	recommended    = max(simulated cover nurses, floor)
//	shortfall(N)   = P(T > N·h·60·f):  normal 1 − Φ((cap − μ)/sd), simulated share of totals
//
// where tiers with their own ratio r_k are rounded separately and the rest
// are pooled under the ward ratio r. The recommendation uses the bootstrap
// quantile because with few patients and right-skewed care times the normal
// upper tail is too light; the normal figures are shown beside it.
//
// Bad input returns a *wardload.Error with code EINVALID whose Field names
// the input (shift_hours, direct_care_fraction, levels, cover_level, draws,
// census, tier, care_minutes, window_hours, nurses_to, patients_per_nurse).
// It panics only on programmer error (CareMinutes and WindowHours of
// different lengths). Input slices are not modified.
//
// References: newsvendor critical fractile, e.g. Porteus, E. L. (2002).
// Foundations of Stochastic Inventory Theory, ch. 1 (service level
// μ + z_q·σ); Hyndman, R. J. & Fan, Y. (1996). Sample quantiles in
// statistical packages. The American Statistician 50(4), 361–365.
func ProjectV1(in ProjectionInput) (*ProjectionV1, error) {
	if err := in.validateV1(); err != nil {
		return nil, err
	}
	p := &ProjectionV1{
		MethodVersion:      MethodVersionV1,
		ShiftHours:         in.ShiftHours,
		DirectCareFraction: in.DirectCareFraction,
		CoverLevel:         in.Cover,
		Caution:            cautionV1,
		Warnings:           []string{},
	}
	codes := make([]string, len(in.Tiers))
	patients := make([]int, len(in.Tiers))
	values := make([][]float64, len(in.Tiers))
	boot := make([]BootstrapTier, len(in.Tiers))
	scaled, observations := 0, 0
	for k, t := range in.Tiers {
		codes[k], patients[k] = t.Code, t.Patients
		values[k] = ShiftMinutes(t.CareMinutes, t.WindowHours, in.ShiftHours)
		boot[k] = BootstrapTier{Values: values[k], Patients: t.Patients}
		p.Patients += t.Patients
		observations += len(t.CareMinutes)
		for _, w := range t.WindowHours {
			if w != in.ShiftHours {
				scaled++
			}
		}
		if t.Patients > 0 && len(t.CareMinutes) < LowObservations {
			p.Warnings = append(p.Warnings, fmt.Sprintf(
				"Tier %s has only %d care observations (fewer than %d): its mean is uncertain, treat the projection as low confidence.",
				t.Code, len(t.CareMinutes), LowObservations))
		}
	}
	if scaled > 0 {
		p.Warnings = append(p.Warnings, fmt.Sprintf(
			"%d of %d observations were timed over windows other than the %g-hour shift; their minutes were scaled to the shift assuming care is spread evenly over time, which is not true where care clusters at certain hours.",
			scaled, observations, in.ShiftHours))
	}
	if p.Patients == 0 {
		p.Warnings = append(p.Warnings, "The census has no patients: the projected care workload is zero.")
	}

	// Analytic model.
	p.ExpectedMinutes, p.VariancePatient, p.VarianceEstimate, p.Tiers = WorkloadMoments(codes, patients, values)
	p.SDMinutes = math.Sqrt(p.VariancePatient + p.VarianceEstimate)
	mu, sd := p.ExpectedMinutes, p.SDMinutes
	p.Bands = make([]Band, len(in.Levels))
	for i, l := range in.Levels {
		z := TwoSidedZ(l)
		half := float64(z * sd) // no fused multiply-add: see WorkloadMoments
		p.Bands[i] = Band{Level: l, Low: mu - half, High: mu + half}
		if p.Bands[i].Low < 0 {
			p.Warnings = append(p.Warnings, fmt.Sprintf(
				"The %g%% normal band reaches below zero minutes: the normal approximation is poor here; rely on the simulated figures.", 100*l))
		}
	}
	p.CoverMinutes = mu + float64(NormalQuantile(in.Cover)*sd)

	// Simulation.
	totals := BootstrapTotals(boot, in.Draws, in.Seed)
	p.Simulation = summariseTotals(totals, in.Seed, in.Cover)
	if in.Draws < 1000 {
		p.Warnings = append(p.Warnings, fmt.Sprintf(
			"Only %d simulation draws: the simulated figures carry visible Monte Carlo error.", in.Draws))
	}

	// Nurses.
	perNurse := in.ShiftHours * 60 * in.DirectCareFraction
	hours := func(minutes float64) float64 { return minutes / 60 / in.DirectCareFraction }
	p.NurseHours = v1NurseHours{
		Expected:       hours(mu),
		Cover:          hours(p.CoverMinutes),
		CoverSimulated: hours(p.Simulation.Cover),
	}
	n := &p.Nurses
	n.ExpectedUnrounded = p.NurseHours.Expected / in.ShiftHours
	n.CoverUnrounded = p.NurseHours.Cover / in.ShiftHours
	n.CoverSimulatedUnrounded = p.NurseHours.CoverSimulated / in.ShiftHours
	// A tiny direct-care fraction (1e-320 passes "more than 0") makes the
	// counts +Inf, and ceilNurses(+Inf) is int(+Inf), not defined in Go: it
	// came out as 0 nurses recommended. Refuse counts past MaxNurses before
	// rounding any of them.
	for _, v := range []float64{n.ExpectedUnrounded, n.CoverUnrounded, n.CoverSimulatedUnrounded} {
		if !(v <= MaxNurses) {
			return nil, wardload.FieldErrorf(wardload.EINVALID, "direct_care_fraction",
				"The care time would need more than %d nurses at a direct-care fraction of %g; check the direct-care fraction.", MaxNurses, in.DirectCareFraction)
		}
	}
	n.Expected = ceilNurses(n.ExpectedUnrounded)
	n.Cover = ceilNurses(n.CoverUnrounded)
	n.CoverSimulated = ceilNurses(n.CoverSimulatedUnrounded)
	n.Recommended, n.DecidedBy = n.CoverSimulated, DecidedByCover
	if in.Floor == nil {
		p.Warnings = append(p.Warnings, "No ratio floor was configured: the recommendation rests on care time alone; check the minimum staffing that applies to this ward.")
	} else {
		p.Floor = ratioFloor(in.Floor, in.Tiers, &p.Warnings)
		floor := p.Floor.Nurses
		n.Floor = &floor
		switch {
		case floor > n.CoverSimulated:
			n.Recommended, n.DecidedBy = floor, DecidedByFloor
		case floor == n.CoverSimulated:
			n.DecidedBy = DecidedByBoth
		}
	}

	// Shortfall table.
	from, to := in.NursesFrom, in.NursesTo
	if from == 0 && to == 0 {
		from = n.Expected
		if n.Floor != nil {
			from = min(from, *n.Floor)
		}
		to = n.Recommended + 3
		from = max(from, to-MaxNursesInRange+1)
	}
	capacities := make([]float64, 0, to-from+1)
	for nurses := from; nurses <= to; nurses++ {
		capacities = append(capacities, float64(nurses)*perNurse)
	}
	above := countAbove(totals, capacities)
	p.Shortfall = make([]v1Shortfall, len(capacities))
	for i, capacity := range capacities {
		ps := float64(above[i]) / float64(len(totals))
		p.Shortfall[i] = v1Shortfall{
			Nurses:               from + i,
			CapacityMinutes:      capacity,
			Probability:          normalExceed(capacity, mu, sd),
			SimulatedProbability: ps,
			SimulatedSE:          math.Sqrt(ps * (1 - ps) / float64(len(totals))),
		}
	}
	return p, nil
}
