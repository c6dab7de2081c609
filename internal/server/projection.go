package server

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"net/http"
	"strconv"
	"strings"

	"github.com/a-h/templ"
	"github.com/go-chi/chi/v5"

	"wardload/internal/export"
	"wardload/internal/projector"
	"wardload/internal/stats"
	"wardload/internal/wardload"
	"wardload/web"
)

// handleProjection shows one stored projection of the ward. A projection
// of another ward is "not found", as if it did not exist. The projection's
// own part of the page comes from s.projections when cached; the user's
// links and the shift's revisions are made for every request.
func (s *Server) handleProjection(w http.ResponseWriter, r *http.Request) error {
	ward := principalFrom(r.Context()).Ward
	notFound := wardload.Errorf(wardload.ENOTFOUND, "There is no such projection on this ward.")
	id, err := idParam(chi.URLParam(r, "id"), "projection")
	if err != nil {
		return notFound
	}
	key := projectionKey{ID: id, WardID: ward.ID, WardCode: ward.Code, WardName: ward.Name, TimeZone: ward.TimeZone}
	pg, ok := s.projections.get(key)
	if !ok {
		p, err := s.store.FindProjectionByID(r.Context(), id)
		if wardload.ErrorCode(err) == wardload.ENOTFOUND || (err == nil && p.WardID != ward.ID) {
			return notFound
		} else if err != nil {
			return fmt.Errorf("projection %d: %w", id, err)
		}
		if pg, err = newProjectionPage(r.Context(), ward, p); err != nil {
			return err
		}
		s.projections.add(key, pg)
	}
	vm := pg.vm
	body := pg.bodyHTML[0]
	if u := principalFrom(r.Context()).User; u != nil && u.Role != wardload.RoleChargeNurse {
		vm.SettingsURL = settingsURL(ward)
		body = pg.bodyHTML[1]
	}
	if err := s.revisionsVM(r, ward, pg.p, &vm); err != nil {
		return err
	}
	return s.render(w, r, http.StatusOK, web.ProjectionPageParts(s.layout(r, pg.title), vm, templ.Raw(pg.titleHTML), templ.Raw(body)))
}

// renderHTML renders c to a string, for the parts of a page kept in a cache.
func renderHTML(ctx context.Context, c templ.Component) (string, error) {
	var b strings.Builder
	if err := c.Render(ctx, &b); err != nil {
		return "", err
	}
	return b.String(), nil
}

// coverPercent says a cover level as a percentage, rounded to four
// decimals of the level so float noise does not show: 0.57 is "57%", where
// 100*0.57 is 56.99999999999999 in float64.
func coverPercent(level float64) string {
	return strconv.FormatFloat(math.Round(level*1e6)/1e4, 'f', -1, 64) + "%"
}

// decidedText says in words which of the cover need and the floor decided
// the recommendation.
func decidedText(p *wardload.Projection) string {
	// Say the cover level in words: "enough for the workload on 90% of such
	// shifts" reads at a glance where "cover level 0.9" needs explaining.
	cover := fmt.Sprintf("the workload on %s of such shifts", coverPercent(p.CoverLevel))
	switch {
	case p.Floor == nil:
		return fmt.Sprintf("Set by %s; no ratio floor is configured for this shift.", cover)
	case p.DecidedBy == stats.DecidedByFloor:
		return fmt.Sprintf("Set by the ratio floor of %d nurses; %s needs %d.", *p.Floor, cover, p.NursesCover)
	case p.DecidedBy == stats.DecidedByBoth:
		return fmt.Sprintf("The ratio floor and %s both ask for %d nurses.", cover, p.Recommended)
	}
	return fmt.Sprintf("Set by %s; the ratio floor asks for %d.", cover, *p.Floor)
}

