package export

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
	"strings"

	"wardload/internal/stats"
	"wardload/internal/wardload"
)

// Columns returns the CSV header for tiers: the fixed columns with one
// "census_<code>" column per tier after census_total.
func Columns(tiers []*wardload.Tier) []string {
	cols := []string{"ward", "date", "shift", "start", "end", "shift_hours", "census_revision", "census_total"}
	for _, t := range tiers {
		cols = append(cols, "census_"+t.Code)
	}
	return append(cols, "cover_level", "expected_nurse_hours", "band_low_nurse_hours", "band_high_nurse_hours",
		"nurses_at_cover", "ratio_floor_nurses", "ratio_floor_rule", "recommended_nurses", "decided_by",
		"method_version", "generated_at", "caution")
}

// fields returns the row's values as the export writes them, in Columns
// order: hours with FormatHours, levels with FormatLevel, instants with
// FormatTime, a missing floor as "", and every free-text cell through
// TextCell. Number cells are never changed, so "-0.50" stays a number.
func (r *Row) fields() []string {
	f := []string{TextCell(r.Ward), r.Date.String(), TextCell(r.Shift), FormatTime(r.Start), FormatTime(r.End), FormatHours(r.ShiftHours),
		strconv.Itoa(r.CensusRevision), strconv.Itoa(r.TotalPatients)}
	for _, n := range r.Census {
		f = append(f, strconv.Itoa(n))
	}
	floor := ""
	if r.Floor != nil {
		floor = strconv.Itoa(*r.Floor)
	}
	return append(f, FormatLevel(r.CoverLevel), FormatHours(r.ExpectedNurseHours), FormatHours(r.BandLowNurseHours),
		FormatHours(r.BandHighNurseHours), strconv.Itoa(r.NursesCover), floor, TextCell(r.FloorRule), strconv.Itoa(r.Recommended),
		TextCell(r.DecidedBy), TextCell(r.MethodVersion), FormatTime(r.GeneratedAt), TextCell(r.Caution))
}

// TextCell neutralises a free-text CSV cell that a spreadsheet would read
// as a formula (CSV or formula injection): a cell starting with '=', '+',
// '-', '@', a tab, a carriage return, a line feed or NUL gets a leading
// single quote, which spreadsheets show as text and do not evaluate. This
// is the mitigation of the OWASP "CSV Injection" page
// (owasp.org/www-community/attacks/CSV_Injection: = + - @ tab CR) and of
// OWASP ASVS 5.0 requirement 1.2.10 (= + - @ tab NUL); LF is added
// because it is as invisible as CR. RFC 4180 quoting is encoding/csv's.
// A shift name is free text a manager types (e.g. "=cmd|' /C calc'!A0"
// passes ShiftPattern.Validate), so the export cannot rely on validation.
//
// Only the CSV is changed; the JSON export carries the text as stored,
// since JSON is not opened by spreadsheets as formulas. Number, date and
// time cells never pass through here: a negative number must stay a
// number.
func TextCell(s string) string {
	if s != "" && strings.IndexByte("=+-@\t\r\n\x00", s[0]) >= 0 {
		return "'" + s
	}
	return s
}

