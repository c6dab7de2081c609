package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"

	"wardload/internal/csvfile"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// workloadFlags are the forecast command's flags for nurse-hours: with
// --observations it combines the census forecast with the care model.
type workloadFlags struct {
	observations, shiftHours, column string
	directCare, cover, ppn           float64
	chargeCounts                     bool
}

// parseShiftHours reads "12" (every shift) or "Day=12,Night=12".
func parseShiftHours(s string, shifts []string) (map[string]float64, error) {
	out := map[string]float64{}
	if v, err := strconv.ParseFloat(strings.TrimSpace(s), 64); err == nil {
		for _, sh := range shifts {
			out[sh] = v
		}
	} else {
		for part := range strings.SplitSeq(s, ",") {
			name, val, ok := strings.Cut(part, "=")
			v, err := strconv.ParseFloat(strings.TrimSpace(val), 64)
			if !ok || err != nil {
				return nil, fmt.Errorf("%q is not NAME=HOURS (or one number for every shift)", clip(part))
			}
			out[strings.TrimSpace(name)] = v
		}
	}
	for _, sh := range shifts {
		v, ok := out[sh]
		switch {
		case !ok:
			return nil, fmt.Errorf("no hours for shift %q of the census file", clip(sh))
		case !(v > 0 && v <= 25):
			return nil, fmt.Errorf("shift %q: the hours must be more than 0 and at most 25", clip(sh))
		}
	}
	return out, nil
}

// careByShift splits the observations file by its shift column into one
// projection input per census shift; without a shift column every shift
// uses all observations (and the report says so).
func careByShift(t *csvfile.Table, wf workloadFlags, shifts []string, hours map[string]float64, levels []float64) (map[string]stats.ProjectionInput, bool, error) {
	tiers, _, err := projectTiers(t, wf.column, 0, false)
	if err != nil {
		return nil, false, err
	}
	pooled := t.Index(shiftColumn) < 0
	out := map[string]stats.ProjectionInput{}
	for _, sh := range shifts {
		in := stats.ProjectionInput{ShiftHours: hours[sh], DirectCareFraction: wf.directCare, Levels: levels, Cover: wf.cover}
		if wf.ppn != 0 {
			in.Floor = &stats.FloorSpec{PatientsPerNurse: wf.ppn, ChargeNurseCounts: wf.chargeCounts}
		}
		for _, ts := range tiers {
			if pooled {
				in.Tiers = append(in.Tiers, ts)
				continue
			}
			keep := stats.TierSample{Code: ts.Code}
			for i, s := range ts.Shifts {
				if s == sh {
					keep.CareMinutes = append(keep.CareMinutes, ts.CareMinutes[i])
					keep.WindowHours = append(keep.WindowHours, ts.WindowHours[i])
					keep.Dates = append(keep.Dates, ts.Dates[i])
					keep.Shifts = append(keep.Shifts, s)
				}
			}
			in.Tiers = append(in.Tiers, keep)
		}
		out[sh] = in
	}
	return out, pooled, nil
}

// censusShifts lists the shift names of the census history in order of
// first appearance.
func censusShifts(hist []stats.CensusCount) []string {
	var out []string
	for _, c := range hist {
		if !slices.Contains(out, c.Shift) {
			out = append(out, c.Shift)
		}
	}
	return out
}

