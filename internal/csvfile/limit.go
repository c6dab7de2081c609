package csvfile

import (
	"bytes"
	"fmt"
	"io"
)

// lineLimitReader fails once a physical line grows past MaxLineBytes, so
// that a file with no newlines cannot make encoding/csv buffer all of it.
type lineLimitReader struct {
	r    io.Reader
	run  int // bytes since the last '\n'
	line int // physical lines completed so far
}

type lineTooLongError struct{ line int }

func (e *lineTooLongError) Error() string {
	return fmt.Sprintf("line %d is longer than %d bytes", e.line, MaxLineBytes)
}

func (l *lineLimitReader) Read(p []byte) (int, error) {
	n, err := l.r.Read(p)
	b := p[:n]
	for {
		i := bytes.IndexByte(b, '\n')
		if i < 0 {
			l.run += len(b)
			break
		}
		if l.run+i > MaxLineBytes {
			return 0, &lineTooLongError{l.line + 1}
		}
		l.run = 0
		l.line++
		b = b[i+1:]
	}
	if l.run > MaxLineBytes {
		return 0, &lineTooLongError{l.line + 1}
	}
	return n, err
}
