package server

import (
	"fmt"
	"math"
	"net/http"
	"net/url"
	"strconv"
	"strings"

	"wardload/internal/projector"
	"wardload/internal/stats"
	"wardload/internal/wardload"
	"wardload/web"
)

// reviewParams is the window and shift a review shows.
type reviewParams struct {
	weeks    int
	shiftID  int64 // 0: all shifts
	from, to wardload.Date
}

// reviewData is what the review page reads from the store.
type reviewData struct {
	ward     *wardload.Ward
	settings *wardload.Settings
	tiers    []*wardload.Tier
	shifts   map[int64]*wardload.ShiftPattern
	order    []*wardload.ShiftPattern // by start
	params   reviewParams
	included []*wardload.Observation
	excluded []*wardload.Observation
}

// reviewWeeks reads a weeks parameter: a whole number of weeks the
// settings' lookback could also be.
func reviewWeeks(s string) (int, bool) {
	n, err := strconv.Atoi(s)
	return n, err == nil && n >= 1 && n <= wardload.MaxLookbackWeeks
}

// weeksParam reads the weeks of a window from a query value, def when it
// is empty; EINVALID naming "weeks" when it is not a whole number of
// weeks a lookback could be.
func weeksParam(v string, def int) (int, error) {
	v = strings.TrimSpace(v)
	if v == "" {
		return def, nil
	}
	n, ok := reviewWeeks(v)
	if !ok {
		return 0, wardload.FieldErrorf(wardload.EINVALID, "weeks", "Weeks must be a whole number from 1 to %d.", wardload.MaxLookbackWeeks)
	}
	return n, nil
}

// reviewQuery is the review's address with a shift and weeks, as the
// exclude and restore forms send them back.
func reviewQuery(ward *wardload.Ward, shift, weeks string) string {
	q := url.Values{}
	if id, err := strconv.ParseInt(shift, 10, 64); err == nil && id > 0 {
		q.Set("shift", strconv.FormatInt(id, 10))
	}
	if n, ok := reviewWeeks(weeks); ok {
		q.Set("weeks", strconv.Itoa(n))
	}
	if len(q) == 0 {
		return reviewURL(ward)
	}
	return reviewURL(ward) + "?" + q.Encode()
}

// loadReview reads the ward's settings, tiers, shifts and the
// observations of the window. The window ends the day before today on the
// ward's calendar and spans weeks×7 days: the observations a projection
// for a shift today would use (projector.Prepare).
func (s *Server) loadReview(r *http.Request, shift, weeks string) (*reviewData, error) {
	ctx := r.Context()
	ward := principalFrom(ctx).Ward
	d := &reviewData{ward: ward, shifts: map[int64]*wardload.ShiftPattern{}}
	var err error
	if d.settings, err = s.store.FindSettings(ctx, ward.ID); err != nil {
		return nil, fmt.Errorf("review: settings: %w", err)
	}
	if d.order, d.tiers, err = s.shiftsAndTiers(ctx, ward, "review"); err != nil {
		return nil, err
	}
	for _, p := range d.order {
		d.shifts[p.ID] = p
	}
	p := reviewParams{}
	if p.weeks, err = weeksParam(weeks, d.settings.LookbackWeeks); err != nil {
		return nil, err
	}
	if sh := strings.TrimSpace(shift); sh != "" {
		id, err := strconv.ParseInt(sh, 10, 64)
		if err != nil || d.shifts[id] == nil {
			return nil, wardload.FieldErrorf(wardload.EINVALID, "shift", "This ward has no such shift.")
		}
		p.shiftID = id
	}
	loc, err := ward.Location()
	if err != nil {
		return nil, fmt.Errorf("review: %w", err)
	}
	today := projector.Today(s.now(), loc)
	p.from, p.to = today.AddDays(-7*p.weeks), today.AddDays(-1)
	d.params = p
	f := wardload.ObservationFilter{WardID: &ward.ID, From: &p.from, To: &p.to, IncludeExcluded: true, Lean: true}
	if p.shiftID != 0 {
		f.ShiftID = &p.shiftID
	}
	all, _, err := s.store.FindObservations(ctx, f)
	if err != nil {
		return nil, fmt.Errorf("review: observations: %w", err)
	}
	for _, o := range all {
		if o.Excluded {
			d.excluded = append(d.excluded, o)
		} else {
			d.included = append(d.included, o)
		}
	}
	return d, nil
}

