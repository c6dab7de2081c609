package server

import (
	"fmt"
	"math"
	"net/http"
	"slices"
	"strconv"
	"time"

	"wardload/internal/stats"
	"wardload/internal/wardload"
	"wardload/web"
)

// exclusionReasons are the reasons offered for excluding an observation.
// They name data problems only; the optional note is capped as well.
var exclusionReasons = []string{
	"extra zero typed",
	"hours entered as minutes",
	"wrong tier",
	"duplicate entry",
	"other (data problem)",
}

// reviewUnit is the unit every figure of the review is in.
const reviewUnit = "care minutes per patient per shift"

// conventionText names a quartile convention in words.
func conventionText(name string) string {
	for _, q := range quartileOptions {
		if q.Value == name {
			return "Quartiles by " + q.Label + ", the ward's setting: " + q.Explanation
		}
	}
	return name
}

// reviewVM builds the page from d.
func (s *Server) reviewVM(r *http.Request, d *reviewData, pg flaggedPaging) (web.ReviewVM, error) {
	ward, p := d.ward, d.params
	vm := web.ReviewVM{
		WardName:       ward.Name,
		URL:            reviewURL(ward),
		ImportURL:      importURL(ward),
		TemplateURL:    templateURL(ward),
		Weeks:          strconv.Itoa(p.weeks),
		WindowText:     fmt.Sprintf("%d weeks, %s to %s", p.weeks, p.from, p.to),
		ShiftText:      "all shifts",
		Conventions:    conventionName(d.settings.Quartiles),
		ConventionNote: conventionText(d.settings.Quartiles),
		Unit:           reviewUnit,
		UnitNote: "Each observation's care minutes are scaled to its own shift pattern's nominal length: " +
			"care minutes ÷ observed hours × the shift's nominal hours (so 60 minutes in a 4-hour window of a " +
			"12-hour shift counts as 180). This assumes care is spread evenly over the shift, as the projections do. " +
			"Only included observations are summarised; the window ends the day before today, like the projections' lookback.",
		Reasons: exclusionReasons,
	}
	if len(ward.FactorNames) > 0 {
		vm.RelationURL = relationURL(ward)
	}
	if p.shiftID != 0 {
		vm.ShiftID = strconv.FormatInt(p.shiftID, 10)
		vm.ShiftText = d.shifts[p.shiftID].Name + " shift only"
	}
	for _, sp := range d.order {
		vm.Shifts = append(vm.Shifts, web.ReviewShiftVM{ID: strconv.FormatInt(sp.ID, 10), Name: sp.Name})
	}
	trs, err := d.reviewTiers()
	if err != nil {
		return vm, err
	}
	hi := 0.0
	for _, tr := range trs {
		if tr.summary != nil {
			hi = max(hi, min(tr.summary.Max, tr.summary.OuterFences.Upper))
		}
	}
	axis := web.NewBoxAxis(hi)
	logScale := histScale(r.URL.Query()) == "log"
	var codes, labels []string
	var plots []*web.BoxPlotVM
	for _, tr := range trs {
		t := tierVM(tr, axis, d.settings.Quartiles)
		t.Hist = tierHistogram(tr, logScale)
		vm.Tiers = append(vm.Tiers, t)
		codes, labels, plots = append(codes, t.Code), append(labels, t.Label), append(plots, t.Plot)
	}
	vm.BoxPlots = web.NewBoxPlots(axis, codes, labels, plots, reviewUnit)
	vm.Order = orderWarnings(trs, reviewUnit)
	vm.OrderOK = len(vm.Order) == 0
	vm.Separation = separationVM(d, trs)
	var trendIns []web.TrendInput
	vm.TrendWeeks, vm.TrendRanges, vm.Trend, trendIns, err = trend(d, trs)
	if err != nil {
		return vm, err
	}
	// Each tier on its own axis from 0: drift within a tier is what the
	// charts are for (the box plots compare tiers on one scale), and an
	// axis from 0 keeps a small change from looking like a large one.
	for _, in := range trendIns {
		top := web.TrendAxisTop([]web.TrendInput{in})
		vm.TrendCharts = append(vm.TrendCharts, web.ReviewTrendChartVM{Label: in.Label, Chart: web.NewTrendChart(in, top)})
	}
	vm.LogScale = histScale(r.URL.Query()) == "log"
	vm.ScaleLinearURL, vm.ScaleLogURL = histScaleURLs(r, vm.URL)
	vm.HistMethod = "Bins by the Freedman–Diaconis rule: width 2 × IQR × n^(−1/3), with the IQR by " + conventionName(d.settings.Quartiles) +
		" (Sturges' rule when the IQR is 0), at most " + strconv.Itoa(maxHistBars) + " bars. Values past the outer fences are counted under the chart, not drawn."
	if vm.LogScale {
		vm.HistMethod = "On the log scale the bins are equal steps of log-minutes, so each bar covers the same ratio (for example 40 to 50 minutes, then 50 to 62). " + vm.HistMethod
	}
	var flagged []flaggedObs
	for _, tr := range trs {
		kinds := map[int]string{}
		if tr.summary != nil {
			for _, out := range tr.summary.Outliers {
				kinds[out.Index] = out.Kind
			}
		}
		for i, o := range tr.obs {
			if kinds[i] != "" || tr.logKind[i] != "" {
				flagged = append(flagged, flaggedObs{o: o, tier: tr.tier, kind: kinds[i], logKind: tr.logKind[i], value: tr.values[i]})
			}
		}
	}
	for _, f := range pageFlagged(&vm, flagged, pg) {
		ov := d.observationVM(f.o, f.tier)
		ov.Kind, ov.LogKind = f.kind, f.logKind
		vm.Flagged = append(vm.Flagged, ov)
	}
	if vm.Calibration, err = s.calibrationVM(r, ward, p.to.AddDays(1)); err != nil {
		return vm, err
	}
	names := map[int64]string{}
	tierByID := map[int64]*wardload.Tier{}
	for _, t := range d.tiers {
		tierByID[t.ID] = t
	}
	for _, o := range d.excluded {
		ov := d.observationVM(o, tierByID[o.TierID])
		ov.Reason, ov.At = o.ExcludedReason, formatAt(o.ExcludedAt)
		if ov.By, err = s.userName(r, names, o.ExcludedBy); err != nil {
			return vm, err
		}
		vm.Excluded = append(vm.Excluded, ov)
	}
	return vm, nil
}

