package stats

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"

	"wardload/internal/wardload"
)

// TierFit is one tier's part of a projection: what was used and what the
// log-scale model made of it.
type TierFit struct {
	Code          string  `json:"code"`
	Patients      int     `json:"patients"`
	Observations  int     `json:"observations"` // given
	Used          int     `json:"used"`         // after setting aside values beyond the outer fences
	HeldOut       int     `json:"held_out"`
	MedianMinutes Number  `json:"median_minutes"` // of the given per-patient shift minutes
	LogLocation   Number  `json:"log_location"`   // fitted ln(minutes + offset) at the projected date
	LogSD         Number  `json:"log_sd"`         // patient-to-patient SD on the log scale, after shrinkage
	Offset        float64 `json:"offset"`         // c in ln(minutes + c)
	NeedMore      int     `json:"need_more"`      // observations short of MinTierObservations; 0 when enough
	Trend         Trend   `json:"trend"`          // this tier's own trend
}

// ShiftEffect reports the common (between-shift) component: the SD on the
// log scale of an effect every patient of one shift shares.
type ShiftEffect struct {
	Estimated   bool   `json:"estimated"`
	SDLog       Number `json:"sd_log"` // √max(0, τ̂²)
	Occurrences int    `json:"occurrences"`
	Reason      string `json:"reason,omitempty"` // why it was not estimated
}

// Trend is a change of care time over the lookback, as percent per 28
// days with a 95% interval (on the log-scale slope, then exponentiated).
type Trend struct {
	Estimated        bool   `json:"estimated"`
	Followed         bool   `json:"followed"` // the projection extrapolates it (the common trend only)
	PercentPer28Days Number `json:"percent_per_28_days"`
	Low              Number `json:"low"`
	High             Number `json:"high"`
	Reason           string `json:"reason,omitempty"`
}

// NurseHours are nurse hours of direct care: care minutes ÷ 60 ÷ the
// direct-care fraction; null when the projection declined.
type NurseHours struct {
	Expected Number `json:"expected"` // at the expected total (point estimates)
	Median   Number `json:"median"`   // at the predictive median
	Cover    Number `json:"cover"`    // at the predictive cover quantile
}

// Nurses are headcounts. Care-giving nurses give direct care for the
// direct-care fraction of the shift; where the floor says the nurse in
// charge does not count towards the ratio, that nurse takes no patients
// and is added on top (InCharge = 1) on both sides: the floor and the care
// time.
type Nurses struct {
	ExpectedUnrounded Number `json:"expected_unrounded"` // care-giving nurses at the expected total
	CoverUnrounded    Number `json:"cover_unrounded"`    // care-giving nurses at the cover quantile
	CareGiving        *int   `json:"care_giving"`        // CoverUnrounded rounded up
	InCharge          int    `json:"in_charge"`          // 1 when the nurse in charge is extra, else 0
	Cover             *int   `json:"cover"`              // CareGiving + InCharge
	Floor             *int   `json:"floor"`              // null when no ratio floor is configured
	Recommended       *int   `json:"recommended"`        // max(Cover, Floor); null when declined without a floor
	DecidedBy         string `json:"decided_by"`
}

// Shortfall is the predictive chance that the shift's care minutes exceed
// what a headcount gives, with its 95% Wilson interval for the Monte Carlo
// error (Text says it, never as a bare 0 or 1).
type Shortfall struct {
	Nurses           int     `json:"nurses"`             // headcount
	CareGivingNurses int     `json:"care_giving_nurses"` // headcount less the nurse in charge where extra
	CapacityMinutes  float64 `json:"capacity_minutes"`   // care-giving nurses × shift hours × 60 × direct-care fraction
	Probability      float64 `json:"probability"`        // share of simulated totals above capacity
	Low              float64 `json:"low"`
	High             float64 `json:"high"`
	Text             string  `json:"text"`
}

