package projector

import (
	"cmp"
	"context"
	"fmt"
	"hash/fnv"
	"maps"
	"math"
	"slices"
	"strconv"
	"sync"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// CalibrationWeeks is how many past weeks a ward's backtest checks: a
// quarter, long enough for about 80 shift totals per shift pattern, short
// enough to reflect the ward as it is now (our choice).
const CalibrationWeeks = 12

// CalibrationDraws is the number of predictive draws per checked shift: a
// PIT's Monte Carlo error is then at most √(0.25/1000) ≈ 0.016, small
// beside the band edges it is compared with.
const CalibrationDraws = 1000

// BacktestData is a ward's history as stats.Backtest takes it.
type BacktestData struct {
	Observations []stats.BacktestObservation
	// Covered holds the shift occurrences ("date|shift") whose
	// observations match their newest census tier by tier: every patient
	// timed, so their total is a shift total.
	Covered map[string]bool
}

// CoveredFunc is Covered as stats.BacktestOptions.Covered.
func (d *BacktestData) CoveredFunc() func(date, shift string, counts map[string]int) bool {
	return func(date, shift string, _ map[string]int) bool { return d.Covered[date+"|"+shift] }
}

// LoadBacktest reads a ward's included observations dated from..to, each
// scaled to its shift pattern's nominal hours (a shift pattern's
// occurrences are named "Name#ID"), leaving out values no projection can
// use (stats.Project refuses those with its own message, so they cannot
// break the census page or the review page here), and which occurrences
// were fully timed. It is the one loader of the ward backtest, for the
// projections (Calibrate) and the command line.
func (s *Service) LoadBacktest(ctx context.Context, wardID int64, from, to wardload.Date) (*BacktestData, error) {
	patterns, err := s.Store.FindShiftPatterns(ctx, wardID)
	if err != nil {
		return nil, err
	}
	tiers, err := s.Store.FindTiers(ctx, wardID)
	if err != nil {
		return nil, err
	}
	obs, _, err := s.Store.FindObservations(ctx, wardload.ObservationFilter{WardID: &wardID, From: &from, To: &to, Lean: true})
	if err != nil {
		return nil, err
	}
	censuses, _, err := s.Store.FindCensus(ctx, wardload.CensusFilter{WardID: &wardID, From: &from, To: &to, LatestOnly: true})
	if err != nil {
		return nil, err
	}
	code := map[int64]string{}
	for _, t := range tiers {
		code[t.ID] = t.Code
	}
	hours := map[int64]float64{}
	name := map[int64]string{}
	for _, p := range patterns {
		hours[p.ID], name[p.ID] = p.NominalHours, p.Name+"#"+strconv.FormatInt(p.ID, 10)
	}
	census := map[string]map[string]int{}
	for _, c := range censuses {
		counts := map[string]int{}
		for _, tc := range c.Counts {
			if tc.Patients > 0 {
				counts[code[tc.TierID]] = tc.Patients
			}
		}
		census[c.Date.String()+"|"+name[c.ShiftID]] = counts
	}
	d := &BacktestData{Observations: make([]stats.BacktestObservation, 0, len(obs)), Covered: map[string]bool{}}
	for _, o := range obs {
		h, ok := hours[o.ShiftID]
		if !ok || code[o.TierID] == "" {
			continue
		}
		minutes := o.CareMinutes / o.WindowHours * h
		if !(minutes >= 0 && minutes <= stats.MaxShiftMinutes) {
			continue
		}
		d.Observations = append(d.Observations, stats.BacktestObservation{Tier: code[o.TierID], Date: o.Date.String(),
			Shift: name[o.ShiftID], Minutes: minutes})
	}
	slices.SortStableFunc(d.Observations, func(a, b stats.BacktestObservation) int {
		return cmp.Or(cmp.Compare(a.Date, b.Date), cmp.Compare(a.Shift, b.Shift))
	})
	timed := map[string]map[string]int{}
	for _, x := range d.Observations {
		k := x.Date + "|" + x.Shift
		if timed[k] == nil {
			timed[k] = map[string]int{}
		}
		timed[k][x.Tier]++
	}
	for k, counts := range timed {
		d.Covered[k] = maps.Equal(counts, census[k])
	}
	return d, nil
}

// Calibrate runs the ward's rolling-origin backtest (stats.Backtest) over
// the CalibrationWeeks weeks before date, with the ward's lookback and
// cover level, on LoadBacktest's data. The seed depends on the ward and
// date only, so the same history gives the same result; results are
// cached by a hash of everything they depend on (only which shifts were
// fully timed, of the censuses).
func (s *Service) Calibrate(ctx context.Context, wardID int64, date wardload.Date) (*stats.BacktestResult, error) {
	// The ward's data version, read before the data, settings included
	// (see wardload.WardVersion for why that order makes the key sound):
	// the same version and date give the same backtest, so a cached one
	// is returned without loading a quarter's observations again.
	version, err := s.Store.WardVersion(ctx, wardID)
	if err != nil {
		return nil, err
	}
	vkey := versionKey(wardID, date, version)
	if r, ok := s.cache().get(vkey); ok {
		return r, nil
	}
	settings, err := s.Store.FindSettings(ctx, wardID)
	if err != nil {
		return nil, err
	}
	from := date.AddDays(-7 * (CalibrationWeeks + settings.LookbackWeeks))
	to := date.AddDays(-1)
	data, err := s.LoadBacktest(ctx, wardID, from, to)
	if err != nil {
		return nil, err
	}
	in, covered := data.Observations, data.Covered
	opts := stats.BacktestOptions{
		Weeks: CalibrationWeeks, LookbackWeeks: settings.LookbackWeeks, End: to.String(),
		Levels: []float64{0.5, 0.8, settings.CoverLevel}, Cover: settings.CoverLevel,
		Draws: CalibrationDraws, Seed: Seed(wardID, date, 0),
		Covered: data.CoveredFunc(),
	}
	if settings.CoverLevel < stats.MinCover || settings.CoverLevel > stats.MaxCover {
		opts.Cover, opts.Levels = 0.9, []float64{0.5, 0.8, 0.9}
	}
	if len(in) == 0 {
		return &stats.BacktestResult{Weeks: CalibrationWeeks, Cover: opts.Cover, Levels: opts.Levels,
			Sentence: (&stats.Calibration{Weeks: CalibrationWeeks}).Sentence(opts.Cover)}, nil
	}
	// A new version with the same input (a census that changed no
	// coverage, a projection saved) still reuses the backtest.
	key := calibrationKey(wardID, date, opts, in, covered)
	if r, ok := s.cache().get(key); ok {
		s.cache().put(vkey, r)
		return r, nil
	}
	r, err := stats.Backtest(in, opts)
	if err != nil {
		return nil, err
	}
	s.cache().put(key, r)
	s.cache().put(vkey, r)
	return r, nil
}

// versionKey names a ward's backtest as of date at a data version. It
// shares the cache with calibrationKey's content hashes; the prefix keeps
// the two kinds of key apart.
func versionKey(wardID int64, date wardload.Date, v wardload.WardVersion) uint64 {
	h := fnv.New64a()
	fmt.Fprintf(h, "version|%d|%s|%d|%d\n", wardID, date, v.Entries, v.LastID)
	return h.Sum64()
}

// calibrationKey hashes everything a backtest depends on (FNV-1a 64), so a
// cached result is reused only for exactly the same input.
func calibrationKey(wardID int64, date wardload.Date, o stats.BacktestOptions, in []stats.BacktestObservation, covered map[string]bool) uint64 {
	h := fnv.New64a()
	fmt.Fprintf(h, "%d|%s|%d|%d|%s|%v|%g|%d|%d\n", wardID, date, o.Weeks, o.LookbackWeeks, o.End, o.Levels, o.Cover, o.Draws, o.Seed)
	for _, x := range in {
		fmt.Fprintf(h, "%s|%s|%s|%x\n", x.Tier, x.Date, x.Shift, math.Float64bits(x.Minutes))
	}
	for _, k := range slices.Sorted(maps.Keys(covered)) {
		if covered[k] {
			fmt.Fprintf(h, "covered %s\n", k)
		}
	}
	return h.Sum64()
}

// calibrationCache keeps recent backtests: a census save re-runs the
// ward's backtest only when its observations or censuses changed (a
// backtest of a ward with ten weeks of data takes about 70 ms; a cached
// one nothing). At most maxCalibrations entries; when full it starts over.
type calibrationCache struct {
	mu sync.Mutex
	m  map[uint64]*stats.BacktestResult
}

const maxCalibrations = 256

func (c *calibrationCache) get(key uint64) (*stats.BacktestResult, bool) {
	c.mu.Lock()
	defer c.mu.Unlock()
	r, ok := c.m[key]
	return r, ok
}

func (c *calibrationCache) put(key uint64, r *stats.BacktestResult) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.m == nil || len(c.m) >= maxCalibrations {
		c.m = map[uint64]*stats.BacktestResult{}
	}
	c.m[key] = r
}

func (s *Service) cache() *calibrationCache {
	s.calOnce.Do(func() { s.calibrations = &calibrationCache{} })
	return s.calibrations
}
