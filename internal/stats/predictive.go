package stats

import (
	"math"
	"math/rand/v2"
)

// A tier with at least fwFrom patients has its shift total drawn in one
// step by the Fenton–Wilkinson lognormal approximation instead of patient
// by patient (see simulateTotals): 16 for cover levels up to 0.95, 64
// above. Measured against exact sums of n lognormal values (200,000 draws
// each): at the 90% quantile FW is within −0.12% for n ≥ 16 and log SD ≤
// 0.7, and above the exact quantile (the safe side) by 1–10% for log SD
// 1–1.5; at the 99% quantile it is up to 3% low for n = 16–32, so higher
// cover levels draw patient by patient up to 64.
const (
	fwFrom     = 16
	fwFromHigh = 64
	fwHighFrom = 0.95 // cover levels above this use fwFromHigh
)

// paramDraw is one draw of the model's parameters from their approximate
// posterior (see simulateTotals).
type paramDraw struct {
	beta, tau2, u float64
}

// simulateTotals draws `draws` shift totals of care minutes from the
// predictive distribution of the fitted model for the census in f.tiers,
// integrating over parameter uncertainty. For each draw:
//
//	β   = β̂ + se(β)·T_ν when the trend is followed, else 0   (Student t,
//	      ν = occurrences − 1; followed when its 96% interval excludes 0;
//	      95% in version 2)
//	τ²  = τ̂²·ν/χ²_ν, ν = 2τ̂⁴/se(τ̂²)², when the effect is drawn
//	      (τ̂² > 2.326·se(τ̂²); 1.96 in version 2); else 0
//	σ_k² = ν_k·s̃_k² / χ²_ν_k          (scaled inverse χ², ν_k = m_k − 1 + 2)
//	v_k = ln(1 + (e^{σ_k²} − 1)/m_k)
//	L_k = ln(ȳ_k + c_k) − β·t̄_k + √(τ²·w_k)·U + √v_k·Z_k − (v_k + τ²·w_k + t̄_k²·se(β)²)/2
//	      (the last term, which keeps E[e^{L_k}] at the estimate, from
//	      version 3 on; its trend part only when the trend is followed)
//	μ_k = L_k − (σ_k² + τ²)/2          (so that E[minutes + c_k] = e^{L_k})
//	b   ~ N(0, τ²)                     (the new shift's common effect)
//	total = Σ_k Σ_{i≤n_k} max(0, exp(μ_k + b + σ_k·ε_i) − c_k)
//
// with U shared by all tiers: the tiers' means are estimated from the same
// shifts, so their errors are positively correlated, and a shared U is the
// cautious (largest-variance) choice. With flat priors on α_k and log σ_k
// this is the usual normal-theory posterior predictive (Gelman et al. 2013,
// Bayesian Data Analysis, 3rd ed., §3.2 and §3.6: the predictive of a new
// value is a Student t on the log scale, wider than the plug-in normal for
// small m_k, so the spread never shrinks below the analytic one). Tiers
// with many patients (fwFrom) have their sum of lognormal values drawn as one
// lognormal with the same mean and variance (Fenton, L. F. (1960), IRE
// Trans. Commun. Syst. 8(1), 57–67), which keeps the right skew of the sum.
//
// Randomness: draws are cut into fixed chunks of 4096; chunk c uses
// math/rand/v2's PCG seeded with (seed, splitmix64(c ⊕ 0x9e3779b97f4a7c15))
// and its NormFloat64 (Marsaglia & Tsang 2000 ziggurat); χ² draws use
// Marsaglia & Tsang's (2000, ACM TOMS 26(3)) gamma method. The same seed
// gives the same totals for any GOMAXPROCS on one platform.
func simulateTotals(f *careFit, draws int, seed uint64) []float64 {
	return inChunks(draws, func() func(out []float64, c int) {
		return func(out []float64, c int) {
			r := rand.New(rand.NewPCG(seed, splitmix64(uint64(c)^streamKey)))
			for d := range out {
				out[d] = f.drawTotal(r)
			}
		}
	})
}

// drawParams draws β, τ² and the shared mean error U.
func (f *careFit) drawParams(r *rand.Rand) paramDraw {
	var p paramDraw
	if f.follow {
		p.beta = f.beta + f.betaSE*studentT(r, f.betaDF)
	}
	if f.draw {
		// Scaled inverse χ² with Satterthwaite's (1946, Biometrics
		// Bulletin 2(6)) degrees of freedom ν = 2·τ̂⁴ / se(τ̂²)²: centred
		// on τ̂², right-skewed like a variance estimate, and 0 when the
		// estimate is (a zero effect is not given a spurious spread).
		nu := max(1, 2*f.tau2*f.tau2/(f.tau2SE*f.tau2SE))
		p.tau2 = min(f.tau2*nu/chiSquare(r, nu), maxLogVariance)
	}
	p.u = r.NormFloat64()
	return p
}

