package web

import (
	"strconv"
	"strings"
	"testing"
)

func TestNiceStep(t *testing.T) {
	for _, tc := range []struct{ raw, want float64 }{
		{0.7, 1}, {1, 1}, {1.2, 2}, {3, 5}, {7, 10}, {12, 20}, {45, 50}, {0, 1},
	} {
		if got := niceStep(tc.raw); got != tc.want {
			t.Errorf("niceStep(%g) = %g, want %g", tc.raw, got, tc.want)
		}
	}
}

func TestNewChart(t *testing.T) {
	if c := NewChart(ChartInput{Mean: 10, SD: 0}); !c.Empty || c.Curve != "" {
		t.Errorf("no spread: %+v, want an empty chart", c)
	}
	c := NewChart(ChartInput{Mean: 60, SD: 10, P10: 48, P50: 59, P90: 73, Capacities: []ChartCapacity{
		{Nurses: 5, NurseHours: 60}, {Nurses: 6, NurseHours: 72, Recommended: true}, {Nurses: 7, NurseHours: 84},
	}})
	if c.Empty || !strings.HasPrefix(c.Curve, "M") || c.Tail == "" {
		t.Fatalf("chart %+v", c)
	}
	// Lines are placed linearly: equal nurse-hour steps, equal x steps.
	// The x are written to one decimal, so the two gaps differ by rounding
	// only: by at most 0.2 in general (four roundings of up to 0.05), by
	// nothing here (see the exact positions below). 0.11 allows one
	// rounding step, 0.1, plus floating-point noise from parsing.
	x := func(s string) float64 { v, _ := strconv.ParseFloat(s, 64); return v }
	d1, d2 := x(c.Lines[1].X1)-x(c.Lines[0].X1), x(c.Lines[2].X1)-x(c.Lines[1].X1)
	if d1 <= 0 || d1-d2 > 0.11 || d2-d1 > 0.11 {
		t.Errorf("capacity lines at %s, %s, %s are not evenly spaced", c.Lines[0].X1, c.Lines[1].X1, c.Lines[2].X1)
	}
	// Worked by hand: x runs from mean − 4·SD = 20 to mean + 4·SD = 100,
	// padded by 4% of 80 to 16.8 … 103.2, over x 24 … 616, so
	// x(h) = 24 + (h − 16.8)/86.4 × 592: 320, 402.22…, 484.44….
	if c.Lines[0].X1 != "320.0" || c.Lines[1].X1 != "402.2" || c.Lines[2].X1 != "484.4" {
		t.Errorf("capacity lines at %s, %s, %s, want 320.0, 402.2, 484.4", c.Lines[0].X1, c.Lines[1].X1, c.Lines[2].X1)
	}
	if c.Lines[1].Class != "chart-cap chart-cap-rec" || c.Lines[1].Label != "6 recommended" || c.Lines[0].Label != "5 nurses" {
		t.Errorf("lines %+v", c.Lines)
	}
	// Neighbouring labels are on different rows.
	if c.Lines[0].LabelY == c.Lines[1].LabelY || c.Lines[0].LabelY != c.Lines[2].LabelY {
		t.Errorf("label rows %s %s %s", c.Lines[0].LabelY, c.Lines[1].LabelY, c.Lines[2].LabelY)
	}
	// The curve's highest point (smallest y) is at the mean, 60, which is
	// where the 5-nurse line stands: the curve is sampled, so its highest
	// sample is at most one sampling step from the mean.
	step := (chartRight - chartLeft) / (chartPoints - 1)
	best, bestX := 1e9, 0.0
	for _, pt := range strings.Fields(c.Curve) {
		xy := strings.Split(strings.TrimLeft(pt, "ML"), ",")
		if y := x(xy[1]); y < best {
			best, bestX = y, x(xy[0])
		}
	}
	if d := bestX - x(c.Lines[0].X1); d > step || d < -step {
		t.Errorf("peak at x=%g, mean line at %s", bestX, c.Lines[0].X1)
	}
	if !(x(c.RangeX1) < x(c.RangeMid) && x(c.RangeMid) < x(c.RangeX2)) {
		t.Errorf("P10–P90 bar %s %s %s", c.RangeX1, c.RangeMid, c.RangeX2)
	}
	if !strings.Contains(c.Describe, "6 nurses give 72.0 nurse-hours") {
		t.Errorf("description %q", c.Describe)
	}
}
