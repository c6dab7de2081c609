// Package csvfile reads the CSV files wardload's commands take: UTF-8 (an
// optional byte order mark is dropped), comma-separated, with a header row.
// Every problem with the file comes back as a *wardload.Error with code
// EINVALID whose message names the file line (the header is line 1) and,
// where there is one, the column, so that a person can find and fix it.
package csvfile

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"slices"
	"strings"

	"wardload/internal/wardload"
)

// Limits that keep a malformed or hostile file from exhausting memory.
// They are far above anything a ward records by hand.
const (
	MaxLineBytes = 1 << 20 // bytes on one physical line
	MaxFields    = 1000    // columns in the header
	MaxRecords   = 20_000_000
	// MaxAbs bounds the size of a number cell. Care minutes, windows and
	// factors are hand-entered quantities far below it, and it keeps every
	// sum of squares over MaxRecords values finite (2e7 × (1e15)² = 2e37):
	// 1.7e308 is a finite float64, but two of them overflowed the mean,
	// SD and fences to Inf and NaN, and the JSON output then failed.
	MaxAbs = 1e15
)

// TierColumn is the column that groups rows by acuity tier.
const TierColumn = "tier"

// Table is a CSV file read into memory. Records holds the data rows (not
// the header); Lines[i] is the file line on which Records[i] starts, so
// data row i+1 (1-based, the first line after the header is row 1) is on
// file line Lines[i].
type Table struct {
	Header  []string
	Records [][]string
	Lines   []int
}

// Read reads a whole CSV file. It returns EINVALID when the file is empty,
// has no data rows, is not UTF-8, has a duplicate or blank column name, a
// row with a different number of fields than the header, a line longer
// than MaxLineBytes, more than MaxFields columns or more than MaxRecords
// rows. Leading and trailing spaces around header names are ignored.
//
// Read keeps every cell; commands that need only a column or two use
// ReadGroups or ReadColumns, whose memory does not grow with row width.
func Read(r io.Reader) (*Table, error) {
	s, err := NewStream(r)
	if err != nil {
		return nil, err
	}
	t := &Table{Header: s.Header}
	for {
		rec, line, err := s.Next()
		if err == io.EOF {
			return t, nil
		} else if err != nil {
			return nil, err
		}
		t.Records = append(t.Records, slices.Clone(rec))
		t.Lines = append(t.Lines, line)
	}
}

// readError turns encoding/csv and line-limit errors into EINVALID with the
// line number; other errors (the reader failing) are passed on wrapped.
func readError(err error) error {
	var long *lineTooLongError
	if errors.As(err, &long) {
		return wardload.Errorf(wardload.EINVALID, "line %d: the line is longer than %d bytes.", long.line, MaxLineBytes)
	}
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		switch {
		case errors.Is(pe.Err, csv.ErrFieldCount):
			return wardload.Errorf(wardload.EINVALID, "line %d: the row does not have the same number of fields as the header.", pe.Line)
		case errors.Is(pe.Err, csv.ErrQuote), errors.Is(pe.Err, csv.ErrBareQuote):
			return wardload.Errorf(wardload.EINVALID, "line %d: a quote (\") is misplaced or not closed.", pe.Line)
		}
		return wardload.Errorf(wardload.EINVALID, "line %d: the row cannot be read as CSV.", pe.Line)
	}
	return fmt.Errorf("csvfile: read: %w", err)
}

// Index returns the position of the named column in the header, or -1.
func (t *Table) Index(name string) int {
	for i, h := range t.Header {
		if h == name {
			return i
		}
	}
	return -1
}

// mustIndex returns the column position or EINVALID naming the column and
// the columns that do exist.
func (t *Table) mustIndex(name string) (int, error) { return index(t.Header, name) }

func quoteList(names []string) string {
	q := make([]string, len(names))
	for i, n := range names {
		q[i] = fmt.Sprintf("%q", n)
	}
	return strings.Join(q, ", ")
}

// Line returns the file line of 1-based data row row.
func (t *Table) Line(row int) int { return t.Lines[row-1] }
