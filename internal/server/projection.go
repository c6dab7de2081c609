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
	key := projector.KeyFor(ward, id)
	pg, ok := s.projections.Get(key)
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
		s.projections.Add(key, pg)
	}
	vm := pg.vm
	body := pg.bodyHTML[0]
	// Settings and review links for managers and admins only: charge
	// nurses and the staffing office get the body without them.
	if u := principalFrom(r.Context()).User; u != nil && u.Role != wardload.RoleChargeNurse && u.Role != wardload.RoleStaffingOffice {
		vm.SettingsURL = settingsURL(ward)
		body = pg.bodyHTML[1]
	}
	staff, err := s.revisionsVM(r, ward, pg.p, &vm)
	if err != nil {
		return err
	}
	if err := s.dutyVM(r, ward, pg.p, staff, &vm); err != nil {
		return err
	}
	switch {
	case readOnly(r):
		// The staffing office enters no corrections or records.
		vm.CensusURL = ""
	case s.now().Before(pg.p.End):
		vm.RecordEnds = formatLocal(pg.p.End, ward)
	default:
		vm.RecordURL = shiftRecordURL(ward, pg.p.Date, pg.p.ShiftID)
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
// the recommendation, or why there is none from care time.
func decidedText(p *wardload.Projection) string {
	// Say the cover level in words: "enough for the workload on 90% of such
	// shifts" reads at a glance where "cover level 0.9" needs explaining.
	cover := fmt.Sprintf("the workload on %s of such shifts", coverPercent(p.CoverLevel))
	switch {
	case p.DecidedBy == stats.DecidedByInsufficient && p.Floor == nil:
		return "There is no recommendation: too few observations to estimate the care workload, and no ratio floor is configured for this shift."
	case p.DecidedBy == stats.DecidedByInsufficient:
		return fmt.Sprintf("The ratio floor of %d nurses alone: too few observations to estimate the care workload, so no band or chance of a shortfall is shown.", *p.Floor)
	case p.Floor == nil:
		return fmt.Sprintf("Set by %s; no ratio floor is configured for this shift.", cover)
	case p.DecidedBy == stats.DecidedByFloor:
		return fmt.Sprintf("Set by the ratio floor of %d nurses; %s needs %d.", *p.Floor, cover, p.NursesCover)
	case p.DecidedBy == stats.DecidedByBoth:
		return fmt.Sprintf("The ratio floor and %s both ask for %d nurses.", cover, p.Recommended)
	}
	return fmt.Sprintf("Set by %s; the ratio floor asks for %d.", cover, *p.Floor)
}

// projectionCacheSize bounds the projection page cache. An entry is a few
// kilobytes (the page's strings and chart geometry, not the stored Input
// and Result), so the cache stays around a megabyte.
const projectionCacheSize = 256

// projectionPage is the part of a projection page that depends only on
// the projection and its ward: everything but the signed-in user's links
// and the census revisions of the shift, which change and are read anew
// on every request. The server keeps them in a projector.PageCache.
type projectionPage struct {
	p     *wardload.Projection // without Input and Result
	title string
	vm    web.ProjectionVM // SettingsURL, Revisions, NewerURL unset
	// Rendered HTML of web.ProjectionTitle and web.ProjectionBody; the
	// body once without and once with the link to the ward settings.
	titleHTML string
	bodyHTML  [2]string
}

// projectionCache is the server's cache of projection pages.
type projectionCache = projector.PageCache[*projectionPage]

func newProjectionCache(max int) *projectionCache {
	return projector.NewPageCache[*projectionPage](max)
}

// newProjectionPage builds the projection's part of the page from the
// stored projection. The figures the export carries come from the
// export's own row of the projection (export.NewRow), formatted with its
// helpers; the detail comes from the stored Result, decoded by its method
// version, and Input, which the page keeps no copy of.
func newProjectionPage(ctx context.Context, ward *wardload.Ward, p *wardload.Projection) (*projectionPage, error) {
	row, res, err := export.NewRow(ward, p)
	if err != nil {
		return nil, fmt.Errorf("projection %d: %w", p.ID, err)
	}
	var in projector.Input
	if err := json.Unmarshal([]byte(p.Input), &in); err != nil {
		return nil, fmt.Errorf("projection %d: input: %w", p.ID, err)
	}
	loc, err := ward.Location()
	if err != nil {
		return nil, err
	}
	vm := web.ProjectionVM{
		WardName: ward.Name, Date: p.Date.String(), ShiftName: p.ShiftName,
		ShiftTimes:  fmt.Sprintf("%s to %s (%s)", p.Start.In(loc).Format("Mon 2 Jan 15:04"), p.End.In(loc).Format("Mon 2 Jan 15:04"), ward.TimeZone),
		ShiftHours:  export.FormatHours(row.ShiftHours),
		Revision:    row.CensusRevision,
		GeneratedAt: formatLocal(p.CreatedAt, ward),

		Recommended: "none",
		DecidedBy:   row.DecidedBy,
		DecidedText: decidedText(p),
		FloorRule:   row.FloorRule,

		CoverLevel:    export.FormatLevel(row.CoverLevel),
		CoverPercent:  coverPercent(row.CoverLevel),
		TotalPatients: strconv.Itoa(row.TotalPatients),

		LookbackFrom: in.Settings.LookbackFrom, LookbackTo: in.Settings.LookbackTo,
		LookbackWeeks:    strconv.Itoa(in.Settings.LookbackWeeks),
		ObservationShift: in.Settings.ObservationShift,

		MethodVersion: row.MethodVersion,
		Seed:          strconv.FormatUint(p.Seed, 10),
		Draws:         strconv.Itoa(p.Draws),
		Quartiles:     in.Settings.Quartiles,
		Caution:       row.Caution,

		CensusURL: fmt.Sprintf("%s?date=%s&shift=%d", censusURL(ward), p.Date, p.ShiftID),
		ListURL:   projectionsURL(ward),
	}
	if row.Recommended != nil {
		vm.Recommended = strconv.Itoa(*row.Recommended)
	}
	if row.Floor != nil {
		vm.Floor = strconv.Itoa(*row.Floor)
	}
	if res.V1 != nil {
		method1VM(&vm, &row, p, res.V1, &in)
	} else {
		method2VM(&vm, &row, p, res.V2, &in)
	}

	lite := *p
	lite.Input, lite.Result = "", ""
	pg := &projectionPage{p: &lite, title: fmt.Sprintf("%s shift %s", p.ShiftName, p.Date), vm: vm}
	if pg.titleHTML, err = renderHTML(ctx, web.ProjectionTitle(vm)); err != nil {
		return nil, fmt.Errorf("projection %d: render: %w", p.ID, err)
	}
	// The body once for charge nurses and once for managers and admins,
	// who get the links to the ward settings and the review.
	review := reviewQuery(ward, strconv.FormatInt(p.ShiftID, 10), strconv.Itoa(in.Settings.LookbackWeeks))
	for i, links := range [][2]string{{"", ""}, {settingsURL(ward), review}} {
		vm.SettingsURL, vm.ReviewURL = links[0], links[1]
		if pg.bodyHTML[i], err = renderHTML(ctx, web.ProjectionBody(vm)); err != nil {
			return nil, fmt.Errorf("projection %d: render: %w", p.ID, err)
		}
	}
	return pg, nil
}

// revisionsVM lists every census revision of the projection's dated shift,
// linking those with a projection. It reads the list with one light query
// on every request: a revision saved a moment ago, perhaps by another
// server process, must show at once. A projection that recommends 0 nurses
// is read in full to tell a declined one without a floor (no
// recommendation) from a census without patients; both are rare. It
// returns the staff on duty entered with the projection's own revision.
func (s *Server) revisionsVM(r *http.Request, ward *wardload.Ward, p *wardload.Projection, vm *web.ProjectionVM) (wardload.StaffOnDuty, error) {
	var staff wardload.StaffOnDuty
	rs, err := s.store.FindShiftRevisions(r.Context(), ward.ID, p.Date, p.ShiftID)
	if err != nil {
		return staff, fmt.Errorf("projection %d: revisions: %w", p.ID, err)
	}
	for _, c := range rs { // newest revision first
		if c.CensusID == p.CensusID {
			staff = c.Staff
		}
		rv := web.RevisionVM{Revision: c.Revision, EnteredAt: formatLocal(c.EnteredAt, ward), Total: strconv.Itoa(c.TotalPatients), Current: c.CensusID == p.CensusID}
		if c.ProjectionID != 0 {
			rv.URL, rv.Recommended = projectionURL(ward, c.ProjectionID), strconv.Itoa(c.Recommended)
			if c.Recommended == 0 {
				decided := p.DecidedBy
				if c.ProjectionID != p.ID {
					other, err := s.store.FindProjectionByID(r.Context(), c.ProjectionID)
					if err != nil {
						return staff, fmt.Errorf("projection %d: revision %d: %w", p.ID, c.Revision, err)
					}
					decided = other.DecidedBy
				}
				if decided == stats.DecidedByInsufficient {
					rv.Recommended, rv.NoRecommend = "", true
				}
			}
			if vm.NewerURL == "" && c.Revision > p.CensusRevision {
				vm.NewerURL, vm.NewerRevision = rv.URL, c.Revision
			}
		}
		vm.Revisions = append(vm.Revisions, rv)
	}
	return staff, nil
}
