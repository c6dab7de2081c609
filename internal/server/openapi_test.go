package server

import (
	"bytes"
	"encoding/json"
	"fmt"
	"regexp"
	"slices"
	"sort"
	"strings"
	"testing"
	"time"
)

// This file holds a small validator for the subset of OpenAPI 3.0 schema
// keywords openapi.json uses: $ref (local), type, nullable, required,
// properties, additionalProperties (false or a schema), items, enum,
// pattern and format date / date-time. Anything else in a schema fails
// the check, so the document cannot drift past what is validated.

// openAPI is the parsed document.
type openAPI map[string]any

func loadOpenAPI(t *testing.T) openAPI {
	t.Helper()
	var doc openAPI
	if err := json.Unmarshal(openAPIDoc, &doc); err != nil {
		t.Fatalf("openapi.json: %v", err)
	}
	return doc
}

// at follows a local JSON pointer such as "#/components/schemas/Error".
func (doc openAPI) at(ref string) (any, error) {
	if !strings.HasPrefix(ref, "#/") {
		return nil, fmt.Errorf("non-local $ref %q", ref)
	}
	var cur any = map[string]any(doc)
	for _, part := range strings.Split(ref[2:], "/") {
		m, ok := cur.(map[string]any)
		if !ok {
			return nil, fmt.Errorf("$ref %q: %q is not in an object", ref, part)
		}
		if cur, ok = m[part]; !ok {
			return nil, fmt.Errorf("$ref %q: no %q", ref, part)
		}
	}
	return cur, nil
}

// deref resolves v while it is a {"$ref": ...} object.
func (doc openAPI) deref(v any) (map[string]any, error) {
	for range 10 {
		m, ok := v.(map[string]any)
		if !ok {
			return nil, fmt.Errorf("not an object: %v", v)
		}
		ref, ok := m["$ref"].(string)
		if !ok {
			return m, nil
		}
		var err error
		if v, err = doc.at(ref); err != nil {
			return nil, err
		}
	}
	return nil, fmt.Errorf("$ref chain too long")
}

// responseSchema returns the schema of the response of method path with
// status and media type, failing if the document does not declare it.
func (doc openAPI) responseSchema(method, path string, status int, media string) (map[string]any, error) {
	// Paths are looked up directly: in a JSON pointer their "/" would
	// need escaping.
	paths, _ := doc["paths"].(map[string]any)
	item, ok := paths[path].(map[string]any)
	if !ok {
		return nil, fmt.Errorf("path %s is not in the document", path)
	}
	op, ok := item[strings.ToLower(method)].(map[string]any)
	if !ok {
		return nil, fmt.Errorf("%s %s is not in the document", method, path)
	}
	responses, _ := op["responses"].(map[string]any)
	res, ok := responses[fmt.Sprint(status)]
	if !ok {
		return nil, fmt.Errorf("%s %s: status %d is not documented", method, path, status)
	}
	r, err := doc.deref(res)
	if err != nil {
		return nil, err
	}
	content, _ := r["content"].(map[string]any)
	mt, ok := content[media].(map[string]any)
	if !ok {
		return nil, fmt.Errorf("%s %s %d: media type %s is not documented", method, path, status, media)
	}
	return doc.deref(mt["schema"])
}

var (
	dateRE     = regexp.MustCompile(`^\d{4}-\d{2}-\d{2}$`)
	schemaKeys = []string{"$ref", "type", "nullable", "required", "properties", "additionalProperties", "items",
		"enum", "pattern", "format", "description", "default"}
)

