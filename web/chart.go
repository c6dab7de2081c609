package web

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// ChartInput is what the workload chart draws, all in nurse-hours: the
// normal model of the shift's workload (Mean, SD), the simulated P10, P50
// and P90, and the capacity of some headcounts.
type ChartInput struct {
	Mean, SD      float64
	P10, P50, P90 float64
	Capacities    []ChartCapacity
}

// ChartCapacity is the nurse-hours a headcount gives on the shift.
type ChartCapacity struct {
	Nurses      int
	NurseHours  float64
	Recommended bool
}

// ChartVM is the geometry of the workload chart, in the coordinates of
// ViewBox, ready for the template: no arithmetic is left to it.
type ChartVM struct {
	ViewBox string
	Empty   bool   // nothing to draw: no variation in the workload
	Curve   string // SVG path of the normal density
	Tail    string // filled area beyond the recommended capacity
	AxisY   string
	AxisX1  string
	AxisX2  string
	Ticks   []ChartTick
	Lines   []ChartLine
	// The simulated P10–P90 bar under the axis, with a dot at P50.
	RangeX1, RangeX2, RangeMid, RangeY string
	LabelY                             string // y of the axis title
	Describe                           string // the chart in words, for screen readers
}

// ChartTick is one labelled tick of the nurse-hours axis.
type ChartTick struct {
	X, Y1, Y2, LabelY string
	Label             string
}

// ChartLine is a vertical line: a headcount's capacity.
type ChartLine struct {
	X1, Y1, X2, Y2 string
	LabelX, LabelY string
	Label          string
	// LabelNum and LabelWord are Label in two parts ("8", "nurses"), so
	// that a narrow screen can drop the word of the neighbours' labels.
	LabelNum, LabelWord string
	Recommended         bool
	Class               string
}

// The chart's frame, in viewBox units.
const (
	chartW      = 640.0
	chartH      = 300.0
	chartLeft   = 24.0
	chartRight  = 616.0
	chartTop    = 56.0 // room for two rows of capacity labels above the curve
	chartBase   = 220.0
	chartPoints = 161
)

// NewChart lays out the chart: x from a little below the lowest of
// mean − 4·SD and the capacities to a little above the highest, never
// below 0 nurse-hours; the density scaled to the frame's height.
func NewChart(in ChartInput) ChartVM {
	c := ChartVM{ViewBox: fmt.Sprintf("0 0 %g %g", chartW, chartH)}
	if !(in.SD > 0) || math.IsInf(in.SD, 0) || math.IsNaN(in.Mean) {
		c.Empty = true
		return c
	}
	lo, hi := in.Mean-4*in.SD, in.Mean+4*in.SD
	for _, cp := range in.Capacities {
		lo, hi = math.Min(lo, cp.NurseHours), math.Max(hi, cp.NurseHours)
	}
	for _, q := range []float64{in.P10, in.P90} {
		lo, hi = math.Min(lo, q), math.Max(hi, q)
	}
	pad := (hi - lo) * 0.04
	lo, hi = math.Max(0, lo-pad), hi+pad
	x := func(v float64) float64 { return chartLeft + (v-lo)/(hi-lo)*(chartRight-chartLeft) }
	y := func(v float64) float64 {
		z := (v - in.Mean) / in.SD
		return chartBase - math.Exp(-z*z/2)*(chartBase-chartTop-8)
	}

	var curve strings.Builder
	rec := math.NaN()
	for _, cp := range in.Capacities {
		if cp.Recommended {
			rec = cp.NurseHours
		}
	}
	var tail strings.Builder
	for i := range chartPoints {
		v := lo + (hi-lo)*float64(i)/(chartPoints-1)
		cmd := "L"
		if i == 0 {
			cmd = "M"
		}
		fmt.Fprintf(&curve, "%s%s,%s ", cmd, oneDecimal(x(v)), oneDecimal(y(v)))
		if !math.IsNaN(rec) && v >= rec {
			if tail.Len() == 0 {
				fmt.Fprintf(&tail, "M%s,%s L%s,%s ", oneDecimal(x(rec)), oneDecimal(chartBase), oneDecimal(x(rec)), oneDecimal(y(rec)))
			}
			fmt.Fprintf(&tail, "L%s,%s ", oneDecimal(x(v)), oneDecimal(y(v)))
		}
	}
	c.Curve = strings.TrimSpace(curve.String())
	if tail.Len() > 0 {
		fmt.Fprintf(&tail, "L%s,%s Z", oneDecimal(x(hi)), oneDecimal(chartBase))
		c.Tail = tail.String()
	}
	c.AxisY, c.AxisX1, c.AxisX2 = oneDecimal(chartBase), oneDecimal(chartLeft), oneDecimal(chartRight)
	step := niceStep((hi - lo) / 6)
	for t := math.Ceil(lo/step) * step; t <= hi; t += step {
		c.Ticks = append(c.Ticks, ChartTick{
			X: oneDecimal(x(t)), Y1: oneDecimal(chartBase), Y2: oneDecimal(chartBase + 6), LabelY: oneDecimal(chartBase + 22),
			Label: strconv.FormatFloat(math.Round(t/step)*step, 'f', -1, 64),
		})
	}
	for i, cp := range in.Capacities {
		l := ChartLine{
			X1: oneDecimal(x(cp.NurseHours)), X2: oneDecimal(x(cp.NurseHours)), Y1: oneDecimal(chartTop - 6), Y2: oneDecimal(chartBase),
			// Neighbouring labels alternate between two rows so that
			// they cannot overlap even where the lines are close.
			LabelX: oneDecimal(x(cp.NurseHours)), LabelY: oneDecimal(chartTop - 36 + float64(i%2)*24),
			Label: fmt.Sprintf("%d nurses", cp.Nurses), Class: "chart-cap",
			LabelNum: strconv.Itoa(cp.Nurses), LabelWord: "nurses",
		}
		if cp.Recommended {
			l.Class, l.Label = "chart-cap chart-cap-rec", fmt.Sprintf("%d recommended", cp.Nurses)
			l.LabelWord, l.Recommended = "recommended", true
		}
		c.Lines = append(c.Lines, l)
	}
	c.RangeX1, c.RangeX2, c.RangeMid, c.RangeY = oneDecimal(x(in.P10)), oneDecimal(x(in.P90)), oneDecimal(x(in.P50)), oneDecimal(chartBase+46)
	c.LabelY = oneDecimal(chartH - 4)
	c.Describe = fmt.Sprintf("Normal curve of the shift's workload centred on %s nurse-hours with a standard deviation of %s; "+
		"the simulation's middle 80%% runs from %s to %s nurse-hours (median %s).",
		oneDecimal(in.Mean), oneDecimal(in.SD), oneDecimal(in.P10), oneDecimal(in.P90), oneDecimal(in.P50))
	for _, cp := range in.Capacities {
		c.Describe += fmt.Sprintf(" %d nurses give %s nurse-hours.", cp.Nurses, oneDecimal(cp.NurseHours))
	}
	return c
}

// niceStep rounds a raw tick step up to 1, 2 or 5 times a power of ten;
// a raw step that is not positive (or NaN) gives 1. A positive raw step
// so small that its power of ten underflows gives 0, which callers check.
func niceStep(raw float64) float64 {
	if !(raw > 0) {
		return 1
	}
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 5, 10} {
		if raw <= m*mag {
			return m * mag
		}
	}
	return 10 * mag
}

// oneDecimal writes a number with one decimal: enough for a coordinate in
// a frame some hundreds of units wide, and for nurse-hours read by people.
func oneDecimal(v float64) string { return strconv.FormatFloat(v, 'f', 1, 64) }
