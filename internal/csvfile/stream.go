package csvfile

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"io"
	"strings"
	"unicode/utf8"

	"wardload/internal/wardload"
)

// Stream reads a CSV file one data row at a time, so that what a caller
// keeps, not the file's size, decides the memory used. It checks what Read
// checks, in file order.
type Stream struct {
	Header []string
	cr     *csv.Reader
	rows   int
}

// NewStream reads and checks the header row. It returns EINVALID for an
// empty file, more than MaxFields columns, or a blank, duplicate or
// non-UTF-8 column name.
func NewStream(r io.Reader) (*Stream, error) {
	br := bufio.NewReader(&lineLimitReader{r: r})
	if bom, err := br.Peek(3); err == nil && bytes.Equal(bom, []byte("\xef\xbb\xbf")) {
		br.Discard(3)
	}
	cr := csv.NewReader(br)
	header, err := cr.Read()
	if err == io.EOF {
		return nil, wardload.Errorf(wardload.EINVALID, "The file is empty: it needs a header row and at least one data row.")
	} else if err != nil {
		return nil, readError(err)
	}
	if len(header) > MaxFields {
		return nil, wardload.Errorf(wardload.EINVALID, "line 1: the header has %d columns; at most %d are allowed.", len(header), MaxFields)
	}
	seen := make(map[string]bool, len(header))
	for i, h := range header {
		if !utf8.ValidString(h) {
			return nil, wardload.Errorf(wardload.EINVALID, "line 1, column %d: the header is not valid UTF-8 text.", i+1)
		}
		h = strings.TrimSpace(h)
		if h == "" {
			return nil, wardload.Errorf(wardload.EINVALID, "line 1, column %d: the column name is blank.", i+1)
		}
		if seen[h] {
			return nil, wardload.FieldErrorf(wardload.EINVALID, h, "line 1: column %q appears twice.", h)
		}
		seen[h] = true
		header[i] = h
	}
	// The record slice is reused between rows: callers copy what they keep.
	cr.ReuseRecord = true
	return &Stream{Header: header, cr: cr}, nil
}

// Next returns the next data row and the file line it starts on. The
// slice is overwritten by the following call. At the end it returns
// io.EOF, or EINVALID if there were no data rows at all; a bad row, a
// non-UTF-8 cell or more than MaxRecords rows is EINVALID naming the line.
func (s *Stream) Next() ([]string, int, error) {
	rec, err := s.cr.Read()
	if err == io.EOF {
		if s.rows == 0 {
			return nil, 0, wardload.Errorf(wardload.EINVALID, "The file has a header row but no data rows.")
		}
		return nil, 0, io.EOF
	} else if err != nil {
		return nil, 0, readError(err)
	}
	line, _ := s.cr.FieldPos(0)
	for i, f := range rec {
		if !utf8.ValidString(f) {
			return nil, 0, wardload.FieldErrorf(wardload.EINVALID, s.Header[i], "line %d, column %q: the cell is not valid UTF-8 text.", line, s.Header[i])
		}
	}
	if s.rows == MaxRecords {
		return nil, 0, wardload.Errorf(wardload.EINVALID, "line %d: the file has more than %d data rows.", line, MaxRecords)
	}
	s.rows++
	return rec, line, nil
}

// index returns the position of the named column, or EINVALID naming the
// columns that do exist.
func index(header []string, name string) (int, error) {
	for i, h := range header {
		if h == name {
			return i, nil
		}
	}
	return -1, wardload.FieldErrorf(wardload.EINVALID, name, "line 1: there is no column %q (the columns are %s).", name, quoteList(header))
}
