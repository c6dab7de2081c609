package establishment

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/stat"

	"wardload/internal/wardload"
)

// TestFTEPublishedExamples checks FTE against worked examples whose
// sources are named; each converts its own convention to the share h.
func TestFTEPublishedExamples(t *testing.T) {
	for _, c := range []struct {
		name                   string
		hours, perFTE, h, want float64
		tol                    float64
	}{
		// Hurst (2002/2003), Department of Health (England), professional
		// judgement example: 455 h/week × 1.22 time-out ÷ 37.5 h per WTE =
		// 14.8 WTE. A year of it: 455 × 52 h over 37.5 × 52 = 1,950 h, the
		// uplift 0.22 as the share 0.22/1.22.
		{"uplift 22%", 455 * 52, 1950, 0.22 / 1.22, 14.8, 0.005},
		// US textbook (Nursing Leadership and Management for Safety and
		// Quality Care, Table 16-3): 2,080 paid − 224 non-productive =
		// 1,856 productive h; one 24/7 post, 8,760 h, needs 4.72 FTE
		// (domain brief §1.7, derived there from that source).
		{"US 2080 h", 8760, 2080, 224.0 / 2080, 4.72, 0.005},
		// Dutch capacity model, BMC Health Serv Res 2007;7:196, Table 1:
		// 1,521.9 of 1,872 contracted hours available → 8,760 / 1,521.9 =
		// 5.76 FTE.
		{"Dutch 1872 h", 8760, 1872, 1 - 1521.9/1872, 5.76, 0.005},
	} {
		if got := FTE(c.hours, c.perFTE, c.h); math.Abs(got-c.want) > c.tol {
			t.Errorf("%s: FTE = %.4f; source says %.2f", c.name, got, c.want)
		}
	}
	// The two conventions differ: a 22% share is ÷0.78 = ×1.2821, not ×1.22.
	if got := FTE(1950, 1950, 0.22); !scalar.EqualWithinAbs(got, 1/0.78, 1e-12) {
		t.Errorf("FTE(1950, 1950, 0.22) = %g; want 1/0.78", got)
	}
}

func params() Params {
	return Params{HoursPerFTE: 1950, Headroom: 0.22 / 1.22, Level: 0.9, Draws: 20_000, Seed: 3}
}

// TestEstimateConstantWeeks: the professional-judgement roster of Hurst's
// example every day (Early 3 × 7.5 h, Late 3 × 7.5 h, Night 2 × 10 h =
// 65 h a day) for four weeks. Hand-computed: 65 × 365.2425 = 23,740.7625 h a
// year; × 1.22 ÷ 1,950 = 14.85319 FTE; every bootstrap draw is the same,
// so the band is the point.
func TestEstimateConstantWeeks(t *testing.T) {
	w := Ward{Ward: "A", Patterns: []string{"Early", "Late", "Night"}}
	for wk := range 4 {
		for range 7 {
			w.Shifts = append(w.Shifts, Shift{wk, "Early", 22.5}, Shift{wk, "Late", 22.5}, Shift{wk, "Night", 20})
		}
	}
	res, err := Estimate([]Ward{w, w}, 4, params())
	if err != nil {
		t.Fatal(err)
	}
	a := res.Wards[0]
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"hours/day", a.HoursPerDay.Value, 65}, {"hours/year", a.HoursYear.Value, 23740.7625},
		{"FTE", a.FTE.Value, 14.85319}, {"FTE low", a.FTE.Low, 14.85319}, {"FTE high", a.FTE.High, 14.85319},
		{"total FTE", res.Total.FTE.Value, 2 * 14.85319}, {"total high", res.Total.FTE.High, 2 * 14.85319},
	} {
		if !scalar.EqualWithinAbs(c.got, c.want, 1e-5) {
			t.Errorf("%s = %.6f; want %.6f", c.name, c.got, c.want)
		}
	}
	if res.Total.Shifts != 2*84 || a.Shifts != 84 || len(a.Missing) != 0 {
		t.Errorf("shifts %d / %d, missing %v", res.Total.Shifts, a.Shifts, a.Missing)
	}
}

