package stats

import (
	"math"
	"math/rand/v2"
	"time"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat/distuv"
)

// maxCensusMean caps a drawn mean census, ten times the largest census a
// tier may record, so that a wild parameter draw far in the trend's tail
// cannot overflow the count draws; the bed cap cuts any such draw anyway.
const maxCensusMean = 10 * MaxPatients

// censusPrep is a checked forecast input with its fitted model.
type censusPrep struct {
	*censusFit
	from, weeks, draws int
	levelsList         []float64
}

// prepareCensus checks in and fits the model to its history.
func prepareCensus(in CensusForecastInput) (*censusPrep, error) {
	p := &censusPrep{weeks: in.Weeks, draws: in.Draws, levelsList: in.Levels}
	if p.weeks == 0 {
		p.weeks = DefaultForecastWeeks
	}
	if p.draws == 0 {
		p.draws = DefaultCensusDraws
	}
	if p.levelsList == nil {
		p.levelsList = []float64{0.8, 0.9}
	}
	if p.weeks < 1 || p.weeks > MaxForecastWeeks {
		return nil, errField("weeks", "The horizon must be from 1 to %d weeks.", MaxForecastWeeks)
	}
	if err := checkCensusSettings(in.Beds, p.draws, in.Family, p.levelsList); err != nil {
		return nil, err
	}
	from, err := time.Parse(time.DateOnly, in.From)
	if err != nil {
		return nil, errField("from", "%q is not a date (YYYY-MM-DD).", clipText(in.From))
	}
	h, err := historyOf(in.History, in.Beds)
	if err != nil {
		return nil, err
	}
	p.from = dayNumber(from)
	last := h.recs[len(h.recs)-1].day
	switch {
	case p.from <= last:
		return nil, errField("from", "The forecast must start after the newest census date, %s.", dateOfDay(last).Format(time.DateOnly))
	case p.from-last > 7*MaxForecastGapWeeks:
		return nil, errField("from", "The forecast must start within %d weeks of the newest census date, %s.", MaxForecastGapWeeks, dateOfDay(last).Format(time.DateOnly))
	}
	if p.censusFit, err = fitCensus(h.tiers, h.shifts, h.recs, in.Family); err != nil {
		return nil, err
	}
	return p, nil
}

// checkCensusSettings checks the settings ForecastCensus and
// BacktestCensus share.
func checkCensusSettings(beds, draws int, family CountFamily, levels []float64) error {
	switch {
	case beds < 1 || beds > MaxPatients:
		return errField("beds", "Beds must be a whole number from 1 to %d.", MaxPatients)
	case draws < 100 || draws > MaxCensusDraws:
		return errField("draws", "Draws must be from 100 to %d.", MaxCensusDraws)
	case family != FamilyQuasiPoisson && family != FamilyNegBin2:
		return errField("family", "The census model is quasi-Poisson or negative binomial (NB2).")
	}
	for _, l := range levels {
		if !(l >= 0.01 && l <= MaxCover) {
			return errField("levels", "Band levels must be from 0.01 to %g.", MaxCover)
		}
	}
	return nil
}

// historyOf checks the history's rows and that it holds at least
// MinCensusHistoryDays dated days.
func historyOf(rows []CensusCount, beds int) (*censusHistory, error) {
	h, err := newCensusHistory(rows, beds)
	if err != nil {
		return nil, err
	}
	if days := distinctDays(h.recs); days < MinCensusHistoryDays {
		return nil, errField("history", "The census history has %d dated day(s); a forecast needs at least 4 weeks (%d days), so %s of census history are needed.",
			days, MinCensusHistoryDays, weeksNeeded(days))
	}
	return h, nil
}

// censusSims holds the draws of every tier on every target, after the bed
// cap: y[k][i·draws + d].
type censusSims struct {
	draws  int
	y      [][]int32
	capped []int // per target: draws whose total was capped
}

func (s *censusSims) tier(k, i int) []int32 { return s.y[k][i*s.draws : (i+1)*s.draws] }

func (s *censusSims) total(i int) []int32 {
	t := make([]int32, s.draws)
	for k := range s.y {
		for d, v := range s.tier(k, i) {
			t[d] += v
		}
	}
	return t
}

