package web

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
)

// BoxInput is one tier's box plot in data units: the five numbers, the
// whisker ends (the most extreme values inside the inner fences, Tukey
// 1977) and the values outside them.
type BoxInput struct {
	Label                   string
	N                       int
	Min, Q1, Median, Q3     float64
	Max                     float64
	WhiskerLo, WhiskerHi    float64
	Outliers                []BoxPoint
	Unit                    string // for the description, e.g. "minutes per shift"
	Convention, Description string // Description: extra words for screen readers
}

// BoxPoint is a value outside the inner fences.
type BoxPoint struct {
	Value   float64
	Extreme bool
}

// BoxAxisVM is the common axis of a page's box plots: every plot maps the
// same values to the same x so that tiers can be compared by eye.
type BoxAxisVM struct {
	Lo, Hi float64
	Ticks  []float64
	Empty  bool
}

// BoxPlotVM is the geometry of one box plot in its viewBox, ready for the
// template.
type BoxPlotVM struct {
	Title, Desc          string
	BoxX, BoxW           string
	MedianX              string
	WhiskerLo, WhiskerHi string
	Points               []BoxPointVM
	// OffScale is the short mark in the gutter for values beyond the
	// axis ("→ 2600", or "→ 3" for three values), OffScaleNote the
	// sentence under the figure; both "" if none.
	OffScale, OffScaleNote string
}

// BoxPlotsVM is every tier's box plot in one figure: a row per tier and
// one axis under them, so that tiers are compared on one scale.
type BoxPlotsVM struct {
	ViewBox   string
	Rows      []BoxRowVM
	AxisY     string // y of the axis line
	TickEndY  string // lower end of the tick marks
	TickY     string // baseline of the tick labels
	TitleY    string // baseline of the unit's name
	Ticks     []BoxTickVM
	AxisTitle string
	Notes     []string // values past the end of the scale, per tier
}

// BoxRowVM is one tier's row: moved down by Transform; Plot nil when the
// tier has no observations.
type BoxRowVM struct {
	Code, Label string
	Transform   string
	Plot        *BoxPlotVM
}

// NewBoxPlots stacks plots (one per tier, nil for a tier without
// observations, labelled by labels and keyed by codes) above axis a,
// whose values are in unit. It returns nil when no tier has a plot.
func NewBoxPlots(a BoxAxisVM, codes, labels []string, plots []*BoxPlotVM, unit string) *BoxPlotsVM {
	if !slices.ContainsFunc(plots, func(p *BoxPlotVM) bool { return p != nil }) {
		return nil
	}
	axisY := float64(len(plots)) * boxRowH
	v := &BoxPlotsVM{
		ViewBox:   fmt.Sprintf("0 0 %g %g", boxW, axisY+boxAxisH),
		AxisY:     frameNum(axisY),
		TickEndY:  frameNum(axisY + 5),
		TickY:     frameNum(axisY + 18),
		TitleY:    frameNum(axisY + 38),
		AxisTitle: unit,
	}
	for i, p := range plots {
		v.Rows = append(v.Rows, BoxRowVM{Code: codes[i], Label: labels[i], Transform: fmt.Sprintf("translate(0 %g)", float64(i)*boxRowH), Plot: p})
		if p != nil && p.OffScaleNote != "" {
			v.Notes = append(v.Notes, p.OffScaleNote)
		}
	}
	for _, t := range a.Ticks {
		v.Ticks = append(v.Ticks, BoxTickVM{X: oneDecimal(a.x(t)), Label: FormatValue(t)})
	}
	return v
}

// BoxPointVM is one outlier mark.
type BoxPointVM struct {
	X       string
	Extreme bool
}

// BoxTickVM is one labelled tick of the axis.
type BoxTickVM struct {
	X, Label string
}

// Frame of the box plots, in viewBox units; x beyond boxRight is the
// "off scale" gutter for values past the axis, labelled from boxGutterX.
// The frame is 360 units wide, so that its 12-unit text is about 12 px
// where a 390 px phone draws it at its own width. Each tier is a row
// boxRowH high: its label on top, the box from y 18 to 38; the shared
// axis is under the last row.
const (
	boxW       = 360.0
	boxLeft    = 12.0
	boxRight   = 296.0
	boxGutterX = boxRight + 6
	boxRowH    = 48.0
	boxAxisH   = 44.0 // the axis line, tick labels and the unit's name
)

