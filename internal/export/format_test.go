package export_test

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"wardload/internal/export"
)

// onlyWriter hides the *bytes.Buffer behind it, so WriteJSON takes its
// own-buffer path.
type onlyWriter struct{ b *bytes.Buffer }

func (w onlyWriter) Write(p []byte) (int, error) { return w.b.Write(p) }

// TestWriteChoosesTheFormat: Write gives the golden files' bytes for
// each format, whatever the writer, and ParseFormat takes only the two
// names the CLI and API document.
func TestWriteChoosesTheFormat(t *testing.T) {
	f := seed(t)
	from, to := day("2026-03-27"), day("2026-03-29")
	tiers, rows, err := export.Rows(ctx, f.st, f.ward, from, to)
	must(t, err)
	for name, want := range map[string]export.Format{"csv": export.CSV, "json": export.JSON} {
		got, ok := export.ParseFormat(name)
		if !ok || got != want {
			t.Fatalf("ParseFormat(%q) = %q, %v", name, got, ok)
		}
		golden, err := os.ReadFile(filepath.Join("testdata", "projections."+name+".golden"))
		must(t, err)
		var direct, wrapped bytes.Buffer
		must(t, export.Write(&direct, got, f.ward, from, to, tiers, rows))
		must(t, export.Write(onlyWriter{&wrapped}, got, f.ward, from, to, tiers, rows))
		if !bytes.Equal(direct.Bytes(), golden) || !bytes.Equal(wrapped.Bytes(), golden) {
			t.Errorf("%s: Write differs from the golden file", name)
		}
	}
	for _, bad := range []string{"", "CSV", "xml", "json "} {
		if _, ok := export.ParseFormat(bad); ok {
			t.Errorf("ParseFormat(%q) accepted", bad)
		}
	}
	if export.CSV.ContentType() != "text/csv; charset=utf-8" || export.JSON.ContentType() != "application/json; charset=utf-8" {
		t.Errorf("content types %q, %q", export.CSV.ContentType(), export.JSON.ContentType())
	}

	// Built in place, the JSON keeps what the buffer held before it, and a
	// failure leaves exactly that.
	b := bytes.NewBufferString("before|")
	must(t, export.WriteJSON(b, f.ward, from, to, tiers, rows))
	if !strings.HasPrefix(b.String(), "before|{") {
		t.Errorf("in-place JSON lost the buffer's start: %.20q", b.String())
	}
	b = bytes.NewBufferString("before|")
	short := append([]export.Row(nil), rows...)
	short[len(short)-1].Census = short[len(short)-1].Census[:1]
	if err := export.WriteJSON(b, f.ward, from, to, tiers, short); err == nil || b.String() != "before|" {
		t.Errorf("failed JSON: err %v, buffer %.20q, want the buffer as it was", err, b.String())
	}
}