// shiftValue is the reviewed unit of one observation: its care minutes
// scaled to its own shift pattern's nominal hours (stats.ShiftMinutes),
// the same scaling the projection uses.
func (d *reviewData) shiftValue(o *wardload.Observation) float64 {
	h := 0.0
	if p := d.shifts[o.ShiftID]; p != nil {
		h = p.NominalHours
	}
	return stats.ShiftMinutes([]float64{o.CareMinutes}, []float64{o.WindowHours}, h)[0]
}

// tierReview is one tier's computed review.
type tierReview struct {
	tier    *wardload.Tier
	obs     []*wardload.Observation
	values  []float64
	summary *stats.Summary // nil with no observations
	logKind map[int]string // index in obs → outlier kind on log-minutes
	// The natural logarithms of the values above 0, and their summary
	// (nil when there are none).
	logs       []float64
	logSummary *stats.Summary
}

// reviewTiers summarises each tier's included observations with the
// ward's quartile convention.
func (d *reviewData) reviewTiers() ([]*tierReview, error) {
	byTier := map[int64]*tierReview{}
	var out []*tierReview
	for _, t := range d.tiers {
		tr := &tierReview{tier: t, logKind: map[int]string{}}
		byTier[t.ID] = tr
		out = append(out, tr)
	}
	for _, o := range d.included {
		if tr := byTier[o.TierID]; tr != nil {
			tr.obs = append(tr.obs, o)
			tr.values = append(tr.values, d.shiftValue(o))
		}
	}
	for _, tr := range out {
		if len(tr.values) == 0 {
			continue
		}
		sum, err := stats.Summarize(tr.values, d.settings.Quartiles)
		if err != nil {
			return nil, fmt.Errorf("review: tier %s: %w", tr.tier.Code, err)
		}
		tr.summary = sum
		// Log-minutes: care time is right-skewed, so fences on the raw
		// scale miss values far too low (domain brief §4.2). Zero minutes
		// have no logarithm and are left out of this check.
		var logs []float64
		var at []int
		for i, v := range tr.values {
			if v > 0 {
				logs = append(logs, math.Log(v))
				at = append(at, i)
			}
		}
		if len(logs) > 0 {
			ls, err := stats.Summarize(logs, d.settings.Quartiles)
			if err != nil {
				return nil, fmt.Errorf("review: tier %s log: %w", tr.tier.Code, err)
			}
			for _, o := range ls.Outliers {
				tr.logKind[at[o.Index]] = o.Kind
			}
			tr.logs, tr.logSummary = logs, ls
		}
	}
	return out, nil
}

// whiskers returns the most extreme values inside the inner fences.
func whiskers(x []float64, f stats.Fences) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, v := range x {
		if v >= f.Lower && v <= f.Upper {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	return lo, hi
}

// orderWarnings compares the medians of neighbouring tiers with data, in
// display order: a tier meant to need more care should have a higher
// median than the one before it.
func orderWarnings(trs []*tierReview, unit string) []string {
	var out []string
	var prev *tierReview
	for _, tr := range trs {
		if tr.summary == nil {
			continue
		}
		if prev != nil && !(tr.summary.Median > prev.summary.Median) {
			out = append(out, fmt.Sprintf("%s (median %s) is not above %s (median %s) in %s: tiers may no longer separate care needs.",
				tr.tier.Label, web.FormatValue(tr.summary.Median), prev.tier.Label, web.FormatValue(prev.summary.Median), unit))
		}
		prev = tr
	}
	return out
}
