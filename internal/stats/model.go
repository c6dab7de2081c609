package stats

import (
	"math"
	"time"

	"wardload/internal/wardload"
)

// MethodVersion names the workload model, the simulation and its random
// streams. It is stored with every projection so that a stored result can
// be reproduced later; change it whenever a change to this package could
// change any number Project returns for the same input.
const MethodVersion = "wardload-model/4"

// MethodVersionV3 is the previous version of the model (ProjectV3):
// version 4 without census movement during the shift.
const MethodVersionV3 = "wardload-model/3"

// MethodVersionV2 is the previous version of the model (ProjectV2): the
// same model as version 3 with a sandwich standard error for the trend,
// 95% tests for the trend and the shift-level effect, and level draws that
// were not centred (see specV3 for the measured differences).
const MethodVersionV2 = "wardload-model/2"

// Caution is shown with every projection, in wardload's own words.
const Caution = "This is a statistical estimate of care workload from past timed observations, not a staffing decision. " +
	"Local staffing law, collective agreements and the judgement of licensed clinical staff come first. " +
	"The ratio floor shown is the one configured in wardload; check it against the rules that apply to your ward and shift."

// Limits on Project's input.
const (
	MaxDraws            = 10_000_000 // simulation draws; beyond this the run takes seconds and gains nothing visible
	MaxPatients         = 10_000     // per tier, as wardload.Census allows
	MaxNursesInRange    = 1000       // headcounts in the shortfall table
	MaxNurses           = 100_000    // largest headcount the shortfall table takes
	MaxShiftMinutes     = 1e7        // largest per-patient shift minutes after scaling; keeps every sum finite
	LowObservations     = 30         // fewer observations in a used tier gives a low-confidence warning (the n ≥ 30 rule of thumb: common practice, no source)
	minTierObservations = 2          // a used tier needs a sample SD
)

// TierSample is one acuity tier's input to Project: its census on the
// projected shift and its timed care observations. CareMinutes[i] was
// observed over WindowHours[i]; Project scales it to the shift (see
// ShiftMinutes). Observations must already be filtered (exclusions,
// lookback) by the caller.
type TierSample struct {
	Code        string    `json:"code"`         // tier code, unique within the input
	Patients    int       `json:"patients"`     // census, ≥ 0; a tier with 0 patients needs no observations
	CareMinutes []float64 `json:"care_minutes"` // direct care minutes per observation, ≥ 0
	WindowHours []float64 `json:"window_hours"` // window of each observation, in (0, 24]; same length as CareMinutes
	// Dates (YYYY-MM-DD) and Shifts name the shift occurrence of each
	// observation; optional (version 2 only). With them the model estimates
	// a trend and the shift-level effect; without them it says it could not.
	Dates  []string `json:"dates,omitempty"`
	Shifts []string `json:"shifts,omitempty"`
}

// FloorSpec is the configured minimum nurse-to-patient ratio for the shift
// (see wardload.RatioFloor). TierPatientsPerNurse gives tiers their own
// ratio; patients of tiers without one are pooled under PatientsPerNurse.
type FloorSpec struct {
	PatientsPerNurse     float64            `json:"patients_per_nurse"`      // ward-wide ratio; 0: none
	TierPatientsPerNurse map[string]float64 `json:"tier_patients_per_nurse"` // per-tier ratios by tier code; may be nil
	ChargeNurseCounts    bool               `json:"charge_nurse_counts"`     // false: one nurse in charge is added on top
}

// ProjectionInput is everything Project needs. The zero value of the
// optional fields means "default" as documented on each field. Its JSON
// form is what a stored projection keeps to be re-run later.
type ProjectionInput struct {
	Tiers              []TierSample `json:"tiers"`
	ShiftHours         float64      `json:"shift_hours"`          // real length of the projected shift, in (0, 25] (a 24-hour shift lasts 25 h over the autumn clock change)
	DirectCareFraction float64      `json:"direct_care_fraction"` // share of a nurse's shift available for direct care, in (0, 1]
	Levels             []float64    `json:"levels"`               // two-sided band levels, each in (0, 1); nil: none
	Cover              float64      `json:"cover"`                // one-sided cover probability q, in (0, 1)
	Draws              int          `json:"draws"`                // bootstrap draws, 1..MaxDraws
	Seed               uint64       `json:"seed"`                 // seed of the bootstrap; same seed, same result
	NursesFrom         int          `json:"nurses_from"`          // shortfall table range; both 0: a range around the need and the floor
	NursesTo           int          `json:"nurses_to"`
	Floor              *FloorSpec   `json:"floor"` // nil: no ratio floor configured
	// Date (YYYY-MM-DD) is the projected shift's date, from which
	// observation ages are counted; required when observations carry dates
	// (version 2 only).
	Date string `json:"date,omitempty"`
	// Calibration is the ward's backtest summary, reported with the
	// projection and warned about when poor (version 2 only; nil: none).
	Calibration *Calibration `json:"calibration,omitempty"`
	// Movement is the census movement during the shift: the shift
	// pattern's end-of-shift history and today's planned counts (version
	// 4 only; nil: the census is held fixed for the whole shift).
	Movement *MovementInput `json:"movement,omitempty"`
}