// writeWorkload prints the nurse-hours forecast: one line per dated shift.
// floor says which ratio floor was used.
func writeWorkload(out io.Writer, wf *stats.WorkloadForecast, source, obs, floor string, pooled bool, directCare float64) error {
	fc := wf.Census
	fmt.Fprintf(out, "Nurse-hours forecast from %s and %s, %s to %s (%d weeks): %s, with %s and %s.\n",
		source, obs, fc.From, fc.To, fc.Weeks, wf.MethodVersion, fc.MethodVersion, stats.MethodVersion)
	fmt.Fprintf(out, "History %s to %s; %d beds; %d draws, seed %d; cover level %s; direct-care fraction %g.\n",
		fc.HistoryFrom, fc.HistoryTo, fc.Beds, fc.Draws, fc.Seed, levelText(wf.Cover), directCare)
	fmt.Fprintln(out, floor)
	if pooled {
		fmt.Fprintf(out, "%s has no %q column: every shift uses all observations, although care by night often differs from care by day.\n", obs, shiftColumn)
	}
	fmt.Fprintln(out)
	w := tabwriter.NewWriter(out, 0, 0, 2, ' ', 0)
	fmt.Fprintf(w, "date\tday\tshift\tcensus\tnurse-hours at %s\tfloor\trecommended\tfrom census\t\n", levelText(wf.Cover))
	var declined []string
	for _, s := range wf.Shifts {
		census := quantileText(s.Census)
		if !s.DataSufficient {
			fmt.Fprintf(w, "%s\t%s\t%s\t%s\t—\t%s\t%s\t—\t\n", s.Date, s.Weekday[:3], s.Shift, census, intText(s.Nurses.Floor), intText(s.Nurses.Recommended))
			declined = append(declined, fmt.Sprintf("%s %s: %s", s.Date, s.Shift, strings.Join(s.Insufficient, " ")))
			continue
		}
		fmt.Fprintf(w, "%s\t%s\t%s\t%s\t%.1f\t%s\t%d (%s)\t%.0f%%\t\n", s.Date, s.Weekday[:3], s.Shift, census,
			s.NurseHoursCover.Value, intText(s.Nurses.Floor), *s.Nurses.Recommended, s.Nurses.DecidedBy, 100*s.CensusShare.Value)
	}
	if err := w.Flush(); err != nil {
		return err
	}
	fmt.Fprintln(out, "\n\"census\": median [bands] of the total census. \"floor\": the ratio floor for the census at the cover percentile. \"from census\": the share of the spread of care time that comes from not knowing the census; the rest is not knowing the care each patient takes.")
	for _, d := range declined {
		fmt.Fprintln(out, "Declined: "+d+" The floor alone is shown.")
	}
	_, err := fmt.Fprintf(out, "\n%s\n%s\n", stats.Caution, fc.Caution)
	return err
}

// intText is n or "—" for none.
func intText(n *int) string {
	if n == nil {
		return "—"
	}
	return strconv.Itoa(*n)
}

// writeWorkloadCSV writes one row per dated shift.
func writeWorkloadCSV(out io.Writer, wf *stats.WorkloadForecast, wflags workloadFlags) error {
	w := csv.NewWriter(out)
	w.Write([]string{"date", "weekday", "shift", "horizon_days", "census_median", "data_sufficient",
		"median_minutes", "cover_minutes", "nurse_hours_cover", "floor_nurses", "recommended_nurses", "decided_by",
		"census_share", "cover_level", "patients_per_nurse", "method_version", "caution"})
	num := func(n stats.Number, prec int) string {
		if !n.Defined {
			return ""
		}
		return strconv.FormatFloat(n.Value, 'f', prec, 64)
	}
	opt := func(n *int) string {
		if n == nil {
			return ""
		}
		return strconv.Itoa(*n)
	}
	for _, s := range wf.Shifts {
		w.Write([]string{s.Date, s.Weekday, s.Shift, strconv.Itoa(s.Horizon), strconv.Itoa(s.Census.Median),
			strconv.FormatBool(s.DataSufficient), num(s.MedianMinutes, 1), num(s.CoverMinutes, 1), num(s.NurseHoursCover, 1),
			opt(s.Nurses.Floor), opt(s.Nurses.Recommended), s.Nurses.DecidedBy, num(s.CensusShare, 3),
			strconv.FormatFloat(wf.Cover, 'f', -1, 64), ppnText(wflags.ppn), wf.MethodVersion, stats.Caution})
	}
	w.Flush()
	return w.Error()
}

// workloadError maps a ForecastWorkload error about a shift's care input
// to its flag (as project's) or to the observations file; "" otherwise.
func workloadError(err error, obs string) string {
	f := wardload.ErrorField(err)
	if f == "shift" {
		return obs + ": " + wardload.ErrorMessage(err)
	}
	switch f {
	case "shift_hours", "direct_care_fraction", "cover_level", "patients_per_nurse": // the care flags
		return projectFlags[f] + ": " + wardload.ErrorMessage(err)
	}
	return "" // levels and draws are the census forecast's (forecastFlags)
}