// newProjectionPage builds the projection's part of the page from the
// stored projection: the figures the export carries come from the
// projection's columns, formatted with the export's helpers; the detail
// comes from the stored Result and Input, which the page keeps no copy of.
func newProjectionPage(ctx context.Context, ward *wardload.Ward, p *wardload.Projection) (*projectionPage, error) {
	var res stats.Projection
	var in projector.Input
	if err := json.Unmarshal([]byte(p.Result), &res); err != nil {
		return nil, fmt.Errorf("projection %d: result: %w", p.ID, err)
	}
	if err := json.Unmarshal([]byte(p.Input), &in); err != nil {
		return nil, fmt.Errorf("projection %d: input: %w", p.ID, err)
	}
	loc, err := ward.Location()
	if err != nil {
		return nil, err
	}
	f := res.DirectCareFraction
	nh := func(minutes float64) float64 { return minutes / 60 / f }
	vm := web.ProjectionVM{
		WardName: ward.Name, Date: p.Date.String(), ShiftName: p.ShiftName,
		ShiftTimes:  fmt.Sprintf("%s to %s (%s)", p.Start.In(loc).Format("Mon 2 Jan 15:04"), p.End.In(loc).Format("Mon 2 Jan 15:04"), ward.TimeZone),
		ShiftHours:  export.FormatHours(p.ShiftHours),
		Revision:    p.CensusRevision,
		GeneratedAt: formatLocal(p.CreatedAt, ward),

		Recommended: strconv.Itoa(p.Recommended),
		NursesCover: strconv.Itoa(p.NursesCover),
		DecidedBy:   p.DecidedBy,
		DecidedText: decidedText(p),
		FloorRule:   export.NoFloor,

		CoverLevel:         export.FormatLevel(p.CoverLevel),
		CoverPercent:       coverPercent(p.CoverLevel),
		TotalPatients:      strconv.Itoa(p.TotalPatients),
		ExpectedCareHours:  export.FormatHours(res.ExpectedMinutes / 60),
		ExpectedNurseHours: export.FormatHours(p.ExpectedNurseHours),
		CoverNurseHours:    export.FormatHours(p.CoverNurseHours),
		BandLow:            export.FormatHours(p.BandLowNurseHours),
		BandHigh:           export.FormatHours(p.BandHighNurseHours),
		DirectCareFraction: export.FormatLevel(f),
		LowerBound:         p.BandLowNurseHours < 0,

		LookbackFrom: in.Settings.LookbackFrom, LookbackTo: in.Settings.LookbackTo,
		LookbackWeeks:    strconv.Itoa(in.Settings.LookbackWeeks),
		ObservationShift: in.Settings.ObservationShift,
		Warnings:         res.Warnings,

		MethodVersion:  p.MethodVersion,
		Seed:           strconv.FormatUint(p.Seed, 10),
		Draws:          strconv.Itoa(p.Draws),
		QuantileMethod: res.Simulation.QuantileMethod,
		Quartiles:      in.Settings.Quartiles,
		Caution:        stats.Caution,

		CensusURL: fmt.Sprintf("%s?date=%s&shift=%d", censusURL(ward), p.Date, p.ShiftID),
		ListURL:   projectionsURL(ward),
	}
	if p.Floor != nil {
		vm.Floor = strconv.Itoa(*p.Floor)
	}
	if res.Floor != nil {
		vm.FloorRule = res.Floor.Description
	}

	// Chart: the normal model and the simulated quantiles in nurse-hours,
	// with the recommended headcount and its neighbours.
	chart := web.ChartInput{Mean: p.ExpectedNurseHours, SD: nh(res.SDMinutes),
		P10: nh(res.Simulation.P10), P50: nh(res.Simulation.P50), P90: nh(res.Simulation.P90)}
	for n := max(1, p.Recommended-1); n <= p.Recommended+1; n++ {
		chart.Capacities = append(chart.Capacities, web.ChartCapacity{Nurses: n, NurseHours: float64(n) * p.ShiftHours, Recommended: n == p.Recommended})
	}
	vm.Chart = web.NewChart(chart)

	for _, sf := range res.Shortfall {
		vm.Shortfall = append(vm.Shortfall, web.ShortfallRowVM{
			Nurses: strconv.Itoa(sf.Nurses), Capacity: export.FormatHours(nh(sf.CapacityMinutes)),
			Analytic: percent(sf.Probability), Simulated: percent(sf.SimulatedProbability),
			SimulatedSE: percent(sf.SimulatedSE), Recommended: sf.Nurses == p.Recommended,
		})
	}

	observations := 0
	for k, t := range res.Tiers {
		label := t.Code
		if k < len(in.Tiers) && in.Tiers[k].Code == t.Code {
			label = in.Tiers[k].Label
		}
		observations += t.Observations
		share := "–"
		if res.ExpectedMinutes > 0 {
			share = percent(t.ExpectedMinutes / res.ExpectedMinutes)
		}
		vm.Tiers = append(vm.Tiers, web.TierShareVM{
			Label: label, Code: t.Code, Patients: strconv.Itoa(t.Patients), Observations: strconv.Itoa(t.Observations),
			Mean: minutes(t.MeanMinutes), SD: minutes(t.SDMinutes), Expected: strconv.FormatFloat(t.ExpectedMinutes, 'f', 1, 64), Share: share,
		})
	}
	vm.Observations = strconv.Itoa(observations)

	lite := *p
	lite.Input, lite.Result = "", ""
	pg := &projectionPage{p: &lite, title: fmt.Sprintf("%s shift %s", p.ShiftName, p.Date), vm: vm}
	if pg.titleHTML, err = renderHTML(ctx, web.ProjectionTitle(vm)); err != nil {
		return nil, fmt.Errorf("projection %d: render: %w", p.ID, err)
	}
	for i, settings := range []string{"", settingsURL(ward)} {
		vm.SettingsURL = settings
		if pg.bodyHTML[i], err = renderHTML(ctx, web.ProjectionBody(vm)); err != nil {
			return nil, fmt.Errorf("projection %d: render: %w", p.ID, err)
		}
	}
	return pg, nil
}

