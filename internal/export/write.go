package export

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
	"strings"
	"unicode"

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
	for _, c := range (&Row{}).cells() {
		cols = append(cols, c.name)
	}
	return cols
}

// cell is one column of a row after the census: its name, its CSV text
// and its JSON value (the CSV's digits; null where the CSV is empty).
type cell struct {
	name string
	csv  string
	json any
}

// text is a free-text cell: TextCell in the CSV, as stored in the JSON.
func text(name, s string) cell { return cell{name, TextCell(s), s} }

// optText is a free-text cell that is null in the JSON when empty.
func optText(name, s string) cell {
	if s == "" {
		return cell{name, "", nil}
	}
	return text(name, s)
}

// number is a cell whose CSV text is also its JSON number; "" is null.
func number(name, s string) cell {
	if s == "" {
		return cell{name, "", nil}
	}
	return cell{name, s, json.RawMessage(s)}
}

func optional[T any](v *T, format func(T) string) string {
	if v == nil {
		return ""
	}
	return format(*v)
}

// cells returns the row's columns after the census, in Columns order:
// hours with FormatHours, levels with FormatLevel, probabilities with
// FormatProbability, instants with FormatTime, a missing figure as ""
// (JSON null), and every free-text cell through TextCell. Number cells are
// never changed, so "-0.50" stays a number.
func (r *Row) cells() []cell {
	var sf Shortfall
	if r.Shortfall != nil {
		sf = *r.Shortfall
	}
	has := r.Shortfall != nil
	prob := func(v float64) string {
		if !has {
			return ""
		}
		return FormatProbability(v)
	}
	careGiving := ""
	if has {
		careGiving = strconv.Itoa(sf.CareGivingNurses)
	}
	// The end-of-shift record's columns: empty (null) without a record;
	// support staff also when the record leaves them out.
	var act [6]string
	if a := r.Actual; a != nil {
		act = [6]string{strconv.Itoa(a.Revision), optional(a.Worked.Nurses, strconv.Itoa), optional(a.Worked.Support, strconv.Itoa),
			strconv.Itoa(a.Admissions), strconv.Itoa(a.Discharges), strconv.FormatBool(a.CareLeftUndone)}
	}
	category := ""
	if r.Actual != nil {
		category = r.Actual.CareCategory
	}
	cells := []cell{
		number("cover_level", FormatLevel(r.CoverLevel)),
		number("data_sufficient", strconv.FormatBool(r.DataSufficient)),
		optText("insufficient", strings.Join(r.Insufficient, " ")),
		number("expected_nurse_hours", optional(r.ExpectedNurseHours, FormatHours)),
		number("band_level", optional(r.BandLevel, FormatLevel)),
		optText("band_method", r.BandMethod),
		number("band_low_nurse_hours", optional(r.BandLowNurseHours, FormatHours)),
		number("band_high_nurse_hours", optional(r.BandHighNurseHours, FormatHours)),
		number("nurses_at_cover", optional(r.NursesCover, strconv.Itoa)),
		number("ratio_floor_nurses", optional(r.Floor, strconv.Itoa)),
		text("ratio_floor_rule", r.FloorRule),
		number("recommended_nurses", optional(r.Recommended, strconv.Itoa)),
		text("decided_by", r.DecidedBy),
		number("care_giving_nurses", careGiving),
		optText("shortfall_method", sf.Method),
		number("shortfall_simulated_share", prob(sf.Probability)),
		number("shortfall_wilson95_low", prob(sf.WilsonLow)),
		number("shortfall_wilson95_high", prob(sf.WilsonHigh)),
		optText("shortfall_text", sf.Text),
	}
	cells = append(cells, r.movementCells()...)
	return append(cells, []cell{
		number("actual_record_revision", act[0]),
		number("actual_nurses", act[1]),
		number("actual_support_staff", act[2]),
		number("actual_admissions", act[3]),
		number("actual_discharges", act[4]),
		number("care_left_undone", act[5]),
		optText("care_left_undone_category", category),
		text("method_version", r.MethodVersion),
		{"generated_at", FormatTime(r.GeneratedAt), FormatTime(r.GeneratedAt)},
		text("caution", r.Caution),
	}...)
}

// fields returns the row's values as the CSV writes them, in Columns
// order.
func (r *Row) fields() []string {
	f := []string{TextCell(r.Ward), r.Date.String(), TextCell(r.Shift), FormatTime(r.Start), FormatTime(r.End), FormatHours(r.ShiftHours),
		strconv.Itoa(r.CensusRevision), strconv.Itoa(r.TotalPatients)}
	for _, n := range r.Census {
		f = append(f, strconv.Itoa(n))
	}
	for _, c := range r.cells() {
		f = append(f, c.csv)
	}
	return f
}