// tierVM formats one tier's summary and lays out its box plot.
func tierVM(tr *tierReview, axis web.BoxAxisVM, convention string) web.ReviewTierVM {
	t := web.ReviewTierVM{Code: tr.tier.Code, Label: tr.tier.Label, N: "0"}
	s := tr.summary
	if s == nil {
		return t
	}
	f := web.FormatValue
	t.N = strconv.Itoa(s.N)
	t.Min, t.Q1, t.Median, t.Q3, t.Max, t.IQR = f(s.Min), f(s.Q1), f(s.Median), f(s.Q3), f(s.Max), f(s.IQR)
	t.InnerLo, t.InnerHi = f(s.InnerFences.Lower), f(s.InnerFences.Upper)
	t.OuterLo, t.OuterHi = f(s.OuterFences.Lower), f(s.OuterFences.Upper)
	t.Mean, t.SD = f(s.Mean), "—"
	if s.SD.Defined {
		t.SD = f(s.SD.Value)
	}
	lo, hi := whiskers(tr.values, s.InnerFences)
	in := web.BoxInput{Label: tr.tier.Label, N: s.N, Min: s.Min, Q1: s.Q1, Median: s.Median, Q3: s.Q3, Max: s.Max,
		WhiskerLo: lo, WhiskerHi: hi, Unit: reviewUnit, Convention: conventionName(convention)}
	for _, o := range s.Outliers {
		in.Outliers = append(in.Outliers, web.BoxPoint{Value: o.Value, Extreme: o.Kind == stats.OutlierExtreme})
	}
	t.Plot = web.NewBoxPlot(axis, in)
	return t
}