// Bounds of version 2 on the cover level and the draws: below 0.5 the
// "cover" is less than even odds; above 0.999 it rests on the extreme tail
// that no ward's history can show; under 1,000 draws the Monte Carlo error
// of a 90% quantile is several percent of it.
const (
	MinCover = 0.5
	MaxCover = 0.999
	MinDraws = 1000
)

// validate checks in for version 2: everything validateV1 checks, and the
// cover and draws bounds, dates and shifts.
func (in *ProjectionInput) validate() error {
	if err := in.validateBase(false); err != nil {
		return err
	}
	bad := func(field, format string, args ...any) error {
		return wardload.FieldErrorf(wardload.EINVALID, field, format, args...)
	}
	if !(in.Cover >= MinCover && in.Cover <= MaxCover) {
		return bad("cover_level", "Cover level must be from %g to %g.", MinCover, MaxCover)
	}
	if in.Draws < MinDraws {
		return bad("draws", "Simulation draws must be at least %d (and at most %d).", MinDraws, MaxDraws)
	}
	for _, l := range in.Levels {
		if l < 0.01 || l > MaxCover {
			return bad("levels", "Band levels must be from 0.01 to %g.", MaxCover)
		}
	}
	if in.Date != "" {
		if _, err := time.Parse(time.DateOnly, in.Date); err != nil {
			return bad("date", "The projected date %q is not a date (YYYY-MM-DD).", clipText(in.Date))
		}
	}
	for _, t := range in.Tiers {
		if len(t.Dates) > 0 {
			if in.Date == "" {
				return bad("date", "Observations carry dates, so the projected date is needed.")
			}
			if len(t.Dates) != len(t.CareMinutes) {
				return bad("date", "Tier %s: every observation needs a date, or none.", t.Code)
			}
			for _, d := range t.Dates {
				day, err := time.Parse(time.DateOnly, d)
				if err != nil {
					return bad("date", "Tier %s: %q is not a date (YYYY-MM-DD).", t.Code, clipText(d))
				}
				if d > in.Date || day.Year() < 1900 {
					return bad("date", "Tier %s: observation date %s is after the projected date %s or implausible.", t.Code, d, in.Date)
				}
			}
		}
		if len(t.Shifts) > 0 && len(t.Shifts) != len(t.Dates) {
			return bad("shift", "Tier %s: every observation with a date needs a shift, or none has one.", t.Code)
		}
	}
	if c := in.Calibration; c != nil && (c.Level <= 0 || c.Level >= 1 || c.Inside > c.Shifts || c.Inside < 0) {
		return bad("calibration", "The calibration summary is inconsistent.")
	}
	return nil
}

// clipText keeps a quoted bad value short in a message.
func clipText(s string) string {
	if len(s) > 40 {
		return s[:40] + "…"
	}
	return s
}

// ShiftMinutes converts care minutes observed over a window to minutes per
// shift under a constant-rate assumption,
//
//	y = care minutes ÷ window hours × shift hours
//
// i.e. care is assumed to be spread evenly over time. Where care clusters
// (mornings, admissions) this is wrong, so Project warns whenever a window
// differs from the shift (pro-rating by time: common practice, no source).
// It panics if the slices differ in length.
func ShiftMinutes(careMinutes, windowHours []float64, shiftHours float64) []float64 {
	if len(careMinutes) != len(windowHours) {
		panic("stats: ShiftMinutes length mismatch")
	}
	y := make([]float64, len(careMinutes))
	for i, c := range careMinutes {
		y[i] = c / windowHours[i] * shiftHours
	}
	return y
}

// TierMoments is one tier's share of the analytic workload model.
type TierMoments struct {
	Code             string  `json:"code"`
	Patients         int     `json:"patients"`
	Observations     int     `json:"observations"`
	MeanMinutes      Number  `json:"mean_minutes"`      // per patient per shift; null with no observations
	SDMinutes        Number  `json:"sd_minutes"`        // sample SD (n−1); null with fewer than 2 observations
	ExpectedMinutes  float64 `json:"expected_minutes"`  // n·mean
	VariancePatient  float64 `json:"variance_patient"`  // n·sd²
	VarianceEstimate float64 `json:"variance_estimate"` // n²·sd²/m
}

