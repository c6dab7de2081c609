package stats

import (
	"errors"
	"math"

	"gonum.org/v1/gonum/mat"
)

// CountFamily names the variance function of a log-link count regression
// (FitCountRegression).
type CountFamily int

// The count families. All use the log link, log μ = xᵀβ.
const (
	// FamilyQuasiPoisson: Var y = φ·μ, β by Poisson maximum likelihood,
	// φ by Pearson's X²/(n − p) (McCullagh & Nelder 1989, §6.2.3 and
	// §9.2.4; Cameron & Trivedi 2013, §3.2.3). φ < 1 is allowed.
	FamilyQuasiPoisson CountFamily = iota
	// FamilyPoisson: Var y = μ, φ = 1.
	FamilyPoisson
	// FamilyNegBin2: Var y = μ + μ²/θ, β and θ by maximum likelihood,
	// alternating as MASS::glm.nb (Venables & Ripley 2002, §7.4; Cameron &
	// Trivedi 2013, §3.3.1).
	FamilyNegBin2
)

// String is the family's name as R calls it.
func (f CountFamily) String() string {
	switch f {
	case FamilyPoisson:
		return "poisson"
	case FamilyNegBin2:
		return "negative binomial (NB2)"
	default:
		return "quasipoisson"
	}
}

// maxTheta bounds θ̂ of FamilyNegBin2: the likelihood of equidispersed or
// underdispersed data rises towards θ = ∞ (the Poisson limit), where it has
// no maximum; at 1e8 the NB2 variance is the Poisson one to within 1e-6
// for any census under 100.
const maxTheta = 1e8

// CountFit is a fitted log-link count regression.
type CountFit struct {
	Family     CountFamily
	Beta       []float64
	Cov        *mat.SymDense // estimated covariance of Beta: φ·(XᵀWX)⁻¹
	SE         []float64     // √diag(Cov)
	Mu         []float64     // fitted means
	Dispersion float64       // φ: Pearson X²/(n−p) for quasi-Poisson, 1 otherwise
	Theta      float64       // NB2 θ̂ (0 for the other families)
	ThetaSE    float64       // NB2 √(1/observed information of θ)
	Deviance   float64       // residual deviance of the family (quasi-Poisson: the Poisson one)
	Iterations int           // IRLS iterations in total
}

// errSingularDesign is returned when XᵀWX is not positive definite.
var errSingularDesign = errors.New("stats: count regression design is rank deficient")

