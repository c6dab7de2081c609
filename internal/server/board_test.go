package server

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"net/http/httptest"
	"net/url"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/getkin/kin-openapi/openapi3"
	"github.com/getkin/kin-openapi/openapi3filter"
	"github.com/getkin/kin-openapi/routers"

	"wardload/internal/export"
	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// validateOperation checks a response to method target against the
// document's operation of path, as validateResponse does for GET.
func validateOperation(t *testing.T, doc *openapi3.T, method, path, target string, res *http.Response, body []byte) error {
	t.Helper()
	item := doc.Paths.Value(path)
	if item == nil || item.GetOperation(method) == nil {
		return fmt.Errorf("%s %s is not in the document", method, path)
	}
	in := &openapi3filter.ResponseValidationInput{
		RequestValidationInput: &openapi3filter.RequestValidationInput{
			Request: httptest.NewRequest(method, target, nil),
			Route:   &routers.Route{Spec: doc, Path: path, PathItem: item, Method: method, Operation: item.GetOperation(method)},
		},
		Status:  res.StatusCode,
		Header:  res.Header,
		Body:    io.NopCloser(bytes.NewReader(body)),
		Options: &openapi3filter.Options{IncludeResponseStatus: true, MultiError: true},
	}
	return openapi3filter.ValidateResponse(context.Background(), in)
}

// putStaffing sends the staffing PUT with token and body.
func (f *censusFixture) putStaffing(t *testing.T, token, ward, date, shift, body string) (*http.Response, string) {
	t.Helper()
	req := httptest.NewRequest("PUT", "/api/v1/wards/"+ward+"/shifts/"+date+"/"+url.PathEscape(shift)+"/staffing", strings.NewReader(body))
	req.Header.Set("Content-Type", "application/json")
	if token != "" {
		req.Header.Set("Authorization", "Bearer "+token)
	}
	return f.do(t, req)
}

func (f *censusFixture) plans(t *testing.T) []*wardload.PlannedStaff {
	t.Helper()
	ps, err := f.st.FindPlannedStaff(context.Background(), wardload.PlannedStaffFilter{})
	if err != nil {
		t.Fatal(err)
	}
	return ps
}

// shortfallText reads, independently of export.BuildBoard, the stored
// projection's shortfall text at n nurses.
func shortfallText(t *testing.T, p *wardload.Projection, n int) string {
	t.Helper()
	var res stats.Projection
	if err := json.Unmarshal([]byte(p.Result), &res); err != nil {
		t.Fatal(err)
	}
	for _, sf := range res.Shortfall {
		if sf.Nurses == n {
			return sf.Text
		}
	}
	t.Fatalf("projection %d has no shortfall row for %d nurses", p.ID, n)
	return ""
}

