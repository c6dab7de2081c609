package simstudy

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Dist is a true distribution of one patient's direct care minutes per
// shift. Every draw is finite and at least 0.
type Dist interface {
	Draw(r *rand.Rand) float64
	String() string
}

// Gamma is the gamma distribution with shape k and scale θ: mean kθ,
// variance kθ².
type Gamma struct{ Shape, Scale float64 }

// Draw draws by Marsaglia & Tsang's method (see gammaDraw).
func (g Gamma) Draw(r *rand.Rand) float64 { return g.Scale * gammaDraw(r, g.Shape) }

func (g Gamma) String() string { return fmt.Sprintf("gamma(shape %g, scale %g)", g.Shape, g.Scale) }

// LogNormal is exp(MeanLog + SDLog·Z), Z standard normal: median
// e^MeanLog, mean e^(MeanLog + SDLog²/2).
type LogNormal struct{ MeanLog, SDLog float64 }

// Draw draws exp(μ + σZ).
func (l LogNormal) Draw(r *rand.Rand) float64 { return math.Exp(l.MeanLog + l.SDLog*r.NormFloat64()) }

func (l LogNormal) String() string {
	return fmt.Sprintf("lognormal(median %.0f, sdlog %g)", math.Exp(l.MeanLog), l.SDLog)
}

// Mixture draws from A with probability P and from B otherwise.
type Mixture struct {
	P    float64
	A, B Dist
}

// Draw picks the component, then draws from it.
func (m Mixture) Draw(r *rand.Rand) float64 {
	if r.Float64() < m.P {
		return m.A.Draw(r)
	}
	return m.B.Draw(r)
}

func (m Mixture) String() string { return fmt.Sprintf("%g·%v + %g·%v", m.P, m.A, 1-m.P, m.B) }

// LogT is min(Max, exp(Loc + Scale·T_ν)) with T_ν Student's t with DF
// degrees of freedom: heavy-tailed on the log scale as well, so that its
// uncapped mean is infinite. The cap (two nurses for the whole of a 12-hour
// shift is 1,440 minutes) keeps every value finite, and the truth uses the
// same capped distribution.
type LogT struct{ Loc, Scale, DF, Max float64 }

// Draw draws T_ν = Z / √(χ²_ν/ν) (the definition of Student's t), then
// exponentiates and caps.
func (l LogT) Draw(r *rand.Rand) float64 {
	chi2 := 2 * gammaDraw(r, l.DF/2)
	t := r.NormFloat64() / math.Sqrt(chi2/l.DF)
	return min(l.Max, math.Exp(l.Loc+l.Scale*t))
}

func (l LogT) String() string {
	return fmt.Sprintf("log-t(median %.0f, scale %g, %g df, cap %g)", math.Exp(l.Loc), l.Scale, l.DF, l.Max)
}

// gammaDraw draws Gamma(shape, 1) by Marsaglia, G. & Tsang, W. W. (2000),
// "A simple method for generating gamma variables", ACM TOMS 26(3),
// 363–372; for shape < 1 it draws Gamma(shape+1)·U^(1/shape) (their §6).
// It is written here rather than borrowed so that the truth never shares
// code with the model it judges.
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
