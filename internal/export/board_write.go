package export

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
)

// BoardColumns are the board export's columns, in their stable order
// (README "Hospital board"; the OpenAPI schema BoardRow).
func BoardColumns() []string {
	cs := (&BoardRow{}).cells()
	out := make([]string, len(cs))
	for i, c := range cs {
		out[i] = c.name
	}
	return out
}

// cells returns the row's columns: instants with FormatTime (ISO 8601
// with offset), probabilities with FormatProbability, a missing figure as
// "" (JSON null), free text through TextCell in the CSV.
func (r *BoardRow) cells() []cell {
	itoa := strconv.Itoa
	c := r.Chance
	has := c != nil
	var ch BoardChance
	if has {
		ch = *c
	}
	prob := func(v float64) string {
		if !has {
			return ""
		}
		return FormatProbability(v)
	}
	chanceText, bound, nurses := "", "", ""
	if has {
		chanceText, bound, nurses = c.ChanceText(), c.Bound, itoa(c.Nurses)
	}
	floorRule := r.FloorRule
	return []cell{
		text("ward", r.Ward),
		text("ward_name", r.WardName),
		{"date", r.Date.String(), r.Date.String()},
		text("shift", r.Shift),
		{"start", FormatTime(r.Start), FormatTime(r.Start)},
		{"end", FormatTime(r.End), FormatTime(r.End)},
		text("status", r.Status),
		number("census_total", optional(r.TotalPatients, itoa)),
		number("census_revision", optional(nonZero(r.CensusRevision), itoa)),
		number("cover_level", optional(r.CoverLevel, FormatLevel)),
		number("recommended_nurses", optional(r.Recommended, itoa)),
		number("ratio_floor_nurses", optional(r.Floor, itoa)),
		optText("ratio_floor_rule", floorRule),
		number("planned_nurses", optional(r.Planned, itoa)),
		number("planned_support_staff", optional(r.PlannedSupport, itoa)),
		number("planned_minus_recommended", optional(r.Difference, itoa)),
		number("planned_below_floor", strconv.FormatBool(r.BelowFloor)),
		optText("shortfall_with_planned", chanceText),
		optText("shortfall_bound", bound),
		number("shortfall_table_nurses", nurses),
		number("shortfall_simulated_share", prob(ch.Probability)),
		number("shortfall_wilson95_low", prob(ch.WilsonLow)),
		number("shortfall_wilson95_high", prob(ch.WilsonHigh)),
	}
}

func nonZero(n int) *int {
	if n == 0 {
		return nil
	}
	return &n
}

// WriteBoardCSV writes the board as CSV (RFC 4180, CRLF): first comment
// lines starting with "# " that carry the caution (once, not per row),
// the window and the generation time, then the header row and one row per
// ward × dated shift in the board's order. Readers that take comments
// (R read.csv comment.char = "#", pandas comment = "#") skip them.
func WriteBoardCSV(w io.Writer, b *Board) error {
	var buf bytes.Buffer
	fmt.Fprintf(&buf, "# caution: %s\r\n", b.Caution)
	fmt.Fprintf(&buf, "# from: %s\r\n# to: %s\r\n# generated_at: %s\r\n", FormatTime(b.From), FormatTime(b.To), FormatTime(b.GeneratedAt))
	cw := csv.NewWriter(&buf)
	cw.UseCRLF = true
	if err := cw.Write(BoardColumns()); err != nil {
		return err
	}
	for i := range b.Rows {
		cs := b.Rows[i].cells()
		fs := make([]string, len(cs))
		for j, c := range cs {
			fs[j] = c.csv
		}
		if err := cw.Write(fs); err != nil {
			return err
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return err
	}
	_, err := w.Write(buf.Bytes())
	return err
}

// WriteBoardJSON writes the board as one JSON object:
//
//	{"from", "to", "generated_at": ISO 8601 with offset, "caution": text,
//	 "columns": [names...], "rows": [{column: value}...]}
//
// Each row has BoardColumns as keys in that order; numbers have the CSV's
// digits, a figure the CSV leaves empty is null and planned_below_floor
// is a boolean. The object ends with a newline.
func WriteBoardJSON(w io.Writer, b *Board) error {
	var buf bytes.Buffer
	buf.WriteString("{")
	key(&buf, "from", FormatTime(b.From))
	buf.WriteString(",")
	key(&buf, "to", FormatTime(b.To))
	buf.WriteString(",")
	key(&buf, "generated_at", FormatTime(b.GeneratedAt))
	buf.WriteString(",")
	key(&buf, "caution", b.Caution)
	buf.WriteString(",")
	key(&buf, "columns", BoardColumns())
	buf.WriteString(`,"rows":[`)
	for i := range b.Rows {
		if i > 0 {
			buf.WriteString(",")
		}
		buf.WriteString("\n{")
		for j, c := range b.Rows[i].cells() {
			if j > 0 {
				buf.WriteString(",")
			}
			key(&buf, c.name, c.json)
		}
		buf.WriteString("}")
	}
	buf.WriteString("]}\n")
	if !json.Valid(buf.Bytes()) {
		return fmt.Errorf("export: built invalid board JSON")
	}
	_, err := w.Write(buf.Bytes())
	return err
}
