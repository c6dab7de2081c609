package web

import (
	"fmt"
	"math"
	"slices"
	"strings"
)

// HistInput is one tier's histogram in data units: equal bins of Width
// from Start, counted by stats.Counts. With Log the bins are on the
// natural logarithm of the values and the axis is labelled in the values'
// own unit. Below and Above count the values left off either end of the
// axis (past the outer fences), BelowMin and AboveMax the most extreme of
// them; Zeros counts values of 0, which have no logarithm.
type HistInput struct {
	Label, Unit  string
	N            int
	Start, Width float64
	Counts       []int
	Below, Above int
	BelowMin     float64
	AboveMax     float64
	Zeros        int
	Log          bool
}

// HistogramVM is the geometry of one histogram in its viewBox, ready for
// the template. The frame is narrow (histW wide) so that the 12-unit text
// stays about 12 px on a 390 px phone, where the figure is drawn at
// roughly its own width.
type HistogramVM struct {
	ViewBox     string
	Title, Desc string
	Bars        []HistBarVM
	Ticks       []BoxTickVM
	CountLabel  string // the largest count, at the top of the count axis
	AxisTitle   string
	Notes       []string // values left off the axis, zeros on a log axis
}

// HistBarVM is one bar.
type HistBarVM struct {
	X, Y, W, H string
	Count      int
	CountText  string // Count, for the template
}

// Frame of a histogram, in viewBox units.
const (
	histW      = 360.0
	histH      = 170.0
	histLeft   = 36.0
	histRight  = 350.0
	histTop    = 12.0
	histBottom = 124.0
)

// histFrame writes a frame constant for the template.
func histFrame(v float64) string { return frameNum(v) }

// NewHistogram lays out in. It returns nil when there is nothing to draw.
func NewHistogram(in HistInput) *HistogramVM {
	if len(in.Counts) == 0 || in.N == 0 {
		return nil
	}
	top := slices.Max(in.Counts)
	if top == 0 {
		return nil
	}
	lo := in.Start
	hi := in.Start + float64(len(in.Counts))*in.Width
	if in.Width == 0 { // every value the same: one bar of nominal width
		lo, hi = in.Start-0.5, in.Start+0.5
	}
	x := func(v float64) float64 { return histLeft + (v-lo)/(hi-lo)*(histRight-histLeft) }
	y := func(c int) float64 { return histBottom - float64(c)/float64(top)*(histBottom-histTop) }
	h := &HistogramVM{
		ViewBox:    fmt.Sprintf("0 0 %g %g", histW, histH),
		Title:      "Histogram of " + in.Label,
		CountLabel: fmt.Sprint(top),
		AxisTitle:  in.Unit,
	}
	if in.Log {
		h.AxisTitle = in.Unit + " (log scale)"
	}
	for i, c := range in.Counts {
		a, b := lo+float64(i)*in.Width, lo+float64(i+1)*in.Width
		if in.Width == 0 {
			a, b = lo, hi
		}
		if c == 0 {
			continue
		}
		h.Bars = append(h.Bars, HistBarVM{X: oneDecimal(x(a)), W: oneDecimal(math.Max(x(b)-x(a)-0.5, 0.5)),
			Y: oneDecimal(y(c)), H: oneDecimal(histBottom - y(c)), Count: c, CountText: fmt.Sprint(c)})
	}
	for _, t := range histTicks(lo, hi, in.Log) {
		h.Ticks = append(h.Ticks, BoxTickVM{X: oneDecimal(x(t.at)), Label: t.label})
	}
	unshown := func(n int, where string, v float64) string {
		if n == 1 {
			return fmt.Sprintf("1 value %s the axis: %s.", where, FormatValue(v))
		}
		return fmt.Sprintf("%d values %s the axis, the most extreme %s.", n, where, FormatValue(v))
	}
	if in.Below > 0 {
		h.Notes = append(h.Notes, unshown(in.Below, "below", in.BelowMin))
	}
	if in.Above > 0 {
		h.Notes = append(h.Notes, unshown(in.Above, "beyond", in.AboveMax))
	}
	if in.Log && in.Zeros > 0 {
		h.Notes = append(h.Notes, fmt.Sprintf("%d values of 0 are not on the log axis.", in.Zeros))
	}
	var d strings.Builder
	scale := "linear"
	if in.Log {
		scale = "logarithmic"
	}
	fmt.Fprintf(&d, "%s: %d observations in %d bins on a %s axis of %s from %s to %s; the fullest bin holds %d.",
		in.Label, in.N, len(in.Counts), scale, in.Unit, histValue(lo, in.Log), histValue(hi, in.Log), top)
	for _, n := range h.Notes {
		d.WriteString(" " + n)
	}
	h.Desc = d.String()
	return h
}

// histValue writes an axis position in the data's unit.
func histValue(v float64, log bool) string {
	if log {
		return FormatValue(math.Exp(v))
	}
	return FormatValue(v)
}

type histTick struct {
	at    float64 // axis position (log value on a log axis)
	label string
}

// histTicks returns about five labelled ticks from lo to hi: round
// numbers on a linear axis, and the 1–2–5 sequence of the unit on a log
// axis (10, 20, 50, 100, ...), thinned to 1–10 when that gives too many.
func histTicks(lo, hi float64, log bool) []histTick {
	var out []histTick
	if !log {
		step := niceStep((hi - lo) / 5)
		for v := math.Ceil(lo/step) * step; v <= hi+step*1e-9; v += step {
			out = append(out, histTick{v, FormatValue(v)})
		}
		return out
	}
	a, b := math.Exp(lo), math.Exp(hi)
	for _, mantissas := range [][]float64{{1, 2, 5}, {1}} {
		out = out[:0]
		for p := math.Floor(math.Log10(a)); math.Pow(10, p) <= b*10; p++ {
			for _, m := range mantissas {
				v := m * math.Pow(10, p)
				if v >= a*(1-1e-9) && v <= b*(1+1e-9) {
					out = append(out, histTick{math.Log(v), FormatValue(v)})
				}
			}
		}
		if len(out) <= 7 {
			break
		}
	}
	if len(out) < 2 { // a narrow range: label its ends instead
		out = []histTick{{lo, FormatValue(a)}, {hi, FormatValue(b)}}
	}
	return out
}