// WorkloadMoments returns the mean and the two variance terms of the total
// care minutes T of one shift, for tiers k with n_k patients, m_k
// observations, sample mean ȳ_k and sample SD s_k (n−1 denominator):
//
//	E[T]              = Σ_k n_k·ȳ_k
//	variance_patient  = Σ_k n_k·s_k²          (patients vary around the tier mean)
//	variance_estimate = Σ_k n_k²·s_k² / m_k   (ȳ_k is itself estimated from m_k observations)
//	Var[T]            = variance_patient + variance_estimate
//
// Patients are assumed independent and a tier's observations a random sample
// of its patients' shifts; the census is taken as fixed for the shift (no
// term for admissions during it). The first two lines are the mean and
// variance of a sum of independent variables; the third is the variance of
// n_k·ȳ_k, n_k²·σ_k²/m_k, with s_k² plugged in for σ_k² (standard results
// for sums of independent variables and the variance of a sample mean; the
// decomposition is the domain brief's §1.6 [D] model).
//
// Each tier's mean and SD come from MeanSD, a corrected two-pass algorithm
// (Chan, Golub & LeVeque 1983). Tiers with Patients 0
// contribute 0. It panics if a tier with patients has fewer than 2 values
// or a negative count; Project returns EINVALID for those instead.
func WorkloadMoments(codes []string, patients []int, values [][]float64) (mu, varPatient, varEstimate float64, tiers []TierMoments) {
	if len(codes) != len(patients) || len(patients) != len(values) {
		panic("stats: WorkloadMoments length mismatch")
	}
	tiers = make([]TierMoments, len(codes))
	for k, y := range values {
		n, m := patients[k], len(y)
		if n < 0 || (n > 0 && m < minTierObservations) {
			panic("stats: WorkloadMoments tier with patients needs 2 or more values")
		}
		t := TierMoments{Code: codes[k], Patients: n, Observations: m}
		switch {
		case m == 1:
			t.MeanMinutes = Defined(y[0])
		case m >= 2:
			mean, sd := MeanSD(y)
			t.MeanMinutes, t.SDMinutes = Defined(mean), Defined(sd)
		}
		if n > 0 {
			fn, fm := float64(n), float64(m)
			// float64(…) around products that feed a sum keeps any
			// platform from fusing them into a multiply-add, so stored
			// results reproduce bit for bit (Go spec, "Arithmetic operators").
			mean, s2 := t.MeanMinutes.Value, float64(t.SDMinutes.Value*t.SDMinutes.Value)
			t.ExpectedMinutes = float64(fn * mean)
			t.VariancePatient = float64(fn * s2)
			t.VarianceEstimate = float64(fn * fn * s2 / fm)
		}
		mu += t.ExpectedMinutes
		varPatient += t.VariancePatient
		varEstimate += t.VarianceEstimate
		tiers[k] = t
	}
	return mu, varPatient, varEstimate, tiers
}

// Field names follow wardload.Settings where one exists.
// validateV1 checks in for version 1 of the model (and as the first step
// of the current one); frozen with ProjectV1.
func (in *ProjectionInput) validateV1() error { return in.validateBase(true) }