// Projection is the workload model's result for one shift. Its JSON form
// is what `wardload project --json` prints and what a projection stores.
type Projection struct {
	MethodVersion      string       `json:"method_version"`
	Method             string       `json:"method"`
	ShiftHours         float64      `json:"shift_hours"`
	DirectCareFraction float64      `json:"direct_care_fraction"`
	CoverLevel         float64      `json:"cover_level"`
	Patients           int          `json:"patients"`
	DataSufficient     bool         `json:"data_sufficient"`
	Insufficient       []string     `json:"insufficient"` // one sentence per tier short of data
	ExpectedMinutes    Number       `json:"expected_minutes"`
	MedianMinutes      Number       `json:"median_minutes"`
	CoverMinutes       Number       `json:"cover_minutes"`
	Bands              []Band       `json:"bands"` // equal-tailed predictive bands
	Tiers              []TierFit    `json:"tiers"`
	ShiftEffect        ShiftEffect  `json:"shift_effect"`
	Trend              Trend        `json:"trend"` // common to all tiers; the one the model uses
	HeldOut            []HeldOut    `json:"held_out"`
	Simulation         Simulation   `json:"simulation"`
	NurseHours         NurseHours   `json:"nurse_hours"`
	Nurses             Nurses       `json:"nurses"`
	CapacityRule       string       `json:"capacity_rule"`
	Floor              *FloorUsed   `json:"floor_used"`
	Calibration        *Calibration `json:"calibration"` // the ward's backtest, when given
	Shortfall          []Shortfall  `json:"shortfall"`
	Warnings           []string     `json:"warnings"`
	Caution            string       `json:"caution"`
	// Movement is the census movement during the shift (version 4; absent
	// when the input gave none): whether it is in the band, the rates
	// and the band without it.
	Movement *Movement `json:"movement,omitempty"`
}

// MethodDescription says in one sentence how version 4 projects.
const MethodDescription = "Per tier, a lognormal matched to the mean and variance of its care minutes; a shift-level effect " +
	"(used when the data show it at the 99% level) and a common trend (at the 96% level); admissions and discharges during " +
	"the shift as Poisson counts from the ward's end-of-shift records (gamma-distributed rates, extra spread where the records show it); simulated " +
	"from the predictive distribution with parameter uncertainty (uncertain tier means, scaled inverse-χ² spreads)."

// MethodDescriptionV3 says in one sentence how version 3 projected.
const MethodDescriptionV3 = "Per tier, a lognormal matched to the mean and variance of its care minutes; a shift-level effect " +
	"(used when the data show it at the 99% level) and a common trend (at the 96% level); simulated " +
	"from the predictive distribution with parameter uncertainty (uncertain tier means, scaled inverse-χ² spreads)."

// MethodDescriptionV2 says in one sentence how version 2 projected.
const MethodDescriptionV2 = "Per tier, a lognormal matched to the mean and variance of its care minutes; a shift-level effect " +
	"and a common trend, each used when the data show it (95% level); simulated " +
	"from the predictive distribution with parameter uncertainty (uncertain tier means, scaled inverse-χ² spreads)."

// Project estimates the direct care minutes of one shift and the nurses
// they need from the predictive distribution of fitCare's model
// (simulateTotals). With totals T_d, q the cover level, f the direct-care
// fraction, h the shift hours and e = 1 when the nurse in charge is extra:
//
//	band(L)         = [Q((1−L)/2), Q((1+L)/2)] of T_d  (type 7; equal tails, so asymmetric for skewed care)
//	cover minutes   = Q(q)
//	care-giving     = ceil(Q(q) ÷ (h·60·f)),   headcount = care-giving + e
//	floor           = as ratioFloor (it already includes e)
//	recommended     = max(headcount, floor)
//	shortfall(N)    = share of T_d > (N − e)·h·60·f, Wilson 95% interval
//
// It declines (DataSufficient false, DecidedBy "insufficient_data",
// recommended = the floor or null) when a tier with patients has fewer than
// MinTierObservations usable observations or no spread at all.
//
// Bad input returns EINVALID naming the field (as ProjectV1, and also
// cover_level outside [0.5, 0.999], draws below 1,000 and dates or shifts
// that do not parse or do not match the observations).
//
// References: newsvendor critical fractile, Porteus, E. L. (2002).
// Foundations of Stochastic Inventory Theory, ch. 1; Hyndman & Fan (1996)
// for the quantiles; Wilson, E. B. (1927) JASA 22, 209–212.
//
// Version 4 adds census movement during the shift when in.Movement is
// given (fitMovement, drawTotalMoving): the totals T_d above are then
// drawn with admissions and discharges, ExpectedMinutes adds the mean of
// the minutes they make, and Movement reports the band and cover quantile
// of the same model with the census held fixed (simulateTotals, the
// version 3 draws), so a reader sees how much of the band movement makes.
// Without movement (none given, too few records and no planned counts, or
// no patients) every number equals version 3's.
func Project(in ProjectionInput) (*Projection, error) { return project(in, specV4) }

