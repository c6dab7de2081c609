package stats

import (
	"cmp"
	"maps"
	"math"
	"math/rand/v2"
	"slices"
	"time"

	"wardload/internal/wardload"
)

// BacktestObservation is one timed observation for Backtest.
type BacktestObservation struct {
	Tier    string  `json:"tier"`
	Date    string  `json:"date"`    // YYYY-MM-DD
	Shift   string  `json:"shift"`   // shift pattern; date and shift name the occurrence
	Minutes float64 `json:"minutes"` // per-patient care minutes over the whole shift (already scaled)
}

// BacktestOptions control Backtest; zero values take the defaults shown.
type BacktestOptions struct {
	Weeks         int       // weeks checked, counted back from End; default 12
	LookbackWeeks int       // weeks of history each check may use; default 10
	End           string    // last date checked; default the newest observation's date
	Levels        []float64 // band levels; default 0.5, 0.8, 0.9
	Cover         float64   // cover level whose one-sided hit rate is summarised; default 0.9
	Draws         int       // predictive draws per check; default 2000
	Seed          uint64
	// Covered, when set, says whether an occurrence's observations cover
	// all its patients (their counts per tier equal its census); only
	// covered occurrences are checked as shift totals. Nil: all are.
	Covered func(date, shift string, counts map[string]int) bool
}

// BacktestRow is the calibration of one kind of prediction.
type BacktestRow struct {
	Name     string    `json:"name"`     // tier code, or "shift totals"
	Checked  int       `json:"checked"`  // predictions compared with what happened
	Coverage []float64 `json:"coverage"` // per level: share of outcomes inside the central band
	CoverHit float64   `json:"cover_hit"`
	PIT      [10]int   `json:"pit"` // histogram of the PIT values in tenths
}

// BacktestResult is a rolling-origin backtest.
type BacktestResult struct {
	From     string        `json:"from"`
	To       string        `json:"to"`
	Weeks    int           `json:"weeks"`
	Levels   []float64     `json:"levels"`
	Cover    float64       `json:"cover"`
	Tiers    []BacktestRow `json:"tiers"`
	Totals   BacktestRow   `json:"totals"`
	Skipped  int           `json:"skipped"` // occurrences with too little history before them
	Sentence string        `json:"sentence"`
}

