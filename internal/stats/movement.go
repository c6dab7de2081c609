package stats

import (
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"gonum.org/v1/gonum/stat/distuv"
)

// Movement constants.
const (
	// MinMovementRecords is the fewest end-of-shift records of one shift
	// pattern from which the rates of admissions and discharges are
	// estimated: with fewer, a rate of 1 per shift has a 90% interval
	// about as wide as the rate itself, and one unusual shift moves it by
	// an eighth (common practice, no source).
	MinMovementRecords = 8
	// MinMovementWeekdayRecords is the fewest records of the projected
	// weekday (and of the other weekdays) before the weekday's own rate is
	// even tried.
	MinMovementWeekdayRecords = 4
	// MaxMovementPlanned bounds a planned count when no beds are
	// configured; with beds, planned admissions are bounded by the beds
	// and planned discharges by the census.
	MaxMovementPlanned = 200
	// movementLevel is the two-sided level of a rate's reported interval.
	movementLevel = 0.9
	// movementWeekdayZ is the Wald z above which the projected weekday
	// keeps its own rate (two-sided 5%).
	movementWeekdayZ = 1.959963984540054
)

// MovementRecord is what one past dated shift of the projected shift
// pattern recorded at its end (wardload.ShiftRecord, newest revision):
// admissions (transfers in included) and discharges (transfers out
// included).
type MovementRecord struct {
	Date       string `json:"date"` // YYYY-MM-DD
	Admissions int    `json:"admissions"`
	Discharges int    `json:"discharges"`
}

// MovementInput is the census movement Project (version 4) adds to a
// projection: the shift pattern's history and today's planned counts.
type MovementInput struct {
	History []MovementRecord `json:"history"`
	// PlannedAdmissions and PlannedDischarges are the charge nurse's
	// counts for today (nil: none given). Each is a lower bound on the
	// shift's count: the simulated count is raised to it when lower
	// (planned admissions also on a ward the census fills).
	PlannedAdmissions *int `json:"planned_admissions,omitempty"`
	PlannedDischarges *int `json:"planned_discharges,omitempty"`
	Beds              int  `json:"beds"` // admissions are capped at the beds free during the shift; 0: no cap
}

// MovementRate is the estimated rate of one kind of movement per shift.
type MovementRate struct {
	Records    int     `json:"records"`    // records the rate rests on (the weekday's own when Weekday)
	Total      int     `json:"total"`      // their sum
	Weekday    bool    `json:"weekday"`    // the projected weekday's own rate
	Family     string  `json:"family"`     // "poisson" or "quasipoisson"
	Dispersion float64 `json:"dispersion"` // φ̂ used; 1 for poisson
	Mean       float64 `json:"mean"`       // posterior mean of the rate per shift
	Low        float64 `json:"low"`        // 90% posterior interval of the rate
	High       float64 `json:"high"`
	Planned    *int    `json:"planned,omitempty"` // today's planned count, a lower bound
	// fitted parts for the draws
	shape, rate float64
	df          float64 // residual df of φ̂; 0: φ is not drawn
}

// Movement is the census-movement component of a projection.
type Movement struct {
	Modelled   bool   `json:"modelled"`         // movement is in the band
	FromRates  bool   `json:"from_rates"`       // the history's rates are used (else only planned counts)
	Reason     string `json:"reason,omitempty"` // why the history's rates are not used
	Records    int    `json:"records"`          // end-of-shift records of this shift pattern
	MinRecords int    `json:"min_records"`
	// Admissions and Discharges are null when the rates are not used.
	Admissions *MovementRate `json:"admissions"`
	Discharges *MovementRate `json:"discharges"`
	// PlannedAdmissions and PlannedDischarges are today's planned counts
	// as given (nil: none), lower bounds of the shift's counts.
	PlannedAdmissions *int `json:"planned_admissions"`
	PlannedDischarges *int `json:"planned_discharges"`
	// ExpectedMinutes is the mean over the draws of the care minutes
	// movement adds (negative: removes); included in the projection's
	// expected minutes.
	ExpectedMinutes Number `json:"expected_minutes"`
	// BandsWithout and CoverMinutesWithout are the band and the cover
	// quantile the same model gives with the census held fixed, so a
	// reader sees how much of the band movement makes.
	BandsWithout        []Band `json:"bands_without"`
	CoverMinutesWithout Number `json:"cover_minutes_without"`
	Assumption          string `json:"assumption"`
}

// MovementAssumption says in words how movement enters the care minutes.
const MovementAssumption = "Admissions and discharges during the shift are counted from the ward's end-of-shift records of the same shift " +
	"(transfers in as admissions, transfers out as discharges) as Poisson counts, with extra spread where the records show it; " +
	"each admitted patient arrives at a random time and brings care for the rest of the shift, with a tier drawn from today's census mix; " +
	"each discharged patient is one of today's patients and leaves at a random time, taking the rest of the shift's care with them. " +
	"Work of the admission or discharge itself is not added."