// TextCell neutralises a free-text CSV cell that a spreadsheet would read
// as a formula (CSV or formula injection) by giving it a leading single
// quote, which spreadsheets show as text and do not evaluate. A cell is
// quoted when its first character is a trigger, or when the first
// character after a run of leading spaces and separators is one:
//
//   - triggers: '=', '+', '-', '@', tab, carriage return, line feed, NUL,
//     and the full-width forms U+FF1D ＝, U+FF0B ＋, U+FF0D － and U+FF20 ＠,
//     which some spreadsheets fold to their ASCII forms on input;
//   - spaces: anything unicode.IsSpace reports (space, NBSP, U+3000...);
//   - separators: ',' and ';' (the field separators of CSV in different
//     locales), the double quote, and their full-width forms U+FF0C ，,
//     U+FF1B ； and U+FF02 ＂.
//
// A leading apostrophe is not a separator: "'=1" is already text to a
// spreadsheet and is not quoted twice.
//
// So " =1+1", ";=1+1" and "＝1+1" are quoted, while "Night =1" is not: a
// trigger after ordinary text cannot start a formula.
//
// This follows the OWASP "CSV Injection" page
// (owasp.org/www-community/attacks/CSV_Injection: = + - @ tab CR, and its
// warning that separators and quotes let a payload start a new cell
// mid-value; from memory of the page's text) and OWASP ASVS 5.0
// requirement 1.2.10 (= + - @ tab NUL); LF is added because it is as
// invisible as CR, and the full-width forms and leading spaces because
// spreadsheets have been seen to accept them in front of a formula
// (common practice, no source). RFC 4180 quoting is encoding/csv's.
// Limitation: encoding/csv does not put a field holding ';' in double
// quotes, so a spreadsheet that splits on ';' (locales with a decimal
// comma) still starts a new cell after any ';' inside a value, with or
// without the leading quote; closing that needs every text cell holding
// ';' quoted per RFC 4180, which changes the file's bytes (and the golden).
//
// A shift name is free text a manager types, and stored data may predate
// any rule on names, so the export cannot rely on validation.
//
// Only the CSV is changed; the JSON export carries the text as stored,
// since JSON is not opened by spreadsheets as formulas. Number, date and
// time cells never pass through here: a negative number must stay a
// number.
func TextCell(s string) string {
	for _, r := range s {
		switch {
		case formulaTrigger(r):
			return "'" + s
		case unicode.IsSpace(r) || cellSeparator(r):
			continue
		}
		return s
	}
	return s
}

// formulaTrigger reports whether r can start a spreadsheet formula (see
// TextCell).
func formulaTrigger(r rune) bool {
	switch r {
	case '=', '+', '-', '@', '\t', '\r', '\n', 0,
		'\uFF1D', '\uFF0B', '\uFF0D', '\uFF20':
		return true
	}
	return false
}

// cellSeparator reports whether r is a field separator or quote that may
// stand before a formula trigger (see TextCell).
func cellSeparator(r rune) bool {
	switch r {
	case ',', ';', '"', '\uFF0C', '\uFF1B', '\uFF02':
		return true
	}
	return false
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
// digits; a figure the CSV leaves empty (no floor, no recommendation, a
// declined projection's care-time figures) is null, and data_sufficient
// is a boolean. The object ends with a newline.
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

// buildJSON appends WriteJSON's object to b. Every key and value goes
// through encoding/json (key); only the object's frame is written here.
// It stays hand-framed rather than a struct for json.Marshal because its
// bytes (pinned by projections.json.golden) cannot be had from types: each
// row starts on a new line, which json.Marshal compacts away even inside
// a json.RawMessage, and a row's keys are the CSV columns in their order,
// including one census key per tier code, which a struct cannot name.
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
		census := &bytes.Buffer{}
		census.WriteString("{")
		for k, t := range tiers {
			if k > 0 {
				census.WriteString(",")
			}
			key(census, t.Code, json.RawMessage(strconv.Itoa(r.Census[k])))
		}
		census.WriteString("}")
		head := []cell{
			{"ward", "", r.Ward}, {"date", "", r.Date.String()}, {"shift", "", r.Shift},
			{"start", "", FormatTime(r.Start)}, {"end", "", FormatTime(r.End)},
			{"shift_hours", "", json.RawMessage(FormatHours(r.ShiftHours))},
			{"census_revision", "", r.CensusRevision}, {"census_total", "", r.TotalPatients},
			{"census", "", json.RawMessage(census.Bytes())},
		}
		for k, c := range append(head, r.cells()...) {
			if k > 0 {
				b.WriteString(",")
			}
			key(b, c.name, c.json)
		}
		b.WriteString("}")
	}
	b.WriteString("\n]}\n")
	return nil
}

// key writes "k":v with v JSON-encoded (a json.RawMessage as it is),
// without HTML escaping: the export is a file, not a page, and a shortfall
// of "< 0.19%" should read as such rather than "\u003c 0.19%". Encoding
// strings and small integers cannot fail.
func key(b *bytes.Buffer, k string, v any) {
	enc := json.NewEncoder(b)
	enc.SetEscapeHTML(false)
	_ = enc.Encode(k)
	b.Truncate(b.Len() - 1) // Encode ends with a newline
	b.WriteString(":")
	_ = enc.Encode(v)
	b.Truncate(b.Len() - 1)
}

func checkCensus(r *Row, tiers []*wardload.Tier) error {
	if len(r.Census) != len(tiers) {
		return fmt.Errorf("export: row %s %s has %d tier counts for %d tiers", r.Date, r.Shift, len(r.Census), len(tiers))
	}
	return nil
}
