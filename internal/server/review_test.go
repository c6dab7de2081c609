package server

import (
	"context"
	"fmt"
	"math"
	"net/http/httptest"
	"net/url"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"wardload/internal/demo"
	"wardload/internal/stats"
	"wardload/internal/wardload"
	"wardload/web"
)

// reviewFixture is the access fixture plus the demo ward, seeded for the
// fixture's clock (2 March 2026): ten weeks of observations ending
// 1 March, with the demo's planted entry errors. The demo is seeded
// before the fixture's wards and users (MustOpenDemo).
type reviewFixture struct {
	*fixture
	ward    *wardload.Ward
	planted []demo.PlantedError
}

func newReviewFixture(tb testing.TB) *reviewFixture {
	tb.Helper()
	st, ward := MustOpenDemo(tb)
	f := &reviewFixture{fixture: newFixtureOn(tb, st), ward: ward}
	if !f.clock.Now().Equal(demoNow) {
		tb.Fatalf("fixture clock %v, demo seeded for %v", f.clock.Now(), demoNow)
	}
	var err error
	if f.planted, err = demo.PlantedErrors(f.clock.Now()); err != nil {
		tb.Fatal(err)
	}
	return f
}

// observations returns the demo ward's observations (excluded too).
func (f *reviewFixture) observations(tb testing.TB) []*wardload.Observation {
	tb.Helper()
	obs, _, err := f.st.FindObservations(context.Background(), wardload.ObservationFilter{WardID: &f.ward.ID, IncludeExcluded: true})
	if err != nil {
		tb.Fatal(err)
	}
	return obs
}

// plantedObservation finds the stored observation of a planted error.
func (f *reviewFixture) plantedObservation(tb testing.TB, p demo.PlantedError) *wardload.Observation {
	tb.Helper()
	tiers, _ := f.st.FindTiers(context.Background(), f.ward.ID)
	shifts, _ := f.st.FindShiftPatterns(context.Background(), f.ward.ID)
	var found []*wardload.Observation
	for _, o := range f.observations(tb) {
		if o.Date != p.Date || o.CareMinutes != p.Recorded || o.WindowHours != p.WindowHours {
			continue
		}
		for _, t := range tiers {
			for _, s := range shifts {
				if t.ID == o.TierID && t.Code == p.Tier && s.ID == o.ShiftID && s.Name == p.Shift {
					found = append(found, o)
				}
			}
		}
	}
	if len(found) != 1 {
		tb.Fatalf("planted %+v: %d matching observations", p, len(found))
	}
	return found[0]
}

