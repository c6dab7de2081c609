package server

import (
	"fmt"
	"net/http"
	"slices"
	"strconv"
	"strings"

	"wardload/internal/projector"
	"wardload/internal/stats"
	"wardload/internal/wardload"
	"wardload/web"
)

// relationMaxPoints caps the pairs the relationship chart draws: a year of
// a ward's observations is tens of thousands, which a phone renders
// slowly and the eye cannot tell apart. Every pair counts in the figures;
// pairs outside the fences are always drawn.
const relationMaxPoints = 2000

// causationCaution is said wherever a relationship is shown.
const causationCaution = "Correlation is not causation: a factor that moves with care time does not show " +
	"that it drives it, and a weak r does not show that it plays no part. Whether a factor belongs in the " +
	"acuity tiers is a clinical judgement."

// handleRelation shows care time per patient per shift (the review's
// unit) against one numeric factor the ward records, for the included
// observations of the window, with stats.Relate's figures and warnings.
func (s *Server) handleRelation(w http.ResponseWriter, r *http.Request) error {
	ctx := r.Context()
	q := r.URL.Query()
	ward := principalFrom(ctx).Ward
	vm := web.RelationVM{
		WardName: ward.Name, URL: relationURL(ward), ReviewURL: reviewURL(ward),
		Unit: reviewUnit, CausationCaution: causationCaution,
	}
	factors := slices.Sorted(slices.Values(ward.FactorNames))
	if len(factors) == 0 {
		vm.NoFactors = true
		return s.renderRelation(w, r, vm)
	}
	vm.Factors = factors
	vm.Factor = factors[0]
	if f := strings.TrimSpace(q.Get("factor")); f != "" {
		if !slices.Contains(factors, f) {
			return wardload.FieldErrorf(wardload.EINVALID, "factor", "This ward records no factor named %q.", f)
		}
		vm.Factor = f
	}
	settings, err := s.store.FindSettings(ctx, ward.ID)
	if err != nil {
		return fmt.Errorf("relation: settings: %w", err)
	}
	shifts, tiers, err := s.shiftsAndTiers(ctx, ward, "relation")
	if err != nil {
		return err
	}
	weeks, err := weeksParam(q.Get("weeks"), settings.LookbackWeeks)
	if err != nil {
		return err
	}
	vm.Weeks = strconv.Itoa(weeks)
	vm.TierText = "all tiers"
	var tierID *int64
	for _, t := range tiers {
		id := strconv.FormatInt(t.ID, 10)
		vm.Tiers = append(vm.Tiers, web.ReviewShiftVM{ID: id, Name: t.Label})
		if id == strings.TrimSpace(q.Get("tier")) {
			tierID, vm.TierID, vm.TierText = &t.ID, id, t.Label+" only"
		}
	}
	if tierID == nil && strings.TrimSpace(q.Get("tier")) != "" {
		return wardload.FieldErrorf(wardload.EINVALID, "tier", "This ward has no such tier.")
	}
	loc, err := ward.Location()
	if err != nil {
		return fmt.Errorf("relation: %w", err)
	}
	today := projector.Today(s.now(), loc)
	from, to := today.AddDays(-7*weeks), today.AddDays(-1)
	vm.WindowText = fmt.Sprintf("%d weeks, %s to %s", weeks, from, to)
	obs, _, err := s.store.FindObservations(ctx, wardload.ObservationFilter{WardID: &ward.ID, TierID: tierID, From: &from, To: &to})
	if err != nil {
		return fmt.Errorf("relation: observations: %w", err)
	}
	hours := map[int64]float64{}
	for _, p := range shifts {
		hours[p.ID] = p.NominalHours
	}
	var x, y []float64
	for _, o := range obs {
		v, ok := o.Factors[vm.Factor]
		if !ok {
			continue
		}
		x = append(x, v)
		y = append(y, stats.ShiftMinutes([]float64{o.CareMinutes}, []float64{o.WindowHours}, hours[o.ShiftID])[0])
	}
	if miss := len(obs) - len(x); miss > 0 {
		vm.Missing = fmt.Sprintf("%d of the %d included observations in this window do not record %s and are left out.", miss, len(obs), vm.Factor)
	}
	if len(x) == 0 {
		return s.renderRelation(w, r, vm)
	}
	rel, err := stats.Relate(x, y)
	if err != nil {
		return err
	}
	relationFigures(&vm, rel)
	if tierID == nil && len(tiers) > 1 {
		vm.AcrossTiersNote = "All tiers are pooled: higher tiers take more care, so a factor that differs by tier " +
			"can relate to care time across tiers and not within any one. Choose a tier to look within it."
	}
	in := web.ScatterInput{XLabel: vm.Factor, YLabel: reviewUnit, X: x, Y: y, Flagged: rel.Flagged, MaxPoints: relationMaxPoints}
	if rel.Slope.Defined {
		in.HasLine, in.Intercept, in.Slope = true, rel.Intercept.Value, rel.Slope.Value
	}
	vm.Scatter = web.NewScatter(in)
	return s.renderRelation(w, r, vm)
}

// relationFigures writes rel's figures into vm, three decimals for the
// coefficients (as the correlate command prints them) and the review's
// rounding for care minutes.
func relationFigures(vm *web.RelationVM, rel *stats.Relation) {
	coef := func(n stats.Number) string {
		if !n.Defined {
			return "undefined"
		}
		return strconv.FormatFloat(n.Value, 'f', 3, 64)
	}
	vm.N = strconv.Itoa(rel.N)
	vm.PearsonR, vm.SpearmanRho, vm.RSquared = coef(rel.PearsonR), coef(rel.SpearmanRho), coef(rel.RSquared)
	vm.Line, vm.ResidualSD = "undefined", "undefined"
	if rel.Slope.Defined {
		vm.Line = fmt.Sprintf("care = %s + %s × %s", web.FormatValue(rel.Intercept.Value), strconv.FormatFloat(rel.Slope.Value, 'g', 4, 64), vm.Factor)
	}
	if rel.ResidualSD.Defined {
		vm.ResidualSD = web.FormatValue(rel.ResidualSD.Value) + " minutes"
	}
	vm.Flagged = strconv.Itoa(len(rel.Flagged))
	if len(rel.Flagged) > 0 {
		vm.PearsonRWithout = coef(rel.PearsonRWithout)
	}
	// The causation sentence is said once, below the figures.
	for _, w := range rel.Warnings {
		if !strings.HasPrefix(w, "Correlation is not causation") {
			vm.Warnings = append(vm.Warnings, w)
		}
	}
	if len(vm.Warnings) == 0 {
		vm.Warnings = []string{"None of the checks (too few pairs, curvature, pairs outside the fences deciding the result) found a problem."}
	}
}

func (s *Server) renderRelation(w http.ResponseWriter, r *http.Request, vm web.RelationVM) error {
	return s.render(w, r, http.StatusOK, web.RelationPage(s.layout(r, "Relationship check · "+vm.WardName), vm))
}