// EstimateMovementRate estimates the per-shift rate of one kind of
// movement from counts y_i of m past shifts of one shift pattern (weekdays
// w_i, 0 = Sunday), for a shift on weekday target.
//
// Dispersion and weekday: counts are fitted by FitCountRegression
// (quasi-Poisson, log link) with design [1] or, when the target weekday
// and the other weekdays each have MinMovementWeekdayRecords records,
// [1, 1{w_i = target}]; the weekday column is kept when its Wald statistic
// |β̂₁/se(β̂₁)| > 1.96 (McCullagh & Nelder 1989, §9.2.4), and then the
// target weekday's own records give the rate. φ̂ = Pearson X²/(n − p) of
// the kept fit; φ̂ ≤ 1 (or no movement at all) is taken as Poisson, φ = 1
// (underdispersion is not relied on: the wider Poisson spread is the
// cautious choice).
//
// Rate: with S = Σy over the m records used, the rate's posterior under
// the Jeffreys prior p(λ) ∝ λ^{-1/2} is
//
//	λ | y ~ Gamma(shape = S/φ + 1/2, rate = m/φ)
//
// (Gelman et al. 2013, Bayesian Data Analysis, 3rd ed., §2.6 for the
// conjugate gamma posterior of a Poisson rate; the Jeffreys prior from
// memory, §2.8). For φ > 1 the counts and exposure are divided by φ: the
// quasi-likelihood's "effective sample" keeps the mean S/m and inflates
// the rate's variance φ times, as Cov(β̂) = φ(XᵀWX)⁻¹ does (McCullagh &
// Nelder 1989, §9.2). Mean = (S/φ + 1/2)/(m/φ); Low, High are the 5% and
// 95% gamma quantiles.
//
// Counting admissions as Poisson arrivals is the usual assumption of
// bed-occupancy and ward-dimensioning models (for example de Bruin, A. M.,
// Bekker, R., van Zanten, L. & Koole, G. M. (2010), "Dimensioning hospital
// wards using the Erlang loss model", Annals of Operations Research 178,
// 23–43; cited from memory); the quasi-Poisson dispersion is the check on
// it, and where records vary more (scheduled lists, batches from theatre)
// the wider spread is carried into the draws.
//
// Preconditions: len(weekdays) = len(counts), counts ≥ 0; it panics
// otherwise. It returns a rate with Records 0 when counts is empty.
func EstimateMovementRate(counts, weekdays []int, target int) MovementRate {
	if len(counts) != len(weekdays) {
		panic("stats: EstimateMovementRate counts and weekdays differ in length")
	}
	r := MovementRate{Family: FamilyPoisson.String(), Dispersion: 1}
	if len(counts) == 0 {
		return r
	}
	y := make([]float64, len(counts))
	same, other, total := 0, 0, 0
	for i, c := range counts {
		if c < 0 {
			panic("stats: EstimateMovementRate count is negative")
		}
		y[i] = float64(c)
		total += c
		if weekdays[i] == target {
			same++
		} else {
			other++
		}
	}
	useWeekday := false
	var fit *CountFit
	if total > 0 && same >= MinMovementWeekdayRecords && other >= MinMovementWeekdayRecords {
		x := make([][]float64, len(y))
		for i := range y {
			x[i] = []float64{1, b2fl(weekdays[i] == target)}
		}
		if f, err := FitCountRegression(x, y, FamilyQuasiPoisson); err == nil && f.SE[1] > 0 &&
			math.Abs(f.Beta[1]/f.SE[1]) > movementWeekdayZ {
			fit, useWeekday = f, true
		}
	}
	if fit == nil && total > 0 && len(y) >= 2 {
		x := make([][]float64, len(y))
		for i := range y {
			x[i] = []float64{1}
		}
		if f, err := FitCountRegression(x, y, FamilyQuasiPoisson); err == nil {
			fit = f
		}
	}
	if fit != nil && fit.Dispersion > 1 {
		r.Family, r.Dispersion = FamilyQuasiPoisson.String(), fit.Dispersion
		r.df = float64(len(y) - len(fit.Beta))
	}
	r.Weekday = useWeekday
	for i, c := range counts {
		if !useWeekday || weekdays[i] == target {
			r.Records++
			r.Total += c
		}
	}
	r.shape = float64(r.Total)/r.Dispersion + 0.5
	r.rate = float64(r.Records) / r.Dispersion
	g := distuv.Gamma{Alpha: r.shape, Beta: r.rate}
	r.Mean = g.Mean()
	r.Low, r.High = g.Quantile((1-movementLevel)/2), g.Quantile((1+movementLevel)/2)
	return r
}

