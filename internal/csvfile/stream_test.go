package csvfile

import (
	"fmt"
	"io"
	"runtime"
	"slices"
	"strings"
	"testing"
)

// ReadGroups and ReadColumns must give what Read followed by Groups or
// Floats gives: the same groups, rows and lines, and the same messages.
func TestStreamMatchesTable(t *testing.T) {
	for _, in := range []string{
		"\ufefftier, care_minutes ,window_hours\nt1,12.5,1\nt2,30,1\n\"t1\",\"1e1\",1\nt2, 7 ,1\n",
		"care_minutes,window_hours\n1,8\n2,8\n3,12\n",
		"note,tier,care_minutes,window_hours\n\"a\nb\",t1,1,8\nc,t2,5,8\n\"d\n\ne\",t1,7,8\nf,t1,200,8\n",
		"tier,care_minutes,window_hours\nt1,5,8\nt1,6,8\nt1,7,8\nt1,8,8\nt1,9,8\nt1,12x,8\n",
		"tier,care_minutes,window_hours\nt1,1,8\n ,2,8\n",
		"a,b\n1,2\n",
		"care_minutes,window_hours\n1,8\n3\n",
		"care_minutes,window_hours\n",
		"",
	} {
		tab, err := Read(strings.NewReader(in))
		var want []Group
		var wantX, wantY *Column
		var wantErr, wantColErr error = err, err
		if err == nil {
			want, wantErr = tab.Groups("care_minutes")
			if wantX, wantColErr = tab.Floats("care_minutes"); wantColErr == nil {
				wantY, wantColErr = tab.Floats("window_hours")
			}
		}
		got, lines, err := ReadGroups(strings.NewReader(in), "care_minutes")
		if fmt.Sprint(err) != fmt.Sprint(wantErr) {
			t.Errorf("%q: ReadGroups error %v, want %v", in, err, wantErr)
		} else if err == nil {
			if fmt.Sprint(got) != fmt.Sprint(want) {
				t.Errorf("%q: groups %v, want %v", in, got, want)
			}
			for i := range tab.Records {
				if lines.Line(i+1) != tab.Line(i+1) {
					t.Errorf("%q: row %d on line %d, want %d", in, i+1, lines.Line(i+1), tab.Line(i+1))
				}
			}
		}
		cols, err := ReadColumns(strings.NewReader(in), "care_minutes", "window_hours")
		if fmt.Sprint(err) != fmt.Sprint(wantColErr) {
			t.Errorf("%q: ReadColumns error %v, want %v", in, err, wantColErr)
		} else if err == nil && (!slices.Equal(cols[0].Values, wantX.Values) || !slices.Equal(cols[1].Values, wantY.Values) ||
			!slices.Equal(cols[0].Rows, wantX.Rows)) {
			t.Errorf("%q: columns %v, want %v %v", in, cols, wantX, wantY)
		}
	}
}

// wideFile generates a CSV file row by row without holding it, and samples
// the heap as it goes so the test sees the peak while the file is read.
type wideFile struct {
	rows, row int
	pad       string
	buf       []byte
	peak      uint64
	sinceRead int
}

func (f *wideFile) Read(p []byte) (int, error) {
	if f.sinceRead >= 4<<20 {
		f.sinceRead = 0
		var ms runtime.MemStats
		runtime.ReadMemStats(&ms)
		f.peak = max(f.peak, ms.HeapInuse)
	}
	for len(f.buf) < len(p) && f.row <= f.rows {
		if f.row == 0 {
			f.buf = append(f.buf, "tier,care_minutes,patients,note\n"...)
		} else {
			f.buf = fmt.Appendf(f.buf, "t%d,%d.5,%d,%s\n", f.row%4+1, 20+f.row%90, 10+f.row%20, f.pad)
		}
		f.row++
	}
	if len(f.buf) == 0 {
		return 0, io.EOF
	}
	n := copy(p, f.buf)
	f.buf = f.buf[:copy(f.buf, f.buf[n:])]
	f.sinceRead += n
	return n, nil
}

// The streaming readers keep 16 bytes a row per column, whatever the width
// of the row: 200,000 rows of 1 KiB (about 200 MiB) must be read with a
// heap far below the file's size. Read keeps every cell and would need
// more than the file.
func TestStreamMemoryBounded(t *testing.T) {
	if testing.Short() {
		t.Skip("reads 200 MiB")
	}
	const rows = 200_000
	const bound = 48 << 20 // values (3.2 MB a column, doubled while growing) plus GC slack
	runtime.GC()
	var base runtime.MemStats
	runtime.ReadMemStats(&base)
	for _, tc := range []struct {
		name string
		read func(io.Reader) (int, error)
	}{
		{"ReadGroups", func(r io.Reader) (int, error) {
			g, _, err := ReadGroups(r, "care_minutes")
			n := 0
			for _, x := range g {
				n += len(x.Values)
			}
			return n, err
		}},
		{"ReadColumns", func(r io.Reader) (int, error) {
			c, err := ReadColumns(r, "care_minutes", "patients")
			if err != nil {
				return 0, err
			}
			return len(c[1].Values), err
		}},
	} {
		f := &wideFile{rows: rows, pad: strings.Repeat("x", 1000)}
		n, err := tc.read(f)
		if err != nil || n != rows {
			t.Fatalf("%s: %d rows, error %v", tc.name, n, err)
		}
		if grew := int64(f.peak) - int64(base.HeapInuse); grew > bound {
			t.Errorf("%s: heap in use grew by %d MiB reading a %d MiB file; bound %d MiB", tc.name, grew>>20, rows*1030>>20, bound>>20)
		} else {
			t.Logf("%s: heap in use grew by at most %.1f MiB reading a %d MiB file", tc.name, float64(grew)/(1<<20), rows*1030>>20)
		}
	}
}
