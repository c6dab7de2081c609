package server

import (
	"context"
	"fmt"
	"net/http/httptest"
	"net/url"
	"strconv"
	"strings"
	"testing"

	"wardload/internal/wardload"
)

// recordForm is a valid end-of-shift post for the dated shift.
func recordForm(date string, shift *wardload.ShiftPattern) url.Values {
	return url.Values{"date": {date}, "shift": {strconv.FormatInt(shift.ID, 10)}, "nurses_worked": {"5"},
		"admissions": {"1"}, "discharges": {"2"}, "care_left_undone": {"no"}, "care_category": {""}}
}

// shiftRecords returns ward A's stored end-of-shift records, newest first.
func (f *censusFixture) shiftRecords(t *testing.T) []*wardload.ShiftRecord {
	t.Helper()
	rs, _, err := f.st.FindShiftRecords(context.Background(), wardload.ShiftRecordFilter{WardID: &f.wardA.ID})
	if err != nil {
		t.Fatal(err)
	}
	return rs
}

// TestShiftRecordForm walks the end-of-shift record: refused while the
// shift runs, every kind of bad input kept and refused with nothing
// stored, a record and its correction as revisions 1 and 2 (audited), and
// the shift list's link. The clocks say 09:00 on 2 March in Dublin (UTC):
// the Night of 1 March (20:00–08:00) has ended, the Day of 2 March runs.
func TestShiftRecordForm(t *testing.T) {
	f := newCensusFixture(t)
	nightURL := "/wards/w-a/shift-record?date=2026-03-01&shift=" + strconv.FormatInt(f.a.night.ID, 10)

	// The running Day shift: no form, and a post is refused.
	_, body := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/shift-record?date=2026-03-02&shift="+strconv.FormatInt(f.a.day.ID, 10), nil)))
	if got := byTestID(t, body, "record-not-ended"); len(got) != 1 || !strings.Contains(got[0], "Mon 2 Mar 20:00") || len(byTestID(t, body, "record-form")) != 0 {
		t.Errorf("running shift: not-ended %q, forms %d", got, len(byTestID(t, body, "record-form")))
	}
	res, body := f.do(t, f.as(t, pNurseA, post("/wards/w-a/shift-record", recordForm("2026-03-02", f.a.day))))
	if res.StatusCode != 400 || !strings.Contains(strings.Join(byTestID(t, body, "error-link"), ""), "once it has ended") {
		t.Errorf("running shift post: status %d, errors %q", res.StatusCode, byTestID(t, body, "error-link"))
	}
	if n := len(f.shiftRecords(t)); n != 0 {
		t.Fatalf("%d records stored for a running shift", n)
	}

	// Bad input: 400, the message linked to its field, the input kept.
	for _, tc := range []struct {
		name    string
		change  map[string]string
		inputID string
		message string
	}{
		{"nurses empty", map[string]string{"nurses_worked": ""}, "record-nurses", "Enter the number of nurses"},
		{"nurses negative", map[string]string{"nurses_worked": "-1"}, "record-nurses", "cannot be negative"},
		{"nurses above twice the beds", map[string]string{"nurses_worked": "61"}, "record-nurses", "twice the ward's 30 beds"},
		{"admissions empty", map[string]string{"admissions": ""}, "record-admissions", "0 if none"},
		{"discharges not a number", map[string]string{"discharges": "two"}, "record-discharges", "whole number"},
		{"discharges implausible", map[string]string{"discharges": "201"}, "record-discharges", "not plausible"},
		{"care not answered", map[string]string{"care_left_undone": ""}, "care-yes", "yes or no"},
		{"category without undone care", map[string]string{"care_category": wardload.CareHygiene}, "care-category", "only given when care was left undone"},
		{"free-text category", map[string]string{"care_left_undone": "yes", "care_category": "bed 4 fell"}, "care-category", "listed categories"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			form := recordForm("2026-03-01", f.a.night)
			for k, v := range tc.change {
				form.Set(k, v)
			}
			res, body := f.do(t, f.as(t, pNurseA, post("/wards/w-a/shift-record", form)))
			if res.StatusCode != 400 {
				t.Fatalf("status %d, want 400", res.StatusCode)
			}
			if summary := strings.Join(byTestID(t, body, "error-link"), " | "); !strings.Contains(summary, tc.message) {
				t.Errorf("summary %q lacks %q", summary, tc.message)
			}
			if !strings.Contains(body, `href="#`+tc.inputID+`"`) {
				t.Errorf("summary does not link to #%s", tc.inputID)
			}
			for _, id := range []string{"record-nurses", "record-admissions", "record-discharges"} {
				name := map[string]string{"record-nurses": "nurses_worked", "record-admissions": "admissions", "record-discharges": "discharges"}[id]
				if v, _ := attrByID(t, body, id, "value"); v != form.Get(name) {
					t.Errorf("%s = %q, want the typed %q", id, v, form.Get(name))
				}
			}
			if n := len(f.shiftRecords(t)); n != 0 {
				t.Errorf("%d records stored", n)
			}
		})
	}

	// A record, then its correction.
	res, _ = f.do(t, f.as(t, pNurseA, post("/wards/w-a/shift-record", recordForm("2026-03-01", f.a.night))))
	flash := res.Cookies()
	if res.StatusCode != 303 || res.Header.Get("Location") != nightURL {
		t.Fatalf("save: status %d Location %q", res.StatusCode, res.Header.Get("Location"))
	}
	rs := f.shiftRecords(t)
	if len(rs) != 1 || rs[0].Revision != 1 || *rs[0].Worked.Nurses != 5 || rs[0].Admissions != 1 || rs[0].Discharges != 2 ||
		rs[0].CareLeftUndone || rs[0].EnteredBy != f.users[pNurseA].ID {
		t.Fatalf("stored %+v", rs)
	}
	if es := f.audit(t, wardload.ActionShiftRecordCreate); len(es) != 1 || es[0].Actor != "n.nurse" {
		t.Errorf("audit %+v", es)
	}
	// The page after the redirect, in the same session: its flash.
	req := httptest.NewRequest("GET", nightURL, nil)
	for _, c := range flash {
		req.AddCookie(c)
	}
	_, body = f.do(t, req)
	if n := byTestID(t, body, "notice"); len(n) != 1 || !strings.Contains(n[0], "revision 1") {
		t.Errorf("notice %q", n)
	}
	if got := byTestID(t, body, "record-latest"); len(got) != 1 || !strings.Contains(got[0], "5 nurses, 1 admission, 2 discharges; no care left undone.") {
		t.Errorf("latest %q", got)
	}
	if v, _ := attrByID(t, body, "record-nurses", "value"); v != "5" {
		t.Errorf("nurses prefilled with %q, want 5", v)
	}
	fix := recordForm("2026-03-01", f.a.night)
	fix.Set("nurses_worked", "4")
	fix.Set("care_left_undone", "yes")
	fix.Set("care_category", wardload.CareMedication)
	if res, _ := f.do(t, f.as(t, pManagerA, post("/wards/w-a/shift-record", fix))); res.StatusCode != 303 {
		t.Fatalf("correction status %d", res.StatusCode)
	}
	rs = f.shiftRecords(t)
	if len(rs) != 2 || rs[0].Revision != 2 || *rs[0].Worked.Nurses != 4 || !rs[0].CareLeftUndone || rs[0].CareCategory != wardload.CareMedication || rs[1].Revision != 1 {
		t.Fatalf("after correction %+v", rs)
	}

	// Ward B's shift is not a shift of ward A.
	res, _ = f.do(t, f.as(t, pNurseA, post("/wards/w-a/shift-record", recordForm("2026-03-01", f.b.night))))
	if res.StatusCode != 400 || len(f.shiftRecords(t)) != 2 {
		t.Errorf("ward B's shift: status %d", res.StatusCode)
	}

	// The shift list links a projected shift that has ended to its record.
	census := f.censusForm(f.a.night, "4", "6", "3", "0")
	census.Set("date", "2026-03-01")
	census.Set(confirmEndedField, "1")
	if res, body := f.do(t, f.as(t, pNurseA, post("/wards/w-a/census", census))); res.StatusCode != 303 {
		t.Fatalf("night census: %d\n%s", res.StatusCode, body)
	}
	_, list := f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/wards/w-a/projections", nil)))
	if got := byTestID(t, list, "row-record-link"); len(got) != 1 || got[0] != "Recorded (rev. 2)" {
		t.Errorf("shift list record links %q", got)
	}
	if !strings.Contains(list, fmt.Sprintf(`href="/wards/w-a/shift-record?date=2026-03-01&amp;shift=%d"`, f.a.night.ID)) {
		t.Error("shift list lacks the link to the night's record")
	}
}
