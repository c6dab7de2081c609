package session

import (
	"reflect"
	"testing"
	"time"

	"github.com/alexedwards/scs/v2"
)

// TestSessionCodec: sessions round-trip through the compact layout with
// their types, other types fall back to gob, gob data from before the
// codec still decodes, and damaged data is an error, never a panic.
func TestSessionCodec(t *testing.T) {
	deadline := time.Date(2026, 3, 2, 21, 0, 0, 123456789, time.UTC)
	c := Codec{}
	for _, tc := range []struct {
		name    string
		values  map[string]any
		compact bool
	}{
		{"signed in", map[string]any{"user_id": int64(42), "auth_at": int64(1772442000), "seen_at": int64(-5)}, true},
		{"flash and secret", map[string]any{"user_id": int64(1), "flash": "Saved · ✓", "token_secret": "", "empty": ""}, true},
		{"empty", map[string]any{}, true},
		{"other type", map[string]any{"user_id": int64(1), "n": 3, "b": true}, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			b, err := c.Encode(deadline, tc.values)
			if err != nil {
				t.Fatal(err)
			}
			if compact := len(b) >= len(sessionMagic) && string(b[:len(sessionMagic)]) == sessionMagic; compact != tc.compact {
				t.Errorf("compact layout = %v, want %v", compact, tc.compact)
			}
			d, v, err := c.Decode(b)
			if err != nil {
				t.Fatal(err)
			}
			if !d.Equal(deadline) || !reflect.DeepEqual(v, tc.values) {
				t.Errorf("decoded %v %#v, want %v %#v", d, v, deadline, tc.values)
			}
		})
	}

	t.Run("gob from before", func(t *testing.T) {
		values := map[string]any{"user_id": int64(7), "flash": "hello"}
		b, err := scs.GobCodec{}.Encode(deadline, values)
		if err != nil {
			t.Fatal(err)
		}
		d, v, err := c.Decode(b)
		if err != nil || !d.Equal(deadline) || !reflect.DeepEqual(v, values) {
			t.Errorf("gob data decoded as %v %#v, %v", d, v, err)
		}
	})

	t.Run("damaged", func(t *testing.T) {
		good, err := c.Encode(deadline, map[string]any{"user_id": int64(300), "flash": "abc"})
		if err != nil {
			t.Fatal(err)
		}
		for n := len(sessionMagic); n < len(good); n++ {
			if _, _, err := c.Decode(good[:n]); err == nil {
				t.Errorf("truncated to %d of %d bytes: no error", n, len(good))
			}
		}
		if _, _, err := c.Decode(append(good, 0)); err == nil {
			t.Error("trailing byte: no error")
		}
		bad := append([]byte(sessionMagic), 0, 1, 1, 'k', 'x')
		if _, _, err := c.Decode(bad); err == nil {
			t.Error("unknown type byte: no error")
		}
		huge := append([]byte(sessionMagic), 0, 0xff, 0xff, 0xff, 0xff, 0x0f)
		if _, _, err := c.Decode(huge); err == nil {
			t.Error("count larger than the data: no error")
		}
	})
}
