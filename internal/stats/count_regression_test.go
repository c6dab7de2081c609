package stats

import (
	"encoding/csv"
	"math"
	"os"
	"slices"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// censusCountsDesign reads testdata/census_counts.csv (an invented series
// written by testdata/census_counts.R) and builds R's model.matrix for
// y ~ weekday*shift + t (interaction true) or y ~ weekday + shift + t,
// with treatment contrasts, weekday levels 0..6 and shift levels day, night.
func censusCountsDesign(t *testing.T, interaction bool) (x [][]float64, y []float64) {
	t.Helper()
	f, err := os.Open("testdata/census_counts.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range recs[1:] { // day,weekday,shift,t,y
		wd, _ := strconv.Atoi(r[1])
		night := 0.0
		if r[2] == "night" {
			night = 1
		}
		tt, _ := strconv.ParseFloat(r[3], 64)
		v, _ := strconv.ParseFloat(r[4], 64)
		row := []float64{1}
		for l := 1; l <= 6; l++ {
			row = append(row, b2f(wd == l))
		}
		row = append(row, night, tt)
		if interaction {
			for l := 1; l <= 6; l++ {
				row = append(row, b2f(wd == l)*night)
			}
		}
		x = append(x, row)
		y = append(y, v)
	}
	return x, y
}

func b2f(b bool) float64 {
	if b {
		return 1
	}
	return 0
}

// Reference values: R 4.2.2 Patched (2022-11-10 r83330), MASS 7.3.58.2,
// from testdata/census_counts.R (output in testdata/census_counts.txt),
// data testdata/census_counts.csv (84 rows), with
// d$weekday <- factor(d$weekday, levels = 0:6) and
// d$shift <- factor(d$shift, levels = c("day", "night")).
// Coefficient order as R's: (Intercept), weekday1..6, shiftnight, t,
// weekday1:shiftnight .. weekday6:shiftnight.
// ctl <- glm.control(epsilon = 1e-14, maxit = 100) for the GLMs, so R's
// values are at the maximum itself (with the default 1e-8 R's SEs come from
// the last-but-one iterate's weights and differ by about 1e-5); glm.nb keeps
// its default control, and theta.ml stops at |Δθ| < eps^0.25 ≈ 1.2e-4, so
// the NB2 values are compared to 1e-5 and θ to 1e-3 relative.
func TestFitCountRegressionMatchesR(t *testing.T) {
	for _, tc := range []struct {
		name           string
		family         CountFamily
		interaction    bool
		beta, se       []float64
		dispersion     float64
		deviance       float64
		theta, thetaSE float64
		tolBeta, tolSE float64
		tolTheta       float64
	}{
		{
			// glm(y ~ weekday*shift + t, family = poisson, data = d, control = ctl)
			name: "poisson", family: FamilyPoisson, interaction: true,
			beta:       []float64{2.41996140758, 0.266239073187, -0.397871752877, -0.0517543510754, -0.229876476521, -0.584326323415, -0.732792239277, -0.258573988294, 0.0609278144115, -0.453991278123, 0.0762524314998, -0.0962473869957, 0.161724162304, 0.167602210088, 0.207280693906},
			se:         []float64{0.125277304904, 0.149272425102, 0.176667269453, 0.160384041372, 0.167872434163, 0.186046954003, 0.194857454093, 0.170445505869, 0.0205809909741, 0.241401943227, 0.264182533887, 0.246083729605, 0.247760849203, 0.273130600107, 0.283491551805},
			dispersion: 1, deviance: 95.6613318396, tolBeta: 1e-7, tolSE: 1e-6,
		},
		{
			// glm(y ~ weekday*shift + t, family = quasipoisson, data = d, control = ctl)
			name: "quasipoisson", family: FamilyQuasiPoisson, interaction: true,
			beta:       []float64{2.41996140758, 0.266239073187, -0.397871752877, -0.0517543510754, -0.229876476521, -0.584326323415, -0.732792239277, -0.258573988294, 0.0609278144115, -0.453991278123, 0.0762524314998, -0.0962473869957, 0.161724162304, 0.167602210088, 0.207280693906},
			se:         []float64{0.148106276622, 0.1764739679, 0.208860906608, 0.189610426369, 0.198463410355, 0.219949827747, 0.230365843358, 0.201505366519, 0.0243314137761, 0.285392018994, 0.312323860037, 0.290926955661, 0.292909692592, 0.322902510111, 0.335151512269},
			dispersion: 1.39766189268, deviance: 95.6613318396, tolBeta: 1e-7, tolSE: 1e-6,
		},
		{
			// glm(y ~ weekday + shift + t, family = quasipoisson, data = d, control = ctl)
			name: "quasipoisson main effects", family: FamilyQuasiPoisson,
			beta:       []float64{2.43100527007, 0.0930787208226, -0.363930519449, -0.0925570198702, -0.156176750954, -0.507825475568, -0.637157436844, -0.284104251104, 0.0609278144115},
			se:         []float64{0.123924309688, 0.137171473477, 0.154595537813, 0.143340830396, 0.145692687823, 0.16092657076, 0.167463609744, 0.0832267494809, 0.0242053245178},
			dispersion: 1.38321361375, deviance: 105.596214054, tolBeta: 1e-7, tolSE: 1e-6,
		},
		{
			// MASS::glm.nb(y ~ weekday*shift + t, data = d)
			name: "negbin", family: FamilyNegBin2, interaction: true,
			beta:       []float64{2.4159772867, 0.269974665982, -0.399117619413, -0.0445004303558, -0.230799623587, -0.584721266216, -0.730087246374, -0.257756906162, 0.061643493765, -0.459064731674, 0.0790217381993, -0.103119946261, 0.167452195695, 0.169177411851, 0.205607512836},
			se:         []float64{0.13771761245, 0.166988228006, 0.192093331254, 0.176879867315, 0.184036209065, 0.200810375418, 0.208872364292, 0.186263404418, 0.022297640815, 0.263712076123, 0.28474555296, 0.267833939511, 0.269438539984, 0.293041941615, 0.302601696389},
			dispersion: 1, deviance: 82.1212627692, theta: 60.1218196662, thetaSE: 63.9037750002,
			tolBeta: 1e-5, tolSE: 1e-5, tolTheta: 1e-3,
		},
	} {
		t.Run(tc.name, func(t *testing.T) {
			x, y := censusCountsDesign(t, tc.interaction)
			x0, y0 := cloneRows(x), slices.Clone(y)
			fit, err := FitCountRegression(x, y, tc.family)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(y, y0) || !rowsEqual(x, x0) {
				t.Error("input modified")
			}
			for j := range tc.beta {
				if !scalar.EqualWithinAbsOrRel(fit.Beta[j], tc.beta[j], tc.tolBeta, tc.tolBeta) {
					t.Errorf("beta[%d] = %.12g, R %.12g", j, fit.Beta[j], tc.beta[j])
				}
				if !scalar.EqualWithinAbsOrRel(fit.SE[j], tc.se[j], tc.tolSE, tc.tolSE) {
					t.Errorf("se[%d] = %.12g, R %.12g", j, fit.SE[j], tc.se[j])
				}
			}
			if !scalar.EqualWithinAbsOrRel(fit.Dispersion, tc.dispersion, 1e-7, 1e-7) {
				t.Errorf("dispersion = %.12g, R %.12g", fit.Dispersion, tc.dispersion)
			}
			if !scalar.EqualWithinAbsOrRel(fit.Deviance, tc.deviance, 1e-6, 1e-6) {
				t.Errorf("deviance = %.12g, R %.12g", fit.Deviance, tc.deviance)
			}
			if tc.family == FamilyNegBin2 {
				if !scalar.EqualWithinAbsOrRel(fit.Theta, tc.theta, 0, tc.tolTheta) {
					t.Errorf("theta = %.10g, R %.10g", fit.Theta, tc.theta)
				}
				if !scalar.EqualWithinAbsOrRel(fit.ThetaSE, tc.thetaSE, 0, tc.tolTheta) {
					t.Errorf("SE(theta) = %.10g, R %.10g", fit.ThetaSE, tc.thetaSE)
				}
			}
		})
	}
}

// An exact case by hand: one group indicator, y = (1, 3) in group A and
// (2, 6) in group B. The Poisson MLE of a saturated-by-group log-linear
// model is the log of each group mean: β0 = ln 2, β1 = ln 4 − ln 2 = ln 2;
// Var β̂0 = 1/Σ_A μ = 1/4, Var β̂1 = 1/4 + 1/8 (McCullagh & Nelder 1989,
// §6.2: the information of a log-linear model is XᵀWX with W = μ).
// Pearson X² = (1−2)²/2·2 + (2−4)²/4·2 = 1 + 2 = 3 on n − p = 2 df.
func TestFitCountRegressionGroupMeans(t *testing.T) {
	x := [][]float64{{1, 0}, {1, 0}, {1, 1}, {1, 1}}
	y := []float64{1, 3, 2, 6}
	fit, err := FitCountRegression(x, y, FamilyQuasiPoisson)
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{math.Ln2, math.Ln2}
	wantSE := []float64{math.Sqrt(1.5 / 4), math.Sqrt(1.5 * (1.0/4 + 1.0/8))}
	for j := range want {
		if !scalar.EqualWithinAbsOrRel(fit.Beta[j], want[j], 1e-10, 1e-10) {
			t.Errorf("beta[%d] = %g, want %g", j, fit.Beta[j], want[j])
		}
		if !scalar.EqualWithinAbsOrRel(fit.SE[j], wantSE[j], 1e-9, 1e-9) {
			t.Errorf("se[%d] = %g, want %g", j, fit.SE[j], wantSE[j])
		}
	}
	if !scalar.EqualWithinAbsOrRel(fit.Dispersion, 1.5, 1e-10, 1e-10) {
		t.Errorf("dispersion = %g, want 1.5", fit.Dispersion)
	}
}

func TestFitCountRegressionRefusesSingular(t *testing.T) {
	x := [][]float64{{1, 2}, {1, 2}, {1, 2}}
	if _, err := FitCountRegression(x, []float64{1, 2, 3}, FamilyPoisson); err == nil {
		t.Error("collinear design accepted")
	}
	if _, err := FitCountRegression([][]float64{{1}}, []float64{1}, FamilyPoisson); err == nil {
		t.Error("n = p accepted")
	}
}

func TestFitCountRegressionPanics(t *testing.T) {
	for name, f := range map[string]func(){
		"negative":  func() { FitCountRegression([][]float64{{1}, {1}}, []float64{-1, 2}, FamilyPoisson) },
		"fraction":  func() { FitCountRegression([][]float64{{1}, {1}}, []float64{1.5, 2}, FamilyPoisson) },
		"rows":      func() { FitCountRegression([][]float64{{1}}, []float64{1, 2}, FamilyPoisson) },
		"row width": func() { FitCountRegression([][]float64{{1}, {1, 2}}, []float64{1, 2}, FamilyPoisson) },
	} {
		func() {
			defer func() {
				if recover() == nil {
					t.Errorf("%s: no panic", name)
				}
			}()
			f()
		}()
	}
}

func cloneRows(x [][]float64) [][]float64 {
	c := make([][]float64, len(x))
	for i := range x {
		c[i] = slices.Clone(x[i])
	}
	return c
}

func rowsEqual(a, b [][]float64) bool {
	return slices.EqualFunc(a, b, func(u, v []float64) bool { return slices.Equal(u, v) })
}