func TestReviewSummariesEqualStats(t *testing.T) {
	f := newReviewFixture(t)
	res, body := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/wards/"+demo.WardCode+"/review?weeks=10", nil)))
	if res.StatusCode != 200 {
		t.Fatalf("status %d\n%s", res.StatusCode, body)
	}
	ctx := context.Background()
	settings, _ := f.st.FindSettings(ctx, f.ward.ID)
	tiers, _ := f.st.FindTiers(ctx, f.ward.ID)
	shifts, _ := f.st.FindShiftPatterns(ctx, f.ward.ID)
	hours := map[int64]float64{}
	for _, s := range shifts {
		hours[s.ID] = s.NominalHours
	}
	// The window: ten weeks ending the day before the clock's date.
	from, to := wardload.Date{Year: 2025, Month: 12, Day: 22}, wardload.Date{Year: 2026, Month: 3, Day: 1}
	if got := byTestID(t, body, "review-window"); len(got) != 1 || got[0] != "10 weeks, "+from.String()+" to "+to.String() {
		t.Errorf("window %q", got)
	}
	if got := byTestID(t, body, "review-quartiles"); len(got) != 1 || got[0] != "Tukey's hinges" {
		t.Errorf("quartiles %q, want the ward's convention (hinges) named", got)
	}
	if got := byTestID(t, body, "review-unit"); len(got) != 1 || got[0] != "care minutes per patient per shift" {
		t.Errorf("unit %q", got)
	}
	f2 := web.FormatValue
	var groups [][]float64
	var want struct{ n, min, q1, med, q3, max, iqr, innerLo, innerHi, outerLo, outerHi, mean, sd []string }
	for _, tier := range tiers {
		var x []float64
		for _, o := range f.observations(t) {
			if o.TierID == tier.ID && !o.Excluded && !o.Date.Before(from) && !o.Date.After(to) {
				x = append(x, stats.ShiftMinutes([]float64{o.CareMinutes}, []float64{o.WindowHours}, hours[o.ShiftID])[0])
			}
		}
		s, err := stats.Summarize(x, settings.Quartiles)
		if err != nil {
			t.Fatal(err)
		}
		groups = append(groups, x)
		want.n = append(want.n, strconv.Itoa(s.N))
		want.min, want.q1, want.med = append(want.min, f2(s.Min)), append(want.q1, f2(s.Q1)), append(want.med, f2(s.Median))
		want.q3, want.max, want.iqr = append(want.q3, f2(s.Q3)), append(want.max, f2(s.Max)), append(want.iqr, f2(s.IQR))
		want.innerLo, want.innerHi = append(want.innerLo, f2(s.InnerFences.Lower)), append(want.innerHi, f2(s.InnerFences.Upper))
		want.outerLo, want.outerHi = append(want.outerLo, f2(s.OuterFences.Lower)), append(want.outerHi, f2(s.OuterFences.Upper))
		want.mean, want.sd = append(want.mean, f2(s.Mean)), append(want.sd, f2(s.SD.Value))
	}
	for _, c := range []struct {
		id   string
		want []string
	}{
		{"summary-n", want.n}, {"summary-min", want.min}, {"summary-q1", want.q1}, {"summary-median", want.med},
		{"summary-q3", want.q3}, {"summary-max", want.max}, {"summary-iqr", want.iqr}, {"summary-inner-lo", want.innerLo},
		{"summary-inner-hi", want.innerHi}, {"summary-outer-lo", want.outerLo}, {"summary-outer-hi", want.outerHi}, {"summary-mean", want.mean}, {"summary-sd", want.sd},
	} {
		if got := byTestID(t, body, c.id); !slices.Equal(got, c.want) {
			t.Errorf("%s = %q, want %q", c.id, got, c.want)
		}
	}
	// One accessible SVG per tier, numbers in its description, no inline style.
	descs := byTestID(t, body, "boxplot-desc")
	if len(descs) != len(tiers) {
		t.Fatalf("%d box plot descriptions, want %d", len(descs), len(tiers))
	}
	for i, d := range descs {
		if !strings.Contains(d, "median "+want.med[i]) || !strings.Contains(d, want.n[i]+" observations") {
			t.Errorf("box plot %d description %q lacks median %s or n %s", i, d, want.med[i], want.n[i])
		}
	}
	if strings.Contains(body, "style=") {
		t.Error("page has an inline style attribute; the CSP forbids them")
	}
	// One figure of every tier's box plot; per tier a histogram and a
	// trend chart; and the backtest's PIT histogram.
	if n := strings.Count(body, `role="img"`); n != 2*len(tiers)+2 || len(byTestID(t, body, "pit-svg")) != 1 || len(byTestID(t, body, "boxplot-svg")) != 1 {
		t.Errorf("%d role=img, want %d (one box plot figure, histogram and trend chart per tier, and the PIT histogram)", n, 2*len(tiers)+2)
	}
	// Each histogram's bars are the Freedman–Diaconis bins of the tier's
	// values up to the outer fence (stats.Counts is checked against R);
	// the bars and the note of values beyond the axis account for all n.
	hists := histogramBars(t, body)
	if len(hists) != len(tiers) {
		t.Fatalf("%d histograms, want %d", len(hists), len(tiers))
	}
	for i, x := range groups {
		s, _ := stats.Summarize(x, settings.Quartiles)
		b := stats.BinsFor(s.N, s.IQR, s.Min, math.Min(s.Max, s.OuterFences.Upper))
		counts, _, above := stats.Counts(x, b)
		var want []int
		for _, c := range counts {
			if c > 0 {
				want = append(want, c)
			}
		}
		total := above
		for _, c := range hists[i] {
			total += c
		}
		if !slices.Equal(hists[i], want) || total != len(x) {
			t.Errorf("tier %d histogram bars %v (+%d beyond), want %v summing with them to n = %d", i, hists[i], above, want, len(x))
		}
	}
	// The backtest says how the projections held, with its table.
	if len(byTestID(t, body, "calibration-sentence"))+len(byTestID(t, body, "calibration-warning")) != 1 ||
		len(byTestID(t, body, "calibration-table")) != 1 || !strings.Contains(body, "In the last 12 weeks") {
		t.Error("the review page lacks the backtest sentence or table")
	}
	// The demo tiers are built to rise; the order check agrees.
	if len(byTestID(t, body, "order-ok")) != 1 || len(byTestID(t, body, "order-warning")) != 0 {
		t.Error("demo tiers rise, but the order check warns")
	}
	// Tier separation: the Kruskal–Wallis figures of the same values, and
	// one verdict per pair of neighbouring tiers; the demo's tiers rise
	// clearly, so every pair says so.
	kw, err := stats.KruskalWallisTest(groups)
	if err != nil {
		t.Fatal(err)
	}
	overall := byTestID(t, body, "separation-overall")
	wantStart := fmt.Sprintf("Across %d tiers and %d observations, the tiers differ", kw.Groups, kw.N)
	if len(overall) != 1 || !strings.HasPrefix(overall[0], wantStart) || !strings.Contains(overall[0], fmt.Sprintf("H = %.1f, %d degrees", kw.H, kw.DF)) {
		t.Errorf("separation %q, want %q… H = %.1f", overall, wantStart, kw.H)
	}
	pairs := byTestID(t, body, "separation-pair")
	if len(pairs) != len(tiers)-1 {
		t.Errorf("%d separation verdicts, want %d", len(pairs), len(tiers)-1)
	}
	for _, pr := range pairs {
		if !strings.Contains(pr, "needs clearly more care time than") {
			t.Errorf("verdict %q: the demo tiers rise clearly", pr)
		}
	}
	if c := byTestID(t, body, "separation-caution"); len(c) != 1 || c[0] != stats.SeparationCaution {
		t.Errorf("caution %q", c)
	}
	// Eleven ISO weeks touch the ten-week window starting on a Monday?
	// 22 Dec 2025 is a Monday, so exactly ten, 2025-W52 to 2026-W09; the
	// table puts the newest first so that it is in view.
	if weeks := byTestID(t, body, "trend-week"); len(weeks) != 10 || !strings.HasPrefix(weeks[0], "2026-W09") || !strings.HasPrefix(weeks[9], "2025-W52") {
		t.Errorf("trend weeks %q, want 2026-W09 first", weeks)
	}
	if charts := byTestID(t, body, "trend-desc"); len(charts) != len(tiers) || !strings.Contains(charts[0], "2025-W52 to 2026-W09") {
		t.Errorf("trend charts %q", charts)
	}
}