func conventionName(name string) string {
	for _, q := range quartileOptions {
		if q.Value == name {
			return q.Label
		}
	}
	return name
}

// observationVM formats one observation for the outlier or excluded list.
func (d *reviewData) observationVM(o *wardload.Observation, t *wardload.Tier) web.ReviewObservationVM {
	id := strconv.FormatInt(o.ID, 10)
	base := "/wards/" + d.ward.Code + "/observations/" + id
	ov := web.ReviewObservationVM{ID: id, Date: o.Date.String(), Window: formatDecimal(o.WindowHours),
		CareMinutes: formatDecimal(o.CareMinutes), Value: web.FormatValue(d.shiftValue(o)),
		ExcludeURL: base + "/exclude", RestoreURL: base + "/restore"}
	if p := d.shifts[o.ShiftID]; p != nil {
		ov.Shift = p.Name
	}
	if t != nil {
		ov.Tier = t.Label
	}
	return ov
}

// userName returns a user's name for the excluded list, caching by ID.
func (s *Server) userName(r *http.Request, cache map[int64]string, id int64) (string, error) {
	if id == 0 {
		return "system", nil
	}
	if n, ok := cache[id]; ok {
		return n, nil
	}
	u, err := s.store.FindUserByID(r.Context(), id)
	if wardload.ErrorCode(err) == wardload.ENOTFOUND {
		cache[id] = fmt.Sprintf("user %d (removed)", id)
		return cache[id], nil
	} else if err != nil {
		return "", fmt.Errorf("review: user: %w", err)
	}
	cache[id] = u.Name
	return u.Name, nil
}

// trend returns the ISO weeks of the window, oldest first, and each
// tier's median per week (the median is the same under every quartile
// convention).
//
// The table's columns run newest week first, so that the week a manager
// reviews on Monday is in view without scrolling; the charts (ins, oldest
// first) put it at the right edge.
func trend(d *reviewData, trs []*tierReview) (weeks, ranges []string, rows []web.ReviewTrendRowVM, ins []web.TrendInput, err error) {
	type span struct{ first, last wardload.Date }
	index := map[string]int{}
	var spans []span
	for day := d.params.from; !day.After(d.params.to); day = day.AddDays(1) {
		k := isoWeek(day)
		if i, ok := index[k]; ok {
			spans[i].last = day
			continue
		}
		index[k] = len(weeks)
		weeks = append(weeks, k)
		spans = append(spans, span{day, day})
	}
	for _, sp := range spans {
		ranges = append(ranges, shortDate(sp.first)+"–"+shortDate(sp.last))
	}
	for _, tr := range trs {
		byWeek := make([][]float64, len(weeks))
		for i, o := range tr.obs {
			w := index[isoWeek(o.Date)]
			byWeek[w] = append(byWeek[w], tr.values[i])
		}
		row := web.ReviewTrendRowVM{Label: tr.tier.Label}
		in := web.TrendInput{Label: tr.tier.Label, Unit: reviewUnit, Weeks: weeks}
		for _, xs := range byWeek {
			row.Counts = append(row.Counts, strconv.Itoa(len(xs)))
			if len(xs) == 0 {
				row.Medians = append(row.Medians, "")
				in.Q1, in.Median, in.Q3 = append(in.Q1, math.NaN()), append(in.Median, math.NaN()), append(in.Q3, math.NaN())
				continue
			}
			q, err := stats.QuartilesOf(xs, d.settings.Quartiles)
			if err != nil {
				return nil, nil, nil, nil, fmt.Errorf("review: trend: %w", err)
			}
			row.Medians = append(row.Medians, web.FormatValue(q.Median))
			in.Q1, in.Median, in.Q3 = append(in.Q1, q.Q1), append(in.Median, q.Median), append(in.Q3, q.Q3)
		}
		slices.Reverse(row.Medians)
		slices.Reverse(row.Counts)
		rows = append(rows, row)
		ins = append(ins, in)
	}
	newestFirst := func(xs []string) []string { ys := slices.Clone(xs); slices.Reverse(ys); return ys }
	return newestFirst(weeks), newestFirst(ranges), rows, ins, nil
}

