package web

import (
	"fmt"
	"strconv"
)

// CalibrationVM is the ward's backtest on the review page: the sentence,
// coverage per band level (expected against observed) and a histogram of
// the probability integral transform (PIT) values, whose bars a calibrated
// model keeps near the dashed line of a tenth each.
type CalibrationVM struct {
	Sentence string
	Warn     bool
	Basis    string
	Rows     []CalibrationRowVM
	Levels   []string // column heads, "50% band"
	PIT      PITChartVM
}

// CalibrationRowVM is one prediction kind: shift totals or a tier.
type CalibrationRowVM struct {
	Name     string
	Checked  string
	Observed []string // per level, "86%"; "—" with nothing checked
}

// PITChartVM is the geometry of the PIT histogram in its 300 × 130 viewBox.
type PITChartVM struct {
	Bars        []PITBarVM
	ExpectedY   string // y of the uniform line
	Description string
	Empty       bool
}

// PITBarVM is one tenth's bar.
type PITBarVM struct {
	X, Y, W, H string
	Label      string // "0.0–0.1: 9"
}

// pitFrame is the chart's drawing area.
const (
	pitLeft, pitRight = 20.0, 290.0
	pitTop, pitBottom = 10.0, 110.0
)

// NewPITChart lays out ten bar counts so that the tallest of them and the
// uniform expectation (a tenth of the total) both fit.
func NewPITChart(counts [10]int, what string) PITChartVM {
	total := 0
	top := 0
	for _, c := range counts {
		total += c
		top = max(top, c)
	}
	vm := PITChartVM{Empty: total == 0}
	if vm.Empty {
		vm.Description = "No " + what + " could be checked yet."
		return vm
	}
	expected := float64(total) / 10
	scale := (pitBottom - pitTop) / max(float64(top), expected*1.5)
	w := (pitRight - pitLeft) / 10
	f := func(v float64) string { return strconv.FormatFloat(v, 'f', 1, 64) }
	for i, c := range counts {
		h := float64(c) * scale
		vm.Bars = append(vm.Bars, PITBarVM{
			X: f(pitLeft + float64(i)*w + 1), Y: f(pitBottom - h), W: f(w - 2), H: f(h),
			Label: fmt.Sprintf("%.1f–%.1f: %d", float64(i)/10, float64(i+1)/10, c),
		})
	}
	vm.ExpectedY = f(pitBottom - expected*scale)
	vm.Description = fmt.Sprintf("Histogram of %d PIT values of %s in tenths; a calibrated model puts about %.0f in each.", total, what, expected)
	return vm
}