var histBarCount = regexp.MustCompile(`data-testid="hist-bar" data-count="(\d+)"`)

// histogramBars returns the bar counts of each histogram on the page.
func histogramBars(t *testing.T, body string) [][]int {
	t.Helper()
	var out [][]int
	for _, svg := range strings.Split(body, `data-testid="histogram-svg"`)[1:] {
		svg, _, _ = strings.Cut(svg, "</svg>")
		var counts []int
		for _, m := range histBarCount.FindAllStringSubmatch(svg, -1) {
			n, _ := strconv.Atoi(m[1])
			counts = append(counts, n)
		}
		out = append(out, counts)
	}
	return out
}

// TestReviewHistogramScale: the log switch is a plain link that keeps the
// other choices, the filter form keeps the scale, and the log histograms
// say so on their axis.
func TestReviewHistogramScale(t *testing.T) {
	f := newReviewFixture(t)
	_, body := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/wards/"+demo.WardCode+"/review?weeks=6", nil)))
	if !strings.Contains(body, `href="/wards/`+demo.WardCode+`/review?scale=log&amp;weeks=6#histograms"`) {
		t.Error("linear page lacks the link to the log scale keeping weeks=6")
	}
	res, body := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/wards/"+demo.WardCode+"/review?weeks=6&scale=log", nil)))
	if res.StatusCode != 200 {
		t.Fatalf("status %d", res.StatusCode)
	}
	if !strings.Contains(body, `<input type="hidden" name="scale" value="log">`) ||
		!strings.Contains(body, `href="/wards/`+demo.WardCode+`/review?weeks=6#histograms"`) {
		t.Error("log page lacks the hidden scale field or the link back to linear")
	}
	descs := byTestID(t, body, "histogram-desc")
	if len(descs) == 0 {
		t.Fatal("no histograms on the log page")
	}
	for _, d := range descs {
		if !strings.Contains(d, "on a logarithmic axis") {
			t.Errorf("log histogram description %q", d)
		}
	}
	if !strings.Contains(body, "(log scale)") || !strings.Contains(byTestID(t, body, "hist-method")[0], "log-minutes") {
		t.Error("log page does not say the axis is logarithmic")
	}
}

