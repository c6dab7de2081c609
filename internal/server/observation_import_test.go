package server

import (
	"bytes"
	"context"
	"io"
	"mime/multipart"
	"net/http"
	"net/http/httptest"
	"slices"
	"strings"
	"testing"

	"wardload/internal/demo"
	"wardload/internal/wardload"
)

// upload returns a multipart POST of content as the form's file field.
func upload(tb testing.TB, path, content string) *http.Request {
	tb.Helper()
	var body bytes.Buffer
	mw := multipart.NewWriter(&body)
	fw, err := mw.CreateFormFile("file", "observations.csv")
	if err != nil {
		tb.Fatal(err)
	}
	io.WriteString(fw, content)
	if err := mw.Close(); err != nil {
		tb.Fatal(err)
	}
	req := httptest.NewRequest("POST", path, &body)
	req.Header.Set("Content-Type", mw.FormDataContentType())
	return req
}

// wardObservations counts a ward's stored observations, excluded ones too.
func wardObservations(tb testing.TB, st wardload.Store, wardID int64) int {
	tb.Helper()
	_, n, err := st.FindObservations(context.Background(), wardload.ObservationFilter{WardID: &wardID, IncludeExcluded: true})
	if err != nil {
		tb.Fatal(err)
	}
	return n
}

func TestImportHappyPath(t *testing.T) {
	f := newReviewFixture(t)
	before := wardObservations(t, f.st, f.ward.ID)
	// The demo ward records dependency_score; one row leaves it blank.
	file := "\ufeffdate,shift,tier,window_hours,care_minutes,dependency_score\r\n" +
		"2026-03-01,Day,t1,12.5,55,4\r\n" +
		"2026-03-01,night,t2,4,30,\r\n" +
		"2026-02-28,Night,t4,12.5,400,17\r\n"
	res, body := f.do(t, f.as(t, pAdmin, upload(t, "/wards/"+demo.WardCode+"/observations/import", file)))
	if res.StatusCode != 303 || res.Header.Get("Location") != "/wards/"+demo.WardCode+"/review" {
		t.Fatalf("status %d Location %q\n%s", res.StatusCode, res.Header.Get("Location"), body)
	}
	if after := wardObservations(t, f.st, f.ward.ID); after != before+3 {
		t.Fatalf("observations %d → %d, want +3", before, after)
	}
	es := f.audit(t, "observation.import")
	if len(es) == 0 || es[0].UserID != f.users[pAdmin].ID {
		t.Fatalf("import audit %+v", es)
	}
	// The newest batch holds the three rows, entered by the admin.
	var batch string
	for _, o := range f.observations(t) {
		if o.EnteredBy == f.users[pAdmin].ID {
			batch = o.BatchID
		}
	}
	obs, n, err := f.st.FindObservations(context.Background(), wardload.ObservationFilter{BatchID: &batch})
	if err != nil || n != 3 {
		t.Fatalf("batch %q: %d rows, %v", batch, n, err)
	}
	if obs[0].Date.String() != "2026-02-28" || obs[0].CareMinutes != 400 || obs[0].Factors["dependency_score"] != 17 {
		t.Errorf("first row %+v", obs[0])
	}
	if _, ok := obs[2].Factors["dependency_score"]; ok || obs[2].WindowHours != 4 {
		t.Errorf("blank factor stored as %v, window %v", obs[2].Factors, obs[2].WindowHours)
	}
	// The flash names the count and the batch.
	// The flash is in the session the import was posted with.
	req := httptest.NewRequest("GET", "/wards/"+demo.WardCode+"/review", nil)
	for _, c := range res.Cookies() {
		req.AddCookie(c)
	}
	_, page := f.do(t, req)
	if got := byTestID(t, page, "notice"); !slices.Equal(got, []string{"Imported 3 observations (batch " + batch + ")."}) {
		t.Errorf("notice %q", got)
	}
}

