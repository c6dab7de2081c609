package web

import (
	"slices"
	"strings"
	"testing"
)

func TestNewBoxAxis(t *testing.T) {
	for _, tc := range []struct {
		hi    float64
		top   float64
		ticks []float64
	}{
		// Step = hi/5 rounded up to 1, 2 or 5 × 10^k; top = hi rounded up to a step.
		{1403.5, 1500, []float64{0, 500, 1000, 1500}},
		{100, 100, []float64{0, 20, 40, 60, 80, 100}},
		{7, 8, []float64{0, 2, 4, 6, 8}},
	} {
		a := NewBoxAxis(tc.hi)
		if a.Empty || a.Lo != 0 || a.Hi != tc.top || !slices.Equal(a.Ticks, tc.ticks) {
			t.Errorf("NewBoxAxis(%v) = %+v, want top %v ticks %v", tc.hi, a, tc.top, tc.ticks)
		}
	}
	for _, hi := range []float64{0, -1} {
		if !NewBoxAxis(hi).Empty {
			t.Errorf("NewBoxAxis(%v) not empty", hi)
		}
	}
}

func TestNewBoxPlot(t *testing.T) {
	a := NewBoxAxis(100) // x = 12 + v/100 × 284 (the 360-unit phone frame)
	p := NewBoxPlot(a, BoxInput{Label: "T1", N: 9, Min: 0, Q1: 25, Median: 50, Q3: 75, Max: 300,
		WhiskerLo: 0, WhiskerHi: 90, Outliers: []BoxPoint{{Value: 95}, {Value: 200, Extreme: true}, {Value: 300, Extreme: true}},
		Unit: "minutes", Convention: "Tukey's hinges"})
	if p.BoxX != "83.0" || p.BoxW != "142.0" || p.MedianX != "154.0" || p.WhiskerLo != "12.0" || p.WhiskerHi != "267.6" {
		t.Errorf("geometry %+v", p)
	}
	if len(p.Points) != 1 || p.Points[0].X != "281.8" || p.Points[0].Extreme {
		t.Errorf("points %+v, want the mild one at 95 only", p.Points)
	}
	if p.OffScale != "→ 2" || p.OffScaleNote != "T1: 2 values past the end of the scale, up to 300." {
		t.Errorf("off scale %q, note %q", p.OffScale, p.OffScaleNote)
	}
	all := NewBoxPlots(a, []string{"t1", "t2"}, []string{"T1", "T2"}, []*BoxPlotVM{p, nil}, "minutes")
	if all.ViewBox != "0 0 360 140" || all.AxisY != "96" || len(all.Rows) != 2 || all.Rows[1].Transform != "translate(0 48)" ||
		all.Rows[1].Plot != nil || !slices.Equal(all.Notes, []string{p.OffScaleNote}) || len(all.Ticks) != 6 {
		t.Errorf("stacked plots %+v", all)
	}
	if NewBoxPlots(a, []string{"t1"}, []string{"T1"}, []*BoxPlotVM{nil}, "minutes") != nil {
		t.Error("stacked plots of no observations")
	}
	for _, want := range []string{"9 observations", "median 50", "Q3 75", "maximum 300", "1 mild and 2 extreme", "2 beyond the axis end of 100"} {
		if !strings.Contains(p.Desc, want) {
			t.Errorf("description %q lacks %q", p.Desc, want)
		}
	}
	if NewBoxPlot(a, BoxInput{N: 0}) != nil {
		t.Error("plot of no observations")
	}
}