// runWorkloadForecast is forecast --observations.
func runWorkloadForecast(e *env, censusFile string, wf workloadFlags, set map[string]bool, cin stats.CensusForecastInput, asJSON, asCSV bool) int {
	const name = "forecast"
	usage := func(format string, a ...any) int { return usageError(e, name, format, a...) }
	for _, f := range []string{"shift-hours", "direct-care"} {
		if !set[f] {
			return usage("--%s is required with --observations", f)
		}
	}
	if !(wf.directCare >= wardload.MinDirectCareFraction && wf.directCare <= 1) {
		return usage("--direct-care: the direct-care fraction must be from %g to 1.", wardload.MinDirectCareFraction)
	}
	shifts := censusShifts(cin.History)
	hours, err := parseShiftHours(wf.shiftHours, shifts)
	if err != nil {
		return usage("--shift-hours: %s", err)
	}
	t, code, err := readProjectFile(e, wf.observations)
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload %s: %s: %s\n", name, wf.observations, oneLineMessage(err))
		return code
	}
	care, pooled, err := careByShift(t, wf, shifts, hours, cin.Levels)
	if err != nil {
		return usage("%s: %s", wf.observations, oneLineMessage(err))
	}
	fc, err := stats.ForecastWorkload(stats.WorkloadForecastInput{Census: cin, Care: care})
	if err != nil {
		if wardload.ErrorCode(err) != wardload.EINVALID {
			fmt.Fprintf(e.stderr, "wardload %s: %s\n", name, wardload.ErrorMessage(err))
			return exitFailure
		}
		if msg := workloadError(err, wf.observations); msg != "" {
			return usage("%s", msg)
		}
		if f, ok := forecastFlags[wardload.ErrorField(err)]; ok {
			return usage("%s: %s", f, wardload.ErrorMessage(err))
		}
		return usage("%s: %s", censusFile, wardload.ErrorMessage(err))
	}
	return printWorkload(e, name, fc, asJSON, asCSV, wf, func(w io.Writer) error {
		return writeWorkload(w, fc, censusFile, wf.observations, fileFloorText(wf), pooled, wf.directCare)
	})
}

// printWorkload writes res as JSON, CSV or the report, buffered so that a
// failure never leaves half of it, and returns the exit status.
func printWorkload(e *env, name string, res *stats.WorkloadForecast, asJSON, asCSV bool, flags workloadFlags, report func(io.Writer) error) int {
	var b strings.Builder
	var err error
	switch {
	case asJSON:
		err = writeJSONTo(&b, res)
	case asCSV:
		err = writeWorkloadCSV(&b, res, flags)
	default:
		err = report(&b)
	}
	if err == nil {
		_, err = io.WriteString(e.stdout, b.String())
	}
	if err != nil {
		fmt.Fprintf(e.stderr, "wardload %s: cannot write the result: %v\n", name, err)
		return exitFailure
	}
	return exitOK
}

// writeJSONTo writes v as one JSON object and a newline.
func writeJSONTo(w io.Writer, v any) error { return json.NewEncoder(w).Encode(v) }

// fileFloorText says which ratio floor the file form used.
func fileFloorText(wf workloadFlags) string {
	if wf.ppn == 0 {
		return "No ratio floor given (--patients-per-nurse): the headcount is the care-time need alone."
	}
	charge := "plus 1 nurse in charge who does not count towards the ratio"
	if wf.chargeCounts {
		charge = "the nurse in charge counts towards the ratio"
	}
	return fmt.Sprintf("Ratio floor used: at most %g patients per nurse, %s, applied to the census at its %s point.", wf.ppn, charge, levelText(wf.cover))
}

// ppnText is the file form's --patients-per-nurse, blank when none was
// given (a ward's floors, per shift, are in floor_nurses).
func ppnText(ppn float64) string {
	if ppn == 0 {
		return ""
	}
	return strconv.FormatFloat(ppn, 'f', -1, 64)
}