// FitCountRegression fits log μᵢ = xᵢᵀβ to counts y by iteratively
// reweighted least squares (McCullagh & Nelder 1989, §2.5):
//
//	zᵢ = ηᵢ + (yᵢ − μᵢ)/μᵢ,   wᵢ = μᵢ²/V(μᵢ)
//	β ← (XᵀWX)⁻¹XᵀWz
//
// with V(μ) = μ (Poisson, quasi-Poisson) or μ + μ²/θ (NB2), started from
// μ = y + 0.1 as R's poisson()$initialize, until the relative change of the
// deviance is under 1e-12. For quasi-Poisson
//
//	φ̂ = Σ (yᵢ − μ̂ᵢ)²/μ̂ᵢ / (n − p)        (Pearson; n − p, not n)
//	Cov(β̂) = φ̂·(XᵀŴX)⁻¹
//
// which leaves β̂ consistent whenever the mean is right, whatever the
// variance (Cameron & Trivedi 2013, §3.2.3). For NB2, θ is re-estimated by
// Newton's method on its score between IRLS fits (MASS::theta.ml),
//
//	∂ℓ/∂θ = Σ [ψ(θ+yᵢ) − ψ(θ) + ln θ + 1 − ln(θ+μᵢ) − (yᵢ+θ)/(θ+μᵢ)]
//
// with ψ(θ+y) − ψ(θ) = Σ_{j<y} 1/(θ+j) exact for whole y, until θ changes
// by less than 1e-10 relative; θ̂ is capped at 1e8 (the Poisson limit) and
// Cov(β̂) = (XᵀŴX)⁻¹ at θ̂, as summary.negbin.
//
// x holds one row per count (include a column of ones for an intercept).
// It panics if the rows of x differ in length from each other or y has a
// different length, or any y is negative or not whole. It returns an error
// if XᵀWX is singular or n ≤ p. x and y are not modified.
func FitCountRegression(x [][]float64, y []float64, family CountFamily) (*CountFit, error) {
	n := len(y)
	if len(x) != n {
		panic("stats: FitCountRegression rows of x and y differ")
	}
	if n == 0 {
		return nil, errSingularDesign
	}
	p := len(x[0])
	for i := range x {
		if len(x[i]) != p {
			panic("stats: FitCountRegression rows of x differ in length")
		}
		if y[i] < 0 || y[i] != math.Trunc(y[i]) {
			panic("stats: FitCountRegression count is negative or not whole")
		}
	}
	if n <= p {
		return nil, errSingularDesign
	}
	X := mat.NewDense(n, p, nil)
	for i := range x {
		X.SetRow(i, x[i])
	}
	fit := &CountFit{Family: family, Mu: make([]float64, n)}
	for i, v := range y {
		fit.Mu[i] = v + 0.1
	}
	theta := math.Inf(1)
	if err := fit.irls(X, y, theta); err != nil {
		return nil, err
	}
	if family == FamilyNegBin2 {
		theta = thetaML(y, fit.Mu, n, math.NaN())
		for range 100 {
			if err := fit.irls(X, y, theta); err != nil {
				return nil, err
			}
			next := thetaML(y, fit.Mu, n, theta)
			done := math.Abs(next-theta) <= 1e-10*theta
			theta = next
			if done {
				break
			}
		}
		if err := fit.irls(X, y, theta); err != nil {
			return nil, err
		}
		fit.Theta = theta
		fit.ThetaSE = 1 / math.Sqrt(thetaInfo(y, fit.Mu, theta))
	}
	fit.Dispersion = 1
	if family == FamilyQuasiPoisson {
		x2 := 0.0
		for i, v := range y {
			d := v - fit.Mu[i]
			x2 += d * d / fit.Mu[i]
		}
		fit.Dispersion = x2 / float64(n-p)
	}
	if err := fit.covariance(X, theta); err != nil {
		return nil, err
	}
	return fit, nil
}

// irls runs IRLS at fixed θ (∞ for the Poisson variance) from fit.Mu.
func (fit *CountFit) irls(X *mat.Dense, y []float64, theta float64) error {
	n, _ := X.Dims()
	w := make([]float64, n)
	z := mat.NewVecDense(n, nil)
	eta := make([]float64, n)
	for i := range n {
		eta[i] = math.Log(fit.Mu[i])
	}
	devOld := math.Inf(1)
	var xtwz, beta mat.VecDense
	var chol mat.Cholesky
	for range 100 {
		fit.Iterations++
		for i := range n {
			mu := fit.Mu[i]
			w[i] = mu / (1 + mu/theta)
			z.SetVec(i, w[i]*(eta[i]+(y[i]-mu)/mu))
		}
		xtwx := weightedGram(X, w)
		xtwz.MulVec(X.T(), z)
		if !chol.Factorize(xtwx) {
			return errSingularDesign
		}
		if err := chol.SolveVecTo(&beta, &xtwz); err != nil {
			return errSingularDesign
		}
		for i := range n {
			eta[i] = mat.Dot(X.RowView(i), &beta)
			fit.Mu[i] = math.Exp(eta[i])
		}
		dev := countDeviance(y, fit.Mu, theta)
		if math.Abs(dev-devOld) <= 1e-12*(math.Abs(dev)+0.1) {
			break
		}
		devOld = dev
	}
	fit.Beta = mat.Col(nil, 0, &beta)
	fit.Deviance = countDeviance(y, fit.Mu, theta)
	return nil
}

