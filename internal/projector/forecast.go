package projector

import (
	"context"
	"fmt"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// ForecastHistoryWeeks is how far back a ward's census history is read
// for a forecast: a year shows the weekday pattern and the trend without
// letting a ward's distant past decide its next weeks.
const ForecastHistoryWeeks = 52

// WardForecast is a ward's forecast input as read from the store, with
// what was used, for the report.
type WardForecast struct {
	Ward     *wardload.Ward
	Settings *wardload.Settings
	Input    stats.WorkloadForecastInput
	// HistoryFrom and HistoryTo bound the census history read; the care
	// observations of each shift pattern come from the ward's lookback
	// weeks before the first forecast date (ObsFrom to ObsTo).
	HistoryFrom, HistoryTo wardload.Date
	ObsFrom, ObsTo         wardload.Date
	Floors                 []wardload.RatioFloor // the floors of the forecast shifts
	ShiftNames             map[int64]string      // by shift pattern ID
}

// ForecastInput reads what stats.ForecastWorkload needs for the ward from
// the store: the newest revision of every census of the ward in the
// ForecastHistoryWeeks weeks before from, as tier codes and shift names;
// per shift pattern the included observations of its lookback weeks
// before from (as Prepare reads them for one shift), its nominal hours,
// the ward's direct-care fraction, cover level and the pattern's ratio
// floor. Dated shifts whose real length differs from the nominal one (a
// daylight-saving change) are forecast at the nominal length. from is the
// first forecast date, or zero for the day after the ward's newest census
// up to tomorrow (Service.Now, the ward's calendar; tomorrow when it has
// none); weeks 1 to stats.MaxForecastWeeks; draws and seed as
// stats.CensusForecastInput. ENOTFOUND for an unknown ward.
func (s *Service) ForecastInput(ctx context.Context, wardID int64, from wardload.Date, weeks, draws int, seed uint64) (*WardForecast, error) {
	ward, err := s.Store.FindWardByID(ctx, wardID)
	if err != nil {
		return nil, err
	}
	settings, err := s.Store.FindSettings(ctx, wardID)
	if err != nil {
		return nil, err
	}
	shifts, err := s.Store.FindShiftPatterns(ctx, wardID)
	if err != nil {
		return nil, err
	}
	tiers, err := s.Store.FindTiers(ctx, wardID)
	if err != nil {
		return nil, err
	}
	auto := from.IsZero()
	if auto {
		loc, err := ward.Location()
		if err != nil {
			return nil, err
		}
		from = Today(s.now(), loc).AddDays(1)
	}
	histFrom, histTo := from.AddDays(-7*ForecastHistoryWeeks), from.AddDays(-1)
	census, _, err := s.Store.FindCensus(ctx, wardload.CensusFilter{WardID: &wardID, From: &histFrom, To: &histTo, LatestOnly: true})
	if err != nil {
		return nil, fmt.Errorf("forecast: census: %w", err)
	}
	if auto {
		var newest wardload.Date
		for _, c := range census {
			if c.Date.After(newest) {
				newest = c.Date
			}
		}
		if !newest.IsZero() {
			from = newest.AddDays(1)
		}
	}
	wf := &WardForecast{Ward: ward, Settings: settings,
		HistoryFrom: from.AddDays(-7 * ForecastHistoryWeeks), HistoryTo: from.AddDays(-1),
		ObsFrom: from.AddDays(-7 * settings.LookbackWeeks), ObsTo: from.AddDays(-1)}
	shiftName, tierCode := map[int64]string{}, map[int64]string{}
	for _, p := range shifts {
		shiftName[p.ID] = p.Name
	}
	wf.ShiftNames = shiftName
	for _, t := range tiers {
		tierCode[t.ID] = t.Code
	}
	in := &wf.Input
	in.Census = stats.CensusForecastInput{From: from.String(), Weeks: weeks, Beds: settings.Beds, Draws: draws, Seed: seed,
		Levels: []float64{settings.CoverLevel}}
	for _, c := range census {
		if c.Date.Before(wf.HistoryFrom) {
			continue // read for the default start, older than this start's history
		}
		for _, tc := range c.Counts {
			in.Census.History = append(in.Census.History, stats.CensusCount{Date: c.Date.String(), Shift: shiftName[c.ShiftID], Tier: tierCode[tc.TierID], Patients: tc.Patients})
		}
	}
	in.Care = map[string]stats.ProjectionInput{}
	for _, p := range shifts {
		obs, _, err := s.Store.FindObservations(ctx, wardload.ObservationFilter{WardID: &wardID, ShiftID: &p.ID, From: &wf.ObsFrom, To: &wf.ObsTo, Lean: true})
		if err != nil {
			return nil, fmt.Errorf("forecast: observations: %w", err)
		}
		byTier := map[int64][]*wardload.Observation{}
		for _, o := range obs {
			byTier[o.TierID] = append(byTier[o.TierID], o)
		}
		care := stats.ProjectionInput{ShiftHours: p.NominalHours, DirectCareFraction: settings.DirectCareFraction,
			Levels: []float64{settings.CoverLevel}, Cover: settings.CoverLevel}
		for _, t := range tiers {
			care.Tiers = append(care.Tiers, tierSample(t.Code, 0, byTier[t.ID], p.Name))
		}
		care.Floor = floorSpec(settings.Floors, p.ID, tiers, &wf.Floors)
		in.Care[p.Name] = care
	}
	return wf, nil
}

// tierSample is one tier's observations of one shift pattern as the
// model takes them: the date names the occurrence.
func tierSample(code string, patients int, obs []*wardload.Observation, shift string) stats.TierSample {
	ts := stats.TierSample{Code: code, Patients: patients, CareMinutes: []float64{}, WindowHours: []float64{}}
	for _, o := range obs {
		ts.CareMinutes = append(ts.CareMinutes, o.CareMinutes)
		ts.WindowHours = append(ts.WindowHours, o.WindowHours)
		ts.Dates = append(ts.Dates, o.Date.String())
		ts.Shifts = append(ts.Shifts, shift)
	}
	return ts
}
