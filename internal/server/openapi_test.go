package server

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"net/http"
	"net/http/httptest"
	"slices"
	"sort"
	"strings"
	"testing"

	"github.com/getkin/kin-openapi/openapi3"
	"github.com/getkin/kin-openapi/openapi3filter"
	"github.com/getkin/kin-openapi/routers"
)

// loadOpenAPI parses openapi.json with kin-openapi and fails unless the
// library finds it a valid OpenAPI 3.0 document.
func loadOpenAPI(t *testing.T) *openapi3.T {
	t.Helper()
	loader := openapi3.NewLoader()
	doc, err := loader.LoadFromData(openAPIDoc)
	if err != nil {
		t.Fatalf("openapi.json: %v", err)
	}
	if err := doc.Validate(loader.Context, openapi3.EnableSchemaFormatValidation(), openapi3.EnableSchemaPatternValidation()); err != nil {
		t.Fatalf("openapi.json is not a valid OpenAPI document: %v", err)
	}
	return doc
}

// errorSchemaRef is the one schema every error response uses.
const errorSchemaRef = "#/components/schemas/Error"

// TestOpenAPILint holds the document to rules beyond validity: every
// operation is named and summarised; every response is JSON with a
// schema; every error status uses the Error schema; an operation behind
// the bearer token documents 401 and every operation but the public
// document documents 500; and every schema is complete (a type, and for
// objects required properties and additionalProperties stated, so a
// client generator knows the whole shape).
func TestOpenAPILint(t *testing.T) {
	doc := loadOpenAPI(t)
	for path, item := range doc.Paths.Map() {
		for method, op := range item.Operations() {
			where := method + " " + path
			if op.OperationID == "" || op.Summary == "" {
				t.Errorf("%s: operationId and summary are required", where)
			}
			secured := len(doc.Security) > 0
			if op.Security != nil {
				secured = len(*op.Security) > 0
			}
			var statuses []string
			for status, r := range op.Responses.Map() {
				statuses = append(statuses, status)
				mt := r.Value.Content.Get("application/json")
				if mt == nil || mt.Schema == nil {
					t.Errorf("%s %s: no application/json schema", where, status)
					continue
				}
				if status[0] >= '4' && mt.Schema.Ref != errorSchemaRef {
					t.Errorf("%s %s: error responses must use %s, not %q", where, status, errorSchemaRef, mt.Schema.Ref)
				}
			}
			if secured && !slices.Contains(statuses, "401") {
				t.Errorf("%s: behind the token but no 401 response", where)
			}
			if secured && !slices.Contains(statuses, "500") {
				t.Errorf("%s: no 500 response", where)
			}
		}
	}
	for name, s := range doc.Components.Schemas {
		lintSchema(t, "#/components/schemas/"+name, s)
	}
}

// lintSchema checks s and the schemas inside it for completeness.
func lintSchema(t *testing.T, where string, s *openapi3.SchemaRef) {
	t.Helper()
	if s.Ref != "" {
		return // checked where it is defined
	}
	v := s.Value
	if v.Type == nil || len(*v.Type) != 1 {
		t.Errorf("%s: want exactly one type, got %v", where, v.Type)
		return
	}
	switch {
	case v.Type.Is("object"):
		if v.AdditionalProperties.Has == nil && v.AdditionalProperties.Schema == nil {
			t.Errorf("%s: additionalProperties must be stated (false, or a schema for a map)", where)
		}
		if len(v.Properties) > 0 && len(v.Required) == 0 {
			t.Errorf("%s: properties but none required", where)
		}
		for _, r := range v.Required {
			if _, ok := v.Properties[r]; !ok {
				t.Errorf("%s: required %q is not a property", where, r)
			}
		}
		for name, p := range v.Properties {
			lintSchema(t, where+"/properties/"+name, p)
		}
		if v.AdditionalProperties.Schema != nil {
			lintSchema(t, where+"/additionalProperties", v.AdditionalProperties.Schema)
		}
	case v.Type.Is("array"):
		if v.Items == nil {
			t.Errorf("%s: an array without items", where)
			return
		}
		lintSchema(t, where+"/items", v.Items)
	}
}

// decodeJSON decodes body keeping numbers as written.
func decodeJSON(t *testing.T, body []byte) any {
	t.Helper()
	dec := json.NewDecoder(bytes.NewReader(body))
	dec.UseNumber()
	var v any
	if err := dec.Decode(&v); err != nil {
		t.Fatalf("body is not JSON: %v\n%s", err, body)
	}
	return v
}

// validateResponse checks a response to GET target against the operation
// of path (the route pattern) with kin-openapi's openapi3filter: the
// status must be documented, and the media type and body must match it.
func validateResponse(t *testing.T, doc *openapi3.T, path, target string, res *http.Response, body []byte) error {
	t.Helper()
	item := doc.Paths.Value(path)
	if item == nil || item.Get == nil {
		return fmt.Errorf("GET %s is not in the document", path)
	}
	req := httptest.NewRequest("GET", target, nil)
	in := &openapi3filter.ResponseValidationInput{
		RequestValidationInput: &openapi3filter.RequestValidationInput{
			Request: req,
			Route:   &routers.Route{Spec: doc, Path: path, PathItem: item, Method: "GET", Operation: item.Get},
		},
		Status:  res.StatusCode,
		Header:  res.Header,
		Body:    io.NopCloser(bytes.NewReader(body)),
		Options: &openapi3filter.Options{IncludeResponseStatus: true, MultiError: true},
	}
	return openapi3filter.ValidateResponse(context.Background(), in)
}