// validate checks v (decoded with UseNumber) against schema and returns
// every violation, each prefixed with its location in v.
func (doc openAPI) validate(schema any, v any, where string) []string {
	s, err := doc.deref(schema)
	if err != nil {
		return []string{where + ": " + err.Error()}
	}
	var errs []string
	fail := func(format string, args ...any) { errs = append(errs, where+": "+fmt.Sprintf(format, args...)) }
	for k := range s {
		if !slices.Contains(schemaKeys, k) {
			fail("schema keyword %q is not supported by this validator", k)
		}
	}
	if v == nil {
		if s["nullable"] != true {
			fail("null where the schema does not allow it")
		}
		return errs
	}
	switch typ, _ := s["type"].(string); typ {
	case "object":
		obj, ok := v.(map[string]any)
		if !ok {
			fail("want an object, got %T", v)
			return errs
		}
		props, _ := s["properties"].(map[string]any)
		req, _ := s["required"].([]any)
		for _, r := range req {
			if _, ok := obj[r.(string)]; !ok {
				fail("missing required property %q", r)
			}
		}
		keys := make([]string, 0, len(obj))
		for k := range obj {
			keys = append(keys, k)
		}
		sort.Strings(keys)
		for _, k := range keys {
			if ps, ok := props[k]; ok {
				errs = append(errs, doc.validate(ps, obj[k], where+"."+k)...)
				continue
			}
			switch ap := s["additionalProperties"].(type) {
			case bool:
				if !ap {
					fail("property %q is not allowed", k)
				}
			case map[string]any:
				errs = append(errs, doc.validate(ap, obj[k], where+"."+k)...)
			}
		}
	case "array":
		arr, ok := v.([]any)
		if !ok {
			fail("want an array, got %T", v)
			return errs
		}
		for i, item := range arr {
			errs = append(errs, doc.validate(s["items"], item, fmt.Sprintf("%s[%d]", where, i))...)
		}
	case "string":
		str, ok := v.(string)
		if !ok {
			fail("want a string, got %T", v)
			return errs
		}
		switch f := s["format"]; f {
		case nil:
		case "date":
			if _, err := time.Parse("2006-01-02", str); err != nil || !dateRE.MatchString(str) {
				fail("%q is not a date", str)
			}
		case "date-time":
			if _, err := time.Parse(time.RFC3339, str); err != nil {
				fail("%q is not an RFC 3339 date-time", str)
			}
		default:
			fail("format %v is not supported by this validator", f)
		}
		if p, ok := s["pattern"].(string); ok && !regexp.MustCompile(p).MatchString(str) {
			fail("%q does not match %s", str, p)
		}
	case "integer", "number":
		n, ok := v.(json.Number)
		if !ok {
			fail("want a %s, got %T", typ, v)
			return errs
		}
		if _, err := n.Float64(); err != nil {
			fail("%s is not a number", n)
		}
		if typ == "integer" && strings.ContainsAny(n.String(), ".eE") {
			fail("%s is not an integer", n)
		}
	case "boolean":
		if _, ok := v.(bool); !ok {
			fail("want a boolean, got %T", v)
		}
	default:
		fail("schema without a supported type: %v", s["type"])
	}
	if enum, ok := s["enum"].([]any); ok && !slices.ContainsFunc(enum, func(e any) bool { return fmt.Sprint(e) == fmt.Sprint(v) }) {
		fail("%v is not one of %v", v, enum)
	}
	return errs
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

// TestOpenAPIValidatorRejects makes sure the validator can fail: each
// document below breaks one rule the API's schemas rely on.
func TestOpenAPIValidatorRejects(t *testing.T) {
	doc := loadOpenAPI(t)
	row, err := doc.at("#/components/schemas/ProjectionRow")
	if err != nil {
		t.Fatal(err)
	}
	good := `{"ward":"w","date":"2026-03-01","shift":"Night","start":"2026-03-01T19:30:00Z","end":"2026-03-02T07:30:00Z",
		"shift_hours":12.00,"census_revision":1,"census_total":3,"census":{"t1":3},"cover_level":0.9,
		"data_sufficient":true,"insufficient":null,"expected_nurse_hours":1.00,"band_level":0.9,"band_method":"predictive_equal_tailed",
		"band_low_nurse_hours":0.50,"band_high_nurse_hours":1.50,"nurses_at_cover":1,
		"ratio_floor_nurses":null,"ratio_floor_rule":"none","recommended_nurses":1,"decided_by":"cover",
		"care_giving_nurses":1,"shortfall_method":"simulated_predictive","shortfall_simulated_share":0,
		"shortfall_wilson95_low":0,"shortfall_wilson95_high":0.001917,"shortfall_text":"< 0.19%",
		"method_version":"m1","generated_at":"2026-03-01T19:00:00+01:00","caution":"c"}`
	if errs := doc.validate(row, decodeJSON(t, []byte(good)), "row"); len(errs) > 0 {
		t.Fatalf("valid row rejected: %v", errs)
	}
	for name, bad := range map[string]string{
		"missing required":  strings.Replace(good, `"caution":"c"`, `"x_caution":"c"`, 1),
		"extra property":    strings.Replace(good, `"caution":"c"`, `"caution":"c","patient":"x"`, 1),
		"integer with .":    strings.Replace(good, `"census_total":3`, `"census_total":3.0`, 1),
		"string for number": strings.Replace(good, `"shift_hours":12.00`, `"shift_hours":"12.00"`, 1),
		"bad enum":          strings.Replace(good, `"decided_by":"cover"`, `"decided_by":"law"`, 1),
		"bad date":          strings.Replace(good, `"date":"2026-03-01"`, `"date":"2026-02-30"`, 1),
		"bad date-time":     strings.Replace(good, `"start":"2026-03-01T19:30:00Z"`, `"start":"2026-03-01 19:30"`, 1),
		"null not nullable": strings.Replace(good, `"decided_by":"cover"`, `"decided_by":null`, 1),
		"bool as string":    strings.Replace(good, `"data_sufficient":true`, `"data_sufficient":"true"`, 1),
		"bad band method":   strings.Replace(good, `"band_method":"predictive_equal_tailed"`, `"band_method":"guess"`, 1),
		"census not int":    strings.Replace(good, `"census":{"t1":3}`, `"census":{"t1":"3"}`, 1),
	} {
		if errs := doc.validate(row, decodeJSON(t, []byte(bad)), "row"); len(errs) == 0 {
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
	paths, _ := doc["paths"].(map[string]any)
	for p, item := range paths {
		for m := range item.(map[string]any) {
			fromDoc = append(fromDoc, strings.ToUpper(m)+" "+p)
		}
	}
	sort.Strings(fromTable)
	sort.Strings(fromDoc)
	if !slices.Equal(fromTable, fromDoc) {
		t.Errorf("route table API routes %q\nOpenAPI paths           %q", fromTable, fromDoc)
	}
	if doc["openapi"] != "3.0.3" {
		t.Errorf("openapi = %v", doc["openapi"])
	}
	if _, err := doc.at("#/components/securitySchemes/bearer"); err != nil {
		t.Error(err)
	}
}
