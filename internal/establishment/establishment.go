// Package establishment turns weeks of projected nurse-hours into the
// establishment a hospital funds: nurse-hours per year and full-time
// equivalents (FTE), per ward and in total, with a bootstrap band over the
// weeks. It is pure (no I/O, no clock, seeded randomness) and imports the
// standard library, internal/stats and the domain's error type only.
//
// The hours per FTE and the headroom are the hospital's own figures; this
// package has no default for either. Every figure is an estimate that
// defers to local staffing law, collective agreements and licensed
// clinical judgement.
package establishment

import (
	"math"
	"math/rand/v2"
	"slices"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// DaysPerYear is the mean Gregorian year (97 leap days in 400 years), so
// that an establishment funds every day of the years it is used for.
const DaysPerYear = 365.2425

// Limits on the input.
const (
	MaxHoursPerFTE = 8784 // every hour of a leap year
	MinDraws       = 1000
	MaxDraws       = 200_000
)

// Params are the hospital's figures and the bootstrap's settings.
type Params struct {
	// HoursPerFTE is the paid (contracted) hours of one FTE in a year, as
	// the hospital's contracts set it (e.g. 37.5 h × 52 weeks = 1,950 h is
	// only an example).
	HoursPerFTE float64
	// Headroom is the share of those paid hours an FTE is not available
	// for rostered work: annual leave, public holidays, study and
	// training, sickness, parental and other leave, as the hospital sets
	// it; 0 ≤ Headroom < 1. Applied as ÷(1 − Headroom): see FTE.
	Headroom float64
	Level    float64 // two-sided level of the band, e.g. 0.9
	Draws    int
	Seed     uint64
}

// Validate returns EINVALID naming "fte_hours", "headroom", "level" or
// "draws".
func (p Params) Validate() error {
	if !(p.HoursPerFTE > 0) || p.HoursPerFTE > MaxHoursPerFTE {
		return wardload.FieldErrorf(wardload.EINVALID, "fte_hours",
			"Hours per FTE must be above 0 and at most %d (the hours of a year): the paid hours of one full-time post a year.", MaxHoursPerFTE)
	}
	if !(p.Headroom >= 0) {
		return wardload.FieldErrorf(wardload.EINVALID, "headroom", "Headroom must not be negative: it is the share of paid hours not available for rostered work.")
	}
	if p.Headroom >= 1 {
		return wardload.FieldErrorf(wardload.EINVALID, "headroom",
			"Headroom must be below 100%%: it is the share of paid hours not available for rostered work (0.22 for 22%%).")
	}
	if !(p.Level >= 0.5 && p.Level <= 0.99) {
		return wardload.FieldErrorf(wardload.EINVALID, "level", "The band's level must be between 0.5 and 0.99.")
	}
	if p.Draws < MinDraws || p.Draws > MaxDraws {
		return wardload.FieldErrorf(wardload.EINVALID, "draws", "Draws must be between %d and %d.", MinDraws, MaxDraws)
	}
	return nil
}

// FTE returns the full-time equivalents that fund `hours` rostered hours a
// year:
//
//	FTE = hours ÷ (hoursPerFTE × (1 − headroom))
//
// An FTE is paid hoursPerFTE hours and is away for the share headroom of
// them, so it works hoursPerFTE·(1 − h); dividing by that funds the hours
// whatever h is. The other convention, ×(1 + u) on rostered hours (the UK
// "time-out" uplift), is the same rule with u = h/(1 − h): a hospital that
// sets its figure as such an uplift u enters h = u/(1 + u) (22% uplift →
// h = 0.1803). Taking an unavailability share h as an uplift would
// under-fund: ×1.22 covers only 18% unavailability, not 22%.
//
// Sources: the available-working-time form of WHO, Workload Indicators of
// Staffing Need, user's manual (2010) (category allowance factor
// 1/(1 − share), from memory); the Dutch capacity model, BMC Health
// Services Research 2007;7:196, Table 1 (1,521.9 of 1,872 h available);
// the uplift form in Hurst, K. (2002/2003), Selecting and Applying Methods
// for Estimating the Size and Mix of Nursing Teams, Department of Health
// (England) (455 h/week × 1.22 ÷ 37.5 = 14.8 WTE). Preconditions as
// Params.Validate for hoursPerFTE and headroom; panics otherwise (callers
// validate first).
func FTE(hours, hoursPerFTE, headroom float64) float64 {
	if !(hoursPerFTE > 0) || !(headroom >= 0 && headroom < 1) {
		panic("establishment: FTE needs hoursPerFTE > 0 and 0 ≤ headroom < 1")
	}
	return hours / (hoursPerFTE * (1 - headroom))
}

// Shift is the nurse-hours one dated shift needs: Week is the index of
// its week (0 … weeks−1) and Pattern the shift pattern it belongs to.
type Shift struct {
	Week    int
	Pattern string
	Hours   float64
}

// Ward is one ward's weeks of shifts.
type Ward struct {
	Ward   string
	Shifts []Shift
	// Patterns are the ward's shift patterns, each running every day; a
	// pattern without any shift in the weeks cannot be estimated.
	Patterns []string
}

// Figure is a point estimate with its band.
type Figure struct {
	Value float64 `json:"value"`
	Low   float64 `json:"low"`
	High  float64 `json:"high"`
}

// WardResult is a ward's establishment.
type WardResult struct {
	Ward        string   `json:"ward"`
	Shifts      int      `json:"shifts"`           // dated shifts with hours
	Missing     []string `json:"missing_patterns"` // patterns without any shift: left out, so the figures are too low
	HoursPerDay Figure   `json:"nurse_hours_per_day"`
	HoursYear   Figure   `json:"nurse_hours_per_year"`
	FTE         Figure   `json:"fte"`
}

// Result holds every ward's establishment and the total.
type Result struct {
	Weeks int
	Wards []WardResult
	Total WardResult
}

// Estimate returns each ward's establishment and the total from `weeks`
// weeks of dated shifts. Per ward, with m_p the mean hours of the dated
// shifts of pattern p (shifts with no projection are left out, not
// counted as 0),
//
//	hours a year = DaysPerYear × Σ_p m_p,   FTE as FTE(hours, HoursPerFTE, Headroom)
//
// and the total is the sum over wards. The band is a percentile bootstrap
// over weeks (Efron, B. & Tibshirani, R. J. (1993), An Introduction to the
// Bootstrap, ch. 13): each draw resamples `weeks` week indices with
// replacement, the same for every ward (calendar weeks, so wards busy in
// the same weeks stay together), recomputes every m_p from the shifts of
// those weeks (a pattern with none in a draw keeps its full-sample mean)
// and so every figure; the band is the type 7 quantiles (1 ∓ Level)/2 of
// the draws (Hyndman & Fan 1996). It carries the week-to-week sampling
// variation of the average, not the uncertainty of each projection nor
// changes to come. Randomness: math/rand/v2 PCG seeded with (Seed, 0).
// Returns EINVALID naming "weeks" (below 1 or above 520, a shift outside
// them, or a ward with no shift at all), "hours" (negative or not finite)
// or as Params.Validate.
func Estimate(wards []Ward, weeks int, p Params) (*Result, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	if weeks < 1 || weeks > 520 {
		return nil, wardload.FieldErrorf(wardload.EINVALID, "weeks", "Weeks must be between 1 and 520.")
	}
	if len(wards) == 0 {
		return nil, wardload.FieldErrorf(wardload.EINVALID, "ward", "Name at least one ward.")
	}
	cells := make([]wardCells, len(wards))
	for i, w := range wards {
		c, err := newCells(w, weeks)
		if err != nil {
			return nil, err
		}
		cells[i] = c
	}
	res := &Result{Weeks: weeks, Wards: make([]WardResult, len(wards)), Total: WardResult{Ward: "total"}}
	points := make([]float64, len(wards))
	total := 0.0
	for i, c := range cells {
		points[i] = c.perDay(nil)
		total += points[i]
		res.Wards[i] = WardResult{Ward: wards[i].Ward, Shifts: len(wards[i].Shifts), Missing: c.missing}
		res.Total.Shifts += len(wards[i].Shifts)
	}
	draws := make([][]float64, len(wards)+1)
	for i := range draws {
		draws[i] = make([]float64, p.Draws)
	}
	r := rand.New(rand.NewPCG(p.Seed, 0))
	count := make([]int, weeks)
	for d := range p.Draws {
		clear(count)
		for range weeks {
			count[r.IntN(weeks)]++
		}
		sum := 0.0
		for i, c := range cells {
			v := c.perDay(count)
			draws[i][d] = v
			sum += v
		}
		draws[len(wards)][d] = sum
	}
	lo, hi := (1-p.Level)/2, (1+p.Level)/2
	fill := func(w *WardResult, point float64, ds []float64) {
		slices.Sort(ds)
		day := Figure{Value: point, Low: stats.HFQuantile(7, lo, ds), High: stats.HFQuantile(7, hi, ds)}
		w.HoursPerDay = day
		w.HoursYear = Figure{Value: day.Value * DaysPerYear, Low: day.Low * DaysPerYear, High: day.High * DaysPerYear}
		fte := func(h float64) float64 { return FTE(h, p.HoursPerFTE, p.Headroom) }
		w.FTE = Figure{Value: fte(w.HoursYear.Value), Low: fte(w.HoursYear.Low), High: fte(w.HoursYear.High)}
	}
	for i := range wards {
		fill(&res.Wards[i], points[i], draws[i])
	}
	fill(&res.Total, total, draws[len(wards)])
	return res, nil
}

// wardCells holds a ward's hours summed by pattern and week, so that a
// bootstrap draw costs patterns × weeks, not shifts.
type wardCells struct {
	sum, n  [][]float64 // [pattern][week]
	mean    []float64   // [pattern]: the unweighted mean, perDay's fallback
	missing []string
}

func newCells(w Ward, weeks int) (wardCells, error) {
	if len(w.Shifts) == 0 {
		return wardCells{}, wardload.FieldErrorf(wardload.EINVALID, "weeks",
			"Ward %s has no projected shift in these %d weeks, so its establishment cannot be estimated.", w.Ward, weeks)
	}
	index := map[string]int{}
	for _, name := range w.Patterns {
		if _, dup := index[name]; !dup {
			index[name] = len(index)
		}
	}
	c := wardCells{sum: make([][]float64, len(index)), n: make([][]float64, len(index))}
	for i := range c.sum {
		c.sum[i], c.n[i] = make([]float64, weeks), make([]float64, weeks)
	}
	for _, s := range w.Shifts {
		k, ok := index[s.Pattern]
		if s.Week < 0 || s.Week >= weeks || !ok {
			return wardCells{}, wardload.FieldErrorf(wardload.EINVALID, "weeks", "Ward %s: a shift lies outside the weeks or its patterns.", w.Ward)
		}
		if !(s.Hours >= 0) || math.IsInf(s.Hours, 0) {
			return wardCells{}, wardload.FieldErrorf(wardload.EINVALID, "hours", "Ward %s: nurse-hours must be a number of hours, not negative.", w.Ward)
		}
		c.sum[k][s.Week] += s.Hours
		c.n[k][s.Week]++
	}
	kept := 0
	for _, name := range w.Patterns {
		k, ok := index[name]
		if !ok {
			continue // a repeated name, already placed
		}
		delete(index, name)
		if slices.Max(c.n[k]) == 0 {
			c.missing = append(c.missing, name)
			continue
		}
		c.sum[kept], c.n[kept] = c.sum[k], c.n[k]
		fs, fn := 0.0, 0.0
		for wk := range c.sum[kept] {
			fs += c.sum[kept][wk]
			fn += c.n[kept][wk]
		}
		c.mean = append(c.mean, fs/fn)
		kept++
	}
	c.sum, c.n = c.sum[:kept], c.n[:kept]
	return c, nil
}

// perDay returns Σ_p m_p with every week weighted by count[week] (nil:
// every week once). A pattern with no shift in the weighted weeks keeps
// its unweighted mean.
func (c wardCells) perDay(count []int) float64 {
	total := 0.0
	for k := range c.sum {
		s, n := 0.0, 0.0
		for wk := range c.sum[k] {
			w := 1.0
			if count != nil {
				w = float64(count[wk])
			}
			s += w * c.sum[k][wk]
			n += w * c.n[k][wk]
		}
		if n == 0 {
			total += c.mean[k]
			continue
		}
		total += s / n
	}
	return total
}