func isoWeek(d wardload.Date) string {
	y, w := time.Date(d.Year, d.Month, d.Day, 12, 0, 0, 0, time.UTC).ISOWeek()
	return fmt.Sprintf("%d-W%02d", y, w)
}

func shortDate(d wardload.Date) string {
	return time.Date(d.Year, d.Month, d.Day, 12, 0, 0, 0, time.UTC).Format("2 Jan")
}

// handleReview shows the weekly review.
func (s *Server) handleReview(w http.ResponseWriter, r *http.Request) error {
	q := r.URL.Query()
	d, err := s.loadReview(r, q.Get("shift"), q.Get("weeks"))
	if err != nil {
		return err
	}
	pg, err := parseFlaggedPaging(q.Get("order"), q.Get("page"))
	if err != nil {
		return err
	}
	vm, err := s.reviewVM(r, d, pg)
	if err != nil {
		return err
	}
	vm.Notice = s.sessions.PopString(r.Context(), sessFlash)
	return s.renderReview(w, r, http.StatusOK, vm)
}

func (s *Server) renderReview(w http.ResponseWriter, r *http.Request, status int, vm web.ReviewVM) error {
	return s.render(w, r, status, web.ReviewPage(s.layout(r, "Weekly review · "+vm.WardName), vm))
}

// calibrationVM runs the ward's backtest as of today (projector.Calibrate,
// cached) and lays it out for the review page.
func (s *Server) calibrationVM(r *http.Request, ward *wardload.Ward, today wardload.Date) (*web.CalibrationVM, error) {
	res, err := s.projector.Calibrate(r.Context(), ward.ID, today)
	if err != nil {
		return nil, err
	}
	c := res.Calibration()
	vm := &web.CalibrationVM{Sentence: res.Sentence, Warn: c.Warn(res.Cover), Basis: c.Basis}
	for _, l := range res.Levels {
		vm.Levels = append(vm.Levels, wholePercent(l)+" band")
	}
	row := func(name string, b stats.BacktestRow) web.CalibrationRowVM {
		out := web.CalibrationRowVM{Name: name, Checked: strconv.Itoa(b.Checked)}
		for _, v := range b.Coverage {
			if b.Checked == 0 {
				out.Observed = append(out.Observed, "—")
				continue
			}
			out.Observed = append(out.Observed, wholePercent(v))
		}
		return out
	}
	expected := web.CalibrationRowVM{Name: "Expected"}
	for _, l := range res.Levels {
		expected.Observed = append(expected.Observed, wholePercent(l))
	}
	vm.Rows = append(vm.Rows, expected)
	totals := row("Shift totals", res.Totals)
	if res.Totals.Checked == 0 {
		totals.Name = "Shift totals (no shift had every patient timed)"
	}
	vm.Rows = append(vm.Rows, totals)
	pit := res.Totals.PIT
	what := "shift totals"
	for _, t := range res.Tiers {
		vm.Rows = append(vm.Rows, row("Tier "+t.Name+", single observations", t))
	}
	if res.Totals.Checked < stats.CalibrationMinShifts {
		pit, what = [10]int{}, "single observations"
		for _, t := range res.Tiers {
			for i, n := range t.PIT {
				pit[i] += n
			}
		}
	}
	vm.PIT = web.NewPITChart(pit, what)
	return vm, nil
}

// wholePercent says a share as a whole percentage, "86%".
func wholePercent(v float64) string { return strconv.FormatFloat(math.Round(100*v), 'f', 0, 64) + "%" }