func TestImportRefused(t *testing.T) {
	f := newReviewFixture(t)
	header := "date,shift,tier,window_hours,care_minutes\n"
	good := "2026-03-01,Day,t1,12.5,55\n"
	for _, tc := range []struct {
		name, file, want string
	}{
		{"bad date on line 3", header + good + "2026-02-30,Day,t1,12.5,55\n", `line 3, column "date": "2026-02-30" is not a date`},
		{"unknown tier on line 4", header + good + good + "2026-03-01,Day,t9,12.5,55\n", `line 4, column "tier": "t9" is not a tier code`},
		{"unknown shift", header + "2026-03-01,Evening,t1,12.5,55\n", `line 2, column "shift": "Evening" is not a shift pattern`},
		{"window over 24 h on line 3", header + good + "2026-03-01,Day,t1,25,55\n", `line 3, column "window_hours": Observation window must be more than 0 and at most 24 hours.`},
		{"negative minutes", header + "2026-03-01,Day,t1,12,-5\n", `line 2, column "care_minutes": Care minutes must be a number of at least 0.`},
		{"not a number", header + good + "2026-03-01,Day,t1,12,4O\n", `line 3, column "care_minutes": "4O" is not a number.`},
		{"identifier column", "date,shift,tier,window_hours,care_minutes,mrn\n2026-03-01,Day,t1,12,40,12345\n", `column "mrn" is not accepted. wardload stores no patient identifiers`},
		{"name column", "patient_name,date,shift,tier,window_hours,care_minutes\nX,2026-03-01,Day,t1,12,40\n", `column "patient_name" is not accepted`},
		{"missing column", "date,shift,tier,care_minutes\n2026-03-01,Day,t1,40\n", `the column "window_hours" is missing`},
		{"header only", header, "no data rows"},
		// The fixture's clock is 2026-03-02 09:00 UTC (Europe/London: same date).
		{"dated tomorrow on line 3", header + good + "2026-03-03,Day,t1,12.5,55\n", `line 3, column "date": 2026-03-03 is after today (2026-03-02)`},
		{"year mistyped far ahead", header + "9999-11-20,Day,t1,12.5,55\n", `line 2, column "date": 9999-11-20 is after today`},
		{"year mistyped far back", header + "1926-03-01,Day,t1,12.5,55\n", `line 2, column "date": 1926-03-01 is before 2000-01-01`},
		{"ragged row", header + "2026-03-01,Day,t1,12\n", "line 2: the row does not have the same number of fields"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			before := wardObservations(t, f.st, f.ward.ID)
			res, body := f.do(t, f.as(t, pAdmin, upload(t, "/wards/"+demo.WardCode+"/observations/import", tc.file)))
			if res.StatusCode != 400 {
				t.Fatalf("status %d, want 400", res.StatusCode)
			}
			msg := byTestID(t, body, "import-error-message")
			if len(msg) != 1 || !strings.Contains(msg[0], tc.want) {
				t.Errorf("message %q, want it to contain %q", msg, tc.want)
			}
			if after := wardObservations(t, f.st, f.ward.ID); after != before {
				t.Errorf("observations %d → %d after a refused file", before, after)
			}
		})
	}
	t.Run("no file", func(t *testing.T) {
		res, body := f.do(t, f.as(t, pAdmin, post("/wards/"+demo.WardCode+"/observations/import", nil)))
		if res.StatusCode != 400 || len(byTestID(t, body, "import-error-message")) != 1 {
			t.Errorf("status %d", res.StatusCode)
		}
	})
}

// TestRowToLine: the store's "Row N" is the Nth data row; the page shows
// its file line instead, which differs when a quoted cell spans lines.
// (The parser checks tiers, shifts and factors first, so the store refuses
// a parsed file only if settings change between the two.)
func TestRowToLine(t *testing.T) {
	lines := []int{2, 3, 5} // a quoted field spans lines 3–4
	for _, c := range []struct{ in, want string }{
		{"Row 3: Unknown tier for this ward.", "line 5: Unknown tier for this ward."},
		{"Row 1: x", "line 2: x"},
		{"Row 4: out of range", "Row 4: out of range"},
		{"Something else.", "Something else."},
	} {
		if got := RowToLine(c.in, lines); got != c.want {
			t.Errorf("RowToLine(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}

func TestImportTemplate(t *testing.T) {
	f := newReviewFixture(t)
	res, body := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/wards/"+demo.WardCode+"/observations/template.csv", nil)))
	if res.StatusCode != 200 || !strings.HasPrefix(res.Header.Get("Content-Type"), "text/csv") {
		t.Fatalf("status %d type %q", res.StatusCode, res.Header.Get("Content-Type"))
	}
	if body != "date,shift,tier,window_hours,care_minutes,dependency_score\n" {
		t.Errorf("template %q", body)
	}
	if cd := res.Header.Get("Content-Disposition"); cd != `attachment; filename="w7-east-observations.csv"` {
		t.Errorf("Content-Disposition %q", cd)
	}
	// The template, filled in, imports.
	res, _ = f.do(t, f.as(t, pAdmin, upload(t, "/wards/"+demo.WardCode+"/observations/import", body+"2026-03-01,Day,t3,12.5,200,\n")))
	if res.StatusCode != 303 {
		t.Errorf("filled template: status %d", res.StatusCode)
	}
}

func TestImportFormPage(t *testing.T) {
	f := newReviewFixture(t)
	res, body := f.do(t, f.as(t, pAdmin, httptest.NewRequest("GET", "/wards/"+demo.WardCode+"/observations/import", nil)))
	if res.StatusCode != 200 {
		t.Fatalf("status %d", res.StatusCode)
	}
	if len(byTestID(t, body, "import-form")) != 1 || len(byTestID(t, body, "import-privacy")) != 1 {
		t.Error("form or privacy note missing")
	}
	if !strings.Contains(body, `enctype="multipart/form-data"`) || !strings.Contains(body, "dependency_score") {
		t.Error("form is not multipart or lacks the ward's factor column")
	}
	// The page states the web limit the route enforces and the way in
	// for larger files.
	if !strings.Contains(body, "(at most "+byteSize(maxImportBytes)+")") || len(byTestID(t, body, "import-limit")) != 1 ||
		!strings.Contains(body, "wardload observations import --ward") {
		t.Error("the page does not state the size limit and the command-line import for larger files")
	}
}
