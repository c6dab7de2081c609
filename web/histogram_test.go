package web

import (
	"math"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// TestNewHistogram: one bar per non-empty bin with its count, heights in
// proportion to the counts, round ticks, and the values left off the axis
// named. Invented numbers, checked by hand.
func TestNewHistogram(t *testing.T) {
	h := NewHistogram(HistInput{Label: "Light care", Unit: "minutes", N: 10, Start: 0, Width: 25,
		Counts: []int{2, 0, 4, 1}, Above: 3, AboveMax: 2600})
	if h == nil {
		t.Fatal("nil histogram")
	}
	var counts []int
	var heights []float64
	for _, b := range h.Bars {
		counts = append(counts, b.Count)
		v, _ := strconv.ParseFloat(b.H, 64)
		heights = append(heights, v)
	}
	if !slices.Equal(counts, []int{2, 4, 1}) {
		t.Errorf("bars %v, want the non-empty bins 2 4 1", counts)
	}
	full := histBottom - histTop
	for i, c := range counts {
		if want := float64(c) / 4 * full; math.Abs(heights[i]-want) > 0.06 {
			t.Errorf("bar %d height %v, want %v", i, heights[i], want)
		}
	}
	var labels []string
	for _, tk := range h.Ticks {
		labels = append(labels, tk.Label)
	}
	if !slices.Equal(labels, []string{"0", "20", "40", "60", "80", "100"}) {
		t.Errorf("ticks %v", labels)
	}
	if len(h.Notes) != 1 || h.Notes[0] != "3 values beyond the axis, the most extreme 2600." || !strings.Contains(h.Desc, h.Notes[0]) {
		t.Errorf("notes %q, desc %q", h.Notes, h.Desc)
	}
	if NewHistogram(HistInput{N: 0}) != nil || NewHistogram(HistInput{N: 3, Counts: []int{0, 0}}) != nil {
		t.Error("want nil with nothing to draw")
	}
}

// TestHistTicksLog: a log axis is labelled in minutes at 1–2–5 steps, at
// the logarithm of the label.
func TestHistTicksLog(t *testing.T) {
	ticks := histTicks(math.Log(30), math.Log(700), true)
	var labels []string
	for _, tk := range ticks {
		labels = append(labels, tk.label)
		v, _ := strconv.ParseFloat(tk.label, 64)
		if math.Abs(tk.at-math.Log(v)) > 1e-12 {
			t.Errorf("tick %s at %v, want log %v", tk.label, tk.at, math.Log(v))
		}
	}
	if !slices.Equal(labels, []string{"50", "100", "200", "500"}) {
		t.Errorf("log ticks %v", labels)
	}
	h := NewHistogram(HistInput{Label: "x", Unit: "minutes", N: 5, Start: math.Log(30), Width: 0.5, Counts: []int{1, 2, 2}, Log: true, Zeros: 2})
	if !strings.HasSuffix(h.AxisTitle, "(log scale)") || !slices.Contains(h.Notes, "2 values of 0 are not on the log axis.") {
		t.Errorf("log histogram title %q notes %q", h.AxisTitle, h.Notes)
	}
}

// TestNewTrendChart: a week without data breaks the line and the band,
// every chart of a page shares the axis top, and the newest week is at
// the right edge.
func TestNewTrendChart(t *testing.T) {
	nan := math.NaN()
	in := TrendInput{Label: "Heavy care", Unit: "minutes", Weeks: []string{"W1", "W2", "W3", "W4"},
		Q1: []float64{100, 110, nan, 90}, Median: []float64{150, 160, nan, 140}, Q3: []float64{200, 230, nan, 210}}
	other := TrendInput{Label: "Light", Weeks: in.Weeks, Q1: []float64{10, 10, 10, 10}, Median: []float64{20, 20, 20, 20}, Q3: []float64{30, 30, 30, 30}}
	top := TrendAxisTop([]TrendInput{in, other})
	if top != 300 {
		t.Errorf("axis top %v, want 300 (round step above 230)", top)
	}
	c := NewTrendChart(in, top)
	if len(c.Lines) != 2 || len(c.Bands) != 2 || len(c.Points) != 3 {
		t.Errorf("lines %d bands %d points %d, want 2 2 3", len(c.Lines), len(c.Bands), len(c.Points))
	}
	if c.Last != "W4" || c.LastX != oneDecimal(trendRight) || c.Points[2].X != oneDecimal(trendRight) {
		t.Errorf("newest week %q at %s, want W4 at the right edge", c.Last, c.LastX)
	}
	if !strings.Contains(c.Desc, "1 of 4 weeks without observations") || !strings.Contains(c.Desc, "W2 160 (Q1 110, Q3 230)") {
		t.Errorf("desc %q", c.Desc)
	}
	empty := TrendInput{Weeks: []string{"W1"}, Q1: []float64{nan}, Median: []float64{nan}, Q3: []float64{nan}}
	if NewTrendChart(empty, top) != nil || NewTrendChart(in, 0) != nil {
		t.Error("want nil without data or axis")
	}
}
