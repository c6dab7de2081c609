package stats

import (
	"fmt"
	"math/rand/v2"
	"slices"
	"time"

	"wardload/internal/wardload"
)

// WorkloadMethodVersion names the compound of the census forecast
// (CensusMethodVersion) and the care-time model (MethodVersion); it
// changes whenever a number ForecastWorkload returns for the same input
// could change.
const WorkloadMethodVersion = "wardload-workload/1"

// WorkloadForecastInput is ForecastWorkload's input.
type WorkloadForecastInput struct {
	Census CensusForecastInput
	// Care holds, per shift name of the census history, what Project
	// takes for one shift of that pattern: the care observations of each
	// tier (tier codes as in the census), the shift's hours, the
	// direct-care fraction, the band levels, the cover level and the
	// ratio floor. Its tiers' Patients, Date, Seed, Draws, NursesFrom,
	// NursesTo and Calibration are ignored: every draw brings its own
	// census, and the draws and seed are the census forecast's.
	Care map[string]ProjectionInput
}

// WorkloadShift is the nurse-hours forecast of one future dated shift.
type WorkloadShift struct {
	Date    string `json:"date"`
	Weekday string `json:"weekday"`
	Shift   string `json:"shift"`
	Horizon int    `json:"horizon_days"`
	// Census is the total census's predictive distribution, as in the
	// census forecast.
	Census CensusQuantiles `json:"census"`
	// DataSufficient is false when a tier that has patients in some draw
	// has too few usable observations on this shift pattern; the shift
	// then has no care figures, only the floor (Insufficient says why).
	DataSufficient bool     `json:"data_sufficient"`
	Insufficient   []string `json:"insufficient"`
	// Care minutes and nurse-hours of direct care (minutes ÷ 60 ÷ the
	// direct-care fraction) of the compound distribution.
	MedianMinutes   Number `json:"median_minutes"`
	CoverMinutes    Number `json:"cover_minutes"`
	Bands           []Band `json:"bands"`
	NurseHoursCover Number `json:"nurse_hours_cover"`
	// CensusShare is the share of the variance of the shift's care
	// minutes that comes from not knowing the census (see
	// ForecastWorkload); the rest is not knowing the care time.
	CensusShare Number `json:"census_share"`
	Nurses      Nurses `json:"nurses"`
	// FloorCensus is the percentile of the census draws at which the
	// ratio floor is taken (the cover level); FloorNurses is that floor.
	FloorPercentile float64 `json:"floor_percentile"`
	// ShortfallText is the chance that the care minutes exceed what the
	// recommended headcount gives, with its 95% interval (never 0 or 1).
	ShortfallText string `json:"shortfall_at_recommended"`
}

// WorkloadForecast is ForecastWorkload's result.
type WorkloadForecast struct {
	MethodVersion string          `json:"method_version"`
	Census        *CensusForecast `json:"census"`
	Cover         float64         `json:"cover_level"`
	Shifts        []WorkloadShift `json:"shifts"`
	Caution       string          `json:"caution"`
}

