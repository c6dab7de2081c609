package csvfile

import (
	"math"
	"strconv"
	"strings"

	"wardload/internal/wardload"
)

// Column is one numeric column. Values[i] came from 1-based data row
// Rows[i] (row 1 is the first line after the header).
type Column struct {
	Name   string
	Values []float64
	Rows   []int
}

// Group is the part of a numeric column that belongs to one tier.
type Group struct {
	Tier string // "" when the file has no tier column
	Column
}

// Strings returns the cells of the named column in row order, with
// surrounding spaces removed. A missing column is EINVALID.
func (t *Table) Strings(name string) ([]string, error) {
	c, err := t.mustIndex(name)
	if err != nil {
		return nil, err
	}
	out := make([]string, len(t.Records))
	for i, rec := range t.Records {
		out[i] = strings.TrimSpace(rec[c])
	}
	return out, nil
}

// Floats returns the named column as numbers. A missing column, an empty
// cell, text that is not a decimal number, and NaN or infinite values are
// EINVALID naming the line and column, e.g.
//
//	line 7, column "care_minutes": "12x" is not a number.
func (t *Table) Floats(name string) (*Column, error) {
	c, err := t.mustIndex(name)
	if err != nil {
		return nil, err
	}
	col := &Column{Name: name, Values: make([]float64, len(t.Records)), Rows: make([]int, len(t.Records))}
	for i, rec := range t.Records {
		v, err := parseCell(t.Lines[i], name, rec[c])
		if err != nil {
			return nil, err
		}
		col.Values[i] = v
		col.Rows[i] = i + 1
	}
	return col, nil
}

// Groups returns the named numeric column split by the tier column, tiers
// in order of first appearance. Without a tier column the whole column is
// one group with Tier "". An empty tier cell is EINVALID.
func (t *Table) Groups(name string) ([]Group, error) {
	col, err := t.Floats(name)
	if err != nil {
		return nil, err
	}
	tc := t.Index(TierColumn)
	if tc < 0 {
		return []Group{{Column: *col}}, nil
	}
	g := grouper{name: name}
	for i, rec := range t.Records {
		if err := g.add(rec[tc], t.Lines[i], col.Values[i], col.Rows[i]); err != nil {
			return nil, err
		}
	}
	return g.groups, nil
}

// grouper splits a column's values by tier, tiers in order of first
// appearance.
type grouper struct {
	name   string
	groups []Group
	at     map[string]int
}

// add files value v of data row row (on file line line) under the tier
// in cell tierCell. An empty tier is EINVALID.
func (g *grouper) add(tierCell string, line int, v float64, row int) error {
	tier := strings.TrimSpace(tierCell)
	if tier == "" {
		return wardload.FieldErrorf(wardload.EINVALID, TierColumn, "line %d, column %q: the tier is empty.", line, TierColumn)
	}
	k, ok := g.at[tier]
	if !ok {
		if g.at == nil {
			g.at = map[string]int{}
		}
		k = len(g.groups)
		g.at[tier] = k
		g.groups = append(g.groups, Group{Tier: tier, Column: Column{Name: g.name}})
	}
	g.groups[k].Values = append(g.groups[k].Values, v)
	g.groups[k].Rows = append(g.groups[k].Rows, row)
	return nil
}

// parse reads one cell as a finite decimal number. strconv.ParseFloat
// also accepts "NaN", "Inf", hexadecimal and '_' separators; a care-time
// sheet never means those, so only digits, sign, point and exponent pass.
func parseCell(line int, name, cell string) (float64, error) {
	s := strings.TrimSpace(cell)
	if s == "" {
		return 0, wardload.FieldErrorf(wardload.EINVALID, name, "line %d, column %q: the cell is empty; a number is required.", line, name)
	}
	if len(s) > 64 || strings.Trim(s, "0123456789+-.eE") != "" {
		return 0, notNumber(line, name, s)
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil {
		if ne, ok := err.(*strconv.NumError); ok && ne.Err == strconv.ErrRange {
			return 0, wardload.FieldErrorf(wardload.EINVALID, name, "line %d, column %q: %q is too large to be a number wardload can use.", line, name, s)
		}
		return 0, notNumber(line, name, s)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, notNumber(line, name, s)
	}
	if math.Abs(v) > MaxAbs {
		return 0, wardload.FieldErrorf(wardload.EINVALID, name, "line %d, column %q: %q is too large to be a number wardload can use (at most %g in size).", line, name, clipCell(s), MaxAbs)
	}
	return v, nil
}

// clipCell shortens a cell quoted in a message.
func clipCell(s string) string {
	if len(s) > 40 {
		return s[:40] + "…"
	}
	return s
}

func notNumber(line int, name, s string) error {
	return wardload.FieldErrorf(wardload.EINVALID, name, "line %d, column %q: %q is not a number.", line, name, clipCell(s))
}
