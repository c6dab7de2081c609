package main

import (
	"context"
	"fmt"
	"io"
	"strings"

	"wardload/internal/projector"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// runWardForecast is forecast --ward: the ward's census history,
// observations and settings from the database (projector.ForecastInput),
// forecast from --from (default: the day after the newest census date).
func runWardForecast(ctx context.Context, e *env, so *storeOptions, code, from string, weeks, draws int, seed uint64, fam stats.CountFamily, asJSON, asCSV bool) int {
	const name = "forecast"
	st, err := openExistingStore(ctx, so)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload %s: %v\n", name, err)
		return exitFailure
	}
	defer st.Close()
	ward, err := findWard(ctx, st, code)
	if err != nil {
		return reportError(e, name, err)
	}
	svc := &projector.Service{Store: st, Now: e.clock}
	var start wardload.Date // zero: the day after the newest census
	if from != "" {
		start, _ = wardload.ParseDate(from)
	}
	wf, err := svc.ForecastInput(ctx, ward.ID, start, weeks, draws, seed)
	if err != nil {
		return reportError(e, name, err)
	}
	wf.Input.Census.Family = fam
	if len(wf.Input.Census.History) == 0 {
		fmt.Fprintf(e.stderr, "wardload %s: ward %s has no census in the %d weeks before %s; a forecast needs at least %d dated days of census.\n",
			name, ward.Code, projector.ForecastHistoryWeeks, wf.Input.Census.From, stats.MinCensusHistoryDays)
		return exitUsage
	}
	res, err := stats.ForecastWorkload(wf.Input)
	if err != nil {
		if wardload.ErrorCode(err) != wardload.EINVALID {
			fmt.Fprintf(e.stderr, "wardload %s: %s\n", name, wardload.ErrorMessage(err))
			return exitFailure
		}
		if f, ok := forecastFlags[wardload.ErrorField(err)]; ok {
			return usageError(e, name, "%s: %s", f, wardload.ErrorMessage(err))
		}
		return usageError(e, name, "ward %s: %s", ward.Code, wardload.ErrorMessage(err))
	}
	flags := workloadFlags{directCare: wf.Settings.DirectCareFraction, cover: wf.Settings.CoverLevel}
	return printWorkload(e, name, res, asJSON, asCSV, flags, func(w io.Writer) error { return writeWardWorkload(w, res, wf) })
}

// writeWardWorkload is writeWorkload for a ward: what was read and the
// floors as configured, then the table.
func writeWardWorkload(out io.Writer, res *stats.WorkloadForecast, wf *projector.WardForecast) error {
	fmt.Fprintf(out, "Ward %s (%s): census %s to %s, care observations %s to %s (the ward's %d-week lookback).\n",
		wf.Ward.Code, wf.Ward.Name, wf.HistoryFrom, wf.HistoryTo, wf.ObsFrom, wf.ObsTo, wf.Settings.LookbackWeeks)
	floor := "No ratio floor is configured for these shifts: the headcount is the care-time need alone."
	if len(wf.Floors) > 0 {
		var parts []string
		for _, f := range wf.Floors {
			part := fmt.Sprintf("%s at most %g patients per nurse", wf.ShiftNames[f.ShiftID], f.PatientsPerNurse)
			if f.TierID != 0 {
				part += " in one tier"
			}
			if !f.ChargeNurseCounts {
				part += " plus 1 nurse in charge"
			}
			parts = append(parts, part)
		}
		floor = fmt.Sprintf("Ratio floors used (the ward's settings): %s; applied to the census at its %s point.", strings.Join(parts, "; "), levelText(res.Cover))
	}
	return writeWorkload(out, res, "the ward's census", "its observations", floor, false, wf.Settings.DirectCareFraction)
}