// Backtest measures calibration on the data's own history, rolling the
// forecast origin forward a week at a time (Hyndman & Athanasopoulos,
// Forecasting: Principles and Practice, 3rd ed., §5.10 "time series
// cross-validation"). For each of the last Weeks weeks and each shift
// pattern, the model (fitCare) is fitted on that pattern's observations of
// the LookbackWeeks weeks before the week, exactly as a projection would
// be, and every observation of the week is scored by its probability
// integral transform (PIT, Dawid 1984, JRSS A 147(2); Gneiting, Balabdaoui
// & Raftery 2007, JRSS B 69(2)):
//
//	single observation y of tier k: PIT = mean over parameter draws of
//	    Φ((ln(y + c_k) − μ_k) / √(σ_k² + τ²))
//	shift total Y of an occurrence with counts n_k: PIT = share of
//	    predictive totals below Y (half of the ties counted)
//
// A calibrated model gives uniform PITs: a share L of them inside
// [(1−L)/2, (1+L)/2] for each level L, and a share q at or below q.
// Occurrences whose tiers lack MinTierObservations before them are skipped.
// Bad input returns EINVALID.
func Backtest(obs []BacktestObservation, o BacktestOptions) (*BacktestResult, error) {
	if o.Weeks == 0 {
		o.Weeks = 12
	}
	if o.LookbackWeeks == 0 {
		o.LookbackWeeks = 10
	}
	if o.Levels == nil {
		o.Levels = []float64{0.5, 0.8, 0.9}
	}
	if o.Cover == 0 {
		o.Cover = 0.9
	}
	if o.Draws == 0 {
		o.Draws = 2000
	}
	bad := func(field, format string, args ...any) error {
		return wardload.FieldErrorf(wardload.EINVALID, field, format, args...)
	}
	if o.Weeks < 1 || o.Weeks > 104 || o.LookbackWeeks < 1 || o.LookbackWeeks > 104 {
		return nil, bad("weeks", "Weeks must be from 1 to 104.")
	}
	if !(o.Cover >= MinCover && o.Cover <= MaxCover) {
		return nil, bad("cover_level", "Cover level must be from %g to %g.", MinCover, MaxCover)
	}
	if o.Draws < 100 || o.Draws > 1_000_000 {
		return nil, bad("draws", "Draws must be from 100 to 1000000.")
	}
	if len(obs) == 0 {
		return nil, bad("observations", "There are no observations to check.")
	}
	days := make([]time.Time, len(obs))
	end := o.End
	for i, x := range obs {
		d, err := time.Parse(time.DateOnly, x.Date)
		if err != nil {
			return nil, bad("date", "Row %d: %q is not a date (YYYY-MM-DD).", i+1, clipText(x.Date))
		}
		if math.IsNaN(x.Minutes) || math.IsInf(x.Minutes, 0) || x.Minutes < 0 || x.Minutes > MaxShiftMinutes {
			return nil, bad("care_minutes", "Row %d: care minutes must be a number from 0 to %g.", i+1, MaxShiftMinutes)
		}
		if x.Tier == "" {
			return nil, bad("tier", "Row %d: the tier is missing.", i+1)
		}
		days[i] = d
		if x.Date > end {
			end = x.Date
		}
	}
	endDay, err := time.Parse(time.DateOnly, end)
	if err != nil {
		return nil, bad("end", "%q is not a date (YYYY-MM-DD).", clipText(end))
	}
	first := endDay.AddDate(0, 0, -7*o.Weeks+1)
	res := &BacktestResult{From: first.Format(time.DateOnly), To: end, Weeks: o.Weeks, Levels: o.Levels, Cover: o.Cover}
	tiers := map[string]*BacktestRow{}
	totals := &BacktestRow{Name: "shift totals", Coverage: make([]float64, len(o.Levels))}
	var tierCodes []string
	for _, x := range obs {
		if _, ok := tiers[x.Tier]; !ok {
			tiers[x.Tier] = &BacktestRow{Name: x.Tier, Coverage: make([]float64, len(o.Levels))}
			tierCodes = append(tierCodes, x.Tier)
		}
	}
	slices.Sort(tierCodes)
	patterns := map[string]bool{}
	for _, x := range obs {
		patterns[x.Shift] = true
	}
	r := rand.New(rand.NewPCG(o.Seed, 0x6261636b74657374)) // "backtest"
	for w := range o.Weeks {
		wStart := first.AddDate(0, 0, 7*w)
		wEnd := wStart.AddDate(0, 0, 7)
		hStart := wStart.AddDate(0, 0, -7*o.LookbackWeeks)
		for _, pattern := range slices.Sorted(maps.Keys(patterns)) {
			train := map[string]*fitInput{}
			occ := map[string][]int{}
			for i, x := range obs {
				if x.Shift != pattern {
					continue
				}
				switch {
				case !days[i].Before(hStart) && days[i].Before(wStart):
					t := train[x.Tier]
					if t == nil {
						t = &fitInput{code: x.Tier}
						train[x.Tier] = t
					}
					t.minutes = append(t.minutes, x.Minutes)
					t.raw = append(t.raw, x.Minutes)
					t.dates = append(t.dates, x.Date)
					t.shifts = append(t.shifts, x.Shift)
				case !days[i].Before(wStart) && days[i].Before(wEnd):
					occ[x.Date] = append(occ[x.Date], i)
				}
			}
			// One fit per week and pattern, as of the week's first day;
			// each occurrence then only moves the projected date (the
			// tiers' mean ages) and sets its census (fitCare does not
			// depend on either otherwise).
			base := make([]fitInput, 0, len(tierCodes))
			for _, code := range tierCodes {
				in := fitInput{code: code}
				if t := train[code]; t != nil {
					in.minutes, in.raw, in.dates, in.shifts = t.minutes, t.raw, t.dates, t.shifts
				}
				base = append(base, in)
			}
			f0 := fitCare(base, wStart.Format(time.DateOnly), specV3)
			for _, date := range slices.Sorted(maps.Keys(occ)) {
				idx := occ[date]
				counts := map[string]int{}
				for _, i := range idx {
					counts[obs[i].Tier]++
				}
				day, _ := time.Parse(time.DateOnly, date)
				f := f0.at(day.Sub(wStart).Hours()/24, counts)
				ok := true
				for _, t := range f.tiers {
					if t.patients > 0 && (len(t.z) < MinTierObservations || t.sigma2 == 0) {
						ok = false
					}
				}
				if !ok {
					res.Skipped++
					continue
				}
				for _, i := range idx {
					k := slices.Index(tierCodes, obs[i].Tier)
					u := f.singlePIT(r, k, obs[i].Minutes, 200)
					tiers[obs[i].Tier].add(u, o.Levels, o.Cover)
				}
				if o.Covered == nil || o.Covered(date, pattern, counts) {
					y := 0.0
					for _, i := range idx {
						y += obs[i].Minutes
					}
					totals.add(totalPIT(f, r, y, o.Draws), o.Levels, o.Cover)
				}
			}
		}
	}
	for _, code := range tierCodes {
		res.Tiers = append(res.Tiers, tiers[code].finish())
	}
	res.Totals = totals.finish()
	res.Sentence = res.Calibration().Sentence(o.Cover)
	return res, nil
}

