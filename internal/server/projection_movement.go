package server

import (
	"fmt"
	"strconv"
	"strings"

	"wardload/internal/stats"
	"wardload/web"
)

// movementVM says what census movement during the shift adds: one
// sentence for the page (how much of the band it makes) and the rates,
// bands and assumption for "How this was worked out". nh turns care
// minutes into nurse-hours. A projection made before movement was
// modelled says that it held the census fixed.
func movementVM(vm *web.ProjectionVM, res *stats.Projection, nh func(float64) float64) {
	mv := res.Movement
	if mv == nil {
		vm.Movement = "The census is held fixed for the whole shift: this projection was made (method " + res.MethodVersion +
			") before wardload counted admissions and discharges during the shift."
		return
	}
	if !mv.Modelled {
		vm.Movement = "Admissions and discharges during the shift are not included yet: " + mv.Reason +
			". The census is held fixed for the whole shift."
		vm.MovementDetails = []string{fmt.Sprintf("End-of-shift records of this shift found: %d; rates are estimated from %d on.", mv.Records, mv.MinRecords)}
		return
	}
	var what string
	switch {
	case mv.FromRates:
		what = fmt.Sprintf("Expected admissions and discharges (about %s and %s this shift%s) are included", rateText(mv.Admissions.Mean), rateText(mv.Discharges.Mean), plannedText(mv, ", "))
	default:
		what = "Planned movement (" + strings.TrimSuffix(strings.TrimPrefix(plannedText(mv, ""), "at least "), " as planned") + ") is included"
	}
	if vm.Declined || len(res.Bands) == 0 || len(mv.BandsWithout) == 0 {
		vm.Movement = what + "."
	} else {
		b, w := res.Bands[0], mv.BandsWithout[0]
		vm.Movement = fmt.Sprintf("%s: they add %s nurse-hours on average and move the %s band from %s–%s to %s–%s nurse-hours.",
			what, signedOneDecimal(nh(mv.ExpectedMinutes.Value)), coverPercent(b.Level),
			oneDecimal(nh(w.Low)), oneDecimal(nh(w.High)), oneDecimal(nh(b.Low)), oneDecimal(nh(b.High)))
		vm.MovementDetails = append(vm.MovementDetails, fmt.Sprintf(
			"Band width: %s nurse-hours with movement, %s with the census held fixed; movement accounts for %s nurse-hours of it.",
			oneDecimal(nh(b.High-b.Low)), oneDecimal(nh(w.High-w.Low)), signedOneDecimal(nh((b.High-b.Low)-(w.High-w.Low)))))
	}
	if !mv.FromRates {
		vm.Movement += " Other admissions and discharges are not modelled yet: " + mv.Reason + "."
	}
	if mv.FromRates {
		vm.MovementDetails = append(vm.MovementDetails, rateDetail("Admissions", mv.Admissions), rateDetail("Discharges", mv.Discharges))
	}
	vm.MovementDetails = append(vm.MovementDetails, mv.Assumption)
}

// plannedText names the planned counts, e.g. "at least 2 admissions as
// planned", after sep; "" when none.
func plannedText(mv *stats.Movement, sep string) string {
	var parts []string
	for _, p := range []struct {
		n    *int
		what string
	}{{mv.PlannedAdmissions, "admission"}, {mv.PlannedDischarges, "discharge"}} {
		if p.n != nil && *p.n > 0 {
			s := "s"
			if *p.n == 1 {
				s = ""
			}
			parts = append(parts, fmt.Sprintf("%d %s%s", *p.n, p.what, s))
		}
	}
	if len(parts) == 0 {
		return ""
	}
	return sep + "at least " + strings.Join(parts, " and ") + " as planned"
}

// rateDetail says one rate with its interval and where it came from.
func rateDetail(what string, r *stats.MovementRate) string {
	from := fmt.Sprintf("%d end-of-shift records of this shift", r.Records)
	if r.Weekday {
		from += " on this weekday (it differs from the other days)"
	}
	spread := "counted as Poisson"
	if r.Family == "quasipoisson" {
		spread = "with extra spread (dispersion " + strconv.FormatFloat(r.Dispersion, 'f', 1, 64) + ")"
	}
	return fmt.Sprintf("%s: %s per shift (90%% interval %s–%s) from %s, %s.", what, rateText(r.Mean), rateText(r.Low), rateText(r.High), from, spread)
}

// rateText writes an expected count per shift with one decimal.
func rateText(v float64) string { return strconv.FormatFloat(v, 'f', 1, 64) }

// signedOneDecimal writes v with one decimal and its sign.
func signedOneDecimal(v float64) string {
	s := oneDecimal(v)
	if !strings.HasPrefix(s, "-") {
		s = "+" + s
	}
	return s
}