// ForecastWorkload forecasts the direct-care workload of every future
// dated shift of the census forecast: for each of the census forecast's
// draws d (ForecastCensus: tier counts c_d after the bed cap) it draws the
// shift's care minutes T_d from Project's predictive distribution for that
// census on that date (the care model fitted to the shift pattern's
// observations, its trend carried to the date), so that T has the
// compound distribution
//
//	P(T ≤ x) = Σ_c P(C = c)·P(T ≤ x | C = c),
//
// which carries both the census's and the care time's uncertainty. Then,
// as Project with f the direct-care fraction, h the shift's hours, q the
// cover level and e = 1 when the nurse in charge is extra:
//
//	bands            = equal-tailed type 7 quantiles of T_d
//	care-giving      = ceil(Q_q(T) ÷ (h·60·f)),  headcount = care-giving + e
//	floor            = the ratio floor of each draw's census, at its
//	                   q quantile (type 1: the floor that holds on a share
//	                   q of the census draws)
//	recommended      = max(headcount, floor)
//	census share     = Var(m·c_d) ÷ Var(T_d), m_k the tier's mean care
//	                   minutes per patient at the estimates (the plug-in
//	                   mean), so that m·c is E[T | C = c]: by the law of
//	                   total variance, Var T = E[Var(T | C)] + Var(E[T | C])
//	                   (e.g. Casella, G. & Berger, R. L. (2002), Statistical
//	                   Inference, 2nd ed., Thm 4.4.7), the share of the
//	                   spread that a known census would remove.
//
// A tier with patients in any draw and fewer than MinTierObservations
// usable observations (or no spread) makes the shift decline
// (DataSufficient false): the floor alone is recommended, as Project
// does. The same input and seed give the same result. Errors are those of
// ForecastCensus and, for a shift's care input, EINVALID naming the
// field; a census shift with no Care entry is EINVALID "shift".
func ForecastWorkload(in WorkloadForecastInput) (*WorkloadForecast, error) {
	h, err := prepareCensus(in.Census)
	if err != nil {
		return nil, err
	}
	var cover float64
	for i, name := range h.shifts {
		c, ok := in.Care[name]
		if !ok {
			return nil, wardload.FieldErrorf(wardload.EINVALID, "shift", "There are no care observations or settings for shift %q.", clipText(name))
		}
		check := c
		check.Draws, check.Date, check.NursesFrom, check.NursesTo = MinDraws, in.Census.From, 0, 0
		check.Calibration = nil
		if err := check.validate(); err != nil {
			return nil, err
		}
		if i > 0 && c.Cover != cover {
			return nil, wardload.FieldErrorf(wardload.EINVALID, "cover_level", "Every shift must use the same cover level.")
		}
		cover = c.Cover
	}
	fc, targets, sims := h.forecast(in.Census)
	out := &WorkloadForecast{MethodVersion: WorkloadMethodVersion, Census: fc, Cover: cover, Caution: Caution}
	for i, t := range targets {
		date := dateOfDay(t.day).Format(time.DateOnly)
		counts := make([][]int32, len(h.tiers))
		for k := range h.tiers {
			counts[k] = sims.tier(k, i)
		}
		ws, err := workloadShift(in.Care[t.shift], h.tiers, counts, date, splitmix64(in.Census.Seed^uint64(i+1)))
		if err != nil {
			return nil, err
		}
		ws.Date, ws.Weekday, ws.Shift, ws.Horizon = date, time.Weekday(t.weekday).String(), t.shift, t.day-h.last
		ws.Census = fc.Shifts[i].Total
		out.Shifts = append(out.Shifts, *ws)
	}
	return out, nil
}

