package stats

import (
	"math"
	"slices"
	"time"
)

// CensusBacktestOptions configure BacktestCensus; zero values take the
// defaults named.
type CensusBacktestOptions struct {
	Horizons     []int       // days after the origin; default 1, 7, 14, 28
	Levels       []float64   // central band levels; default 0.8, 0.9
	Draws        int         // per dated shift; default 1000
	Seed         uint64      // the same seed gives the same result
	Beds         int         // the ward's beds (required)
	Family       CountFamily // as ForecastCensus
	Step         int         // days between origins; default 7
	Origins      int         // use only the newest this many origins; 0: all
	LookbackDays int         // history each origin may use; 0: all before it
}

// CensusHorizon is the backtest at one horizon, pooled over origins,
// tiers and shifts.
type CensusHorizon struct {
	Horizon     int       `json:"horizon_days"`
	Checked     int       `json:"checked"`      // observed tier counts forecast at this horizon
	Coverage    []float64 `json:"coverage"`     // share inside each integer band, by level
	PITCoverage []float64 `json:"pit_coverage"` // expected share by the randomized PIT, by level
	Compared    int       `json:"compared"`     // of Checked, those with a seasonal-naive forecast
	MAE         float64   `json:"mae"`          // of the predictive median
	MAENaive    float64   `json:"mae_seasonal_naive"`
	MAEAverage  float64   `json:"mae_average"`
	MASE        float64   `json:"mase"`         // Hyndman & Koehler (2006)
	RelMAE      float64   `json:"relative_mae"` // MAE / MAENaive
	Scaled      int       `json:"scaled"`       // of Compared, those in MASE (in-sample scale > 0)
}

// CensusBacktestResult is BacktestCensus's result.
type CensusBacktestResult struct {
	MethodVersion string          `json:"method_version"`
	Origins       int             `json:"origins"`
	FirstOrigin   string          `json:"first_origin"`
	LastOrigin    string          `json:"last_origin"`
	Levels        []float64       `json:"levels"`
	Horizons      []CensusHorizon `json:"horizons"`
}