// TestRosterPlannerPushesAndPulls is the roster planner's journey over the
// API with one token for wards A and B: planned staff pushed (idempotent,
// audited, bad input refused with nothing stored), then the board pulled
// with gap rows, the chance with the planned staff and one caution.
func TestRosterPlannerPushesAndPulls(t *testing.T) {
	f := newCensusFixture(t)
	doc := loadOpenAPI(t)
	const putPath = "/api/v1/wards/{ward}/shifts/{date}/{shift}/staffing"
	// The fixture's clock is 2026-03-02 09:00 UTC (Dublin is on UTC): the
	// next 24 hours hold the Day and Night of 2 March and the Day of 3
	// March (08:00), for each ward.
	p := f.mustProject(t, pNurseA, f.a, "2026-03-02", f.a.day, 5, 8, 4, 0)
	token, _ := f.MustWriteToken(t, "roster", f.wardA.ID, f.wardB.ID)
	onlyA, _ := f.MustWriteToken(t, "roster-a", f.wardA.ID)
	readOnly, _ := f.MustToken(t, "reader", f.wardA.ID, f.wardB.ID)

	planned := p.Recommended - 1
	body := fmt.Sprintf(`{"nurses": %d}`, planned)
	res, out := f.putStaffing(t, token, "w-a", "2026-03-02", "day", body)
	if res.StatusCode != 200 || !strings.Contains(out, `"changed":true`) || !strings.Contains(out, `"shift":"Day"`) ||
		!strings.Contains(out, `"start":"2026-03-02T08:00:00+00:00"`) {
		t.Fatalf("first PUT: %d %s", res.StatusCode, out)
	}
	if err := validateOperation(t, doc, "PUT", putPath, "/api/v1/wards/w-a/shifts/2026-03-02/day/staffing", res, []byte(out)); err != nil {
		t.Errorf("PUT response does not conform: %v", err)
	}
	res, out = f.putStaffing(t, token, "w-a", "2026-03-02", "Day", body)
	if res.StatusCode != 200 || !strings.Contains(out, `"changed":false`) {
		t.Fatalf("repeat PUT: %d %s", res.StatusCode, out)
	}
	res, out = f.putStaffing(t, token, "w-b", "2026-03-02", "Night", `{"nurses": 4, "support_staff": 1}`)
	if res.StatusCode != 200 {
		t.Fatalf("ward B PUT: %d %s", res.StatusCode, out)
	}
	if n := len(f.audit(t, wardload.ActionStaffingPlan)); n != 2 {
		t.Fatalf("staffing.plan audit rows = %d, want 2 (the repeat writes none)", n)
	}
	if e := f.audit(t, wardload.ActionStaffingPlan)[0]; !strings.HasPrefix(e.Actor, "token:") {
		t.Errorf("audit actor %q, want the token", e.Actor)
	}

	// Bad input: a clear message, the field named, nothing stored.
	for _, tc := range []struct {
		name, token, ward, date, shift, body string
		status                               int
		field                                string
	}{
		{"negative", token, "w-a", "2026-03-03", "Day", `{"nurses": -1}`, 400, "nurses"},
		{"absurd for 30 beds", token, "w-a", "2026-03-03", "Day", `{"nurses": 61}`, 400, "nurses"},
		{"fraction", token, "w-a", "2026-03-03", "Day", `{"nurses": 4.5}`, 400, ""},
		{"missing nurses", token, "w-a", "2026-03-03", "Day", `{"support_staff": 1}`, 400, "nurses"},
		{"unknown field", token, "w-a", "2026-03-03", "Day", `{"nurses": 4, "patient": "x"}`, 400, ""},
		{"two objects", token, "w-a", "2026-03-03", "Day", `{"nurses": 4}{"nurses": 5}`, 400, ""},
		{"negative support", token, "w-a", "2026-03-03", "Day", `{"nurses": 4, "support_staff": -2}`, 400, "support"},
		{"no such shift", token, "w-a", "2026-03-03", "Evening", `{"nurses": 4}`, 404, "shift"},
		{"bad date", token, "w-a", "2026-02-30", "Day", `{"nurses": 4}`, 400, "date"},
		{"years away", token, "w-a", "2031-03-03", "Day", `{"nurses": 4}`, 400, "date"},
		{"ward not on token", onlyA, "w-b", "2026-03-03", "Day", `{"nurses": 4}`, 403, ""},
		{"read-only token", readOnly, "w-a", "2026-03-03", "Day", `{"nurses": 4}`, 403, ""},
		{"no token", "", "w-a", "2026-03-03", "Day", `{"nurses": 4}`, 401, ""},
		{"unknown ward", token, "w-x", "2026-03-03", "Day", `{"nurses": 4}`, 404, ""},
	} {
		res, out := f.putStaffing(t, tc.token, tc.ward, tc.date, tc.shift, tc.body)
		if res.StatusCode != tc.status || !strings.Contains(out, `"error"`) || !strings.Contains(out, `"message"`) {
			t.Errorf("%s: %d %s, want %d with an error message", tc.name, res.StatusCode, out, tc.status)
		}
		if tc.field != "" && !strings.Contains(out, `"field":"`+tc.field+`"`) {
			t.Errorf("%s: %s does not name the field %s", tc.name, out, tc.field)
		}
		target := "/api/v1/wards/" + tc.ward + "/shifts/" + tc.date + "/" + tc.shift + "/staffing"
		if err := validateOperation(t, doc, "PUT", putPath, target, res, []byte(out)); err != nil {
			t.Errorf("%s: response does not conform: %v", tc.name, err)
		}
	}
	if n := len(f.plans(t)); n != 2 {
		t.Fatalf("%d plans stored after the bad requests, want 2", n)
	}

	// Pull the board.
	req := httptest.NewRequest("GET", "/api/v1/board", nil)
	req.Header.Set("Authorization", "Bearer "+token)
	res, out = f.do(t, req)
	if res.StatusCode != 200 {
		t.Fatalf("board: %d %s", res.StatusCode, out)
	}
	if err := validateOperation(t, doc, "GET", "/api/v1/board", "/api/v1/board", res, []byte(out)); err != nil {
		t.Errorf("board does not conform: %v", err)
	}
	var board struct {
		From, To, Caution string
		Rows              []map[string]any
	}
	if err := json.Unmarshal([]byte(out), &board); err != nil {
		t.Fatal(err)
	}
	if board.Caution != stats.Caution || board.From != "2026-03-02T09:00:00+00:00" || board.To != "2026-03-03T09:00:00+00:00" {
		t.Errorf("board head: from %s to %s caution %q", board.From, board.To, board.Caution)
	}
	if strings.Count(out, "collective agreements") != 1 {
		t.Errorf("the caution appears %d times, want once", strings.Count(out, "collective agreements"))
	}
	if len(board.Rows) != 6 {
		t.Fatalf("%d rows, want 6 (3 dated shifts × 2 wards)", len(board.Rows))
	}
	offset := regexp.MustCompile(`^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d[+-]\d\d:\d\d$`)
	gaps := 0
	for _, r := range board.Rows {
		if !offset.MatchString(r["start"].(string)) || !offset.MatchString(r["end"].(string)) {
			t.Errorf("row times %v–%v lack an offset", r["start"], r["end"])
		}
		if r["status"] == export.StatusNoCensus {
			gaps++
			if r["recommended_nurses"] != nil || r["shortfall_with_planned"] != nil {
				t.Errorf("gap row with figures: %v", r)
			}
		}
	}
	if gaps != 5 {
		t.Errorf("%d gap rows, want 5 (every shift but ward A's Day of 2 March)", gaps)
	}
	top := board.Rows[0]
	if top["ward"] != "w-a" || top["date"] != "2026-03-02" || top["shift"] != "Day" || top["status"] != export.StatusProjected {
		t.Fatalf("most at risk first: got %v", top)
	}
	want := shortfallText(t, p, planned)
	if top["planned_nurses"] != float64(planned) || top["planned_minus_recommended"] != float64(-1) ||
		top["recommended_nurses"] != float64(p.Recommended) || top["shortfall_bound"] != "exact" ||
		top["shortfall_with_planned"] != want || top["ratio_floor_nurses"] != float64(*p.Floor) {
		t.Errorf("top row %v\nwant planned %d, recommended %d, floor %d, chance %q", top, planned, p.Recommended, *p.Floor, want)
	}
	if strings.Contains(want, "0%") && !strings.Contains(want, "<") || want == "100%" {
		t.Errorf("chance text %q reads as a bare 0 or 1", want)
	}
	nightB := false
	for _, r := range board.Rows {
		if r["ward"] == "w-b" && r["shift"] == "Night" && r["date"] == "2026-03-02" {
			nightB = r["planned_nurses"] == float64(4) && r["planned_support_staff"] == float64(1) && r["status"] == export.StatusNoCensus
		}
	}
	if !nightB {
		t.Error("ward B's Night of 2 March: planned staff not on its gap row")
	}

	// A token of ward A only sees ward A; CSV has the caution once, first.
	req = httptest.NewRequest("GET", "/api/v1/board?format=csv&view=week", nil)
	req.Header.Set("Authorization", "Bearer "+onlyA)
	res, out = f.do(t, req)
	lines := strings.Split(strings.TrimRight(out, "\r\n"), "\r\n")
	if res.StatusCode != 200 || !strings.HasPrefix(lines[0], "# caution: "+stats.Caution) || strings.Contains(out, "w-b") {
		t.Fatalf("CSV board: %d\n%s", res.StatusCode, out)
	}
	header := -1
	for i, l := range lines {
		if l == strings.Join(export.BoardColumns(), ",") {
			header = i
		}
	}
	// A week from 09:00 on 2 March: the Day of 2 March to the Day of 9
	// March (08:00), 15 dated shifts of ward A.
	if header < 0 || len(lines)-header-1 != 15 {
		t.Errorf("CSV: header at line %d, %d rows, want 15\n%s", header, len(lines)-header-1, out)
	}
	for _, bad := range []string{"?view=month", "?format=xml", "?view=day&view=week"} {
		req = httptest.NewRequest("GET", "/api/v1/board"+bad, nil)
		req.Header.Set("Authorization", "Bearer "+token)
		if res, out := f.do(t, req); res.StatusCode != 400 {
			t.Errorf("%s: %d %s, want 400", bad, res.StatusCode, out)
		}
	}
}