// workloadShift is one target's compound: counts[k][d] is tier codes[k]'s
// census in draw d.
func workloadShift(care ProjectionInput, codes []string, counts [][]int32, date string, seed uint64) (*WorkloadShift, error) {
	draws := len(counts[0])
	ws := &WorkloadShift{Insufficient: []string{}, Bands: []Band{}, FloorPercentile: care.Cover}
	byCode := map[string]int{}
	fits := make([]fitInput, len(care.Tiers))
	for j, t := range care.Tiers {
		byCode[t.Code] = j
		fits[j] = fitInput{code: t.Code, raw: t.CareMinutes,
			minutes: ShiftMinutes(t.CareMinutes, t.WindowHours, care.ShiftHours), dates: t.Dates, shifts: t.Shifts}
	}
	f := fitCare(fits, date, specV3)
	if care.Cover > fwHighFrom {
		f.fwFrom = fwFromHigh
	}
	// idx[k] is census tier k's tier in the care fit; a census tier the
	// care input lacks has no observations at all.
	idx := make([]int, len(codes))
	present := make([]bool, len(codes))
	for k, code := range codes {
		j, ok := byCode[code]
		idx[k] = -1
		if ok {
			idx[k] = j
		}
		present[k] = slices.ContainsFunc(counts[k], func(c int32) bool { return c > 0 })
		if !present[k] {
			continue
		}
		switch {
		case !ok || len(f.tiers[j].z) < MinTierObservations:
			used := 0
			if ok {
				used = len(f.tiers[j].z)
			}
			ws.Insufficient = append(ws.Insufficient, fmt.Sprintf(
				"Tier %s may have patients on this shift but has %d usable observations of it; about %d more are needed.", code, used, MinTierObservations-used))
		case f.tiers[j].sigma2 == 0:
			ws.Insufficient = append(ws.Insufficient, fmt.Sprintf(
				"Tier %s: all usable observations of this shift are equal, so its spread cannot be estimated.", code))
		}
	}

	// The ratio floor of every draw's census, at the cover quantile.
	inCharge := 0
	if care.Floor != nil && !care.Floor.ChargeNurseCounts {
		inCharge = 1
	}
	ws.Nurses.InCharge = inCharge
	if care.Floor != nil {
		floors := make([]int32, draws)
		samples := make([]TierSample, len(codes))
		for d := range draws {
			for k, code := range codes {
				samples[k] = TierSample{Code: code, Patients: int(counts[k][d])}
			}
			floors[d] = int32(floorNurses(care.Floor, samples))
		}
		slices.Sort(floors)
		fl := countQuantile(floors, care.Cover)
		ws.Nurses.Floor = &fl
	}
	ws.DataSufficient = len(ws.Insufficient) == 0
	if !ws.DataSufficient {
		ws.Nurses.DecidedBy = DecidedByInsufficient
		ws.Nurses.Recommended = ws.Nurses.Floor
		return ws, nil
	}

	// The compound draws, and E[T | C] at the estimates for the census share.
	perPatient := make([]float64, len(codes))
	for k := range codes {
		if j := idx[k]; j >= 0 && present[k] {
			perPatient[k] = f.perPatientMean(&f.tiers[j])
		}
	}
	g := *f
	g.tiers = slices.Clone(f.tiers)
	totals, means := compoundTotals(counts, perPatient, seed, func(r *rand.Rand, c []int) float64 {
		for j := range g.tiers {
			g.tiers[j].patients = 0
		}
		for k, n := range c {
			if j := idx[k]; j >= 0 {
				g.tiers[j].patients = n
			}
		}
		return g.drawTotal(r)
	})
	_, sdT := MeanSD(totals)
	_, sdM := MeanSD(means)
	if sdT > 0 {
		ws.CensusShare = Defined(min(1, sdM*sdM/(sdT*sdT)))
	}
	sorted := slices.Sorted(slices.Values(totals))
	coverMin := HFQuantile(7, care.Cover, sorted)
	ws.MedianMinutes, ws.CoverMinutes = Defined(HFQuantile(7, 0.5, sorted)), Defined(coverMin)
	for _, l := range care.Levels {
		ws.Bands = append(ws.Bands, Band{Level: l, Low: HFQuantile(7, (1-l)/2, sorted), High: HFQuantile(7, (1+l)/2, sorted)})
	}
	perNurse := care.ShiftHours * 60 * care.DirectCareFraction
	ws.NurseHoursCover = Defined(coverMin / 60 / care.DirectCareFraction)
	if !(coverMin/perNurse <= MaxNurses) {
		return nil, wardload.FieldErrorf(wardload.EINVALID, "direct_care_fraction",
			"The care time would need more than %d nurses at a direct-care fraction of %g; check the direct-care fraction and the observations.", MaxNurses, care.DirectCareFraction)
	}
	careGiving := ceilNurses(coverMin / perNurse)
	head := careGiving + inCharge
	n := &ws.Nurses
	n.CareGiving, n.Cover = &careGiving, &head
	rec := recommend(n, head)
	above := countAbove(totals, []float64{float64(max(0, rec-inCharge)) * perNurse})
	ws.ShortfallText = ProbabilityText(above[0], draws)
	return ws, nil
}

// compoundTotals draws T_d = draw(r, c_d) for every census draw d
// (counts[k][d] is tier k's census in draw d) from one PCG stream seeded
// with (seed, streamKey), and returns the totals and m·c_d, the census's
// conditional mean at the per-patient means m.
func compoundTotals(counts [][]int32, perPatient []float64, seed uint64, draw func(r *rand.Rand, c []int) float64) (totals, means []float64) {
	draws := len(counts[0])
	r := rand.New(rand.NewPCG(seed, streamKey))
	totals, means = make([]float64, draws), make([]float64, draws)
	c := make([]int, len(counts))
	for d := range draws {
		for k := range counts {
			c[k] = int(counts[k][d])
			means[d] += perPatient[k] * float64(c[k])
		}
		totals[d] = draw(r, c)
	}
	return totals, means
}
