package web

import (
	"fmt"
	"math"
)

// ScatterInput is what the relationship chart draws: pairs (X[i], Y[i]),
// the indices of the pairs to mark as outside the fences, and the fitted
// line y = Intercept + Slope·x when HasLine.
type ScatterInput struct {
	XLabel, YLabel   string
	X, Y             []float64
	Flagged          []int // indices into X and Y
	HasLine          bool
	Intercept, Slope float64
	// MaxPoints caps the points drawn (0: all). Flagged pairs are always
	// drawn; the others are taken at an even stride, so the picture is
	// the same for the same data.
	MaxPoints int
}

// ScatterVM is the geometry of the relationship chart in ViewBox
// coordinates: no arithmetic is left to the template.
type ScatterVM struct {
	ViewBox          string
	Points           []ScatterPointVM
	Flagged          []ScatterPointVM
	XTicks, YTicks   []ScatterTickVM
	Line             *ScatterLineVM
	XLabel, YLabel   string
	Drawn, Total     int
	Desc             string
	XLabelX, XLabelY string
}

// ScatterPointVM is one drawn pair.
type ScatterPointVM struct{ X, Y string }

// ScatterTickVM is one labelled tick; Pos is x for the x axis, y for the
// y axis.
type ScatterTickVM struct{ Pos, Label string }

// ScatterLineVM is the fitted line clipped to the x range of the data.
type ScatterLineVM struct{ X1, Y1, X2, Y2 string }

// Frame of the relationship chart, in viewBox units: as narrow as the
// other review charts so that 12-unit text stays at least 12 px wide on a
// 390 px phone.
const (
	scatterW      = 360.0
	scatterH      = 260.0
	scatterLeft   = 44.0
	scatterRight  = 350.0
	scatterTop    = 28.0
	scatterBottom = 210.0
)

// scatterFrame writes a frame constant for the template.
func scatterFrame(v float64) string { return frameNum(v) }

// niceRange returns round ends and a step covering [lo, hi] in about
// four steps; a zero-width range is widened by one unit either side.
func niceRange(lo, hi float64) (float64, float64, float64) {
	if hi <= lo {
		lo, hi = lo-1, hi+1
	}
	step := niceStep((hi - lo) / 4)
	return math.Floor(lo/step) * step, math.Ceil(hi/step) * step, step
}

// NewScatter lays out in. It returns nil without pairs or with a value
// that is not finite.
func NewScatter(in ScatterInput) *ScatterVM {
	n := len(in.X)
	if n == 0 || len(in.Y) != n {
		return nil
	}
	xlo, xhi, ylo, yhi := math.Inf(1), math.Inf(-1), 0.0, math.Inf(-1)
	for i := range n {
		if math.IsNaN(in.X[i]) || math.IsInf(in.X[i], 0) || math.IsNaN(in.Y[i]) || math.IsInf(in.Y[i], 0) {
			return nil
		}
		xlo, xhi = min(xlo, in.X[i]), max(xhi, in.X[i])
		ylo, yhi = min(ylo, in.Y[i]), max(yhi, in.Y[i])
	}
	x0, x1, xs := niceRange(xlo, xhi)
	y0, y1, ys := niceRange(ylo, yhi)
	px := func(v float64) float64 { return scatterLeft + (v-x0)/(x1-x0)*(scatterRight-scatterLeft) }
	py := func(v float64) float64 { return scatterBottom - (v-y0)/(y1-y0)*(scatterBottom-scatterTop) }
	pt := func(i int) ScatterPointVM {
		return ScatterPointVM{X: oneDecimal(px(in.X[i])), Y: oneDecimal(py(in.Y[i]))}
	}
	c := &ScatterVM{
		ViewBox: fmt.Sprintf("0 0 %g %g", scatterW, scatterH),
		XLabel:  in.XLabel, YLabel: in.YLabel, Total: n,
		XLabelX: oneDecimal((scatterLeft + scatterRight) / 2), XLabelY: oneDecimal(scatterBottom + 40),
	}
	flagged := make(map[int]bool, len(in.Flagged))
	for _, i := range in.Flagged {
		if i >= 0 && i < n && !flagged[i] {
			flagged[i] = true
			c.Flagged = append(c.Flagged, pt(i))
		}
	}
	others := n - len(c.Flagged)
	keep := others
	if in.MaxPoints > 0 && keep > in.MaxPoints {
		keep = in.MaxPoints
	}
	// The j-th kept unflagged pair is the ⌊j·(others−1)/(keep−1)⌋-th
	// one, so that the first and the last are both drawn.
	pick := func(j int) int {
		if keep <= 1 {
			return 0
		}
		return j * (others - 1) / (keep - 1)
	}
	next, seen := 0, 0
	for i := range n {
		if flagged[i] {
			continue
		}
		if len(c.Points) < keep && seen == pick(next) {
			c.Points = append(c.Points, pt(i))
			next++
		}
		seen++
	}
	c.Drawn = len(c.Points) + len(c.Flagged)
	for v := x0; v <= x1+xs/2; v += xs {
		c.XTicks = append(c.XTicks, ScatterTickVM{Pos: oneDecimal(px(v)), Label: FormatValue(v)})
	}
	for v := y0; v <= y1+ys/2; v += ys {
		c.YTicks = append(c.YTicks, ScatterTickVM{Pos: oneDecimal(py(v)), Label: FormatValue(v)})
	}
	if in.HasLine && xhi > xlo {
		if a, b, ok := clipLine(in.Intercept, in.Slope, xlo, xhi, y0, y1); ok {
			c.Line = &ScatterLineVM{
				X1: oneDecimal(px(a)), Y1: oneDecimal(py(in.Intercept + in.Slope*a)),
				X2: oneDecimal(px(b)), Y2: oneDecimal(py(in.Intercept + in.Slope*b)),
			}
		}
	}
	c.Desc = fmt.Sprintf("Scatter plot of %s (down the side) against %s (along the bottom): %d pairs, %s from %s to %s and %s from %s to %s",
		in.YLabel, in.XLabel, n, in.XLabel, FormatValue(xlo), FormatValue(xhi), in.YLabel, FormatValue(min(ylo, yhi)), FormatValue(yhi))
	if len(c.Flagged) > 0 {
		c.Desc += fmt.Sprintf("; %d outside the fences, drawn as hollow red rings", len(c.Flagged))
	}
	if c.Drawn < n {
		c.Desc += fmt.Sprintf("; %d of the %d pairs drawn", c.Drawn, n)
	}
	c.Desc += "."
	return c
}

// clipLine returns the part [a, b] of [xlo, xhi] where the line
// y = b0 + b1·x stays within [ylo, yhi], so that it is drawn inside the
// frame with its true slope; ok is false when none of it does.
func clipLine(b0, b1, xlo, xhi, ylo, yhi float64) (a, b float64, ok bool) {
	a, b = xlo, xhi
	if b1 != 0 {
		u, v := (ylo-b0)/b1, (yhi-b0)/b1
		a, b = max(a, min(u, v)), min(b, max(u, v))
	} else if b0 < ylo || b0 > yhi {
		return 0, 0, false
	}
	return a, b, a < b
}
