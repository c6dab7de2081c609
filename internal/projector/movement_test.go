package projector_test

import (
	"encoding/json"
	"testing"

	"wardload/internal/projector"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// The end-of-shift records of the same shift pattern give the movement
// history (the newest revision of each, none of another shift); with
// fewer than stats.MinMovementRecords the projection says so and holds
// the census fixed.
func TestSaveMovementHistory(t *testing.T) {
	h := seedHand(t)
	h.addObservations(t, 12)
	s := h.service()
	record := func(date string, shift *wardload.ShiftPattern, adm, dis int) {
		t.Helper()
		must(t, h.st.CreateShiftRecord(ctx, &wardload.ShiftRecord{WardID: h.ward.ID, Date: day(date), ShiftID: shift.ID,
			Worked: wardload.StaffOnDuty{Nurses: new(3)}, Admissions: adm, Discharges: dis}))
	}
	result := func(p *wardload.Projection) (projector.Input, stats.Projection) {
		t.Helper()
		var res stats.Projection
		must(t, json.Unmarshal([]byte(p.Result), &res))
		return decodeInput(t, p), res
	}

	for i := range stats.MinMovementRecords - 1 {
		record(day("2026-03-05").AddDays(i).String(), h.early, 2, 1)
	}
	record("2026-03-18", h.late, 9, 9) // another shift: not used
	_, p, err := s.Save(ctx, h.ward.ID, h.shiftDate, h.early.ID, h.counts(2, 3, 0), wardload.StaffOnDuty{}, wardload.PlannedMovement{})
	must(t, err)
	in, res := result(p)
	if res.MethodVersion != stats.MethodVersion || res.Movement == nil || res.Movement.Modelled || res.Movement.Records != stats.MinMovementRecords-1 {
		t.Fatalf("movement with too few records: %+v", res.Movement)
	}
	if len(in.Model.Movement.History) != stats.MinMovementRecords-1 || in.Settings.MovementTo != "2026-03-19" {
		t.Fatalf("input movement %+v, window to %s", in.Model.Movement, in.Settings.MovementTo)
	}

	// The eighth record, then a correction of it: the newest revision counts.
	record("2026-03-19", h.early, 5, 0)
	record("2026-03-19", h.early, 3, 1)
	_, p, err = s.Save(ctx, h.ward.ID, h.shiftDate, h.early.ID, h.counts(2, 3, 0), wardload.StaffOnDuty{}, wardload.PlannedMovement{Discharges: new(1)})
	must(t, err)
	in, res = result(p)
	mv := res.Movement
	if !mv.Modelled || !mv.FromRates || mv.Records != stats.MinMovementRecords || mv.Admissions.Total != 7*2+3 || mv.Discharges.Total != 7+1 {
		t.Fatalf("movement: %+v, admissions %+v", mv, mv.Admissions)
	}
	if in.Model.Movement.History[0].Date != "2026-03-05" || *in.Model.Movement.PlannedDischarges != 1 || in.Model.Movement.Beds != 0 {
		t.Fatalf("input movement %+v", in.Model.Movement)
	}
	if mv.Discharges.Planned == nil || *mv.Discharges.Planned != 1 || len(mv.BandsWithout) != 1 {
		t.Fatalf("planned discharges %+v, bands without %+v", mv.Discharges.Planned, mv.BandsWithout)
	}
	got, err := projector.Recompute(p)
	must(t, err)
	b, err := json.Marshal(got)
	must(t, err)
	if string(b) != p.Result {
		t.Errorf("recomputed result differs:\n%s\n%s", b, p.Result)
	}
}