// frameNum writes a frame constant for the template: 16, not 16.0.
func frameNum(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }

// NewBoxAxis returns an axis from 0 to a round number at or above hi:
// care minutes are never negative, so 0 anchors every plot. hi ≤ 0 or not
// finite gives an empty axis.
func NewBoxAxis(hi float64) BoxAxisVM {
	if !(hi > 0) || math.IsInf(hi, 0) {
		return BoxAxisVM{Empty: true}
	}
	raw := hi / 5
	step := niceStep(raw)
	top := math.Ceil(hi/step) * step
	// Near the float64 limits the rounding overflows (hi 1.7e308 gives top
	// +Inf, and the tick loop below would then never end) or underflows
	// (a subnormal hi gives a raw step of 0, which niceStep would turn
	// into 1, or a step of 0). Such values are entry errors the review
	// lists; they get no plot rather than a runaway loop.
	if !(raw > 0) || !(step > 0) || math.IsInf(top, 0) || math.IsNaN(top) {
		return BoxAxisVM{Empty: true}
	}
	a := BoxAxisVM{Lo: 0, Hi: top}
	for v := 0.0; v <= top+step/2; v += step {
		a.Ticks = append(a.Ticks, v)
	}
	return a
}

func (a BoxAxisVM) x(v float64) float64 {
	return boxLeft + (v-a.Lo)/(a.Hi-a.Lo)*(boxRight-boxLeft)
}

// NewBoxPlot lays out in on axis a. Values past the axis's top are drawn
// as one arrow in the gutter with their count and largest value.
func NewBoxPlot(a BoxAxisVM, in BoxInput) *BoxPlotVM {
	if a.Empty || in.N == 0 {
		return nil
	}
	clamp := func(v float64) string { return oneDecimal(a.x(math.Min(v, a.Hi))) }
	p := &BoxPlotVM{
		Title:     "Box plot of " + in.Label,
		BoxX:      clamp(in.Q1),
		BoxW:      oneDecimal(a.x(math.Min(in.Q3, a.Hi)) - a.x(math.Min(in.Q1, a.Hi))),
		MedianX:   clamp(in.Median),
		WhiskerLo: clamp(in.WhiskerLo),
		WhiskerHi: clamp(in.WhiskerHi),
	}
	var beyond []float64
	mild, extreme := 0, 0
	for _, o := range in.Outliers {
		if o.Extreme {
			extreme++
		} else {
			mild++
		}
		if o.Value > a.Hi {
			beyond = append(beyond, o.Value)
			continue
		}
		p.Points = append(p.Points, BoxPointVM{X: oneDecimal(a.x(o.Value)), Extreme: o.Extreme})
	}
	if len(beyond) == 1 {
		p.OffScale = "→ " + FormatValue(beyond[0])
		p.OffScaleNote = fmt.Sprintf("%s: 1 value past the end of the scale, %s.", in.Label, FormatValue(beyond[0]))
	} else if len(beyond) > 1 {
		p.OffScale = fmt.Sprintf("→ %d", len(beyond))
		p.OffScaleNote = fmt.Sprintf("%s: %d values past the end of the scale, up to %s.", in.Label, len(beyond), FormatValue(slices.Max(beyond)))
	}
	var d strings.Builder
	fmt.Fprintf(&d, "%s, %s, %d observations (quartiles: %s): minimum %s, Q1 %s, median %s, Q3 %s, maximum %s; whiskers %s to %s",
		in.Label, in.Unit, in.N, in.Convention, FormatValue(in.Min), FormatValue(in.Q1), FormatValue(in.Median), FormatValue(in.Q3), FormatValue(in.Max),
		FormatValue(in.WhiskerLo), FormatValue(in.WhiskerHi))
	fmt.Fprintf(&d, "; %d mild and %d extreme outliers", mild, extreme)
	if len(beyond) > 0 {
		fmt.Fprintf(&d, ", %d beyond the axis end of %s", len(beyond), FormatValue(a.Hi))
	}
	d.WriteString(".")
	if in.Description != "" {
		d.WriteString(" " + in.Description)
	}
	p.Desc = d.String()
	return p
}

// FormatValue shows a data value with at most one decimal, dropping a
// trailing ".0": minutes are read by people, not compared bit for bit.
func FormatValue(v float64) string {
	s := strings.TrimSuffix(oneDecimal(v), ".0")
	if s == "-0" {
		s = "0"
	}
	return s
}