// TestBoardPageForTheStaffingOffice: the staffing office sees its wards'
// board with the gap rows said as such, the caution, the ratio floor and
// its downloads; it may not plan, and a charge nurse may.
func TestBoardPageForTheStaffingOffice(t *testing.T) {
	f := newCensusFixture(t)
	p := f.mustProject(t, pNurseA, f.a, "2026-03-02", f.a.day, 5, 8, 4, 0)
	if _, err := f.st.SetPlannedStaff(context.Background(), &wardload.PlannedStaff{WardID: f.wardA.ID, Date: p.Date, ShiftID: f.a.day.ID, Nurses: p.Recommended + 1}); err != nil {
		t.Fatal(err)
	}
	res, page := f.do(t, f.as(t, pStaffA, httptest.NewRequest("GET", "/board", nil)))
	if res.StatusCode != 200 {
		t.Fatalf("board: %d", res.StatusCode)
	}
	rows := byTestID(t, page, "board-row")
	if len(rows) != 3 {
		t.Fatalf("%d rows, want ward A's 3 dated shifts", len(rows))
	}
	statuses := byTestID(t, page, "board-status")
	if n := strings.Count(strings.Join(statuses, "|"), "no census yet"); n != 2 {
		t.Errorf("statuses %q: want 2 × no census yet", statuses)
	}
	if got := byTestID(t, page, "board-caution"); len(got) != 1 || !strings.Contains(got[0], "collective agreements") {
		t.Errorf("caution %q", got)
	}
	floors := byTestID(t, page, "board-floor")
	if !strings.Contains(strings.Join(floors, "|"), strconv.Itoa(*p.Floor)) {
		t.Errorf("floors %q lack the floor %d", floors, *p.Floor)
	}
	if got := byTestID(t, page, "board-difference"); !strings.Contains(strings.Join(got, "|"), "+1") {
		t.Errorf("differences %q lack +1", got)
	}
	if strings.Contains(page, "/staffing?date=") {
		t.Error("the staffing office is offered to plan")
	}
	if len(byTestID(t, page, "board-csv")) != 1 {
		t.Error("no CSV download for the staffing office")
	}
	res, csvBody := f.do(t, f.as(t, pStaffA, httptest.NewRequest("GET", "/board.csv?view=week", nil)))
	if res.StatusCode != 200 || !strings.HasPrefix(csvBody, "# caution: ") || !strings.Contains(res.Header.Get("Content-Disposition"), "attachment") {
		t.Errorf("board.csv: %d %q", res.StatusCode, res.Header.Get("Content-Disposition"))
	}
	_, page = f.do(t, f.as(t, pNurseA, httptest.NewRequest("GET", "/board", nil)))
	if !strings.Contains(page, "/wards/w-a/staffing?date=2026-03-02") || len(byTestID(t, page, "board-csv")) != 0 {
		t.Error("charge nurse: want a plan link and no download")
	}
	// Its projection page and shift list offer no entry forms or ward
	// settings.
	for _, path := range []string{fmt.Sprintf("/wards/w-a/projections/%d", p.ID), "/wards/w-a/projections?from=2026-03-01&to=2026-03-02", "/"} {
		res, page := f.do(t, f.as(t, pStaffA, httptest.NewRequest("GET", path, nil)))
		if res.StatusCode != 200 {
			t.Fatalf("%s: %d", path, res.StatusCode)
		}
		// The planned-and-worked report (/staffing-report) is for reading;
		// the plan form (/staffing, /staffing?date=…) is not.
		for _, link := range []string{"/settings", "/review", "/shift-record", `href="/wards/w-a/census`, `/staffing"`, "/staffing?"} {
			if strings.Contains(page, link) {
				t.Errorf("%s offers the staffing office %s", path, link)
			}
		}
	}
	// The staffing office changes nothing: census entry is refused.
	res, _ = f.do(t, f.as(t, pStaffA, post("/wards/w-a/census", url.Values{"date": {"2026-03-02"}})))
	if res.StatusCode != 403 {
		t.Errorf("staffing office census post: %d, want 403", res.StatusCode)
	}
}