// TestReviewFlagsPlantedErrors: the demo's planted entry errors are in the
// outlier list. An extra zero is far above its tier: extreme on the
// minutes scale. Hours typed as minutes are far below: the minutes-scale
// lower fence is negative for right-skewed care time, so only the
// log-minutes fences catch them.
func TestReviewFlagsPlantedErrors(t *testing.T) {
	f := newReviewFixture(t)
	_, body := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/wards/"+demo.WardCode+"/review?weeks=10", nil)))
	dates, cares := byTestID(t, body, "flagged-date"), byTestID(t, body, "flagged-care")
	kinds, logKinds := byTestID(t, body, "flagged-kind"), byTestID(t, body, "flagged-logkind")
	if len(dates) == 0 || len(dates) != len(cares) || len(kinds) != len(dates) || len(logKinds) != len(dates) {
		t.Fatalf("flagged columns: %d dates, %d care, %d kinds, %d log kinds", len(dates), len(cares), len(kinds), len(logKinds))
	}
	for _, p := range f.planted {
		found := false
		for i := range dates {
			if dates[i] != p.Date.String() || cares[i] != formatDecimal(p.Recorded) {
				continue
			}
			found = true
			switch p.Kind {
			case demo.ErrorExtraZero:
				if kinds[i] != "extreme" {
					t.Errorf("%s %v: minutes-scale kind %q, want extreme", p.Kind, p.Recorded, kinds[i])
				}
			case demo.ErrorHours:
				if logKinds[i] != "extreme" {
					t.Errorf("%s %v: log-scale kind %q, want extreme", p.Kind, p.Recorded, logKinds[i])
				}
			}
		}
		if !found {
			t.Errorf("planted %s (%v on %s) not in the outlier list", p.Kind, p.Recorded, p.Date)
		}
	}
	// Extreme rows (either scale) come first.
	seenMild := false
	for i := range dates {
		extreme := kinds[i] == "extreme" || logKinds[i] == "extreme"
		if extreme && seenMild {
			t.Errorf("row %d (%s) is extreme but follows a mild one", i, dates[i])
		}
		seenMild = seenMild || !extreme
	}
	if n := len(byTestID(t, body, "exclude-form")); n != len(dates) {
		t.Errorf("%d exclude forms for %d flagged rows", n, len(dates))
	}
	if !strings.Contains(body, "Reason (data problem only — no patient details)") {
		t.Error("exclude form lacks the no-patient-details label")
	}
}