// ProjectV3 is Project as method version 3 (MethodVersionV3) made it:
// the census held fixed for the whole shift, in.Movement ignored.
func ProjectV3(in ProjectionInput) (*Projection, error) { return project(in, specV3) }

// ProjectV2 is Project as method version 2 (MethodVersionV2) made it, kept
// so that projections stored under version 2 recompute exactly; new
// projections use Project.
func ProjectV2(in ProjectionInput) (*Projection, error) { return project(in, specV2) }

func project(in ProjectionInput, spec modelSpec) (*Projection, error) {
	if err := in.validate(); err != nil {
		return nil, err
	}
	p := &Projection{
		MethodVersion: spec.version, Method: spec.description,
		ShiftHours: in.ShiftHours, DirectCareFraction: in.DirectCareFraction, CoverLevel: in.Cover,
		Caution: Caution, Warnings: []string{}, Insufficient: []string{}, Bands: []Band{},
		Shortfall: []Shortfall{}, HeldOut: []HeldOut{}, Calibration: in.Calibration,
		Simulation: Simulation{Seed: in.Seed, QuantileMethod: QuantileMethodSimulated},
	}
	var moving *movementFit
	if spec.movement && in.Movement != nil {
		patients := 0
		for _, t := range in.Tiers {
			patients += t.Patients
		}
		var err error
		if moving, p.Movement, err = fitMovement(in.Movement, in.Date, patients); err != nil {
			return nil, err
		}
	}
	fits := make([]fitInput, len(in.Tiers))
	scaled, observations := 0, 0
	for k, t := range in.Tiers {
		fits[k] = fitInput{code: t.Code, patients: t.Patients, raw: t.CareMinutes,
			minutes: ShiftMinutes(t.CareMinutes, t.WindowHours, in.ShiftHours),
			dates:   t.Dates, shifts: t.Shifts}
		p.Patients += t.Patients
		observations += len(t.CareMinutes)
		for _, w := range t.WindowHours {
			if w != in.ShiftHours {
				scaled++
			}
		}
	}
	f := fitCare(fits, in.Date, spec)
	if in.Cover > fwHighFrom {
		f.fwFrom = fwFromHigh
	}
	p.HeldOut = append(p.HeldOut, f.held...)
	p.ShiftEffect = ShiftEffect{Estimated: f.effect, Occurrences: f.groups, Reason: f.effectNo}
	if f.effect {
		p.ShiftEffect.SDLog = Defined(math.Sqrt(max(0, f.tau2)))
	} else {
		p.Warnings = append(p.Warnings, "The shift-level effect could not be estimated: "+f.effectNo+
			". Heavy shifts where every patient needs more care at once are not in the band.")
	}
	p.Trend = trendOf(f.trend, f.beta, f.betaSE, f.betaDF, f.trendNo)
	p.Trend.Followed = f.follow
	p.Tiers = make([]TierFit, len(in.Tiers))
	for k, t := range f.tiers {
		tf := TierFit{Code: t.code, Patients: t.patients, Observations: len(fits[k].minutes),
			Used: len(t.z), HeldOut: len(fits[k].minutes) - len(t.z), Offset: t.offset}
		tf.Trend = trendOf(f.tierSlope(&f.tiers[k]))
		if len(fits[k].minutes) > 0 {
			tf.MedianMinutes = Defined(medianOf(fits[k].minutes))
		}
		if len(t.z) >= 2 {
			tf.LogLocation = Defined(t.level - f.slopeUsed()*t.tbar - (t.sigma2+f.tau2Used())/2)
			tf.LogSD = Defined(math.Sqrt(t.sigma2))
		}
		if t.patients > 0 {
			switch {
			case len(t.z) < MinTierObservations:
				tf.NeedMore = MinTierObservations - len(t.z)
				p.Insufficient = append(p.Insufficient, fmt.Sprintf(
					"Insufficient observations in tier %s: %d usable, need about %d more.", t.code, len(t.z), tf.NeedMore))
			case t.sigma2 == 0:
				tf.NeedMore = 1
				p.Insufficient = append(p.Insufficient, fmt.Sprintf(
					"Tier %s: all %d usable observations are equal, so its spread cannot be estimated; add observations that show its real variation.", t.code, len(t.z)))
			}
		}
		if tr := tf.Trend; tr.Estimated && t.patients > 0 && (tr.Low.Value > 0 || tr.High.Value < 0) {
			p.Warnings = append(p.Warnings, fmt.Sprintf(
				"Care time in tier %s has moved: %+.0f%% per 4 weeks (95%% interval %+.0f%% to %+.0f%%). Review the tier and its observations.",
				t.code, tr.PercentPer28Days.Value, tr.Low.Value, tr.High.Value))
		}
		p.Tiers[k] = tf
	}
	for _, h := range f.held {
		p.Warnings = append(p.Warnings, HeldOutWarning(h))
	}
	if scaled > 0 {
		p.Warnings = append(p.Warnings, fmt.Sprintf(
			"%d of %d observations were timed over windows other than the %g-hour shift; their minutes were scaled to the shift assuming care is spread evenly over time, which is not true where care clusters at certain hours.",
			scaled, observations, in.ShiftHours))
	}
	if p.Patients == 0 {
		p.Warnings = append(p.Warnings, "The census has no patients: the projected care workload is zero.")
	}
	if c := in.Calibration; c != nil && c.Warn(in.Cover) {
		p.Warnings = append(p.Warnings, c.Sentence(in.Cover))
	}

	inCharge := 0
	if in.Floor != nil && !in.Floor.ChargeNurseCounts {
		inCharge = 1
		p.CapacityRule = "The nurse in charge takes no patients and does not count towards the ratio, so that nurse's time is not counted as direct care: headcount = care-giving nurses + 1."
	} else {
		p.CapacityRule = "Every nurse counted, the nurse in charge included, gives direct care for the direct-care fraction of the shift."
	}
	p.Nurses.InCharge = inCharge
	if in.Floor == nil {
		p.Warnings = append(p.Warnings, WarnNoFloor)
	} else {
		p.Floor = ratioFloor(in.Floor, in.Tiers, &p.Warnings)
		floor := p.Floor.Nurses
		p.Nurses.Floor = &floor
	}
	p.DataSufficient = len(p.Insufficient) == 0
	if !p.DataSufficient {
		p.Nurses.DecidedBy = DecidedByInsufficient
		p.Nurses.Recommended = p.Nurses.Floor
		if p.Nurses.Floor != nil {
			p.Warnings = append(p.Warnings, WarnDeclinedFloor)
		} else {
			p.Warnings = append(p.Warnings, WarnDeclinedNoFloor)
		}
		return p, nil
	}

	ps := make([]float64, 0, 2*len(in.Levels))
	for _, l := range in.Levels {
		ps = append(ps, (1-l)/2, (1+l)/2)
	}
	totals := simulateTotals(f, in.Draws, in.Seed)
	movedMean := 0.0
	if moving != nil {
		without, extra := summariseTotalsWith(totals, in.Seed, in.Cover, ps)
		mv := p.Movement
		mv.CoverMinutesWithout = Defined(without.Cover)
		for i, l := range in.Levels {
			mv.BandsWithout = append(mv.BandsWithout, Band{Level: l, Low: extra[2*i], High: extra[2*i+1]})
		}
		totals, movedMean = simulateMoving(f, moving, in.Draws, in.Seed)
		mv.ExpectedMinutes = Defined(movedMean)
	}
	p.ExpectedMinutes = Defined(f.plugInMean() + movedMean)
	var extra []float64
	p.Simulation, extra = summariseTotalsWith(totals, in.Seed, in.Cover, ps)
	sim := &p.Simulation
	p.MedianMinutes, p.CoverMinutes = Defined(sim.P50), Defined(sim.Cover)
	for i, l := range in.Levels {
		p.Bands = append(p.Bands, Band{Level: l, Low: extra[2*i], High: extra[2*i+1]})
	}

	perNurse := in.ShiftHours * 60 * in.DirectCareFraction
	hours := func(minutes float64) Number { return Defined(minutes / 60 / in.DirectCareFraction) }
	p.NurseHours = NurseHours{Expected: hours(p.ExpectedMinutes.Value), Median: hours(sim.P50), Cover: hours(sim.Cover)}
	n := &p.Nurses
	expU, covU := p.ExpectedMinutes.Value/perNurse, sim.Cover/perNurse
	if !(expU <= MaxNurses) || !(covU <= MaxNurses) {
		return nil, wardload.FieldErrorf(wardload.EINVALID, "direct_care_fraction",
			"The care time would need more than %d nurses at a direct-care fraction of %g; check the direct-care fraction and the observations.", MaxNurses, in.DirectCareFraction)
	}
	n.ExpectedUnrounded, n.CoverUnrounded = Defined(expU), Defined(covU)
	care := ceilNurses(covU)
	head := care + inCharge
	n.CareGiving, n.Cover = &care, &head
	rec := recommend(n, head)

	from, to := in.NursesFrom, in.NursesTo
	if from == 0 && to == 0 {
		from = ceilNurses(expU) + inCharge
		if n.Floor != nil {
			from = min(from, *n.Floor)
		}
		to = rec + 3
		from = max(from, to-MaxNursesInRange+1, inCharge)
	}
	capacities := make([]float64, 0, to-from+1)
	for nurses := from; nurses <= to; nurses++ {
		capacities = append(capacities, float64(max(0, nurses-inCharge))*perNurse)
	}
	above := countAbove(totals, capacities)
	for i, capacity := range capacities {
		lo, hi := WilsonInterval(above[i], len(totals))
		p.Shortfall = append(p.Shortfall, Shortfall{
			Nurses: from + i, CareGivingNurses: max(0, from+i-inCharge), CapacityMinutes: capacity,
			Probability: float64(above[i]) / float64(len(totals)), Low: lo, High: hi,
			Text: ProbabilityText(above[i], len(totals)),
		})
	}
	return p, nil
}

