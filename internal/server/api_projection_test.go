package server

import (
	"bytes"
	"context"
	"net/http"
	"net/http/httptest"
	"strings"
	"testing"

	"wardload/internal/export"
	"wardload/internal/sqlite"
	"wardload/internal/wardload"
)

// apiFixture is a real server on SQLite holding the demo ward (with its
// stored projections) and an empty second ward, with a token for each.
type apiFixture struct {
	st                *sqlite.Store
	s                 *Server
	ward, other       *wardload.Ward
	tokWard, tokOther string
	from, to          wardload.Date
}

func newAPIFixture(t *testing.T) *apiFixture {
	t.Helper()
	ctx := wardload.WithActor(context.Background(), wardload.Actor{Name: "test"})
	f := &apiFixture{}
	f.st, f.ward = MustOpenDemo(t)
	now := demoNow
	f.other = &wardload.Ward{Code: "w-other", Name: "Other", TimeZone: "Europe/Dublin"}
	if err := f.st.CreateWard(ctx, f.other); err != nil {
		t.Fatal(err)
	}
	f.s, _ = MustNew(t, f.st)
	for _, tk := range []struct {
		secret *string
		name   string
		ward   int64
	}{{&f.tokWard, "planner", f.ward.ID}, {&f.tokOther, "planner-other", f.other.ID}} {
		secret, hash := NewTokenSecret()
		if err := f.st.CreateToken(ctx, &wardload.APIToken{Name: tk.name, Hash: hash, WardIDs: []int64{tk.ward}}); err != nil {
			t.Fatal(err)
		}
		*tk.secret = secret
	}
	// The last fortnight of the demo's census (it ends the day before now).
	f.to = wardload.DateOf(now).AddDays(-1)
	f.from = f.to.AddDays(-13)
	return f
}

func (f *apiFixture) get(t *testing.T, target, token string) (int, string, []byte) {
	t.Helper()
	res, body := f.response(t, target, token)
	return res.StatusCode, res.Header.Get("Content-Type"), body
}

// response sends GET target with the bearer token (none if "").
func (f *apiFixture) response(t *testing.T, target, token string) (*http.Response, []byte) {
	t.Helper()
	req := httptest.NewRequest("GET", target, nil)
	if token != "" {
		req.Header.Set("Authorization", "Bearer "+token)
	}
	res, body := do(t, f.s.Handler(), req)
	return res, []byte(body)
}

// TestAPIProjectionsIsTheExport: the body is byte for byte what
// export.WriteJSON (and WriteCSV) write for the same ward and dates, as the
// CLI and the download use them.
func TestAPIProjectionsIsTheExport(t *testing.T) {
	f := newAPIFixture(t)
	tiers, rows, err := export.Rows(context.Background(), f.st, f.ward, f.from, f.to)
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) < 14 {
		t.Fatalf("only %d demo rows in %s..%s; the test needs real data", len(rows), f.from, f.to)
	}
	var wantJSON, wantCSV bytes.Buffer
	if err := export.WriteJSON(&wantJSON, f.ward, f.from, f.to, tiers, rows); err != nil {
		t.Fatal(err)
	}
	if err := export.WriteCSV(&wantCSV, tiers, rows); err != nil {
		t.Fatal(err)
	}
	q := "/api/v1/projections?ward=" + f.ward.Code + "&from=" + f.from.String() + "&to=" + f.to.String()
	status, ctype, body := f.get(t, q, f.tokWard)
	if status != 200 || !strings.HasPrefix(ctype, "application/json") {
		t.Fatalf("status %d Content-Type %q\n%s", status, ctype, body)
	}
	if !bytes.Equal(body, wantJSON.Bytes()) {
		t.Errorf("JSON body differs from export.WriteJSON:\n got %.300s\nwant %.300s", body, wantJSON.Bytes())
	}
	status, ctype, body = f.get(t, q+"&format=csv", f.tokWard)
	if status != 200 || !strings.HasPrefix(ctype, "text/csv") {
		t.Fatalf("csv: status %d Content-Type %q", status, ctype)
	}
	if !bytes.Equal(body, wantCSV.Bytes()) {
		t.Errorf("CSV body differs from export.WriteCSV")
	}
	// Explicit format=json is the default.
	if _, _, body = f.get(t, q+"&format=json", f.tokWard); !bytes.Equal(body, wantJSON.Bytes()) {
		t.Error("format=json differs from the default")
	}
}