// tierLocation draws tier k's log variance and its log-scale location at
// the projected date.
func (f *careFit) tierLocation(r *rand.Rand, t *careTier, p paramDraw) (mu, sigma2 float64) {
	sigma2 = min(t.df*t.sigma2/chiSquare(r, t.df), maxLogVariance)
	// The log of the tier's mean (plus offset) at the projected date, with
	// the error of a mean of m values whose log variance is sigma2
	// (squared CV e^{σ²} − 1, so the mean's squared CV is that over m, and
	// its log variance ln(1 + CV²/m)) and of the shifts they came from; then the
	// lognormal location that keeps that mean: μ = level − (σ² + τ²)/2.
	v := math.Log1p(math.Expm1(sigma2) / float64(len(t.y)))
	level := t.level - p.beta*t.tbar + math.Sqrt(p.tau2*t.weight)*p.u + math.Sqrt(v)*r.NormFloat64()
	if f.spec.meanPreserving {
		// Centre the normal errors so that E[e^level] = e^{level at the
		// estimates}: ȳ_k estimates the tier's mean without bias, and the
		// uncentred draw put the expected total e^{v/2} above it. The
		// trend's part uses its normal approximation (a Student t has no
		// exponential moment).
		level -= (v + p.tau2*t.weight) / 2
		if f.follow {
			level -= t.tbar * t.tbar * f.betaSE * f.betaSE / 2
		}
	}
	return level - (sigma2+p.tau2)/2, sigma2
}

// drawTotal draws one shift total.
func (f *careFit) drawTotal(r *rand.Rand) float64 {
	p := f.drawParams(r)
	b := math.Sqrt(p.tau2) * r.NormFloat64()
	total := 0.0
	for k := range f.tiers {
		t := &f.tiers[k]
		if t.patients == 0 {
			continue
		}
		mu, s2 := f.tierLocation(r, t, p)
		mu += b
		total = f.tierSum(r, total, t.patients, mu, s2, t.offset)
	}
	return total
}

// tierSum adds to total the care minutes of n patients of one tier whose
// log minutes (plus offset) are normal(mu, s2) in this draw, one patient
// at a time onto the running total (so that every sum rounds as it
// always has: stored projections recompute to the bit): patient by
// patient below fwFrom, else by Fenton–Wilkinson: Σ of n lognormal(mu,
// s²) ≈ lognormal with the same mean n·e^{mu+s²/2} and variance
// n·(e^{s²}−1)·e^{2mu+s²}.
func (f *careFit) tierSum(r *rand.Rand, total float64, n int, mu, s2, offset float64) float64 {
	if n < f.fwFrom {
		s := math.Sqrt(s2)
		for range n {
			total += max(0, math.Exp(mu+s*r.NormFloat64())-offset)
		}
		return total
	}
	nf := float64(n)
	v := math.Log1p(math.Expm1(s2) / nf)
	loc := math.Log(nf) + mu + s2/2 - v/2
	return total + max(0, math.Exp(loc+math.Sqrt(v)*r.NormFloat64())-nf*offset)
}

// chiSquare draws χ²_ν = 2·Gamma(ν/2).
func chiSquare(r *rand.Rand, nu float64) float64 { return 2 * gammaDraw(r, nu/2) }

// studentT draws Student's t with ν degrees of freedom, Z / √(χ²_ν/ν).
func studentT(r *rand.Rand, nu float64) float64 {
	return r.NormFloat64() / math.Sqrt(chiSquare(r, nu)/nu)
}

// gammaDraw draws Gamma(shape, 1) by Marsaglia & Tsang (2000), "A simple
// method for generating gamma variables", ACM TOMS 26(3), 363–372; for
// shape < 1 it draws Gamma(shape+1) and multiplies by U^(1/shape) (their §6).
func gammaDraw(r *rand.Rand, shape float64) float64 {
	if shape < 1 {
		u := r.Float64()
		for u == 0 {
			u = r.Float64()
		}
		return gammaDraw(r, shape+1) * math.Pow(u, 1/shape)
	}
	d := shape - 1.0/3
	c := 1 / math.Sqrt(9*d)
	for {
		x := r.NormFloat64()
		v := 1 + c*x
		if v <= 0 {
			continue
		}
		v = v * v * v
		u := r.Float64()
		if u < 1-0.0331*x*x*x*x || math.Log(u) < 0.5*x*x+d*(1-v+math.Log(v)) {
			return d * v
		}
	}
}

// plugInMean is E[total] at the point estimates, Σ_k n_k·(e^{L̂_k} − c_k)
// with L̂_k = ln(ȳ_k + c_k) − β̂·t̄_k (β̂ only where the trend is
// followed): the tier means, moved to the projected date.
func (f *careFit) plugInMean() float64 {
	total := 0.0
	for _, t := range f.tiers {
		if t.patients == 0 {
			continue
		}
		total += float64(t.patients) * f.perPatientMean(&t)
	}
	return total
}

// perPatientMean is tier t's mean care minutes per patient at the
// estimates, e^{L̂_k} − c_k (at least 0), as plugInMean sums them.
func (f *careFit) perPatientMean(t *careTier) float64 {
	return max(0, math.Exp(t.level-f.slopeUsed()*t.tbar)-t.offset)
}