// covariance sets Cov = φ(XᵀŴX)⁻¹ and SE at the fitted means.
func (fit *CountFit) covariance(X *mat.Dense, theta float64) error {
	n, _ := X.Dims()
	w := make([]float64, n)
	for i, mu := range fit.Mu {
		w[i] = mu / (1 + mu/theta)
	}
	info := weightedGram(X, w)
	p := len(fit.Beta)
	var chol mat.Cholesky
	if !chol.Factorize(info) {
		return errSingularDesign
	}
	cov := mat.NewSymDense(p, nil)
	if err := chol.InverseTo(cov); err != nil {
		return errSingularDesign
	}
	cov.ScaleSym(fit.Dispersion, cov)
	fit.Cov = cov
	fit.SE = make([]float64, p)
	for j := range p {
		fit.SE[j] = math.Sqrt(cov.At(j, j))
	}
	return nil
}

// weightedGram returns XᵀWX for W = diag(w).
func weightedGram(X *mat.Dense, w []float64) *mat.SymDense {
	n, p := X.Dims()
	g := mat.NewSymDense(p, nil)
	for i := range n {
		row := X.RawRowView(i)
		for a := range p {
			wa := w[i] * row[a]
			for b := a; b < p; b++ {
				g.SetSym(a, b, g.At(a, b)+wa*row[b])
			}
		}
	}
	return g
}

// countDeviance is the residual deviance: Poisson for θ = ∞,
// 2Σ[y ln(y/μ) − (y+θ) ln((y+θ)/(μ+θ))] for NB2 (McCullagh & Nelder 1989,
// Table 2.1; Venables & Ripley 2002, §7.4).
func countDeviance(y, mu []float64, theta float64) float64 {
	d := 0.0
	for i, v := range y {
		m := mu[i]
		t := 0.0
		if v > 0 {
			t = v * math.Log(v/m)
		}
		if math.IsInf(theta, 1) {
			d += 2 * (t - (v - m))
		} else {
			d += 2 * (t - (v+theta)*math.Log((v+theta)/(m+theta)))
		}
	}
	return d
}

// thetaScore and thetaInfo are the score and observed information of θ
// in the NB2 log-likelihood at fixed μ (MASS::theta.ml).
func thetaScore(y, mu []float64, theta float64) float64 {
	s := 0.0
	for i, v := range y {
		for j := 0.0; j < v; j++ {
			s += 1 / (theta + j)
		}
		s += math.Log(theta) + 1 - math.Log(theta+mu[i]) - (v+theta)/(mu[i]+theta)
	}
	return s
}

func thetaInfo(y, mu []float64, theta float64) float64 {
	s := 0.0
	for i, v := range y {
		for j := 0.0; j < v; j++ {
			s += 1 / ((theta + j) * (theta + j))
		}
		m := mu[i]
		s += -1/theta + 2/(m+theta) - (v+theta)/((m+theta)*(m+theta))
	}
	return s
}

// thetaML maximises the NB2 likelihood in θ at fixed μ by Newton's method
// from start (NaN: the moment start n/Σ(y/μ − 1)², as theta.ml), staying
// inside (0, maxTheta].
func thetaML(y, mu []float64, n int, start float64) float64 {
	theta := start
	if math.IsNaN(theta) {
		s := 0.0
		for i, v := range y {
			d := v/mu[i] - 1
			s += d * d
		}
		theta = float64(n) / s
	}
	theta = math.Min(math.Max(theta, 1e-6), maxTheta)
	for range 50 {
		info := thetaInfo(y, mu, theta)
		if !(info > 0) {
			// No interior maximum along Newton's path: the Poisson limit.
			return maxTheta
		}
		step := thetaScore(y, mu, theta) / info
		next := theta + step
		if next <= 0 {
			next = theta / 2
		}
		next = math.Min(next, maxTheta)
		if math.Abs(next-theta) <= 1e-12*theta {
			return next
		}
		theta = next
	}
	return theta
}