// TestAPIResponsesConformToOpenAPI sends real requests for every
// documented status and validates each body against the document.
func TestAPIResponsesConformToOpenAPI(t *testing.T) {
	f := newAPIFixture(t)
	doc := loadOpenAPI(t)
	dates := "&from=" + f.from.String() + "&to=" + f.to.String()
	forgedSecret, _ := NewTokenSecret()
	for _, tc := range []struct {
		name   string
		path   string // the route pattern, to find the schema
		target string
		token  string
		status int
		code   string // error.code
		field  string // error.field
	}{
		{"wards", "/api/v1/wards", "/api/v1/wards", f.tokWard, 200, "", ""},
		{"wards without token", "/api/v1/wards", "/api/v1/wards", "", 401, "unauthorized", ""},
		{"projections", "/api/v1/projections", "/api/v1/projections?ward=" + f.ward.Code + dates, f.tokWard, 200, "", ""},
		{"projections empty ward", "/api/v1/projections", "/api/v1/projections?ward=w-other" + dates, f.tokOther, 200, "", ""},
		{"missing ward", "/api/v1/projections", "/api/v1/projections?from=2026-03-01&to=2026-03-02", f.tokWard, 400, "invalid", "ward"},
		{"bad ward code", "/api/v1/projections", "/api/v1/projections?ward=W%207" + dates, f.tokWard, 400, "invalid", "ward"},
		{"missing from", "/api/v1/projections", "/api/v1/projections?ward=" + f.ward.Code + "&to=2026-03-01", f.tokWard, 400, "invalid", "from"},
		{"bad from", "/api/v1/projections", "/api/v1/projections?ward=" + f.ward.Code + "&from=2026-02-30&to=2026-03-01", f.tokWard, 400, "invalid", "from"},
		{"missing to", "/api/v1/projections", "/api/v1/projections?ward=" + f.ward.Code + "&from=2026-03-01", f.tokWard, 400, "invalid", "to"},
		{"to before from", "/api/v1/projections", "/api/v1/projections?ward=" + f.ward.Code + "&from=2026-03-02&to=2026-03-01", f.tokWard, 400, "invalid", "to"},
		{"range too long", "/api/v1/projections", "/api/v1/projections?ward=" + f.ward.Code + "&from=2024-01-01&to=2026-03-01", f.tokWard, 400, "invalid", "to"},
		{"bad format", "/api/v1/projections", "/api/v1/projections?ward=" + f.ward.Code + dates + "&format=xml", f.tokWard, 400, "invalid", "format"},
		{"ward twice", "/api/v1/projections", "/api/v1/projections?ward=" + f.ward.Code + "&ward=w-other" + dates, f.tokWard, 400, "invalid", "ward"},
		{"no token", "/api/v1/projections", "/api/v1/projections?ward=" + f.ward.Code + dates, "", 401, "unauthorized", ""},
		{"forged token", "/api/v1/projections", "/api/v1/projections?ward=" + f.ward.Code + dates, forgedSecret, 401, "unauthorized", ""},
		{"other ward's token", "/api/v1/projections", "/api/v1/projections?ward=" + f.ward.Code + dates, f.tokOther, 403, "forbidden", "ward"},
		// The ward is checked before the dates: a token learns nothing else.
		{"other ward's token, bad dates", "/api/v1/projections", "/api/v1/projections?ward=" + f.ward.Code + "&from=x", f.tokOther, 403, "forbidden", "ward"},
		{"unknown ward", "/api/v1/projections", "/api/v1/projections?ward=no-such" + dates, f.tokWard, 404, "not_found", "ward"},
		{"document", "/api/v1/openapi.json", "/api/v1/openapi.json", "", 200, "", ""},
	} {
		t.Run(tc.name, func(t *testing.T) {
			res, body := f.response(t, tc.target, tc.token)
			if res.StatusCode != tc.status {
				t.Fatalf("status %d, want %d\n%s", res.StatusCode, tc.status, body)
			}
			if ctype := res.Header.Get("Content-Type"); !strings.HasPrefix(ctype, "application/json") {
				t.Errorf("Content-Type %q", ctype)
			}
			if err := validateResponse(t, doc, tc.path, tc.target, res, body); err != nil {
				t.Errorf("does not conform: %v", err)
			}
			v := decodeJSON(t, body)
			if tc.status == 200 {
				return
			}
			e := v.(map[string]any)["error"].(map[string]any)
			if e["code"] != tc.code || (e["field"] != nil && e["field"] != tc.field) || (tc.field != "" && e["field"] != tc.field) {
				t.Errorf("error %v, want code %s field %q", e, tc.code, tc.field)
			}
		})
	}
}
