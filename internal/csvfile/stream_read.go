package csvfile

import (
	"io"
	"sort"
)

// Lines maps 1-based data rows to file lines. Only rows where a quoted
// cell spanning lines has moved the count are stored, so an ordinary file
// costs nothing per row.
type Lines struct {
	rows, lines []int // breakpoints: from rows[k] on, line = lines[k] + (row − rows[k])
}

func (l *Lines) add(row, line int) {
	if n := len(l.rows); n > 0 && l.lines[n-1]+row-l.rows[n-1] == line {
		return
	}
	l.rows = append(l.rows, row)
	l.lines = append(l.lines, line)
}

// Line returns the file line on which 1-based data row row starts.
func (l *Lines) Line(row int) int {
	k := sort.SearchInts(l.rows, row+1) - 1
	return l.lines[k] + row - l.rows[k]
}

// ReadGroups reads the named numeric column from r, split by the tier
// column as Table.Groups does, keeping only each row's value and row
// number: 16 bytes a row, whatever the width of the file, with the line
// buffer bounded by MaxLineBytes. Errors are those of Read and Groups, the
// first in file order.
func ReadGroups(r io.Reader, name string) ([]Group, *Lines, error) {
	s, err := NewStream(r)
	if err != nil {
		return nil, nil, err
	}
	c, err := index(s.Header, name)
	if err != nil {
		return nil, nil, err
	}
	tc, _ := index(s.Header, TierColumn)
	g := grouper{name: name}
	lines := &Lines{}
	for row := 1; ; row++ {
		rec, line, err := s.Next()
		if err == io.EOF {
			break
		} else if err != nil {
			return nil, nil, err
		}
		lines.add(row, line)
		v, err := parseCell(line, name, rec[c])
		if err != nil {
			return nil, nil, err
		}
		tier := "all" // any non-blank key: without a tier column there is one group
		if tc >= 0 {
			tier = rec[tc]
		}
		if err := g.add(tier, line, v, row); err != nil {
			return nil, nil, err
		}
	}
	if tc < 0 {
		g.groups[0].Tier = ""
	}
	return g.groups, lines, nil
}

// ReadColumns reads the named numeric columns from r as Table.Floats
// does, keeping only their values and row numbers (16 bytes a row per
// column). Errors are those of Read and Floats, the first in file order.
func ReadColumns(r io.Reader, names ...string) ([]*Column, error) {
	s, err := NewStream(r)
	if err != nil {
		return nil, err
	}
	at := make([]int, len(names))
	cols := make([]*Column, len(names))
	for k, name := range names {
		if at[k], err = index(s.Header, name); err != nil {
			return nil, err
		}
		cols[k] = &Column{Name: name}
	}
	for row := 1; ; row++ {
		rec, line, err := s.Next()
		if err == io.EOF {
			return cols, nil
		} else if err != nil {
			return nil, err
		}
		for k, col := range cols {
			v, err := parseCell(line, col.Name, rec[at[k]])
			if err != nil {
				return nil, err
			}
			col.Values = append(col.Values, v)
			col.Rows = append(col.Rows, row)
		}
	}
}