// TestStaffingPage: a charge nurse plans a shift in the browser; bad input
// shows the page again with the message and stores nothing.
func TestStaffingPage(t *testing.T) {
	f := newCensusFixture(t)
	form := func(date, shift, nurses string) url.Values {
		return url.Values{"date": {date}, "shift": {shift}, "nurses": {nurses}}
	}
	day := strconv.FormatInt(f.a.day.ID, 10)
	for _, tc := range []struct {
		name string
		form url.Values
	}{
		{"negative", form("2026-03-03", day, "-2")},
		{"absurd", form("2026-03-03", day, "500")},
		{"not a number", form("2026-03-03", day, "six")},
		{"other ward's shift", form("2026-03-03", strconv.FormatInt(f.b.day.ID, 10), "5")},
		{"no date", form("", day, "5")},
	} {
		res, page := f.do(t, f.as(t, pNurseA, post("/wards/w-a/staffing", tc.form)))
		if res.StatusCode != 400 || len(byTestID(t, page, "staffing-error")) != 1 {
			t.Errorf("%s: %d, want 400 with a message", tc.name, res.StatusCode)
		}
	}
	if n := len(f.plans(t)); n != 0 {
		t.Fatalf("bad input stored %d plans", n)
	}
	cookie := MustSession(t, f.s, f.users[pNurseA].ID)
	req := post("/wards/w-a/staffing", form("2026-03-03", day, "6"))
	req.AddCookie(cookie)
	res, _ := f.do(t, req)
	if res.StatusCode != 303 {
		t.Fatalf("save: %d", res.StatusCode)
	}
	ps := f.plans(t)
	if len(ps) != 1 || ps[0].Nurses != 6 || ps[0].UpdatedBy != f.users[pNurseA].ID {
		t.Fatalf("stored %+v", ps)
	}
	req = httptest.NewRequest("GET", res.Header.Get("Location"), nil)
	req.AddCookie(cookie)
	_, page := f.do(t, req)
	if !strings.Contains(page, "6 nurses planned") || !strings.Contains(page, `value="6"`) {
		t.Error("the page does not show the saved plan")
	}
}