// Warnings that pages show in their own place (the headline, the list of
// observations set aside) and so leave out of the list: named here, so a
// page matches them exactly rather than by wording.
const (
	WarnNoFloor         = "No ratio floor was configured: the recommendation rests on care time alone; check the minimum staffing that applies to this ward."
	WarnDeclinedFloor   = "Too few observations to estimate care time: the recommendation is the ratio floor alone, and no shortfall chance is shown."
	WarnDeclinedNoFloor = "Too few observations to estimate care time and no ratio floor configured: there is no recommendation."
)

// HeldOutWarning is the warning Project gives for an observation set aside.
func HeldOutWarning(h HeldOut) string {
	on := ""
	if h.Date != "" {
		on = " on " + h.Date
	}
	return fmt.Sprintf("An observation of %g minutes in tier %s%s lies far %s the tier's other values (beyond the log-scale outer fence) and was set aside as a likely entry error; review it.",
		h.CareMinutes, h.Tier, on, h.Side)
}

// trendOf turns a log-scale slope per day into percent per 28 days with a
// 95% Student-t interval.
func trendOf(ok bool, beta, se, df float64, reason string) Trend {
	if !ok {
		return Trend{Reason: reason}
	}
	t := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: df}.Quantile(0.975)
	pct := func(b float64) Number { return Defined(100 * math.Expm1(28*b)) }
	return Trend{Estimated: true, PercentPer28Days: pct(beta), Low: pct(beta - t*se), High: pct(beta + t*se)}
}

