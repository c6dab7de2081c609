package web

import (
	"math"
	"strconv"
	"testing"
)

// A year of pairs draws at most MaxPoints of the unflagged ones, every
// flagged one, the same ones each time, spread over the whole run.
func TestScatterCapsPoints(t *testing.T) {
	n := 5000
	x, y := make([]float64, n), make([]float64, n)
	for i := range n {
		x[i], y[i] = float64(i), float64(i%97)
	}
	in := ScatterInput{XLabel: "score", YLabel: "minutes", X: x, Y: y, Flagged: []int{0, 17, 4999, 17}, MaxPoints: 2000}
	c := NewScatter(in)
	if len(c.Flagged) != 3 || len(c.Points) != 2000 || c.Drawn != 2003 || c.Total != n {
		t.Fatalf("flagged %d, points %d, drawn %d of %d; want 3, 2000, 2003 of 5000", len(c.Flagged), len(c.Points), c.Drawn, c.Total)
	}
	again := NewScatter(in)
	for i := range c.Points {
		if c.Points[i] != again.Points[i] {
			t.Fatalf("point %d differs between two layouts", i)
		}
	}
	// The first and last unflagged pairs (x 1 and 4998) are both drawn.
	first, _ := strconv.ParseFloat(c.Points[0].X, 64)
	last, _ := strconv.ParseFloat(c.Points[len(c.Points)-1].X, 64)
	x0, x1, _ := niceRange(0, 4999)
	px := func(v float64) float64 { return scatterLeft + (v-x0)/(x1-x0)*(scatterRight-scatterLeft) }
	if math.Abs(first-px(1)) > 0.06 || math.Abs(last-px(4998)) > 0.06 {
		t.Errorf("drawn points span x %v to %v, want %.1f to %.1f", first, last, px(1), px(4998))
	}
	if all := NewScatter(ScatterInput{X: x[:10], Y: y[:10], MaxPoints: 2000}); len(all.Points) != 10 {
		t.Errorf("10 pairs: %d drawn", len(all.Points))
	}
	if NewScatter(ScatterInput{X: []float64{1, math.NaN()}, Y: []float64{1, 2}}) != nil || NewScatter(ScatterInput{}) != nil {
		t.Error("a chart of nothing or of NaN")
	}
}

// The fitted line keeps its slope inside the frame: y = 2x on [0, 10]
// with the y axis ending at 10 is drawn from x 0 to x 5 only.
func TestClipLine(t *testing.T) {
	for _, tc := range []struct {
		b0, b1, xlo, xhi, ylo, yhi float64
		a, b                       float64
		ok                         bool
	}{
		{0, 2, 0, 10, 0, 10, 0, 5, true},
		{10, -2, 0, 10, 0, 10, 0, 5, true},
		{3, 0, 0, 10, 0, 10, 0, 10, true},
		{11, 0, 0, 10, 0, 10, 0, 0, false},
		{-30, 1, 0, 10, 0, 10, 0, 0, false},
	} {
		a, b, ok := clipLine(tc.b0, tc.b1, tc.xlo, tc.xhi, tc.ylo, tc.yhi)
		if ok != tc.ok || (ok && (a != tc.a || b != tc.b)) {
			t.Errorf("%+v: got %v %v %v", tc, a, b, ok)
		}
	}
}
