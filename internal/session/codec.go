package session

import (
	"bytes"
	"encoding/binary"
	"errors"
	"time"

	"github.com/alexedwards/scs/v2"
)

// Codec encodes session data for the session store (it is the Codec of
// the server's scs.SessionManager). Every page decodes its session, and
// scs's gob codec builds a new gob decoder, with its type descriptions,
// for each one, which costs more than the session lookup itself.
// wardload's sessions hold only int64s and strings, so they are written in
// a small binary layout of their own; a value of any other type makes the
// whole session gob, and data that does not start with sessionMagic (gob
// never starts a stream with a zero byte, which would be an empty message)
// is read as gob, so sessions stored before this codec stay valid.
type Codec struct{}

var _ scs.Codec = Codec{}

// sessionMagic starts every session in the compact layout:
//
//	magic, varint deadline (Unix nanoseconds), uvarint n, then n times:
//	uvarint len, key, type byte ('i' varint | 's' uvarint len, bytes)
const sessionMagic = "\x00wl1"

var errSessionData = errors.New("session data: malformed")

// Encode writes the compact layout, or gob when a value is neither an
// int64 nor a string.
func (Codec) Encode(deadline time.Time, values map[string]any) ([]byte, error) {
	b := make([]byte, 0, 64)
	b = append(b, sessionMagic...)
	b = binary.AppendVarint(b, deadline.UnixNano())
	b = binary.AppendUvarint(b, uint64(len(values)))
	for k, v := range values {
		b = binary.AppendUvarint(b, uint64(len(k)))
		b = append(b, k...)
		switch v := v.(type) {
		case int64:
			b = append(b, 'i')
			b = binary.AppendVarint(b, v)
		case string:
			b = append(b, 's')
			b = binary.AppendUvarint(b, uint64(len(v)))
			b = append(b, v...)
		default:
			return scs.GobCodec{}.Encode(deadline, values)
		}
	}
	return b, nil
}

// Decode reads either layout.
func (Codec) Decode(b []byte) (time.Time, map[string]any, error) {
	rest, ok := bytes.CutPrefix(b, []byte(sessionMagic))
	if !ok {
		return scs.GobCodec{}.Decode(b)
	}
	r := sessionReader{b: rest}
	deadline := time.Unix(0, r.varint())
	n := r.uvarint()
	if r.err != nil || n > uint64(len(r.b)) {
		return time.Time{}, nil, errSessionData
	}
	values := make(map[string]any, n)
	for range n {
		k := string(r.bytes(r.uvarint()))
		switch r.byte() {
		case 'i':
			values[k] = r.varint()
		case 's':
			values[k] = string(r.bytes(r.uvarint()))
		default:
			r.err = errSessionData
		}
		if r.err != nil {
			return time.Time{}, nil, errSessionData
		}
	}
	if len(r.b) != 0 {
		return time.Time{}, nil, errSessionData
	}
	return deadline, values, nil
}

// sessionReader reads the compact layout, remembering the first error.
type sessionReader struct {
	b   []byte
	err error
}

func (r *sessionReader) varint() int64 {
	v, n := binary.Varint(r.b)
	if n <= 0 {
		r.err, r.b = errSessionData, nil
		return 0
	}
	r.b = r.b[n:]
	return v
}

func (r *sessionReader) uvarint() uint64 {
	v, n := binary.Uvarint(r.b)
	if n <= 0 {
		r.err, r.b = errSessionData, nil
		return 0
	}
	r.b = r.b[n:]
	return v
}

func (r *sessionReader) byte() byte {
	if len(r.b) == 0 {
		r.err = errSessionData
		return 0
	}
	c := r.b[0]
	r.b = r.b[1:]
	return c
}

func (r *sessionReader) bytes(n uint64) []byte {
	if n > uint64(len(r.b)) {
		r.err, r.b = errSessionData, nil
		return nil
	}
	v := r.b[:n]
	r.b = r.b[n:]
	return v
}