// draw draws one shift's count from the rate's posterior predictive:
//
//	φ_d = max(1, φ̂·ν/χ²_ν)       (quasi-Poisson, ν = n − p; else 1)
//	λ_d ~ Gamma(S/φ_d + 1/2, m/φ_d)
//	y   ~ Poisson(λ_d)                     when φ_d = 1
//	y   ~ Poisson(Gamma(λ_d/(φ_d − 1))·(φ_d − 1))  else: mean λ_d, variance φ_d·λ_d
//
// as the census forecast draws its quasi-Poisson counts (drawCount). With
// φ = 1 the predictive is negative binomial with size S + 1/2 and
// probability m/(m + 1).
func (m *MovementRate) draw(r *rand.Rand) int {
	if m.Records == 0 {
		return 0
	}
	phi := m.Dispersion
	if m.df > 0 {
		phi = max(1, phi*m.df/chiSquare(r, m.df))
	}
	lambda := gammaDraw(r, float64(m.Total)/phi+0.5) * phi / float64(m.Records)
	return int(quasiPoissonDraw(r, lambda, phi))
}

// movementFit is a checked MovementInput with its rates, ready for the
// draws.
type movementFit struct {
	adm, dis         *MovementRate
	planAdm, planDis int
	beds             int
	patients         int // census total at the shift's start
}

// fitMovement estimates the movement of in for a shift on date (a valid
// YYYY-MM-DD) with the census total patients, and says what it could use.
// It returns nil and the reason when no movement can be modelled.
func fitMovement(in *MovementInput, date string, patients int) (*movementFit, *Movement, error) {
	mv := &Movement{MinRecords: MinMovementRecords, Records: len(in.History), Assumption: MovementAssumption, BandsWithout: []Band{}}
	for _, c := range []struct {
		field string
		n     *int
	}{{"planned_admissions", in.PlannedAdmissions}, {"planned_discharges", in.PlannedDischarges}} {
		if c.n != nil && (*c.n < 0 || *c.n > MaxMovementPlanned) {
			return nil, nil, errField(c.field, "Planned counts must be from 0 to %d.", MaxMovementPlanned)
		}
	}
	if in.Beds < 0 || in.Beds > MaxPatients {
		return nil, nil, errField("beds", "Beds must be from 0 to %d.", MaxPatients)
	}
	day, err := time.Parse(time.DateOnly, date)
	if err != nil {
		return nil, nil, errField("date", "%q is not a date (YYYY-MM-DD).", clipText(date))
	}
	adm, dis := make([]int, len(in.History)), make([]int, len(in.History))
	wd := make([]int, len(in.History))
	for i, h := range in.History {
		d, err := time.Parse(time.DateOnly, h.Date)
		if err != nil {
			return nil, nil, errField("movement", "Movement record %d: %q is not a date (YYYY-MM-DD).", i+1, clipText(h.Date))
		}
		if h.Admissions < 0 || h.Discharges < 0 || h.Admissions > MaxMovementPlanned || h.Discharges > MaxMovementPlanned {
			return nil, nil, errField("movement", "Movement record %d: counts must be from 0 to %d.", i+1, MaxMovementPlanned)
		}
		adm[i], dis[i], wd[i] = h.Admissions, h.Discharges, int(d.Weekday())
	}
	mv.PlannedAdmissions, mv.PlannedDischarges = in.PlannedAdmissions, in.PlannedDischarges
	fit := &movementFit{beds: in.Beds, patients: patients}
	if in.PlannedAdmissions != nil {
		fit.planAdm = *in.PlannedAdmissions
	}
	if in.PlannedDischarges != nil {
		fit.planDis = *in.PlannedDischarges
	}
	switch {
	case len(in.History) >= MinMovementRecords:
		a := EstimateMovementRate(adm, wd, int(day.Weekday()))
		d := EstimateMovementRate(dis, wd, int(day.Weekday()))
		a.Planned, d.Planned = in.PlannedAdmissions, in.PlannedDischarges
		fit.adm, fit.dis = &a, &d
		mv.Admissions, mv.Discharges, mv.FromRates = &a, &d, true
	case len(in.History) == 0:
		mv.Reason = fmt.Sprintf("no end-of-shift records of this shift yet; movement is estimated once %d are recorded", MinMovementRecords)
	default:
		mv.Reason = fmt.Sprintf("only %d end-of-shift record(s) of this shift; movement is estimated once %d are recorded", len(in.History), MinMovementRecords)
	}
	if patients == 0 {
		mv.FromRates, mv.Admissions, mv.Discharges, fit.adm, fit.dis = false, nil, nil, nil, nil
		mv.Reason = "the census has no patients, so there is no tier mix for admitted patients"
		return nil, mv, nil
	}
	if fit.adm == nil && fit.planAdm == 0 && fit.planDis == 0 {
		return nil, mv, nil
	}
	mv.Modelled = true
	return fit, mv, nil
}

