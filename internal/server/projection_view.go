package server

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"wardload/internal/export"
	"wardload/internal/projector"
	"wardload/internal/stats"
	"wardload/internal/wardload"
	"wardload/web"
)

// method2VM fills the page's figures from a method 2 result. The figures
// the export carries come from row; a declined projection gets no band,
// chart, shortfall table or probability, only what data are missing.
func method2VM(vm *web.ProjectionVM, row *export.Row, p *wardload.Projection, res *stats.Projection, in *projector.Input) {
	f := res.DirectCareFraction
	nh := func(minutes float64) float64 { return minutes / 60 / f }
	vm.Declined = !res.DataSufficient
	vm.CapacityRule = res.CapacityRule
	vm.DirectCareFraction = export.FormatLevel(f)
	if c := res.Calibration; c != nil {
		vm.Calibration, vm.CalibrationWarn = c.Sentence(res.CoverLevel), c.Warn(res.CoverLevel)
	}

	observations := 0
	for k, t := range res.Tiers {
		label := tierLabel(in, k, t.Code)
		observations += t.Observations
		tv := web.TierVM{Label: label, Code: t.Code, Patients: strconv.Itoa(t.Patients),
			Observations: strconv.Itoa(t.Observations), Used: strconv.Itoa(t.Used), Median: minutes(t.MedianMinutes)}
		if t.Patients > 0 && t.NeedMore > 0 {
			if t.Used < stats.MinTierObservations {
				tv.NeedMore = fmt.Sprintf("need about %d more", t.NeedMore)
				vm.NeedMore = append(vm.NeedMore, fmt.Sprintf("Insufficient observations — need about %d more in tier %s (%s).", t.NeedMore, t.Code, label))
			} else {
				// Enough observations, all equal: no spread to estimate.
				tv.NeedMore = "all equal: need observations that vary"
				vm.NeedMore = append(vm.NeedMore, fmt.Sprintf("Insufficient observations — the %d observations of tier %s (%s) are all equal; its spread cannot be estimated.", t.Used, t.Code, label))
			}
		}
		vm.Tiers = append(vm.Tiers, tv)
		if t.Patients > 0 {
			vm.TierTrends = append(vm.TierTrends, "Tier "+t.Code+": "+trendText(t.Trend))
		}
	}
	vm.Observations = strconv.Itoa(observations)
	for _, h := range res.HeldOut {
		on := ""
		if h.Date != "" {
			on = " on " + h.Date
		}
		vm.HeldOut = append(vm.HeldOut, fmt.Sprintf("%s care minutes in tier %s%s, far %s the tier's other values: set aside as a likely entry error.",
			strconv.FormatFloat(h.CareMinutes, 'g', -1, 64), h.Tier, on, h.Side))
	}
	vm.Warnings = pageWarnings(res)

	vm.Method = stats.MethodDescription
	if res.Method != "" {
		vm.Method = res.Method
	}
	vm.QuantileMethod = res.Simulation.QuantileMethod
	if e := res.ShiftEffect; e.Estimated && math.Expm1(e.SDLog.Value) < 0.005 {
		vm.ShiftEffect = fmt.Sprintf("Shift-level effect (care that every patient of one shift shares): estimated from %d shifts; "+
			"none beyond the patients' own variation (SD %s on the log scale).", e.Occurrences, strconv.FormatFloat(e.SDLog.Value, 'f', 3, 64))
	} else if e.Estimated {
		vm.ShiftEffect = fmt.Sprintf("Shift-level effect (care that every patient of one shift shares): estimated from %d shifts, "+
			"SD %s on the log scale, so a shift is typically about %s%% heavier or lighter for all its patients at once; it is in the band.",
			e.Occurrences, strconv.FormatFloat(e.SDLog.Value, 'f', 3, 64), strconv.FormatFloat(100*math.Expm1(e.SDLog.Value), 'f', 0, 64))
	} else {
		vm.ShiftEffect = "Shift-level effect not estimated: " + strings.TrimSuffix(e.Reason, ".") +
			". Heavy shifts where every patient needs more care at once are not in the band."
	}
	vm.Trend = "Trend of care time over the lookback, common to all tiers: " + trendText(res.Trend)
	if res.Trend.Estimated && res.Trend.Followed {
		vm.Trend += " The projection follows it to this shift."
	} else if res.Trend.Estimated {
		vm.Trend += " The projection does not follow it (not clear enough) and uses the lookback's level."
	}

	movementVM(vm, res, nh)
	if vm.Declined {
		return
	}
	n := res.Nurses
	vm.InCharge = n.InCharge == 1
	if n.Cover != nil {
		vm.NursesCover = strconv.Itoa(*n.Cover)
	}
	if n.CareGiving != nil {
		vm.CareGiving = strconv.Itoa(*n.CareGiving)
	}
	vm.ExpectedCareHours = export.FormatHours(res.ExpectedMinutes.Value / 60)
	vm.ExpectedNurseHours = export.FormatHours(*row.ExpectedNurseHours)
	vm.MedianNurseHours = oneDecimal(res.NurseHours.Median.Value) + " nurse-hours"
	vm.CoverNurseHours = export.FormatHours(p.CoverNurseHours)
	vm.BandLevel = coverPercent(*row.BandLevel)
	vm.BandName = vm.BandLevel + " band"
	vm.BandLow, vm.BandHigh = export.FormatHours(*row.BandLowNurseHours), export.FormatHours(*row.BandHighNurseHours)

	rec := *row.Recommended
	chart := web.ChartInput{BandLow: *row.BandLowNurseHours, BandHigh: *row.BandHighNurseHours,
		Median: res.NurseHours.Median.Value, BandName: vm.BandName, Cover: p.CoverNurseHours, CoverName: vm.CoverPercent + " cover"}
	for h := max(1, rec-1); h <= rec+1; h++ {
		care := max(0, h-n.InCharge)
		chart.Capacities = append(chart.Capacities, web.ChartCapacity{Nurses: h, CareGiving: care, NurseHours: float64(care) * p.ShiftHours, Recommended: h == rec})
	}
	vm.Chart = web.NewChart(chart)
	for _, sf := range res.Shortfall {
		vm.Shortfall = append(vm.Shortfall, web.ShortfallRowVM{
			Nurses: strconv.Itoa(sf.Nurses), CareGiving: strconv.Itoa(sf.CareGivingNurses),
			Capacity: oneDecimal(nh(sf.CapacityMinutes)), Chance: sf.Text, Recommended: sf.Nurses == rec,
		})
	}
}