// revisionsVM lists every census revision of the projection's dated shift,
// linking those with a projection. It reads the list with one light query
// on every request: a revision saved a moment ago, perhaps by another
// server process, must show at once.
func (s *Server) revisionsVM(r *http.Request, ward *wardload.Ward, p *wardload.Projection, vm *web.ProjectionVM) error {
	rs, err := s.store.FindShiftRevisions(r.Context(), ward.ID, p.Date, p.ShiftID)
	if err != nil {
		return fmt.Errorf("projection %d: revisions: %w", p.ID, err)
	}
	for _, c := range rs { // newest revision first
		rv := web.RevisionVM{Revision: c.Revision, EnteredAt: formatLocal(c.EnteredAt, ward), Total: strconv.Itoa(c.TotalPatients), Current: c.CensusID == p.CensusID}
		if c.ProjectionID != 0 {
			rv.URL, rv.Recommended = projectionURL(ward, c.ProjectionID), strconv.Itoa(c.Recommended)
			if vm.NewerURL == "" && c.Revision > p.CensusRevision {
				vm.NewerURL, vm.NewerRevision = rv.URL, c.Revision
			}
		}
		vm.Revisions = append(vm.Revisions, rv)
	}
	return nil
}

// percent formats a probability for people: one decimal, with "< 0.1%"
// rather than a misleading 0.0% for a small non-zero chance.
func percent(p float64) string {
	switch {
	case p == 0:
		return "0%"
	case p < 0.0005:
		return "< 0.1%"
	case p > 0.9995 && p < 1:
		return "> 99.9%"
	}
	return strconv.FormatFloat(100*p, 'f', 1, 64) + "%"
}

// minutes formats a tier's mean or SD, "–" when undefined.
func minutes(n stats.Number) string {
	if !n.Defined || math.IsNaN(n.Value) {
		return "–"
	}
	return strconv.FormatFloat(n.Value, 'f', 1, 64)
}
