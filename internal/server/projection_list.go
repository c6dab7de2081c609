package server

import (
	"bytes"
	"fmt"
	"net/http"
	"slices"
	"strconv"
	"strings"

	"wardload/internal/export"
	"wardload/internal/projector"
	"wardload/internal/wardload"
	"wardload/web"
)

// The shift list's default range, in days from the ward's today: the last
// fortnight, which a census may still be corrected in, to the projector's
// furthest date ahead.
const (
	listDaysBack  = projector.MaxDaysBack
	listDaysAhead = projector.MaxDaysAhead
)

// listRange reads ?from=&to= (YYYY-MM-DD), each defaulting to the range
// above; a bad date is EINVALID naming "from" or "to".
func (s *Server) listRange(r *http.Request, ward *wardload.Ward) (from, to wardload.Date, err error) {
	loc, err := ward.Location()
	if err != nil {
		return from, to, err
	}
	today := projector.Today(s.now(), loc)
	from, to = today.AddDays(-listDaysBack), today.AddDays(listDaysAhead)
	q := r.URL.Query()
	for _, p := range []struct {
		name string
		d    *wardload.Date
	}{{"from", &from}, {"to", &to}} {
		v := strings.TrimSpace(q.Get(p.name))
		if v == "" {
			continue
		}
		d, err := wardload.ParseDate(v)
		if err != nil {
			return from, to, wardload.FieldErrorf(wardload.EINVALID, p.name, "Enter the date as YYYY-MM-DD, for example %s.", today)
		}
		*p.d = d
	}
	return from, to, nil
}

// handleProjections lists the newest projection of each dated shift of the
// ward in the range, newest first. Managers and admins get the range's
// downloads; a charge nurse sees the projections only.
func (s *Server) handleProjections(w http.ResponseWriter, r *http.Request) error {
	ward := principalFrom(r.Context()).Ward
	vm := web.ProjectionListVM{WardName: ward.Name, TimeZone: ward.TimeZone,
		PageURL: projectionsURL(ward), CensusURL: censusURL(ward)}
	q := r.URL.Query()
	vm.From, vm.To = clip(q.Get("from"), 10), clip(q.Get("to"), 10)
	from, to, err := s.listRange(r, ward)
	var rows []export.Row
	if err == nil {
		vm.From, vm.To = from.String(), to.String()
		_, rows, err = export.Rows(r.Context(), s.store, ward, from, to)
	}
	if wardload.ErrorCode(err) == wardload.EINVALID {
		if wardload.ErrorField(err) == "from" {
			vm.FromError = wardload.ErrorMessage(err)
		} else {
			vm.ToError = wardload.ErrorMessage(err)
		}
		return s.render(w, r, http.StatusBadRequest, web.ProjectionListPage(s.layout(r, "Shift projections"), vm))
	} else if err != nil {
		return fmt.Errorf("projections: %w", err)
	}
	// The export's rows carry the figures; the links need the IDs of the
	// same projections, which the same filter gives newest first.
	ps, _, err := s.store.FindProjections(r.Context(), wardload.ProjectionFilter{WardID: &ward.ID, From: &from, To: &to, LatestOnly: true})
	if err != nil {
		return fmt.Errorf("projections: %w", err)
	}
	slices.Reverse(rows)
	for i, row := range rows {
		rv := web.ProjectionRowVM{
			Date: row.Date.String(), Shift: row.Shift, Revision: strconv.Itoa(row.CensusRevision),
			TotalPatients: strconv.Itoa(row.TotalPatients), Recommended: "none", Floor: "none",
			NursesCover: "–", ExpectedNurseHours: "–", Declined: !row.DataSufficient,
		}
		if row.Recommended != nil {
			rv.Recommended = strconv.Itoa(*row.Recommended)
		}
		if row.NursesCover != nil {
			rv.NursesCover = strconv.Itoa(*row.NursesCover)
		}
		if row.ExpectedNurseHours != nil {
			rv.ExpectedNurseHours = export.FormatHours(*row.ExpectedNurseHours)
		}
		if row.Floor != nil {
			rv.Floor = strconv.Itoa(*row.Floor)
		}
		if i < len(ps) && ps[i].Date == row.Date && ps[i].CensusRevision == row.CensusRevision && ps[i].ShiftName == row.Shift {
			rv.URL = projectionURL(ward, ps[i].ID)
			rv.RecordText = "after " + row.End.Format("15:04")
			if !s.now().Before(row.End) && !readOnly(r) {
				rv.RecordURL, rv.RecordText = shiftRecordURL(ward, row.Date, ps[i].ShiftID), "Record"
				if row.Actual != nil {
					rv.RecordText = fmt.Sprintf("Recorded (rev. %d)", row.Actual.Revision)
				}
			}
		}
		vm.Rows = append(vm.Rows, rv)
	}
	if readOnly(r) {
		vm.CensusURL = ""
	}
	if u := principalFrom(r.Context()).User; u != nil && u.Role != wardload.RoleChargeNurse {
		qs := "?from=" + from.String() + "&to=" + to.String()
		vm.CSVURL, vm.JSONURL = projectionsURL(ward)+".csv"+qs, projectionsURL(ward)+".json"+qs
		vm.ReportURL = staffingReportURL(ward)
	}
	return s.render(w, r, http.StatusOK, web.ProjectionListPage(s.layout(r, "Shift projections"), vm))
}

// handleProjectionsCSV downloads the shift list's range as the roster
// export's CSV.
func (s *Server) handleProjectionsCSV(w http.ResponseWriter, r *http.Request) error {
	return s.download(w, r, export.CSV)
}

// handleProjectionsJSON downloads the shift list's range as the roster
// export's JSON.
func (s *Server) handleProjectionsJSON(w http.ResponseWriter, r *http.Request) error {
	return s.download(w, r, export.JSON)
}

// download writes export.WriteCSV or WriteJSON of the range into a buffer,
// so a failure is an error page and not half a file, and sends it as an
// attachment named wardload-<ward>-<from>-<to>.<format>.
func (s *Server) download(w http.ResponseWriter, r *http.Request, format export.Format) error {
	ward := principalFrom(r.Context()).Ward
	from, to, err := s.listRange(r, ward)
	if err != nil {
		return err
	}
	tiers, rows, err := export.Rows(r.Context(), s.store, ward, from, to)
	if err != nil {
		return err
	}
	var buf bytes.Buffer
	if err := export.Write(&buf, format, ward, from, to, tiers, rows); err != nil {
		return fmt.Errorf("download %s: %w", format, err)
	}
	h := w.Header()
	h.Set("Content-Type", format.ContentType())
	h.Set("Content-Disposition", fmt.Sprintf(`attachment; filename="wardload-%s-%s-%s.%s"`, ward.Code, from, to, format))
	h.Set("Cache-Control", "no-store")
	w.WriteHeader(http.StatusOK)
	_, err = w.Write(buf.Bytes())
	return err
}