// TestOwnTokensForSeveralWards: the staffing office makes one token for
// its wards that may send planned staff; a ward it does not belong to is
// refused; it revokes its own token and no one else's.
func TestOwnTokensForSeveralWards(t *testing.T) {
	f := newCensusFixture(t)
	office := f.MustUser(t, "", "s.hospital", wardload.RoleStaffingOffice, "pw of s.hospital 7c1e", f.wardA.ID, f.wardB.ID)
	// One session throughout, so the secret sealed in it reaches the list.
	cookie := MustSession(t, f.s, office.ID)
	as := func(req *http.Request) *http.Request {
		req.AddCookie(cookie)
		return req
	}
	ids := func(ws ...*wardload.Ward) []string {
		var out []string
		for _, w := range ws {
			out = append(out, strconv.FormatInt(w.ID, 10))
		}
		return out
	}
	// The ward-A-only office may not add ward B.
	res, page := f.do(t, f.as(t, pStaffA, post("/tokens", url.Values{"name": {"sneaky"}, "ward": ids(f.wardA, f.wardB)})))
	if res.StatusCode != 400 || len(byTestID(t, page, "token-error")) != 1 {
		t.Errorf("other ward: %d, want 400 with a message", res.StatusCode)
	}
	if _, err := f.st.FindTokenByName(context.Background(), "sneaky"); wardload.ErrorCode(err) != wardload.ENOTFOUND {
		t.Errorf("refused token stored: %v", err)
	}
	res, _ = f.do(t, as(post("/tokens", url.Values{"name": {"hospital-roster"}, "ward": ids(f.wardA, f.wardB), "write_staffing": {"1"}})))
	if res.StatusCode != 303 {
		t.Fatalf("create: %d", res.StatusCode)
	}
	// The secret comes with the session cookie the create refreshed.
	req := as(httptest.NewRequest("GET", "/tokens", nil))
	_, page = f.do(t, req)
	secret := byTestID(t, page, "token-secret")
	if len(secret) != 1 {
		t.Fatalf("secret not shown once:\n%s", page)
	}
	if got := byTestID(t, page, "token-permission"); len(got) != 1 || got[0] != "read, send planned staff" {
		t.Errorf("permission %q", got)
	}
	res, out := f.putStaffing(t, secret[0], "w-b", "2026-03-03", "Day", `{"nurses": 5}`)
	if res.StatusCode != 200 {
		t.Fatalf("the new token's PUT: %d %s", res.StatusCode, out)
	}
	tok, err := f.st.FindTokenByName(context.Background(), "hospital-roster")
	if err != nil {
		t.Fatal(err)
	}
	// Another's token: not found; their own: revoked.
	res, _ = f.do(t, f.as(t, pStaffA, post(fmt.Sprintf("/tokens/%d/revoke", tok.ID), nil)))
	if res.StatusCode != 404 {
		t.Errorf("revoke another's token: %d, want 404", res.StatusCode)
	}
	res, _ = f.do(t, as(post(fmt.Sprintf("/tokens/%d/revoke", tok.ID), nil)))
	if res.StatusCode != 303 {
		t.Errorf("revoke own token: %d", res.StatusCode)
	}
	if res, _ := f.putStaffing(t, secret[0], "w-b", "2026-03-03", "Day", `{"nurses": 6}`); res.StatusCode != 401 {
		t.Errorf("revoked token PUT: %d, want 401", res.StatusCode)
	}
}