// TestOpenAPIValidatorRejects makes sure the library's validation can fail
// on the rules the API's schemas rely on: each row below breaks one.
// (A whole number written as 3.0 is an integer to JSON Schema, so it is
// not among them; the API writes integers with encoding/json.)
func TestOpenAPIValidatorRejects(t *testing.T) {
	doc := loadOpenAPI(t)
	row := doc.Components.Schemas["ProjectionRow"]
	if row == nil {
		t.Fatal("no ProjectionRow schema")
	}
	good := `{"ward":"w","date":"2026-03-01","shift":"Night","start":"2026-03-01T19:30:00Z","end":"2026-03-02T07:30:00Z",
		"shift_hours":12.00,"census_revision":1,"census_total":3,"census":{"t1":3},"cover_level":0.9,
		"data_sufficient":true,"insufficient":null,"expected_nurse_hours":1.00,"band_level":0.9,"band_method":"predictive_equal_tailed",
		"band_low_nurse_hours":0.50,"band_high_nurse_hours":1.50,"nurses_at_cover":1,
		"ratio_floor_nurses":null,"ratio_floor_rule":"none","recommended_nurses":1,"decided_by":"cover",
		"care_giving_nurses":1,"shortfall_method":"simulated_predictive","shortfall_simulated_share":0,
		"shortfall_wilson95_low":0,"shortfall_wilson95_high":0.001917,"shortfall_text":"< 0.19%",
		"movement_modelled":true,"expected_admissions":1.25,"expected_discharges":0.50,"planned_admissions":2,"planned_discharges":null,
		"movement_nurse_hours":1.10,"band_low_without_movement_nurse_hours":0.40,"band_high_without_movement_nurse_hours":1.20,
		"actual_record_revision":2,"actual_nurses":5,"actual_support_staff":null,"actual_admissions":1,"actual_discharges":0,
		"care_left_undone":true,"care_left_undone_category":"hygiene",
		"method_version":"m1","generated_at":"2026-03-01T19:00:00+01:00","caution":"c"}`
	if err := row.Value.VisitJSON(decodeJSON(t, []byte(good)), openapi3.MultiErrors()); err != nil {
		t.Fatalf("valid row rejected: %v", err)
	}
	for name, bad := range map[string]string{
		"missing required":  strings.Replace(good, `"caution":"c"`, `"x_caution":"c"`, 1),
		"extra property":    strings.Replace(good, `"caution":"c"`, `"caution":"c","patient":"x"`, 1),
		"fraction for int":  strings.Replace(good, `"census_total":3`, `"census_total":3.5`, 1),
		"string for number": strings.Replace(good, `"shift_hours":12.00`, `"shift_hours":"12.00"`, 1),
		"bad enum":          strings.Replace(good, `"decided_by":"cover"`, `"decided_by":"law"`, 1),
		"bad date":          strings.Replace(good, `"date":"2026-03-01"`, `"date":"2026-02-30"`, 1),
		"bad date-time":     strings.Replace(good, `"start":"2026-03-01T19:30:00Z"`, `"start":"2026-03-01 19:30"`, 1),
		"null not nullable": strings.Replace(good, `"decided_by":"cover"`, `"decided_by":null`, 1),
		"bool as string":    strings.Replace(good, `"data_sufficient":true`, `"data_sufficient":"true"`, 1),
		"bad band method":   strings.Replace(good, `"band_method":"predictive_equal_tailed"`, `"band_method":"guess"`, 1),
		"census not int":    strings.Replace(good, `"census":{"t1":3}`, `"census":{"t1":"3"}`, 1),
		// The end-of-shift record's columns: a category outside the fixed
		// list (free text could hold patient details), negative counts.
		"free-text category": strings.Replace(good, `"care_left_undone_category":"hygiene"`, `"care_left_undone_category":"bed 4 fell"`, 1),
		"negative actual":    strings.Replace(good, `"actual_nurses":5`, `"actual_nurses":-1`, 1),
		"undone as string":   strings.Replace(good, `"care_left_undone":true`, `"care_left_undone":"yes"`, 1),
		// Movement: planned counts are whole and not negative.
		"negative planned":   strings.Replace(good, `"planned_admissions":2`, `"planned_admissions":-2`, 1),
		"fraction planned":   strings.Replace(good, `"planned_admissions":2`, `"planned_admissions":1.5`, 1),
		"modelled as string": strings.Replace(good, `"movement_modelled":true`, `"movement_modelled":"yes"`, 1),
	} {
		if err := row.Value.VisitJSON(decodeJSON(t, []byte(bad))); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
}

// TestOpenAPIListsExactlyTheAPIRoutes: every /api/ route of the table is a
// path and method of the document, and the document has no others.
func TestOpenAPIListsExactlyTheAPIRoutes(t *testing.T) {
	doc := loadOpenAPI(t)
	s, _ := MustNew(t, MustOpenSQLite(t))
	var fromTable, fromDoc []string
	for _, rt := range s.Routes() {
		if strings.HasPrefix(rt.Pattern, "/api/") {
			fromTable = append(fromTable, rt.Method+" "+rt.Pattern)
			if rt.Access.API == (rt.Pattern == "/api/v1/openapi.json") {
				t.Errorf("%s: only the document itself may be public among API routes", rt.Pattern)
			}
		}
	}
	for p, item := range doc.Paths.Map() {
		for m := range item.Operations() {
			fromDoc = append(fromDoc, strings.ToUpper(m)+" "+p)
		}
	}
	sort.Strings(fromTable)
	sort.Strings(fromDoc)
	if !slices.Equal(fromTable, fromDoc) {
		t.Errorf("route table API routes %q\nOpenAPI paths           %q", fromTable, fromDoc)
	}
	if doc.OpenAPI != "3.0.3" {
		t.Errorf("openapi = %v", doc.OpenAPI)
	}
	if doc.Components.SecuritySchemes["bearer"] == nil {
		t.Error("no bearer security scheme")
	}
}
