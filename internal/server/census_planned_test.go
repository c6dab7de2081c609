package server

import (
	"context"
	"fmt"
	"net/http/httptest"
	"strconv"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

// TestCensusPlannedMovement: planned admissions and discharges are
// refused beside their field when out of bounds (input kept, nothing
// stored), stored and audited with the census when valid, kept for a
// correction, and the projection page says in one sentence what they add
// to the band, with the details under "How this was worked out".
func TestCensusPlannedMovement(t *testing.T) {
	f := newCensusFixture(t)
	ctx := context.Background()
	// The form folds the section away until something is in it.
	_, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/census", nil)))
	if n := len(byTestID(t, body, "planned-field")); n != 2 {
		t.Fatalf("%d planned fields, want 2", n)
	}
	if strings.Contains(body, `class="planned-movement" open`) {
		t.Error("empty planned section is open")
	}

	for _, c := range []struct {
		name, adm, dis, field, msg string
	}{
		{"admissions above beds", "31", "", "planned-admissions", "more than the ward's 30 beds"},
		{"negative admissions", "-2", "", "planned-admissions", "cannot be negative"},
		{"words", "two", "", "planned-admissions", "whole number"},
		{"discharges above census", "", "14", "planned-discharges", "more than the 13 patients"},
	} {
		t.Run(c.name, func(t *testing.T) {
			form := f.censusForm(f.a.day, "4", "6", "3", "0")
			form.Set(plannedAdmissionsField, c.adm)
			form.Set(plannedDischargesField, c.dis)
			res, body := f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", form)))
			if res.StatusCode != 400 {
				t.Fatalf("status %d, want 400", res.StatusCode)
			}
			if v, _ := attrByID(t, body, c.field, "aria-invalid"); v != "true" {
				t.Errorf("%s not aria-invalid", c.field)
			}
			if msg := strings.Join(byTestID(t, body, "planned-error"), " "); !strings.Contains(msg, c.msg) {
				t.Errorf("message %q, want %q", msg, c.msg)
			}
			if v, _ := attrByID(t, body, "planned-admissions", "value"); v != c.adm {
				t.Errorf("planned-admissions = %q, want the typed %q", v, c.adm)
			}
			if !strings.Contains(body, `class="planned-movement" open`) {
				t.Error("the section with an error is folded away")
			}
			if nc, np := f.counts(t); nc != 0 || np != 0 {
				t.Errorf("stored %d census, %d projections", nc, np)
			}
		})
	}

	form := f.censusForm(f.a.day, "4", "6", "3", "0")
	form.Set(plannedAdmissionsField, "2")
	res, body := f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", form)))
	m := projectionPath.FindStringSubmatch(res.Header.Get("Location"))
	if res.StatusCode != 303 || m == nil {
		t.Fatalf("status %d\n%s", res.StatusCode, body)
	}
	id, _ := strconv.ParseInt(m[1], 10, 64)
	p, err := f.st.FindProjectionByID(ctx, id)
	if err != nil {
		t.Fatal(err)
	}
	c, err := f.st.FindCensusByID(ctx, p.CensusID)
	if err != nil {
		t.Fatal(err)
	}
	if c.Planned.Admissions == nil || *c.Planned.Admissions != 2 || c.Planned.Discharges != nil {
		t.Fatalf("stored planned %+v", c.Planned)
	}
	audits, _, err := f.st.FindAudit(ctx, wardload.AuditFilter{Action: new(wardload.ActionCensusCreate)})
	if err != nil {
		t.Fatal(err)
	}
	if len(audits) == 0 || !strings.Contains(audits[0].After, `"Planned":{"Admissions":2,"Discharges":null}`) {
		t.Errorf("census audit lacks the planned movement: %+v", audits)
	}

	_, page := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", fmt.Sprintf("/wards/w-a/projections/%d", p.ID), nil)))
	sentence := strings.Join(byTestID(t, page, "movement"), "")
	if !strings.HasPrefix(sentence, "Planned movement (2 admissions) is included: they add +") ||
		!strings.Contains(sentence, "Other admissions and discharges are not modelled yet: no end-of-shift records") {
		t.Errorf("movement sentence %q", sentence)
	}
	details := strings.Join(byTestID(t, page, "movement-detail"), "\n")
	if !strings.Contains(details, "Band width:") || !strings.Contains(details, "leaves at a random time") {
		t.Errorf("movement details %q", details)
	}

	// A correction starts from the stored planned count, section open.
	_, body = f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/census?date=2026-03-02&shift="+strconv.FormatInt(c.ShiftID, 10), nil)))
	if v, _ := attrByID(t, body, "planned-admissions", "value"); v != "2" {
		t.Errorf("correction starts from %q, want 2", v)
	}
}

// TestProjectionMovementFromRecords: with eight end-of-shift records of
// the shift, the page names the expected admissions and discharges and
// what they do to the band, and the details give the rates.
func TestProjectionMovementFromRecords(t *testing.T) {
	f := newCensusFixture(t)
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	for i := range 8 {
		d, _ := wardload.ParseDate("2026-02-20")
		if err := f.st.CreateShiftRecord(ctx, &wardload.ShiftRecord{WardID: f.wardA.ID, Date: d.AddDays(i), ShiftID: f.a.day.ID,
			Worked: wardload.StaffOnDuty{Nurses: new(5)}, Admissions: 2 + i%2, Discharges: 1}); err != nil {
			t.Fatal(err)
		}
	}
	res, body := f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", f.censusForm(f.a.day, "4", "6", "3", "0"))))
	m := projectionPath.FindStringSubmatch(res.Header.Get("Location"))
	if res.StatusCode != 303 || m == nil {
		t.Fatalf("status %d\n%s", res.StatusCode, body)
	}
	_, page := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/projections/"+m[1], nil)))
	// Admissions 2,3,2,3,…: S = 20 over 8 records, posterior mean
	// (20 + 1/2)/8 = 2.6 (by hand; underdispersed, so Poisson);
	// discharges (8 + 1/2)/8 = 1.1.
	sentence := strings.Join(byTestID(t, page, "movement"), "")
	if !strings.HasPrefix(sentence, "Expected admissions and discharges (about 2.6 and 1.1 this shift) are included: they add +") ||
		!strings.Contains(sentence, "band from") {
		t.Errorf("movement sentence %q", sentence)
	}
	details := strings.Join(byTestID(t, page, "movement-detail"), "\n")
	if !strings.Contains(details, "Admissions: 2.6 per shift (90% interval") || !strings.Contains(details, "from 8 end-of-shift records of this shift, counted as Poisson") {
		t.Errorf("movement details %q", details)
	}
}