// BacktestCensus runs a rolling-origin evaluation (Tashman 2000, IJF
// 16:437–450) of ForecastCensus on a census history. Origins are the
// days, Step apart, from the first with MinCensusHistoryDays dated days of
// history up to and including it, to the last from which a horizon still
// lands in the history. From each origin the model is fitted to the
// history up to the origin (the LookbackDays before it, when set) and
// every recorded dated shift at origin + h days, for each horizon h, is
// forecast with Draws draws (seed splitmix64(Seed + origin index)).
// Pooled over origins, tiers and shifts, per horizon:
//
//	Coverage_L    = share of observed y with q((1−L)/2) ≤ y ≤ q((1+L)/2)
//	PITCoverage_L = mean of |[F(y−1), F(y)] ∩ [(1−L)/2, (1+L)/2]| / (F(y) − F(y−1))
//
// (F the predictive distribution function of the draws): the second is
// the probability that the randomized PIT falls in the central L band,
// exactly L in expectation for a calibrated count forecast, while the
// integer band covers at least L by construction (Czado, Gneiting & Held
// 2009, Biometrics 65:1254–1261). Point accuracy uses the predictive
// median ŷ against two benchmarks: the seasonal-naive forecast (the same
// shift on the same weekday in the newest week up to the origin, or up to
// three weeks before if that day is missing) and the fixed average census
// (the tier's mean on that shift over the fitted history):
//
//	MAE = mean |y − ŷ|,   RelMAE = MAE / MAE_naive
//	MASE = mean |y − ŷ| / s,  s = mean_t |y_t − y_{t−7}| in sample
//
// with s the in-sample mean absolute error of the one-week seasonal-naive
// forecast of that tier and shift (Hyndman & Koehler 2006, IJF 22:679–688,
// eq. for seasonal MASE); errors with s = 0 are left out of MASE only.
// Point accuracy is measured on targets that have a seasonal-naive
// forecast, so the three MAEs compare like with like.
//
// It returns ForecastCensus's input errors.
func BacktestCensus(history []CensusCount, o CensusBacktestOptions) (*CensusBacktestResult, error) {
	o = o.withDefaults()
	if err := checkCensusSettings(o.Beds, o.Draws, o.Family, o.Levels); err != nil {
		return nil, err
	}
	for _, hz := range o.Horizons {
		if hz < 1 || hz > 7*MaxForecastWeeks {
			return nil, errField("horizons", "Horizons must be from 1 to %d days.", 7*MaxForecastWeeks)
		}
	}
	h, err := historyOf(history, o.Beds)
	if err != nil {
		return nil, err
	}
	recs := h.recs
	last := recs[len(recs)-1].day
	observed := map[occKey][]int{}
	for _, r := range recs {
		observed[occKey{r.day, r.shift}] = r.counts
	}
	origins := censusOrigins(recs, o, slices.Min(o.Horizons))
	res := &CensusBacktestResult{MethodVersion: CensusMethodVersion, Origins: len(origins), Levels: o.Levels}
	acc := make([]horizonAcc, len(o.Horizons))
	for j, origin := range origins {
		lo := 0
		for lo < len(recs) && o.LookbackDays > 0 && recs[lo].day <= origin-o.LookbackDays {
			lo++
		}
		hi := lo
		for hi < len(recs) && recs[hi].day <= origin {
			hi++
		}
		train := recs[lo:hi]
		if distinctDays(train) < MinCensusHistoryDays {
			continue
		}
		f, err := fitCensus(h.tiers, h.shifts, train, o.Family)
		if err != nil {
			return nil, err
		}
		var targets []censusTarget
		var hIdx []int
		for hn, hz := range o.Horizons {
			d := origin + hz
			if d > last {
				continue
			}
			for _, t := range f.targets(d, d) {
				if observed[occKey{t.day, t.shift}] != nil {
					targets = append(targets, t)
					hIdx = append(hIdx, hn)
				}
			}
		}
		sims := f.simulate(targets, o.Beds, o.Draws, splitmix64(o.Seed+uint64(j)))
		bench := newCensusBenchmarks(train)
		for i, t := range targets {
			y := observed[occKey{t.day, t.shift}]
			for k := range h.tiers {
				naive, hasNaive := bench.naive(k, t, origin)
				acc[hIdx[i]].add(y[k], sims.tier(k, i), o.Levels, hasNaive, naive, bench.average(k, t.shift), bench.scale(k, t.shift))
			}
		}
		if res.FirstOrigin == "" {
			res.FirstOrigin = dateOfDay(origin).Format(time.DateOnly)
		}
		res.LastOrigin = dateOfDay(origin).Format(time.DateOnly)
	}
	for i, hz := range o.Horizons {
		res.Horizons = append(res.Horizons, acc[i].finish(hz, len(o.Levels)))
	}
	return res, nil
}

func (o CensusBacktestOptions) withDefaults() CensusBacktestOptions {
	if o.Horizons == nil {
		o.Horizons = []int{1, 7, 14, 28}
	}
	if o.Levels == nil {
		o.Levels = []float64{0.8, 0.9}
	}
	if o.Draws == 0 {
		o.Draws = 1000
	}
	if o.Step <= 0 {
		o.Step = 7
	}
	return o
}

// occKey is one dated shift.
type occKey struct {
	day   int
	shift string
}

// censusOrigins lists the origins (see BacktestCensus).
func censusOrigins(recs []censusRecord, o CensusBacktestOptions, minH int) []int {
	start, n, prev := -1, 0, -1<<62
	for _, r := range recs {
		if r.day != prev {
			n++
			prev = r.day
		}
		if n == MinCensusHistoryDays {
			start = r.day
			break
		}
	}
	if start < 0 {
		return nil
	}
	var out []int
	for d := start; d+minH <= recs[len(recs)-1].day; d += o.Step {
		out = append(out, d)
	}
	if o.Origins > 0 && len(out) > o.Origins {
		out = out[len(out)-o.Origins:]
	}
	return out
}

// pitBandShare is the probability that a PIT uniform on [a, b] falls in
// [lo, hi] (the point a itself when b = a).
func pitBandShare(a, b, lo, hi float64) float64 {
	if b <= a {
		if a >= lo && a <= hi {
			return 1
		}
		return 0
	}
	return math.Max(0, math.Min(b, hi)-math.Max(a, lo)) / (b - a)
}
