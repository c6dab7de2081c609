package web

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// ChartInput is what the workload chart draws, all in nurse-hours: the
// band of the shift's workload with its median, the cover figure, and the
// capacity of some headcounts. The band and the cover figure are the ones
// the page states beside the chart, under the same names.
type ChartInput struct {
	BandLow, BandHigh float64
	Median            float64
	BandName          string // e.g. "90% band"
	Cover             float64
	CoverName         string // e.g. "90% cover"
	Capacities        []ChartCapacity
}

// ChartCapacity is the nurse-hours of direct care a headcount gives on the
// shift: its care-giving nurses × the shift's hours.
type ChartCapacity struct {
	Nurses      int
	CareGiving  int // Nurses less the nurse in charge where that nurse is extra
	NurseHours  float64
	Recommended bool
}

// ChartVM is the geometry of the workload chart, in the coordinates of
// ViewBox, ready for the template: no arithmetic is left to it.
type ChartVM struct {
	ViewBox string
	Empty   bool // nothing to draw: the band has no width (for example, no patients)
	AxisY   string
	AxisX1  string
	AxisX2  string
	Ticks   []ChartTick
	Lines   []ChartLine
	// The band as a bar with end caps, its name at its left end and a dot
	// at the median.
	BandX1, BandX2, BandY             string
	BandCapY1, BandCapY2              string
	BandLabel, BandLabelX, BandLabelY string // centred under the bar
	MedianX                           string
	CoverX, CoverY1, CoverY2          string // the cover figure: a mark across the bar
	CoverLabel, CoverLabelY           string
	AxisLabelX, AxisLabelY            string // the axis title "nurse-hours"
	Describe                          string // the chart in words, for screen readers
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
	chartW     = 640.0
	chartH     = 236.0
	chartLeft  = 24.0
	chartRight = 616.0
	chartTop   = 56.0  // room for two rows of capacity labels above the lines
	chartBandY = 122.0 // the band's bar
	chartBase  = 180.0 // the axis
)

// NewChart lays out the chart: x from a little below the lowest of the
// band and the capacities to a little above the highest, never below 0
// nurse-hours.
func NewChart(in ChartInput) ChartVM {
	c := ChartVM{ViewBox: fmt.Sprintf("0 0 %g %g", chartW, chartH)}
	for _, v := range []float64{in.BandLow, in.BandHigh, in.Median, in.Cover} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			c.Empty = true
			return c
		}
	}
	if !(in.BandHigh > in.BandLow) {
		c.Empty = true
		return c
	}
	lo, hi := in.BandLow, in.BandHigh
	for _, v := range []float64{in.Median, in.Cover} {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	for _, cp := range in.Capacities {
		lo, hi = math.Min(lo, cp.NurseHours), math.Max(hi, cp.NurseHours)
	}
	pad := (hi - lo) * 0.06
	lo, hi = math.Max(0, lo-pad), hi+pad
	x := func(v float64) float64 { return chartLeft + (v-lo)/(hi-lo)*(chartRight-chartLeft) }

	c.AxisY, c.AxisX1, c.AxisX2 = oneDecimal(chartBase), oneDecimal(chartLeft), oneDecimal(chartRight)
	step := niceStep((hi - lo) / 6)
	if step > 0 {
		for t := math.Ceil(lo/step) * step; t <= hi; t += step {
			c.Ticks = append(c.Ticks, ChartTick{
				X: oneDecimal(x(t)), Y1: oneDecimal(chartBase), Y2: oneDecimal(chartBase + 6), LabelY: oneDecimal(chartBase + 22),
				Label: strconv.FormatFloat(math.Round(t/step)*step, 'f', -1, 64),
			})
		}
	}
	c.AxisLabelX, c.AxisLabelY = oneDecimal(chartRight), oneDecimal(chartH-4)
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

	c.BandX1, c.BandX2, c.BandY = oneDecimal(x(in.BandLow)), oneDecimal(x(in.BandHigh)), oneDecimal(chartBandY)
	c.BandCapY1, c.BandCapY2 = oneDecimal(chartBandY-7), oneDecimal(chartBandY+7)
	c.MedianX = oneDecimal(x(in.Median))
	// The band's name sits under the bar, centred, where the capacity
	// labels above the frame cannot reach it.
	c.BandLabel, c.BandLabelX, c.BandLabelY = in.BandName, oneDecimal((x(in.BandLow)+x(in.BandHigh))/2), oneDecimal(chartBandY+28)
	c.CoverX, c.CoverY1, c.CoverY2 = oneDecimal(x(in.Cover)), oneDecimal(chartBandY-18), oneDecimal(chartBandY+18)
	c.CoverLabel, c.CoverLabelY = in.CoverName, oneDecimal(chartBandY-24)

	var d strings.Builder
	fmt.Fprintf(&d, "The %s of this shift's workload runs from %s to %s nurse-hours, median %s; %s: %s nurse-hours.",
		in.BandName, oneDecimal(in.BandLow), oneDecimal(in.BandHigh), oneDecimal(in.Median), in.CoverName, oneDecimal(in.Cover))
	for _, cp := range in.Capacities {
		if cp.CareGiving != cp.Nurses {
			fmt.Fprintf(&d, " %d nurses (%d giving direct care) give %s nurse-hours.", cp.Nurses, cp.CareGiving, oneDecimal(cp.NurseHours))
		} else {
			fmt.Fprintf(&d, " %d nurses give %s nurse-hours.", cp.Nurses, oneDecimal(cp.NurseHours))
		}
	}
	c.Describe = d.String()
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