// validateBase checks what both versions check; requireObservations adds
// version 1's refusal of a tier with patients and fewer than two
// observations (version 2 declines instead).
func (in *ProjectionInput) validateBase(requireObservations bool) error {
	bad := func(field, format string, args ...any) error {
		return wardload.FieldErrorf(wardload.EINVALID, field, format, args...)
	}
	if math.IsNaN(in.ShiftHours) || !(in.ShiftHours > 0 && in.ShiftHours <= 25) {
		return bad("shift_hours", "Shift length must be more than 0 and at most 25 hours.")
	}
	if math.IsNaN(in.DirectCareFraction) || !(in.DirectCareFraction > 0 && in.DirectCareFraction <= 1) {
		return bad("direct_care_fraction", "Direct-care fraction must be more than 0 and at most 1.")
	}
	for _, l := range in.Levels {
		if !(l > 0 && l < 1) {
			return bad("levels", "Band levels must be between 0 and 1 (for example 0.8 or 0.9).")
		}
	}
	if !(in.Cover > 0 && in.Cover < 1) {
		return bad("cover_level", "Cover level must be between 0 and 1 (for example 0.9).")
	}
	if in.Draws < 1 || in.Draws > MaxDraws {
		return bad("draws", "Simulation draws must be between 1 and %d.", MaxDraws)
	}
	if in.NursesFrom < 0 || in.NursesTo < 0 || in.NursesTo < in.NursesFrom {
		return bad("nurses_to", "The nurse range must be whole numbers from at least 0, with the end not before the start.")
	}
	if in.NursesTo > MaxNurses {
		return bad("nurses_to", "The nurse range may go up to %d.", MaxNurses)
	}
	if in.NursesTo-in.NursesFrom >= MaxNursesInRange {
		return bad("nurses_to", "The nurse range may hold at most %d headcounts.", MaxNursesInRange)
	}
	seen := map[string]bool{}
	for _, t := range in.Tiers {
		if t.Code == "" {
			return bad("tier", "Every tier needs a code.")
		}
		if seen[t.Code] {
			return bad("tier", "Tier %s is listed twice.", t.Code)
		}
		seen[t.Code] = true
		if t.Patients < 0 || t.Patients > MaxPatients {
			return bad("census", "The census of tier %s must be a whole number from 0 to %d.", t.Code, MaxPatients)
		}
		if len(t.CareMinutes) != len(t.WindowHours) {
			panic("stats: TierSample CareMinutes and WindowHours differ in length")
		}
		for i, c := range t.CareMinutes {
			if math.IsNaN(c) || math.IsInf(c, 0) || c < 0 {
				return bad("care_minutes", "Tier %s: care minutes must be numbers of at least 0.", t.Code)
			}
			w := t.WindowHours[i]
			if math.IsNaN(w) || !(w > 0 && w <= 24) {
				return bad("window_hours", "Tier %s: observation windows must be more than 0 and at most 24 hours.", t.Code)
			}
			if !(c/w*in.ShiftHours <= MaxShiftMinutes) {
				return bad("care_minutes", "Tier %s: an observation of %g minutes in %g hours scales to more than %g minutes per shift; check the minutes and the window.", t.Code, c, w, MaxShiftMinutes)
			}
		}
		if requireObservations && t.Patients > 0 && len(t.CareMinutes) == 0 {
			return bad("tier", "Tier %s has %d patients but no care observations.", t.Code, t.Patients)
		}
		if requireObservations && t.Patients > 0 && len(t.CareMinutes) < minTierObservations {
			return bad("tier", "Tier %s has patients but only one care observation; at least 2 are needed to estimate its spread.", t.Code)
		}
	}
	if f := in.Floor; f != nil {
		if math.IsNaN(f.PatientsPerNurse) || f.PatientsPerNurse < 0 || f.PatientsPerNurse > 50 ||
			(f.PatientsPerNurse == 0 && len(f.TierPatientsPerNurse) == 0) {
			return bad("patients_per_nurse", "Patients per nurse must be more than 0 and at most 50.")
		}
		total := 0
		for _, t := range in.Tiers {
			total += t.Patients
		}
		// A tiny ratio (1e-320 passes "more than 0") makes the floor huge
		// or +Inf, and int(+Inf) is not defined in Go (it came out as 0 or
		// as a count no database column holds).
		if r := f.PatientsPerNurse; r > 0 && !(float64(total)/r <= MaxNurses) {
			return bad("patients_per_nurse", "At %g patients per nurse, %d patients need more than %d nurses; check the ratio floor.", r, total, MaxNurses)
		}
		for code, r := range f.TierPatientsPerNurse {
			if !seen[code] {
				return bad("patients_per_nurse", "A ratio floor names tier %s, which is not in the projection.", code)
			}
			if math.IsNaN(r) || !(r > 0 && r <= 50) {
				return bad("patients_per_nurse", "Patients per nurse for tier %s must be more than 0 and at most 50.", code)
			}
			if !(float64(total)/r <= MaxNurses) {
				return bad("patients_per_nurse", "At %g patients per nurse in tier %s, the floor needs more than %d nurses; check the ratio floor.", r, code, MaxNurses)
			}
		}
	}
	return nil
}

// FloorFor builds the FloorSpec of one shift pattern from a ward's
// configured ratio floors (wardload.Settings.Floors), or nil when none
// applies to the shift. tierCode maps tier IDs to the codes used in
// ProjectionInput; a floor naming a tier missing from it is skipped (the
// tier has no patients on the projection). The nurse in charge counts
// only if every applicable floor says so: where any one of them says the
// nurse in charge is extra, one nurse is added (the cautious reading).
func FloorFor(floors []wardload.RatioFloor, shiftID int64, tierCode map[int64]string) *FloorSpec {
	var spec *FloorSpec
	for _, f := range floors {
		if f.ShiftID != shiftID {
			continue
		}
		if spec == nil {
			spec = &FloorSpec{ChargeNurseCounts: true}
		}
		spec.ChargeNurseCounts = spec.ChargeNurseCounts && f.ChargeNurseCounts
		if f.TierID == 0 {
			spec.PatientsPerNurse = f.PatientsPerNurse
			continue
		}
		code, ok := tierCode[f.TierID]
		if !ok {
			continue
		}
		if spec.TierPatientsPerNurse == nil {
			spec.TierPatientsPerNurse = map[string]float64{}
		}
		spec.TierPatientsPerNurse[code] = f.PatientsPerNurse
	}
	return spec
}