// Calibration is the summary a projection carries: shift totals when at
// least CalibrationMinShifts were checked, else single observations.
func (b *BacktestResult) Calibration() *Calibration {
	c := &Calibration{Weeks: b.Weeks, Level: b.Cover, Basis: "shift totals"}
	row := b.Totals
	if row.Checked < CalibrationMinShifts {
		c.Basis = "single observations"
		row = BacktestRow{}
		for _, t := range b.Tiers {
			row.Checked += t.Checked
			row.CoverHit += t.CoverHit * float64(t.Checked)
		}
		if row.Checked > 0 {
			row.CoverHit /= float64(row.Checked)
		}
	}
	c.Shifts = row.Checked
	c.Inside = int(math.Round(row.CoverHit * float64(row.Checked)))
	return c
}

// add counts one PIT value u (coverage is accumulated as counts until
// finish turns it into shares).
func (row *BacktestRow) add(u float64, levels []float64, cover float64) {
	row.Checked++
	for i, l := range levels {
		if u >= (1-l)/2 && u <= (1+l)/2 {
			row.Coverage[i]++
		}
	}
	if u <= cover {
		row.CoverHit++
	}
	row.PIT[min(9, int(u*10))]++
}

func (row *BacktestRow) finish() BacktestRow {
	out := *row
	out.Coverage = slices.Clone(row.Coverage)
	if row.Checked > 0 {
		for i := range out.Coverage {
			out.Coverage[i] /= float64(row.Checked)
		}
		out.CoverHit /= float64(row.Checked)
	}
	return out
}

// singlePIT is the predictive CDF of one new patient of tier k at y,
// averaged over n parameter draws.
func (f *careFit) singlePIT(r *rand.Rand, k int, y float64, n int) float64 {
	t := &f.tiers[k]
	z := math.Log(y + t.offset)
	s := 0.0
	for range n {
		p := f.drawParams(r)
		mu, s2 := f.tierLocation(r, t, p)
		s += 1 - NormalUpperTail((z-mu)/math.Sqrt(s2+p.tau2))
	}
	return s / float64(n)
}

// totalPIT is the share of predictive totals below y, ties counted half.
func totalPIT(f *careFit, r *rand.Rand, y float64, draws int) float64 {
	below, ties := 0, 0
	for range draws {
		switch v := f.drawTotal(r); cmp.Compare(v, y) {
		case -1:
			below++
		case 0:
			ties++
		}
	}
	return (float64(below) + float64(ties)/2) / float64(draws)
}

// at returns a copy of f for a projected date days later than the one it
// was fitted for, with the given census per tier code: observation ages
// grow by days (t̄ falls by days; slopes and spreads are unchanged).
func (f *careFit) at(days float64, census map[string]int) *careFit {
	g := *f
	g.tiers = slices.Clone(f.tiers)
	for k := range g.tiers {
		g.tiers[k].patients = census[g.tiers[k].code]
		g.tiers[k].tbar -= days
	}
	return &g
}
