package stats

import (
	"math"
	"time"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// Census model constants.
const (
	// MinCellObservations is the fewest observations every weekday × shift
	// cell of a tier needs before the interaction is even tried: with fewer,
	// a cell's own parameter rests on three counts or less, and its
	// estimate's sampling error (relative SE ≈ √(φ/(n·μ))) swamps the
	// weekday-by-shift differences a roster would act on.
	MinCellObservations = 4
	// interactionAlpha is the level of the analysis-of-deviance F test that
	// keeps the weekday × shift interaction (McCullagh & Nelder 1989, §4.5.2
	// and §9.2.4: with estimated dispersion the deviance difference over its
	// degrees of freedom, divided by φ̂ of the larger model, is F).
	interactionAlpha = 0.05
)

// cellKey is one weekday × shift cell.
type cellKey struct {
	weekday int
	shift   string
}

// censusRecord is one dated shift of the history with every tier's count
// (tiers without a row that shift count 0).
type censusRecord struct {
	day     int // days since 1970-01-01
	weekday int // 0 = Sunday, as time.Weekday
	shift   string
	counts  []int // by tier index
}

// tierModel is one tier's fitted census model.
type tierModel struct {
	tier        int
	family      CountFamily
	fit         *CountFit
	chol        *mat.TriDense // lower Cholesky factor of fit.Cov, for β draws
	interaction bool
	reason      string           // why main effects, when they were chosen
	weekdays    []int            // weekday levels in the design; [0] is the base
	shifts      []string         // shift levels in the design; [0] is the base
	inter       []cellKey        // cells with their own interaction column
	zero        map[cellKey]bool // cells forecast as none (see fitTier)
	allZero     bool             // the tier never had a patient
	origin      int              // day of trend 0: the newest history day
	rows        int              // observations fitted
}

// design returns the model's row for a dated shift:
//
//	[1, 1{weekday = w₁}, …, 1{shift = s₁}, …, (day − origin)/7, 1{cell = c₁}, …]
//
// treatment contrasts as R's model.matrix, the trend in weeks.
func (m *tierModel) design(day, weekday int, shift string) []float64 {
	row := []float64{1}
	for _, w := range m.weekdays[1:] {
		row = append(row, b2fl(weekday == w))
	}
	for _, s := range m.shifts[1:] {
		row = append(row, b2fl(shift == s))
	}
	row = append(row, float64(day-m.origin)/7)
	for _, c := range m.inter {
		row = append(row, b2fl(weekday == c.weekday && shift == c.shift))
	}
	return row
}

func b2fl(b bool) float64 {
	if b {
		return 1
	}
	return 0
}

// fitTier fits tier k's counts in recs by the log-linear model
//
//	log E[y] = α + γ_weekday + δ_shift + (γδ)_weekday,shift + β·weeks
//
// with Var y = φ·E[y] (quasi-Poisson) or E[y] + E[y]²/θ (NB2); see
// ForecastCensus for the choices it makes.
func fitTier(recs []censusRecord, k int, family CountFamily, origin int) (*tierModel, error) {
	m := &tierModel{tier: k, family: family, origin: origin, zero: map[cellKey]bool{}}
	cellN, cellSum := map[cellKey]int{}, map[cellKey]int{}
	wdSum, shSum := map[int]int{}, map[string]int{}
	total := 0
	for _, r := range recs {
		c := cellKey{r.weekday, r.shift}
		cellN[c]++
		cellSum[c] += r.counts[k]
		wdSum[r.weekday] += r.counts[k]
		shSum[r.shift] += r.counts[k]
		total += r.counts[k]
	}
	if total == 0 {
		m.allZero = true
		return m, nil
	}
	dense := true
	for c, n := range cellN {
		if n < MinCellObservations || cellSum[c] == 0 {
			dense = false
		}
	}
	// A weekday or shift that never had a patient of this tier has its
	// Poisson MLE on the boundary (log μ = −∞); its rows are left out and
	// its cells forecast as none rather than fitted to a diverging
	// coefficient whose huge standard error would make draws explode.
	var use []censusRecord
	for _, r := range recs {
		if wdSum[r.weekday] == 0 || shSum[r.shift] == 0 {
			m.zero[cellKey{r.weekday, r.shift}] = true
			continue
		}
		use = append(use, r)
	}
	m.weekdays, m.shifts = levels(use)
	main, err := m.fitRows(use, family)
	if err != nil {
		return nil, err
	}
	if !dense {
		main.reason = "main effects: a weekday × shift cell has fewer than 4 observations or no patients"
		return main, nil
	}
	if len(m.weekdays) < 2 || len(m.shifts) < 2 {
		main.reason = "main effects: one weekday or one shift only"
		return main, nil
	}
	full := *m
	for _, w := range m.weekdays[1:] {
		for _, s := range m.shifts[1:] {
			if cellN[cellKey{w, s}] > 0 {
				full.inter = append(full.inter, cellKey{w, s})
			}
		}
	}
	full.interaction = true
	// The choice is made on the quasi-Poisson fits (the mean structure);
	// the family's own fit follows on the chosen design.
	qMain, qFull := main, &full
	if family != FamilyQuasiPoisson {
		if qMain, err = m.fitRows(use, FamilyQuasiPoisson); err != nil {
			return nil, err
		}
	}
	if qFull, err = full.fitRows(use, FamilyQuasiPoisson); err != nil {
		return nil, err
	}
	df1 := float64(len(qFull.fit.Beta) - len(qMain.fit.Beta))
	df2 := float64(len(use) - len(qFull.fit.Beta))
	f := (qMain.fit.Deviance - qFull.fit.Deviance) / df1 / qFull.fit.Dispersion
	p := 1 - distuv.F{D1: df1, D2: df2}.CDF(math.Max(f, 0))
	if !(p < interactionAlpha) {
		main.reason = "main effects: the weekday × shift interaction was not significant at 5% by the F test"
		return main, nil
	}
	if family == FamilyQuasiPoisson {
		return qFull, nil
	}
	return full.fitRows(use, family)
}

// fitRows fits a copy of m's design to recs.
func (m *tierModel) fitRows(recs []censusRecord, family CountFamily) (*tierModel, error) {
	c := *m
	x := make([][]float64, len(recs))
	y := make([]float64, len(recs))
	for i, r := range recs {
		x[i] = c.design(r.day, r.weekday, r.shift)
		y[i] = float64(r.counts[m.tier])
	}
	fit, err := FitCountRegression(x, y, family)
	if err != nil {
		return nil, err
	}
	var chol mat.Cholesky
	if !chol.Factorize(fit.Cov) {
		return nil, errSingularDesign
	}
	c.fit, c.family, c.rows = fit, family, len(recs)
	c.chol = mat.NewTriDense(len(fit.Beta), mat.Lower, nil)
	chol.LTo(c.chol)
	return &c, nil
}

// levels returns the weekdays (Monday first) and shifts (in order of first
// appearance) present in recs.
func levels(recs []censusRecord) (weekdays []int, shifts []string) {
	seenW, seenS := map[int]bool{}, map[string]bool{}
	for _, r := range recs {
		seenW[r.weekday] = true
		if !seenS[r.shift] {
			seenS[r.shift] = true
			shifts = append(shifts, r.shift)
		}
	}
	for _, w := range []int{1, 2, 3, 4, 5, 6, 0} {
		if seenW[w] {
			weekdays = append(weekdays, w)
		}
	}
	return weekdays, shifts
}

// dayNumber returns the days since 1970-01-01 of a YYYY-MM-DD date.
func dayNumber(t time.Time) int { return int(t.Unix() / 86400) }

// dateOfDay is dayNumber's inverse.
func dateOfDay(day int) time.Time { return time.Unix(int64(day)*86400, 0).UTC() }
