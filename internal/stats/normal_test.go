package stats

import (
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// Values from R 4.2.2 Patched (2022-11-10 r83330), Debian r-base-core,
// printed with sprintf("%.17g"); script testdata/projection_reference.R.
func TestNormalQuantileR(t *testing.T) {
	tests := []struct {
		expr string
		p    float64
		want float64
	}{
		{"qnorm(0.975)", 0.975, 1.9599639845400536},
		{"qnorm(0.9)", 0.9, 1.2815515655446008},
		{"qnorm(0.95)", 0.95, 1.6448536269514715},
		{"qnorm(0.995)", 0.995, 2.5758293035488999},
		{"qnorm(0.1)", 0.1, -1.2815515655446008},
		{"qnorm(1e-10)", 1e-10, -6.3613409024040557},
		{"qnorm(0.5)", 0.5, 0},
	}
	for _, tc := range tests {
		t.Run(tc.expr, func(t *testing.T) {
			if got := NormalQuantile(tc.p); !scalar.EqualWithinAbsOrRel(got, tc.want, 1e-15, 1e-14) {
				t.Errorf("NormalQuantile(%v) = %.17g, R %s = %.17g", tc.p, got, tc.expr, tc.want)
			}
		})
	}
}

// Values from R 4.2.2 (as above).
func TestNormalUpperTailR(t *testing.T) {
	tests := []struct {
		expr string
		z    float64
		want float64
	}{
		{"pnorm(1.5, lower.tail=FALSE)", 1.5, 0.066807201268858071},
		{"pnorm(-2, lower.tail=FALSE)", -2, 0.97724986805182079},
		{"pnorm(8, lower.tail=FALSE)", 8, 6.2209605742717849e-16}, // 1 − Φ would lose this entirely
	}
	for _, tc := range tests {
		if got := NormalUpperTail(tc.z); !scalar.EqualWithinRel(got, tc.want, 1e-13) {
			t.Errorf("NormalUpperTail(%v) = %.17g, R %s = %.17g", tc.z, got, tc.expr, tc.want)
		}
	}
}

// TwoSidedZ(0.95) is qnorm(0.975) and TwoSidedZ(0.8) is qnorm(0.9) (R values above).
func TestTwoSidedZ(t *testing.T) {
	if got := TwoSidedZ(0.95); !scalar.EqualWithinRel(got, 1.9599639845400536, 1e-14) {
		t.Errorf("TwoSidedZ(0.95) = %.17g", got)
	}
	if got := TwoSidedZ(0.8); !scalar.EqualWithinRel(got, 1.2815515655446008, 1e-14) {
		t.Errorf("TwoSidedZ(0.8) = %.17g", got)
	}
}

func TestNormalPanics(t *testing.T) {
	for name, f := range map[string]func(){
		"quantile above 1": func() { NormalQuantile(1.5) },
		"quantile below 0": func() { NormalQuantile(-0.1) },
		"two-sided 1":      func() { TwoSidedZ(1) },
		"two-sided 0":      func() { TwoSidedZ(0) },
	} {
		t.Run(name, func(t *testing.T) {
			defer func() {
				if recover() == nil {
					t.Error("no panic")
				}
			}()
			f()
		})
	}
}