func TestReviewExcludeAndRestore(t *testing.T) {
	f := newReviewFixture(t)
	ctx := context.Background()
	o := f.plantedObservation(t, f.planted[0])
	base := "/wards/" + demo.WardCode
	exclude := fmt.Sprintf("%s/observations/%d/exclude", base, o.ID)

	res, _ := f.do(t, f.as(t, pAdmin, post(exclude, url.Values{"reason": {"extra zero typed"}, "note": {"bed 4, Mrs X"}, "weeks": {"10"}})))
	if res.StatusCode != 303 || res.Header.Get("Location") != base+"/review?weeks=10" {
		t.Fatalf("exclude: %d Location %q", res.StatusCode, res.Header.Get("Location"))
	}
	got, err := f.st.FindObservationByID(ctx, o.ID)
	if err != nil {
		t.Fatal(err)
	}
	if !got.Excluded || got.ExcludedReason != "extra zero typed" || got.ExcludedBy != f.users[pAdmin].ID {
		t.Errorf("after exclude: excluded %v reason %q by %d", got.Excluded, got.ExcludedReason, got.ExcludedBy)
	}
	if es := f.audit(t, "observation.exclude"); len(es) != 1 || es[0].EntityID != o.ID || es[0].UserID != f.users[pAdmin].ID {
		t.Errorf("exclude audit rows %+v", es)
	} else if strings.Contains(es[0].After, "Mrs X") {
		// A smuggled free-text field must not reach the store or the audit log.
		t.Errorf("free text stored in the audit row: %s", es[0].After)
	}

	// The page shows the flash, the excluded row with reason and name, and
	// no longer lists it among the outliers.
	req := httptest.NewRequest("GET", base+"/review?weeks=10", nil)
	for _, c := range res.Cookies() { // the session the form was posted with
		req.AddCookie(c)
	}
	_, body := f.do(t, req)
	if n := byTestID(t, body, "notice"); len(n) != 1 || !strings.Contains(n[0], "excluded (extra zero typed)") {
		t.Errorf("notice %q", n)
	}
	if r := byTestID(t, body, "excluded-reason"); !slices.Equal(r, []string{"extra zero typed"}) {
		t.Errorf("excluded reasons %q", r)
	}
	if by := byTestID(t, body, "excluded-by"); !slices.Equal(by, []string{"a.admin"}) {
		t.Errorf("excluded by %q", by)
	}
	for i, d := range byTestID(t, body, "flagged-date") {
		if d == o.Date.String() && byTestID(t, body, "flagged-care")[i] == formatDecimal(o.CareMinutes) {
			t.Error("excluded observation still listed among the outliers")
		}
	}

	// Excluding twice is a conflict, nothing changes.
	res, _ = f.do(t, f.as(t, pAdmin, post(exclude, url.Values{"reason": {"wrong tier"}})))
	if res.StatusCode != 409 {
		t.Errorf("second exclude: %d, want 409", res.StatusCode)
	}

	res, _ = f.do(t, f.as(t, pAdmin, post(fmt.Sprintf("%s/observations/%d/restore", base, o.ID), url.Values{"weeks": {"10"}})))
	if res.StatusCode != 303 || res.Header.Get("Location") != base+"/review?weeks=10" {
		t.Errorf("restore: %d Location %q", res.StatusCode, res.Header.Get("Location"))
	}
	got, _ = f.st.FindObservationByID(ctx, o.ID)
	if got.Excluded {
		t.Error("still excluded after restore")
	}
	if es := f.audit(t, "observation.restore"); len(es) != 1 || es[0].EntityID != o.ID {
		t.Errorf("restore audit rows %d", len(es))
	}
}

func TestReviewExcludeRefused(t *testing.T) {
	f := newReviewFixture(t)
	ctx := context.Background()
	o := f.plantedObservation(t, f.planted[0])
	exclude := fmt.Sprintf("/wards/%s/observations/%d/exclude", demo.WardCode, o.ID)
	for _, tc := range []struct {
		name   string
		form   url.Values
		status int
		msg    string
	}{
		{"reason not offered", url.Values{"reason": {"patient confused"}, "weeks": {"10"}}, 400, "Choose one of the listed reasons."},
		{"no reason", url.Values{"weeks": {"10"}}, 400, "Choose one of the listed reasons."},
	} {
		t.Run(tc.name, func(t *testing.T) {
			res, body := f.do(t, f.as(t, pAdmin, post(exclude, tc.form)))
			if res.StatusCode != tc.status {
				t.Fatalf("status %d, want %d", res.StatusCode, tc.status)
			}
			msgs := byTestID(t, body, "exclude-error")
			if len(msgs) != 1 || !strings.Contains(msgs[0], tc.msg) {
				t.Errorf("error next to the form %q, want %q", msgs, tc.msg)
			}
			got, _ := f.st.FindObservationByID(ctx, o.ID)
			if got.Excluded {
				t.Error("excluded despite the refusal")
			}
		})
	}
	if n := len(f.audit(t, "observation.exclude")); n != 0 {
		t.Errorf("%d exclude audit rows after refusals", n)
	}
}

