package export_test

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"testing"
	"time"

	"wardload/internal/export"
	"wardload/internal/wardload"
)

// Formula injection: OWASP "CSV Injection"
// (owasp.org/www-community/attacks/CSV_Injection) lists = + - @ tab CR as
// leading characters a spreadsheet may evaluate; OWASP ASVS 5.0 1.2.10
// adds NUL. The payloads are the usual proofs of concept.
func TestTextCell(t *testing.T) {
	for in, want := range map[string]string{
		"=cmd|' /C calc'!A0":                  "'=cmd|' /C calc'!A0",
		"+1+2":                                "'+1+2",
		"-2+3":                                "'-2+3",
		"@SUM(A1:A9)":                         "'@SUM(A1:A9)",
		"\t=1":                                "'\t=1",
		"\r=1":                                "'\r=1",
		"\n=1":                                "'\n=1",
		"\x00=1":                              "'\x00=1",
		"=HYPERLINK(\"http://example.test\")": "'=HYPERLINK(\"http://example.test\")",
		"Day":                                 "Day",
		"Night =1":                            "Night =1", // only the first character counts
		// A trigger after leading spaces or separators (OWASP CSV
		// Injection: separators and quotes can start a new cell), and the
		// full-width forms U+FF1D U+FF0B U+FF0D U+FF20.
		" =1+1":           "' =1+1",
		"   @SUM(A1)":     "'   @SUM(A1)",
		";=1+1":           "';=1+1",
		",=1+1":           "',=1+1",
		"\"=1+1":          "'\"=1+1",
		"; ;+1":           "'; ;+1",
		"\u00a0=1+1":      "'\u00a0=1+1", // no-break space
		"\u3000=1+1":      "'\u3000=1+1", // ideographic space
		"\uff1b\uff1d1+1": "'\uff1b\uff1d1+1",
		"\uff1d1+1":       "'\uff1d1+1", // ＝1+1
		"\uff0b1+1":       "'\uff0b1+1", // ＋1+1
		"\uff0d1+1":       "'\uff0d1+1", // －1+1
		"\uff20SUM(A1)":   "'\uff20SUM(A1)",
		" ;Day":           " ;Day", // separators before ordinary text
		"Day \uff1d1":     "Day \uff1d1",
		"   ":             "   ",
		"\xff=1":          "\xff=1", // invalid UTF-8 is text, not a separator
		"'=1":             "'=1",    // already text; not quoted twice
		"":                "",
	} {
		if got := export.TextCell(in); got != want {
			t.Errorf("TextCell(%q) = %q, want %q", in, got, want)
		}
	}
}