// counts draws one shift's admissions and discharges: each drawn from its
// rate (0 without rates); discharges raised to the planned count and
// capped at the census; drawn admissions capped at the beds free once the
// discharges have left (beds − patients + discharges, when beds are
// configured), then raised to the planned count, which stands even on a
// full ward (the charge nurse knows of beds the draws do not).
func (m *movementFit) counts(r *rand.Rand) (adm, dis int) {
	if m.adm != nil {
		adm, dis = m.adm.draw(r), m.dis.draw(r)
	}
	dis = min(max(dis, m.planDis), m.patients)
	if m.beds > 0 {
		adm = min(adm, max(0, m.beds-m.patients+dis))
	}
	return max(adm, m.planAdm), dis
}

// drawTotalMoving draws one shift total with census movement (version 4):
// drawTotal's model for the census at the shift's start, where
//
//	D discharged patients, chosen uniformly among the census, give
//	  care only for the share U of the shift before they leave;
//	A admitted patients, each of tier k with probability n_k/n, give
//	  care for the share 1 − U after they arrive;
//	U ~ Uniform(0, 1) independently for each moving patient.
//
// Given the number of arrivals of a Poisson process in an interval, their
// times are independent and uniform on it (Ross, S. M., Introduction to
// Probability Models, the order-statistic property of the Poisson process;
// from memory), and care is taken to be spread evenly over the shift, as
// ShiftMinutes assumes. An admitted or discharged patient's care is drawn
// from their tier's distribution in that draw (same parameter draw, same
// shift effect). It returns the total and the net minutes movement made.
//
// leave and arrive are scratch space of len(f.tiers), overwritten.
func (f *careFit) drawTotalMoving(r *rand.Rand, m *movementFit, leave, arrive []int) (total, moved float64) {
	p := f.drawParams(r)
	b := math.Sqrt(p.tau2) * r.NormFloat64()
	adm, dis := m.counts(r)
	clear(leave)
	clear(arrive)
	remaining := m.patients
	for range dis {
		leave[patientTier(f, r.IntN(remaining), leave)]++
		remaining--
	}
	for range adm {
		arrive[patientTier(f, r.IntN(m.patients), nil)]++
	}
	for k := range f.tiers {
		t := &f.tiers[k]
		if t.patients == 0 {
			continue
		}
		mu, s2 := f.tierLocation(r, t, p)
		mu += b
		s := math.Sqrt(s2)
		total = f.tierSum(r, total, t.patients-leave[k], mu, s2, t.offset)
		for range leave[k] {
			c, u := max(0, math.Exp(mu+s*r.NormFloat64())-t.offset), r.Float64()
			total += u * c
			moved -= (1 - u) * c
		}
		for range arrive[k] {
			c := (1 - r.Float64()) * max(0, math.Exp(mu+s*r.NormFloat64())-t.offset)
			total += c
			moved += c
		}
	}
	return total, moved
}

// patientTier returns the tier of the i-th of the census's patients not
// yet counted in taken (nil: none taken), in tier order.
func patientTier(f *careFit, i int, taken []int) int {
	for k := range f.tiers {
		n := f.tiers[k].patients
		if taken != nil {
			n -= taken[k]
		}
		if i < n {
			return k
		}
		i -= n
	}
	panic("stats: patientTier index beyond the census")
}

// simulateMoving is simulateTotals with census movement (drawTotalMoving),
// on the random streams of simulateTotals with the chunk key moved by
// movementStream; it returns the totals and the mean of the moved minutes.
func simulateMoving(f *careFit, m *movementFit, draws int, seed uint64) (totals []float64, movedMean float64) {
	moved := make([]float64, draws)
	totals = inChunks(draws, func() func(out []float64, c int) {
		leave, arrive := make([]int, len(f.tiers)), make([]int, len(f.tiers))
		return func(out []float64, c int) {
			r := rand.New(rand.NewPCG(seed, splitmix64(uint64(c)^streamKey^movementStream)))
			base := c * bootstrapChunk
			for d := range out {
				out[d], moved[base+d] = f.drawTotalMoving(r, m, leave, arrive)
			}
		}
	})
	sum := 0.0
	for _, v := range moved {
		sum += v
	}
	return totals, sum / float64(draws)
}

// movementStream separates the random streams of the draws with movement
// from those without (any fixed constant would do).
const movementStream = 0x6d6f76656d656e74