// medianOf is the type 7 median of x (not modified).
func medianOf(x []float64) float64 {
	return HFQuantile(7, 0.5, slices.Sorted(slices.Values(x)))
}

// ProbabilityText says a simulated share k/n as a percentage with its 95%
// Wilson interval, never as a bare 0% or 100%: "< 0.02%" when no draw
// exceeded, "> 99.98%" when all did, else "12% (11.5–12.6%)".
func ProbabilityText(k, n int) string {
	lo, hi := WilsonInterval(k, n)
	switch {
	case k == 0:
		return "< " + percentText(hi)
	case k == n:
		return "> " + percentText(lo)
	}
	return percentText(float64(k)/float64(n)) + " (" + strings.TrimSuffix(percentText(lo), "%") + "–" + percentText(hi) + ")"
}

func percentText(p float64) string {
	x := 100 * p
	var s string
	switch {
	case x >= 10:
		s = strconv.FormatFloat(x, 'f', 0, 64)
	case x >= 1:
		s = strconv.FormatFloat(x, 'f', 1, 64)
	default:
		s = strconv.FormatFloat(x, 'g', 2, 64)
	}
	// A share just under 100% must not read as 100% (nor one just above
	// 0% as 0%): add decimals until it does not.
	for prec := 1; prec <= 8; prec++ {
		v, _ := strconv.ParseFloat(s, 64)
		if !(v == 100 && x < 100) && !(v == 0 && x > 0) {
			break
		}
		s = strconv.FormatFloat(x, 'f', prec, 64)
	}
	return s + "%"
}