// method1VM fills the page's figures from a result stored by method 1,
// simply: its normal band named as such, its simulated shortfall shares
// with a Wilson interval (as the export restates them), and its own
// warnings. Method 1 counted every nurse as giving direct care.
func method1VM(vm *web.ProjectionVM, row *export.Row, p *wardload.Projection, res *stats.ProjectionV1, in *projector.Input) {
	f := res.DirectCareFraction
	nh := func(minutes float64) float64 { return minutes / 60 / f }
	vm.MethodV1 = true
	vm.CapacityRule = "Method 1 counted every nurse on the shift, the nurse in charge included, as giving direct care for the direct-care fraction of the shift."
	vm.DirectCareFraction = export.FormatLevel(f)
	vm.NursesCover = strconv.Itoa(p.NursesCover)
	vm.ExpectedCareHours = export.FormatHours(res.ExpectedMinutes / 60)
	vm.ExpectedNurseHours = export.FormatHours(*row.ExpectedNurseHours)
	vm.MedianNurseHours = oneDecimal(nh(res.Simulation.P50)) + " nurse-hours"
	vm.CoverNurseHours = export.FormatHours(p.CoverNurseHours)
	vm.BandLevel = coverPercent(*row.BandLevel)
	vm.BandName = vm.BandLevel + " normal band"
	vm.BandLow, vm.BandHigh = export.FormatHours(*row.BandLowNurseHours), export.FormatHours(*row.BandHighNurseHours)
	vm.Method = "Method 1: a normal model of the shift's care minutes beside a two-level bootstrap of the observations, which decided the headcount."
	vm.QuantileMethod = res.Simulation.QuantileMethod
	vm.Warnings = res.Warnings

	rec := p.Recommended
	chart := web.ChartInput{BandLow: *row.BandLowNurseHours, BandHigh: *row.BandHighNurseHours,
		Median: nh(res.Simulation.P50), BandName: vm.BandName, Cover: p.CoverNurseHours, CoverName: vm.CoverPercent + " cover"}
	for h := max(1, rec-1); h <= rec+1; h++ {
		chart.Capacities = append(chart.Capacities, web.ChartCapacity{Nurses: h, CareGiving: h, NurseHours: float64(h) * p.ShiftHours, Recommended: h == rec})
	}
	vm.Chart = web.NewChart(chart)
	for _, sf := range res.Shortfall {
		chance := "–"
		if res.Simulation.Draws > 0 {
			chance = export.ShortfallV1(sf.Nurses, sf.SimulatedProbability, res.Simulation.Draws).Text
		}
		vm.Shortfall = append(vm.Shortfall, web.ShortfallRowVM{Nurses: strconv.Itoa(sf.Nurses), CareGiving: strconv.Itoa(sf.Nurses),
			Capacity: oneDecimal(nh(sf.CapacityMinutes)), Chance: chance, Recommended: sf.Nurses == rec})
	}

	observations := 0
	for k, t := range res.Tiers {
		observations += t.Observations
		median := "–"
		if k < len(in.Model.Tiers) && len(in.Model.Tiers[k].CareMinutes) > 0 {
			mt := in.Model.Tiers[k]
			y := slices.Sorted(slices.Values(stats.ShiftMinutes(mt.CareMinutes, mt.WindowHours, res.ShiftHours)))
			median = strconv.FormatFloat(stats.HFQuantile(7, 0.5, y), 'f', 1, 64)
		}
		vm.Tiers = append(vm.Tiers, web.TierVM{Label: tierLabel(in, k, t.Code), Code: t.Code, Patients: strconv.Itoa(t.Patients),
			Observations: strconv.Itoa(t.Observations), Used: strconv.Itoa(t.Observations), Median: median})
	}
	vm.Observations = strconv.Itoa(observations)
}