// simulate draws every tier's census on every target (see ForecastCensus
// for the model and the random streams) and applies the bed cap.
func (f *censusFit) simulate(targets []censusTarget, beds, draws int, seed uint64) *censusSims {
	s := &censusSims{draws: draws, y: make([][]int32, len(f.models)), capped: make([]int, len(targets))}
	for k, m := range f.models {
		s.y[k] = make([]int32, len(targets)*draws)
		if m.allZero {
			continue
		}
		r := rand.New(rand.NewPCG(seed, splitmix64(uint64(k+1))))
		xs := make([]*mat.VecDense, len(targets))
		for i, t := range targets {
			if !m.zero[cellKey{t.weekday, t.shift}] {
				xs[i] = mat.NewVecDense(len(m.fit.Beta), m.design(t.day, t.weekday, t.shift))
			}
		}
		p := len(m.fit.Beta)
		z := mat.NewVecDense(p, nil)
		beta := mat.NewVecDense(p, nil)
		bhat := mat.NewVecDense(p, m.fit.Beta)
		nu := float64(m.rows - p) // residual df of φ̂
		for d := range draws {
			phi, c := m.fit.Dispersion, 1.0
			if m.family == FamilyQuasiPoisson && nu > 0 {
				c = nu / chiSquare(r, nu)
				phi *= c
			}
			for j := range p {
				z.SetVec(j, r.NormFloat64())
			}
			beta.MulVec(m.chol, z)
			beta.AddScaledVec(bhat, math.Sqrt(c), beta)
			for i, x := range xs {
				if x == nil {
					continue
				}
				mu := math.Min(math.Exp(mat.Dot(x, beta)), maxCensusMean)
				s.y[k][i*draws+d] = int32(m.drawCount(r, mu, phi))
			}
		}
	}
	y := make([]int32, len(f.models))
	for i := range targets {
		for d := range draws {
			for k := range y {
				y[k] = s.y[k][i*draws+d]
			}
			if capToBeds(y, beds) {
				s.capped[i]++
				for k := range y {
					s.y[k][i*draws+d] = y[k]
				}
			}
		}
	}
	return s
}

// drawCount draws a census of mean mu from the tier's count distribution
// with dispersion phi (quasi-Poisson; see ForecastCensus).
func (m *tierModel) drawCount(r *rand.Rand, mu, phi float64) float64 {
	if mu <= 0 {
		return 0
	}
	if m.family == FamilyNegBin2 {
		return poissonDraw(r, gammaDraw(r, m.fit.Theta)*mu/m.fit.Theta)
	}
	return quasiPoissonDraw(r, mu, phi)
}

// quasiPoissonDraw draws a count of mean mu and variance phi·mu: Poisson
// for phi = 1; for phi > 1 Poisson with a gamma-distributed mean of shape
// mu/(phi − 1) and scale phi − 1 (a negative binomial); for phi < 1 a
// binomial with n = ⌈mu/(1 − phi)⌉ and p = mu/n.
func quasiPoissonDraw(r *rand.Rand, mu, phi float64) float64 {
	if mu <= 0 {
		return 0
	}
	lambda := mu
	switch {
	case phi > 1:
		lambda = gammaDraw(r, mu/(phi-1)) * (phi - 1)
	case phi < 1:
		n := math.Ceil(mu / (1 - phi))
		return distuv.Binomial{N: n, P: mu / n, Src: r}.Rand()
	}
	return poissonDraw(r, lambda)
}

// poissonDraw draws Poisson(lambda), 0 for lambda ≤ 0.
func poissonDraw(r *rand.Rand, lambda float64) float64 {
	if lambda <= 0 {
		return 0
	}
	return distuv.Poisson{Lambda: lambda, Src: r}.Rand()
}

// capToBeds scales y down to a total of beds by the largest-remainder
// method when its total exceeds beds (see ForecastCensus), reporting
// whether it did.
func capToBeds(y []int32, beds int) bool {
	total := 0
	for _, v := range y {
		total += int(v)
	}
	if total <= beds {
		return false
	}
	left := beds
	rem := make([]int, len(y)) // remainders in units of 1/total
	for k, v := range y {
		q := int(v) * beds
		y[k] = int32(q / total)
		rem[k] = q % total
		left -= int(y[k])
	}
	for ; left > 0; left-- {
		best := 0
		for k := range rem {
			if rem[k] > rem[best] {
				best = k
			}
		}
		y[best]++
		rem[best] = -1
	}
	return true
}