// A shift name is free text. ShiftPattern.Validate now refuses one that
// does not begin with a letter or digit, but a database may hold names
// stored before that rule (e.g. "=cmd|…"). The CSV must carry them as
// text, while number cells keep their sign: a negative band limit is
// still a number.
func TestWriteCSVNeutralisesFormulas(t *testing.T) {
	sp := &wardload.ShiftPattern{WardID: 1, Name: "=cmd|' /C calc'!A0", StartMinute: 420, NominalHours: 12}
	if err := sp.Validate(); wardload.ErrorCode(err) != wardload.EINVALID {
		t.Errorf("shift name %q passes Validate (%v); names must begin with a letter or digit", sp.Name, err)
	}
	tiers := []*wardload.Tier{{ID: 1, Code: "t1", Label: "=1+1"}}
	floor, cover, rec := 3, 1, 3
	expected, low, high := 1.5, -0.5, 3.5
	at := time.Date(2026, 3, 28, 7, 30, 0, 0, time.UTC)
	rows := []export.Row{{
		Ward: "w1", Date: wardload.Date{Year: 2026, Month: 3, Day: 28}, Shift: sp.Name,
		Start: at, End: at.Add(12 * time.Hour), ShiftHours: 12, CensusRevision: 1, TotalPatients: 2,
		Census: []int{2}, CoverLevel: 0.9, DataSufficient: true, ExpectedNurseHours: &expected, BandLowNurseHours: &low, BandHighNurseHours: &high,
		NursesCover: &cover, Floor: &floor, FloorRule: "-1 nurse", Recommended: &rec, DecidedBy: "@floor", BandMethod: "=band",
		Shortfall:     &export.Shortfall{Method: "+sim", Nurses: 3, CareGivingNurses: 2, Text: "-text"},
		MethodVersion: "+v", GeneratedAt: at, Caution: "\tcaution",
	}}
	var b bytes.Buffer
	if err := export.WriteCSV(&b, tiers, rows); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&b).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]string{}
	for i, c := range recs[0] {
		col[c] = recs[1][i]
	}
	for c, want := range map[string]string{
		"shift": "'=cmd|' /C calc'!A0", "ratio_floor_rule": "'-1 nurse", "decided_by": "'@floor",
		"method_version": "'+v", "caution": "'\tcaution",
		"band_method": "'=band", "shortfall_method": "'+sim", "shortfall_text": "'-text",
		// Numbers are untouched.
		"band_low_nurse_hours": "-0.50", "expected_nurse_hours": "1.50", "census_t1": "2", "ratio_floor_nurses": "3",
	} {
		if col[c] != want {
			t.Errorf("%s = %q, want %q", c, col[c], want)
		}
	}
	for c, v := range col {
		if v != "" && bytes.IndexByte([]byte("=+@\t\r\n\x00"), v[0]) >= 0 {
			t.Errorf("cell %s = %q starts with a formula character", c, v)
		}
		if v != "" && v[0] == '-' && c != "band_low_nurse_hours" {
			t.Errorf("cell %s = %q starts with '-'", c, v)
		}
	}

	// JSON is not read as formulas: it keeps the stored text.
	var j bytes.Buffer
	ward := &wardload.Ward{Code: "w1"}
	if err := export.WriteJSON(&j, ward, rows[0].Date, rows[0].Date, tiers, rows); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Rows []map[string]any `json:"rows"`
	}
	if err := json.Unmarshal(j.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	if got := doc.Rows[0]["shift"]; got != sp.Name {
		t.Errorf("JSON shift = %q, want the stored %q", got, sp.Name)
	}
}

// The OWASP variants through WriteCSV: a trigger after spaces or a
// separator, and the full-width forms, reach every free-text cell quoted.
// Number cells keep their digits and sign.
func TestWriteCSVNeutralisesOWASPVariants(t *testing.T) {
	tiers := []*wardload.Tier{{ID: 1, Code: "t1", Label: "t1"}}
	floor, rec := 3, 3
	low := -0.5
	at := time.Date(2026, 3, 28, 7, 30, 0, 0, time.UTC)
	rows := []export.Row{{
		Ward: " =1+1", Date: wardload.Date{Year: 2026, Month: 3, Day: 28}, Shift: "\uff1d1+1",
		Start: at, End: at.Add(12 * time.Hour), ShiftHours: 12, CensusRevision: 1, TotalPatients: 2,
		Census: []int{2}, CoverLevel: 0.9, DataSufficient: true, BandLowNurseHours: &low,
		Floor: &floor, FloorRule: ";=1+1", Recommended: &rec, DecidedBy: "\uff20SUM(A1)",
		MethodVersion: "\u3000\uff0b1", GeneratedAt: at, Caution: ";\uff0d1",
	}}
	var b bytes.Buffer
	if err := export.WriteCSV(&b, tiers, rows); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(bytes.NewReader(b.Bytes())).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]string{}
	for i, c := range recs[0] {
		col[c] = recs[1][i]
	}
	for c, want := range map[string]string{
		"ward": "' =1+1", "shift": "'\uff1d1+1", "ratio_floor_rule": "';=1+1",
		"decided_by": "'\uff20SUM(A1)", "method_version": "'\u3000\uff0b1", "caution": "';\uff0d1",
		"band_low_nurse_hours": "-0.50", "ratio_floor_nurses": "3",
	} {
		if col[c] != want {
			t.Errorf("%s = %q, want %q", c, col[c], want)
		}
	}

}
