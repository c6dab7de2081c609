package web

import (
	"fmt"
	"math"
	"strings"
)

// TrendInput is one tier's weekly quartiles, oldest week first; NaN
// where a week has no observations of the tier.
type TrendInput struct {
	Label, Unit    string
	Weeks          []string // week labels, e.g. "2026-W09"
	Q1, Median, Q3 []float64
}

// TrendChartVM is one small multiple of the weekly trend: the median per
// week as a line with points and the band from Q1 to Q3, on an axis every
// tier's chart shares, newest week at the right edge.
type TrendChartVM struct {
	ViewBox     string
	Title, Desc string
	Bands       []string // polygon point lists, one per run of weeks with data
	Lines       []string // polyline point lists, one per run
	Points      []TrendPointVM
	Ticks       []TrendTickVM // y axis
	First, Last string        // the first and last week's labels
	LastX       string
}

// TrendPointVM is one week's median mark.
type TrendPointVM struct{ X, Y string }

// TrendTickVM is one labelled y-axis tick.
type TrendTickVM struct{ Y, Label string }

// Frame of a trend chart, in viewBox units: narrow, like the histograms,
// so that text stays readable on a phone.
const (
	trendW      = 360.0
	trendH      = 130.0
	trendLeft   = 40.0
	trendRight  = 348.0
	trendTop    = 10.0
	trendBottom = 100.0
)

// trendFrame writes a frame constant for the template.
func trendFrame(v float64) string { return frameNum(v) }

// TrendAxisTop returns the top of a shared y axis for ins: a round number
// at or above every Q3 (and median), from 0. It is 0 when no week has data.
func TrendAxisTop(ins []TrendInput) float64 {
	hi := 0.0
	for _, in := range ins {
		for i := range in.Median {
			for _, v := range []float64{in.Q3[i], in.Median[i]} {
				if v > hi && !math.IsInf(v, 0) {
					hi = v
				}
			}
		}
	}
	if hi == 0 {
		return 0
	}
	step := niceStep(hi / 4)
	return math.Ceil(hi/step) * step
}

// NewTrendChart lays out in on an axis from 0 to top. It returns nil when
// top is not positive or no week has data.
func NewTrendChart(in TrendInput, top float64) *TrendChartVM {
	n := len(in.Weeks)
	if !(top > 0) || math.IsInf(top, 0) || n == 0 {
		return nil
	}
	x := func(i int) float64 {
		if n == 1 {
			return (trendLeft + trendRight) / 2
		}
		return trendLeft + float64(i)/float64(n-1)*(trendRight-trendLeft)
	}
	y := func(v float64) float64 { return trendBottom - math.Min(v, top)/top*(trendBottom-trendTop) }
	c := &TrendChartVM{
		ViewBox: fmt.Sprintf("0 0 %g %g", trendW, trendH),
		Title:   "Weekly median of " + in.Label,
		First:   in.Weeks[0], Last: in.Weeks[n-1], LastX: oneDecimal(x(n - 1)),
	}
	var line, upper, lower []string
	flush := func() {
		if len(line) > 0 {
			c.Lines = append(c.Lines, strings.Join(line, " "))
			for i := len(lower) - 1; i >= 0; i-- {
				upper = append(upper, lower[i])
			}
			c.Bands = append(c.Bands, strings.Join(upper, " "))
		}
		line, upper, lower = nil, nil, nil
	}
	var d strings.Builder
	fmt.Fprintf(&d, "%s, weekly median of %s with the band from Q1 to Q3, %s to %s:", in.Label, in.Unit, c.First, c.Last)
	with := 0
	for i := range n {
		if math.IsNaN(in.Median[i]) {
			flush()
			continue
		}
		with++
		px := oneDecimal(x(i))
		line = append(line, px+","+oneDecimal(y(in.Median[i])))
		upper = append(upper, px+","+oneDecimal(y(in.Q3[i])))
		lower = append(lower, px+","+oneDecimal(y(in.Q1[i])))
		c.Points = append(c.Points, TrendPointVM{X: px, Y: oneDecimal(y(in.Median[i]))})
		fmt.Fprintf(&d, " %s %s (Q1 %s, Q3 %s);", in.Weeks[i], FormatValue(in.Median[i]), FormatValue(in.Q1[i]), FormatValue(in.Q3[i]))
	}
	flush()
	if with == 0 {
		return nil
	}
	step := niceStep(top / 4)
	for v := 0.0; v <= top+step/2; v += step {
		c.Ticks = append(c.Ticks, TrendTickVM{Y: oneDecimal(y(v)), Label: FormatValue(v)})
	}
	if with < n {
		fmt.Fprintf(&d, " %d of %d weeks without observations.", n-with, n)
	}
	c.Desc = strings.TrimSuffix(d.String(), ";") + "."
	return c
}