// TestEstimateMissingShiftsAreNotZero: a shift without a projection is
// left out, not counted as no work, and a pattern with none is named.
func TestEstimateMissingShiftsAreNotZero(t *testing.T) {
	w := Ward{Ward: "A", Patterns: []string{"Day", "Night", "Twilight"}}
	for wk := range 2 {
		for d := range 7 {
			w.Shifts = append(w.Shifts, Shift{wk, "Day", 60})
			if d%2 == 0 { // half the nights have no census
				w.Shifts = append(w.Shifts, Shift{wk, "Night", 40})
			}
		}
	}
	res, err := Estimate([]Ward{w}, 2, params())
	if err != nil {
		t.Fatal(err)
	}
	if got := res.Wards[0].HoursPerDay.Value; got != 100 {
		t.Errorf("hours/day = %g; want 60 + 40", got)
	}
	if m := res.Wards[0].Missing; len(m) != 1 || m[0] != "Twilight" {
		t.Errorf("missing = %v", m)
	}
}

// TestEstimateBandWidth: one shift a day whose hours vary by week. The
// bootstrap variance of a mean of N equal-sized groups is the plug-in
// variance of the group means over N (Efron & Tibshirani 1993, §5.2, from
// memory): SE* = sd_pop(week means)/√N. The 90% percentile band's half
// width should be near 1.645·SE* (normal approximation); 15% tolerance
// for the skew and the Monte Carlo error of 20,000 draws.
func TestEstimateBandWidth(t *testing.T) {
	const weeks = 12
	means := []float64{50, 62, 55, 71, 48, 66, 58, 53, 75, 60, 49, 64}
	w := Ward{Ward: "A", Patterns: []string{"Day"}}
	for wk, m := range means {
		for d := range 7 {
			w.Shifts = append(w.Shifts, Shift{wk, "Day", m + float64(d%3) - 1}) // days within a week average m
		}
	}
	res, err := Estimate([]Ward{w}, weeks, params())
	if err != nil {
		t.Fatal(err)
	}
	day := res.Wards[0].HoursPerDay
	_, sd := stat.PopMeanStdDev(means, nil)
	se := sd / math.Sqrt(weeks)
	half := (day.High - day.Low) / 2
	if math.Abs(half-1.645*se)/(1.645*se) > 0.15 {
		t.Errorf("band half width %.3f; want about 1.645 × %.3f = %.3f", half, se, 1.645*se)
	}
	if !(day.Low < day.Value && day.Value < day.High) {
		t.Errorf("band %v does not hold the point", day)
	}
	again, _ := Estimate([]Ward{w}, weeks, params())
	if again.Wards[0].FTE != res.Wards[0].FTE {
		t.Error("same seed, different band")
	}
}

func TestBadInput(t *testing.T) {
	w := Ward{Ward: "A", Patterns: []string{"Day"}, Shifts: []Shift{{0, "Day", 60}}}
	for _, c := range []struct {
		name, field string
		mod         func(*Params)
	}{
		{"zero FTE hours", "fte_hours", func(p *Params) { p.HoursPerFTE = 0 }},
		{"negative FTE hours", "fte_hours", func(p *Params) { p.HoursPerFTE = -1950 }},
		{"NaN FTE hours", "fte_hours", func(p *Params) { p.HoursPerFTE = math.NaN() }},
		{"headroom 100%", "headroom", func(p *Params) { p.Headroom = 1 }},
		{"headroom 150%", "headroom", func(p *Params) { p.Headroom = 1.5 }},
		{"negative headroom", "headroom", func(p *Params) { p.Headroom = -0.1 }},
		{"NaN headroom", "headroom", func(p *Params) { p.Headroom = math.NaN() }},
		{"level", "level", func(p *Params) { p.Level = 1 }},
		{"draws", "draws", func(p *Params) { p.Draws = 10 }},
	} {
		p := params()
		c.mod(&p)
		_, err := Estimate([]Ward{w}, 1, p)
		if wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != c.field {
			t.Errorf("%s: %v; want EINVALID on %s", c.name, err, c.field)
		}
	}
	for _, c := range []struct {
		name  string
		wards []Ward
		weeks int
		field string
	}{
		{"no weeks", []Ward{w}, 0, "weeks"},
		{"no shifts", []Ward{{Ward: "B", Patterns: []string{"Day"}}}, 1, "weeks"},
		{"negative hours", []Ward{{Ward: "B", Patterns: []string{"Day"}, Shifts: []Shift{{0, "Day", -1}}}}, 1, "hours"},
		{"week outside", []Ward{{Ward: "B", Patterns: []string{"Day"}, Shifts: []Shift{{3, "Day", 1}}}}, 1, "weeks"},
	} {
		_, err := Estimate(c.wards, c.weeks, params())
		if wardload.ErrorCode(err) != wardload.EINVALID || wardload.ErrorField(err) != c.field {
			t.Errorf("%s: %v; want EINVALID on %s", c.name, err, c.field)
		}
	}
}