// WriteCSV writes a header row and one record per row, per RFC 4180
// (encoding/csv with CRLF line ends). It returns an error if a row's census
// does not have one count per tier, or the writer fails.
func WriteCSV(w io.Writer, tiers []*wardload.Tier, rows []Row) error {
	cw := csv.NewWriter(w)
	cw.UseCRLF = true
	if err := cw.Write(Columns(tiers)); err != nil {
		return err
	}
	for i := range rows {
		if err := checkCensus(&rows[i], tiers); err != nil {
			return err
		}
		if err := cw.Write(rows[i].fields()); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// WriteJSON writes one JSON object:
//
//	{"ward": code, "from": date, "to": date, "caution": text,
//	 "tiers": [{"code", "label"}...], "rows": [{column: value}...]}
//
// Each row object has the CSV columns as keys, in the same order, except
// that the census_<code> columns are gathered into one "census" object
// (keys in tier order). Numbers are JSON numbers with exactly the CSV's
// digits; a missing floor is null. The object ends with a newline.
//
// The object is built whole and checked before anything reaches w; when w
// is a *bytes.Buffer it is built in place (no second copy), and on failure
// the buffer is cut back to its length on entry.
func WriteJSON(w io.Writer, ward *wardload.Ward, from, to wardload.Date, tiers []*wardload.Tier, rows []Row) error {
	b, inPlace := w.(*bytes.Buffer)
	if !inPlace {
		b = new(bytes.Buffer)
	}
	start := b.Len()
	if err := buildJSON(b, ward, from, to, tiers, rows); err != nil {
		b.Truncate(start)
		return err
	}
	if !json.Valid(b.Bytes()[start:]) {
		b.Truncate(start)
		return fmt.Errorf("export: built invalid JSON")
	}
	if inPlace {
		return nil
	}
	_, err := w.Write(b.Bytes())
	return err
}

// buildJSON appends WriteJSON's object to b.
func buildJSON(b *bytes.Buffer, ward *wardload.Ward, from, to wardload.Date, tiers []*wardload.Tier, rows []Row) error {
	b.WriteString("{")
	key(b, "ward", ward.Code)
	b.WriteString(",")
	key(b, "from", from.String())
	b.WriteString(",")
	key(b, "to", to.String())
	b.WriteString(",")
	key(b, "caution", stats.Caution)
	b.WriteString(`,"tiers":[`)
	for i, t := range tiers {
		if i > 0 {
			b.WriteString(",")
		}
		b.WriteString("{")
		key(b, "code", t.Code)
		b.WriteString(",")
		key(b, "label", t.Label)
		b.WriteString("}")
	}
	b.WriteString(`],"rows":[`)
	for i := range rows {
		r := &rows[i]
		if err := checkCensus(r, tiers); err != nil {
			return err
		}
		if i > 0 {
			b.WriteString(",")
		}
		b.WriteString("\n{")
		floor := json.RawMessage("null")
		if r.Floor != nil {
			floor = json.RawMessage(strconv.Itoa(*r.Floor))
		}
		census := &bytes.Buffer{}
		census.WriteString("{")
		for k, t := range tiers {
			if k > 0 {
				census.WriteString(",")
			}
			key(census, t.Code, json.RawMessage(strconv.Itoa(r.Census[k])))
		}
		census.WriteString("}")
		for k, kv := range []struct {
			k string
			v any
		}{
			{"ward", r.Ward}, {"date", r.Date.String()}, {"shift", r.Shift},
			{"start", FormatTime(r.Start)}, {"end", FormatTime(r.End)},
			{"shift_hours", json.RawMessage(FormatHours(r.ShiftHours))},
			{"census_revision", r.CensusRevision}, {"census_total", r.TotalPatients},
			{"census", json.RawMessage(census.Bytes())},
			{"cover_level", json.RawMessage(FormatLevel(r.CoverLevel))},
			{"expected_nurse_hours", json.RawMessage(FormatHours(r.ExpectedNurseHours))},
			{"band_low_nurse_hours", json.RawMessage(FormatHours(r.BandLowNurseHours))},
			{"band_high_nurse_hours", json.RawMessage(FormatHours(r.BandHighNurseHours))},
			{"nurses_at_cover", r.NursesCover}, {"ratio_floor_nurses", floor}, {"ratio_floor_rule", r.FloorRule},
			{"recommended_nurses", r.Recommended}, {"decided_by", r.DecidedBy},
			{"method_version", r.MethodVersion}, {"generated_at", FormatTime(r.GeneratedAt)}, {"caution", r.Caution},
		} {
			if k > 0 {
				b.WriteString(",")
			}
			key(b, kv.k, kv.v)
		}
		b.WriteString("}")
	}
	b.WriteString("\n]}\n")
	return nil
}

// key writes "k":v with v JSON-encoded (a json.RawMessage as it is).
// Encoding strings and small integers cannot fail.
func key(b *bytes.Buffer, k string, v any) {
	kb, _ := json.Marshal(k)
	vb, _ := json.Marshal(v)
	b.Write(kb)
	b.WriteString(":")
	b.Write(vb)
}

func checkCensus(r *Row, tiers []*wardload.Tier) error {
	if len(r.Census) != len(tiers) {
		return fmt.Errorf("export: row %s %s has %d tier counts for %d tiers", r.Date, r.Shift, len(r.Census), len(tiers))
	}
	return nil
}
