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

func TestNewChartEmpty(t *testing.T) {
	for name, in := range map[string]ChartInput{
		"no width":  {BandLow: 10, BandHigh: 10, Median: 10, Cover: 10},
		"reversed":  {BandLow: 12, BandHigh: 10, Median: 11, Cover: 11},
		"not a num": {BandLow: 10, BandHigh: 12, Median: 11, Cover: nan()},
	} {
		if c := NewChart(in); !c.Empty || len(c.Lines) != 0 {
			t.Errorf("%s: %+v, want an empty chart", name, c)
		}
	}
}

func nan() float64 { v, _ := strconv.ParseFloat("NaN", 64); return v }

func TestNewChart(t *testing.T) {
	// An asymmetric band, as method 2 gives for right-skewed care.
	c := NewChart(ChartInput{BandLow: 40, BandHigh: 70, Median: 52, Cover: 64, BandName: "90% band", CoverName: "90% cover",
		Capacities: []ChartCapacity{
			{Nurses: 5, CareGiving: 4, NurseHours: 48}, {Nurses: 6, CareGiving: 5, NurseHours: 60, Recommended: true}, {Nurses: 7, CareGiving: 6, NurseHours: 72},
		}})
	if c.Empty {
		t.Fatalf("chart %+v", c)
	}
	// Worked by hand: x runs from min(40, 48) = 40 to max(70, 72) = 72,
	// padded by 6% of 32 (1.92) to 38.08 … 73.92, over x 24 … 616, so
	// x(h) = 24 + (h − 38.08)/35.84 × 592.
	x := func(h float64) string { return strconv.FormatFloat(24+(h-38.08)/35.84*592, 'f', 1, 64) }
	for _, tc := range []struct{ name, got, want string }{
		{"band low", c.BandX1, x(40)}, {"band high", c.BandX2, x(70)}, {"median", c.MedianX, x(52)}, {"cover", c.CoverX, x(64)},
		{"5 nurses", c.Lines[0].X1, x(48)}, {"6 nurses", c.Lines[1].X1, x(60)}, {"7 nurses", c.Lines[2].X1, x(72)},
	} {
		if tc.got != tc.want {
			t.Errorf("%s at x = %s, want %s", tc.name, tc.got, tc.want)
		}
	}
	if c.BandX1 != "55.7" || c.CoverX != "452.1" { // the same, as numbers: 24 + 1.92/35.84·592, 24 + 25.92/35.84·592
		t.Errorf("band from %s, cover at %s; want 55.7 and 452.1", c.BandX1, c.CoverX)
	}
	if c.BandLabel != "90% band" || c.CoverLabel != "90% cover" {
		t.Errorf("labels %q %q", c.BandLabel, c.CoverLabel)
	}
	if c.Lines[1].Class != "chart-cap chart-cap-rec" || c.Lines[1].Label != "6 recommended" || c.Lines[0].Label != "5 nurses" {
		t.Errorf("lines %+v", c.Lines)
	}
	// Neighbouring labels are on different rows.
	if c.Lines[0].LabelY == c.Lines[1].LabelY || c.Lines[0].LabelY != c.Lines[2].LabelY {
		t.Errorf("label rows %s %s %s", c.Lines[0].LabelY, c.Lines[1].LabelY, c.Lines[2].LabelY)
	}
	for _, want := range []string{"90% band of this shift's workload runs from 40.0 to 70.0 nurse-hours, median 52.0", "90% cover: 64.0 nurse-hours",
		"6 nurses (5 giving direct care) give 60.0 nurse-hours"} {
		if !strings.Contains(c.Describe, want) {
			t.Errorf("description %q lacks %q", c.Describe, want)
		}
	}
	if len(c.Ticks) < 3 {
		t.Errorf("%d ticks", len(c.Ticks))
	}
}

// The axis never goes below 0 nurse-hours.
func TestNewChartStartsAtZero(t *testing.T) {
	c := NewChart(ChartInput{BandLow: 0.5, BandHigh: 10, Median: 3, Cover: 8, Capacities: []ChartCapacity{{Nurses: 1, CareGiving: 1, NurseHours: 12, Recommended: true}}})
	if c.Ticks[0].Label != "0" || c.Ticks[0].X != "24.0" {
		t.Errorf("first tick %+v, want 0 at the left edge", c.Ticks[0])
	}
}