// TestReviewOtherWardsObservation404: an observation is reached only
// through its own ward, even by an admin who may see every ward.
func TestReviewOtherWardsObservation404(t *testing.T) {
	f := newReviewFixture(t)
	o := f.plantedObservation(t, f.planted[0])
	for _, path := range []string{
		fmt.Sprintf("/wards/w-a/observations/%d/exclude", o.ID),
		fmt.Sprintf("/wards/w-a/observations/%d/restore", o.ID),
		"/wards/w-a/observations/999999/exclude",
		"/wards/w-a/observations/abc/exclude",
	} {
		res, _ := f.do(t, f.as(t, pAdmin, post(path, url.Values{"reason": {"wrong tier"}})))
		if res.StatusCode != 404 {
			t.Errorf("%s: %d, want 404", path, res.StatusCode)
		}
	}
	if got, _ := f.st.FindObservationByID(context.Background(), o.ID); got.Excluded {
		t.Error("excluded through another ward")
	}
}

func TestReviewFilters(t *testing.T) {
	f := newReviewFixture(t)
	shifts, _ := f.st.FindShiftPatterns(context.Background(), f.ward.ID)
	night := shifts[1]
	_, body := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", fmt.Sprintf("/wards/%s/review?shift=%d&weeks=2", demo.WardCode, night.ID), nil)))
	if got := byTestID(t, body, "review-shift"); !slices.Equal(got, []string{night.Name + " shift only"}) {
		t.Errorf("shift %q", got)
	}
	// Count the included night observations of the two weeks directly.
	from, to := wardload.Date{Year: 2026, Month: 2, Day: 16}, wardload.Date{Year: 2026, Month: 3, Day: 1}
	obs, n, err := f.st.FindObservations(context.Background(), wardload.ObservationFilter{WardID: &f.ward.ID, ShiftID: &night.ID, From: &from, To: &to})
	if err != nil || n == 0 {
		t.Fatal(n, err)
	}
	total := 0
	for _, s := range byTestID(t, body, "summary-n") {
		k, _ := strconv.Atoi(s)
		total += k
	}
	if total != len(obs) {
		t.Errorf("summaries count %d observations, want %d", total, len(obs))
	}
	for _, q := range []string{"weeks=0", "weeks=105", "weeks=x", "shift=abc", "shift=999999"} {
		res, _ := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/wards/"+demo.WardCode+"/review?"+q, nil)))
		if res.StatusCode != 400 {
			t.Errorf("%s: %d, want 400", q, res.StatusCode)
		}
	}
}

// TestReviewOrderWarning: a tier whose median is not above the one before
// it is named.
func TestReviewOrderWarning(t *testing.T) {
	f := newCensusFixture(t)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	// Move t3 before t2 in display order (0, as t1; ties go by code): its
	// median is higher, so t2 now follows a tier that takes more care.
	order := 0
	if _, err := f.st.UpdateTier(ctx, f.a.tiers[2].ID, wardload.TierUpdate{DisplayOrder: &order}); err != nil {
		t.Fatal(err)
	}
	_, body := f.do(t, f.as(t, pManagerA, httptest.NewRequest("GET", "/wards/w-a/review", nil)))
	ws := byTestID(t, body, "order-warning")
	if len(ws) != 1 || !strings.HasPrefix(ws[0], f.a.tiers[1].Label) || !strings.Contains(ws[0], "is not above "+f.a.tiers[2].Label) ||
		!strings.Contains(ws[0], "tiers may no longer separate care needs") {
		t.Errorf("order warnings %q", ws)
	}
	if len(byTestID(t, body, "order-ok")) != 0 {
		t.Error("order-ok shown with a warning")
	}
}

// TestHomeLinksReviewForManagers: the home page links each ward's review
// for managers and admins, not for charge nurses (who may not open it).
func TestHomeLinksReviewForManagers(t *testing.T) {
	f := newFixture(t)
	for _, tc := range []struct {
		p    string
		want int
	}{{pNurseA, 0}, {pManagerA, 1}, {pAdmin, 2}} {
		_, body := f.do(t, f.as(t, tc.p, httptest.NewRequest("GET", "/", nil)))
		if n := len(byTestID(t, body, "ward-review")); n != tc.want {
			t.Errorf("%s: %d review links, want %d", tc.p, n, tc.want)
		}
		if tc.want > 0 && !strings.Contains(body, `href="/wards/w-a/review"`) {
			t.Errorf("%s: no link to /wards/w-a/review", tc.p)
		}
	}
}