// tierLabel is the label of the k-th tier of the input, or its code.
func tierLabel(in *projector.Input, k int, code string) string {
	if k < len(in.Tiers) && in.Tiers[k].Code == code {
		return in.Tiers[k].Label
	}
	return code
}

// trendText says a trend and its 95% interval per 4 weeks, or why it was
// not estimated.
func trendText(t stats.Trend) string {
	if !t.Estimated {
		if t.Reason == "" {
			return "not estimated."
		}
		return "not estimated: " + strings.TrimSuffix(t.Reason, ".") + "."
	}
	pct := func(n stats.Number) string { return strconv.FormatFloat(n.Value, 'f', 1, 64) }
	sign := func(n stats.Number) string {
		if n.Value > 0 {
			return "+" + pct(n)
		}
		return pct(n)
	}
	return fmt.Sprintf("%s%% per 4 weeks (95%% interval %s%% to %s%%).", sign(t.PercentPer28Days), sign(t.Low), sign(t.High))
}

// pageWarnings are the model's warnings less those the page already
// shows in their own place: the calibration sentence (under the
// headcount), the observations set aside (their own list, with the review
// link) and the declining note (the headline says it). A declined
// projection also drops the note that a recommendation rests on care time
// alone, which is not so: it rests on the floor, or there is none.
func pageWarnings(res *stats.Projection) []string {
	shown := map[string]bool{stats.WarnDeclinedFloor: true, stats.WarnDeclinedNoFloor: true}
	if !res.DataSufficient {
		shown[stats.WarnNoFloor] = true
	}
	if res.Calibration != nil {
		shown[res.Calibration.Sentence(res.CoverLevel)] = true
	}
	for _, h := range res.HeldOut {
		shown[stats.HeldOutWarning(h)] = true
	}
	var out []string
	for _, w := range res.Warnings {
		if !shown[w] {
			out = append(out, w)
		}
	}
	return out
}
