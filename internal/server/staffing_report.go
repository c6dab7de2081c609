package server

import (
	"fmt"
	"net/http"
	"slices"
	"strconv"

	"wardload/internal/projector"
	"wardload/internal/wardload"
	"wardload/web"
)

// staffingReportWeeks is the report's default span; at most
// wardload.MaxLookbackWeeks.
const staffingReportWeeks = 8

// handleStaffingReport shows, week by week, how the staff planned and the
// staff who worked (end-of-shift records) compare with the projections'
// recommendations and ratio floors (wardload.StaffingWeeks), and lists
// the shifts worked below the floor.
func (s *Server) handleStaffingReport(w http.ResponseWriter, r *http.Request) error {
	ctx := r.Context()
	ward := principalFrom(ctx).Ward
	weeks, err := weeksParam(r.URL.Query().Get("weeks"), staffingReportWeeks)
	if err != nil {
		return err
	}
	loc, err := ward.Location()
	if err != nil {
		return fmt.Errorf("staffing report: %w", err)
	}
	today := projector.Today(s.now(), loc)
	from, to := today.AddDays(-7*weeks), today.AddDays(-1)
	projections, _, err := s.store.FindProjections(ctx, wardload.ProjectionFilter{WardID: &ward.ID, From: &from, To: &to, LatestOnly: true})
	if err != nil {
		return fmt.Errorf("staffing report: projections: %w", err)
	}
	records, _, err := s.store.FindShiftRecords(ctx, wardload.ShiftRecordFilter{WardID: &ward.ID, From: &from, To: &to, LatestOnly: true})
	if err != nil {
		return fmt.Errorf("staffing report: records: %w", err)
	}
	plans, err := s.store.FindPlannedStaff(ctx, wardload.PlannedStaffFilter{WardIDs: []int64{ward.ID}, From: &from, To: &to})
	if err != nil {
		return fmt.Errorf("staffing report: plans: %w", err)
	}
	type key struct {
		date  wardload.Date
		shift int64
	}
	worked, undone, planned := map[key]int{}, map[key]bool{}, map[key]int{}
	for _, rec := range records {
		if rec.Worked.Nurses != nil {
			worked[key{rec.Date, rec.ShiftID}] = *rec.Worked.Nurses
		}
		undone[key{rec.Date, rec.ShiftID}] = rec.CareLeftUndone
	}
	for _, p := range plans {
		planned[key{p.Date, p.ShiftID}] = p.Nurses
	}
	vm := web.StaffingReportVM{WardName: ward.Name, URL: staffingReportURL(ward), Weeks: strconv.Itoa(weeks),
		WindowText: fmt.Sprintf("%d weeks, %s to %s", weeks, from, to), ProjectionsURL: projectionsURL(ward)}
	var shifts []wardload.StaffedShift
	floors := map[string]bool{}
	for _, p := range projections {
		k := key{p.Date, p.ShiftID}
		sh := wardload.StaffedShift{Date: p.Date, Hours: p.ShiftHours, Recommended: p.RecommendedNurses(), Floor: p.Floor, CareUndone: undone[k]}
		if n, ok := planned[k]; ok {
			sh.Planned = &n
		}
		if n, ok := worked[k]; ok {
			sh.Worked = &n
		}
		shifts = append(shifts, sh)
		if p.Floor != nil {
			floors[fmt.Sprintf("%s: %d nurses", p.ShiftName, *p.Floor)] = true
		}
		if sh.Worked != nil && p.Floor != nil && *sh.Worked < *p.Floor {
			vm.BelowFloor = append(vm.BelowFloor, web.StaffedShiftVM{Date: p.Date.String(), Shift: p.ShiftName,
				Recommended: strconv.Itoa(p.Recommended), Floor: strconv.Itoa(*p.Floor), Planned: optInt(sh.Planned), Worked: strconv.Itoa(*sh.Worked)})
		}
	}
	for _, wk := range wardload.StaffingWeeks(shifts) {
		vm.Rows = append(vm.Rows, web.StaffingWeekVM{
			Week: wk.Week, Range: wk.From.String() + " to " + wk.To.String(),
			Shifts: strconv.Itoa(wk.Shifts), Recorded: strconv.Itoa(wk.Recorded),
			BelowRec: strconv.Itoa(wk.BelowRec), BelowFloor: strconv.Itoa(wk.BelowFlr),
			Planned: strconv.Itoa(wk.Planned), PlanBelow: strconv.Itoa(wk.PlanBelow),
			HoursShort: strconv.FormatFloat(wk.HoursShort, 'f', 1, 64), HoursOver: strconv.FormatFloat(wk.HoursOver, 'f', 1, 64),
			CareUndone: strconv.Itoa(wk.CareUndone),
		})
	}
	for f := range floors {
		vm.Floors = append(vm.Floors, f)
	}
	slices.Sort(vm.Floors)
	return s.render(w, r, http.StatusOK, web.StaffingReportPage(s.layout(r, "Planned and worked against needed · "+ward.Name), vm))
}

// optInt is n or "—" for none.
func optInt(n *int) string {
	if n == nil {
		return "—"
	}
	return strconv.Itoa(*n)
}
