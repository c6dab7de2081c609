package stats

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestProjectV2Frozen checks that method version 2 still gives, byte for
// byte, what it gave before version 3 existed. testdata/v2 holds inputs
// drawn from the simulation battery's scenarios (drift with the trend
// followed, a shift-level effect, an entry error, a floor with the nurse
// in charge extra, a census of 40 on 8 observations, a declined tier) and
// the JSON that Project of commit 8b43977 (version 2) returned for them.
// Stored version 2 projections are recomputed by ProjectV2, so any change
// here would break projector.Recompute for them.
func TestProjectV2Frozen(t *testing.T) {
	inputs, err := filepath.Glob("testdata/v2/*.input.json")
	if err != nil || len(inputs) < 6 {
		t.Fatalf("want 6 or more inputs in testdata/v2, got %d (%v)", len(inputs), err)
	}
	for _, path := range inputs {
		name := strings.TrimSuffix(filepath.Base(path), ".input.json")
		t.Run(name, func(t *testing.T) {
			raw, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			var in ProjectionInput
			if err := json.Unmarshal(raw, &in); err != nil {
				t.Fatal(err)
			}
			want, err := os.ReadFile(filepath.Join("testdata/v2", name+".v2.json"))
			if err != nil {
				t.Fatal(err)
			}
			p, err := ProjectV2(in)
			if err != nil {
				t.Fatal(err)
			}
			got, _ := json.Marshal(p)
			if !bytes.Equal(got, want) {
				t.Errorf("ProjectV2 no longer reproduces version 2:\ngot  %.300s\nwant %.300s", got, want)
			}
			p3, err := Project(in)
			if err != nil {
				t.Fatal(err)
			}
			if p3.MethodVersion != MethodVersion || p.MethodVersion != MethodVersionV2 || p3.Method == p.Method {
				t.Errorf("versions: v3 %q (%q), v2 %q (%q)", p3.MethodVersion, p3.Method, p.MethodVersion, p.Method)
			}
		})
	}
}
