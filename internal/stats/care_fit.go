package stats

import (
	"fmt"
	"math"
	"slices"
	"time"

	"gonum.org/v1/gonum/stat/distuv"
)

// The care model of versions 2 and 3 (see fitCare; modelSpec holds what
// differs between them). Its tuning constants were
// chosen with the simulation battery in internal/simstudy (bench/calibration
// prints its table); each says why.
const (
	// MinTierObservations is the fewest usable observations a tier with
	// patients needs before the care-time part of a projection is shown.
	// Below it the battery's tiny-tier scenarios could not keep the cover
	// promise within 2 points without recommending absurd headcounts, so
	// the projection declines (DecidedByInsufficient) instead.
	MinTierObservations = 8
	// fenceK is the multiple of the log-scale IQR beyond the quartiles
	// where an observation is set aside as a likely entry error: Tukey's
	// (1977) outer fence, 3·IQR. On a lognormal tier it sets aside about
	// one value in a million that is real; a value typed in hours instead of
	// minutes (×60, +4.1 on the log scale) lies far beyond it.
	fenceK = 3.0
	// minFenceReach: the fences lie at least ln 5 beyond the quartiles on
	// the log scale (a factor of 5 in minutes), so that a tier whose
	// values happen to cluster tightly (a small IQR) does not lose real
	// values as errors; a ×60 or ×10 typing error still lies beyond.
	minFenceReach = 1.6094379124341003 // ln 5
	// minFenceObservations: quartiles of fewer values cannot tell an entry
	// error from the tail: with 8 lognormal values a real one fell beyond
	// the outer fence in 1 of 10 seeded samples (TestProjectSmallTierSpread).
	minFenceObservations = 12
	// offsetShare sets the log offset c = max(1 minute, 10% of the tier's
	// median): zero-minute observations stay finite on the log scale
	// without dominating its spread (our choice, checked by the battery).
	offsetShare = 0.1
	// priorDF is the weight, in degrees of freedom, with which a tier's log
	// variance is pulled towards the pooled log variance of all tiers
	// (hierarchical shrinkage; Gelman et al. 2013, Bayesian Data Analysis,
	// 3rd ed., §5.4 and §14.8 for the scaled inverse-χ² form). 2 keeps the
	// pull weak, so a tier that really is more variable stays so.
	priorDF = 2.0
	// minTrendDates and minTrendDays: a trend needs this many distinct dates
	// spread over this many days before it is estimated at all.
	minTrendDates = 8
	minTrendDays  = 14
	// minEffectGroups: the shift-level component needs this many shift
	// occurrences with two or more observations.
	minEffectGroups = 5
	// maxLogVariance caps a simulated log variance (σ = 10 on the log
	// scale) so that every simulated total stays finite.
	maxLogVariance = 100.0
	// sigmaFloorShare keeps at least this share of a tier's residual log
	// variance as patient-to-patient variance after the shift-level part is
	// taken out, so a noisy estimate of that part cannot leave a tier with
	// no spread of its own.
	sigmaFloorShare = 0.25
)

// HeldOut is an observation the model set aside because it lies beyond the
// log-scale outer fences of its tier: probably an entry error (minutes
// typed as hours, a misplaced digit). It is not deleted; the review page is
// where it can be excluded or confirmed.
type HeldOut struct {
	Tier        string  `json:"tier"`
	Index       int     `json:"index"`        // position in the tier's CareMinutes
	CareMinutes float64 `json:"care_minutes"` // as given
	Side        string  `json:"side"`         // "above" or "below"
	Date        string  `json:"date,omitempty"`
}

// modelSpec is what differs between method versions 2 and 3 of the care
// model; everything else is shared. A version's spec never changes once
// projections have been stored under it (projector.Recompute re-runs it).
type modelSpec struct {
	version     string
	description string
	// jackknife: the trend's standard error is the delete-one-occurrence
	// jackknife (CR3) instead of the CR1 sandwich (slope).
	jackknife bool
	// trendQuantile: the trend is followed when |β̂/se| exceeds the
	// Student t quantile t_{q, G−1} (0.975: a 95% two-sided test).
	trendQuantile float64
	// effectZ: the shift-level effect is drawn when τ̂² > z·se(τ̂²).
	effectZ float64
	// meanPreserving: the simulated tier levels keep the expected total
	// at the plug-in estimate (tierLocation).
	meanPreserving bool
	// movement: census movement during the shift (ProjectionInput.Movement)
	// is drawn (drawTotalMoving).
	movement bool
}

// specV2 is method version 2, frozen.
var specV2 = modelSpec{
	version:       MethodVersionV2,
	description:   MethodDescriptionV2,
	trendQuantile: 0.975, effectZ: 1.959963984540054,
}

// specV3 is method version 3 (MethodVersion). Its changes were measured
// with the simulation battery (bench/calibration.sh; version 2 at 400
// replications, version 3 at 600, seed 20261204) and, for the test's
// size, 1,000 flat histories per scenario; before → after:
//
//   - jackknife: on flat wards the CR1 sandwich made the 95% trend test
//     reject in 6.0–7.2% of 1,000 histories per scenario (it is known to be
//     too small with few clusters: Cameron & Miller 2015, §VI); the
//     jackknife rejects in 4.3–5.6%.
//   - meanPreserving: version 2 drew the level error on the log scale
//     without centring it, so the expected total was e^{v/2} above the
//     plug-in mean; at a census of 100 the cover quantile was exceeded on
//     9.4% of next shifts for 10% promised, 9.9% after.
//   - the trend is followed at the 96% level (t_{0.98}) and the shift
//     effect drawn at the one-sided 99% level (z = 2.326): every chance
//     detection costs about 4–5 nurses at a census of 100 (a wider band
//     and, for a trend, a moved level), and the battery's no-waste rule
//     leaves about 0.1 nurse for them there. census-100 rec − oracle
//     +0.72 → +0.57; drift shortfall 0.079 → 0.096, shift-effect 0.088 →
//     0.098 (limit 0.12).
var specV3 = modelSpec{
	version:     MethodVersionV3,
	description: MethodDescriptionV3,
	jackknife:   true, trendQuantile: 0.98, effectZ: 2.3263478740408408,
	meanPreserving: true,
}

// specV4 is method version 4 (MethodVersion): version 3 with census
// movement during the shift (Project, drawTotalMoving). Without movement
// its numbers are version 3's.
var specV4 = modelSpec{
	version:     MethodVersion,
	description: MethodDescription,
	jackknife:   true, trendQuantile: 0.98, effectZ: 2.3263478740408408,
	meanPreserving: true, movement: true,
}

// careTier is one tier's part of a fitted model.
type careTier struct {
	code     string
	patients int
	offset   float64   // c of z = ln(y + c)
	z        []float64 // log-scale values used
	t        []float64 // days relative to the projected date (≤ 0); nil without dates
	group    []int     // shift occurrence of each used value; nil without dates and shifts
	zbar     float64   // mean of z
	level    float64   // ln(ȳ + c): log of the mean of the kept values plus the offset
	y        []float64 // kept values, minutes
	tbar     float64   // mean of t
	resVar   float64   // moment-matched log variance (shift-level part included)
	sigma2   float64   // patient-to-patient log variance after shrinkage
	df       float64   // degrees of freedom of sigma2
	weight   float64   // Σ_g (n_kg/m_k)²: how shift occurrences weigh on zbar
}

// careFit is the fitted log-scale model of FitCare.
type careFit struct {
	spec  modelSpec
	tiers []careTier
	held  []HeldOut

	trend   bool
	beta    float64 // common slope per day on the log scale
	betaSE  float64
	betaDF  float64
	follow  bool   // the projection follows the trend (fitTrend)
	trendNo string // why no trend was estimated

	effect   bool
	tau2     float64 // shift-level log variance (may be below 0 before truncation)
	tau2SE   float64
	draw     bool // the projection draws the shift-level effect (fitEffect)
	groups   int  // shift occurrences with two or more observations
	effectNo string

	fwFrom int // see fwFrom in predictive.go
}

// fitInput is one tier's data for fitCare.
type fitInput struct {
	code     string
	patients int
	minutes  []float64 // per-patient shift minutes (ShiftMinutes)
	raw      []float64 // as given, for HeldOut
	dates    []string  // optional
	shifts   []string  // optional
}

// fitCare fits, on the log scale z = ln(y + c_k), the model
//
//	z_kgi = α_k + β·t_g + b_g + e_kgi,   b_g ~ N(0, τ²),  e_kgi ~ N(0, σ_k²)
//
// for tier k, shift occurrence g (date and shift) on day t_g relative to the
// projected date, and patient i. Right-skewed care times become roughly
// symmetric on the log scale, and b_g multiplies every patient's care on
// one shift at once (a heavy intake, an emergency). Estimators, all by
// moments so that they are cheap and transparent:
//
//   - values beyond the outer fences Q1 − 3·IQR, Q3 + 3·IQR of a tier's z
//     (type 7 quartiles, Tukey 1977; at least ln 5 beyond the quartiles)
//     are set aside and reported (HeldOut);
//   - β: the pooled within-tier least-squares slope Σ(t−t̄_k)(z−z̄_k) /
//     Σ(t−t̄_k)², with a cluster-robust standard error over shift
//     occurrences, G/(G−1)·Σ_g (Σ_{i∈g}(t_i−t̄_k)r_i)² / Sxx² (Liang &
//     Zeger 1986; Cameron & Miller 2015, J. Human Resources 50(2)), or
//     in version 3 its delete-one-occurrence jackknife (slopeJackknife);
//     only with ≥ 8 distinct dates over ≥ 14 days;
//   - τ²: the mean product of residual pairs within a shift occurrence,
//     Σ_g Σ_{i<j} r_i r_j / Σ_g n_g(n_g−1)/2, an analysis-of-variance
//     moment estimator (Searle, Casella & McCulloch 1992, Variance
//     Components, ch. 3), with a cluster-robust standard error; only with
//     ≥ 5 occurrences holding two or more observations;
//   - σ_k²: the log variance of the lognormal with the tier's mean and
//     variance of minutes (fitSpread), less τ² (at least a quarter of
//     it), shrunk towards the pooled value with 2 degrees of freedom;
//   - the trend enters the projection only when |β̂/se| exceeds the
//     spec's Student t quantile (version 3: t_{0.98}, a 96% interval that
//     excludes 0), and the shift-level effect only when τ̂² is more than
//     the spec's z standard errors above 0 (version 3: 2.326, one-sided
//     99%), so a flat ward does not pay for a line or a shared effect it
//     does not have (the cost of the averaged alternative is recorded in
//     fitTrend and fitEffect, the choice of levels at specV3).
//
// fitCare assumes validated input (see ProjectionInput.validate).
func fitCare(tiers []fitInput, target string, spec modelSpec) *careFit {
	f := &careFit{spec: spec, fwFrom: fwFrom}
	dated := target != ""
	for _, t := range tiers {
		if len(t.dates) != len(t.minutes) {
			dated = false
		}
	}
	var targetDay time.Time
	if dated {
		targetDay, _ = time.Parse(time.DateOnly, target)
	}
	groupID := map[string]int{}
	for _, in := range tiers {
		ct := careTier{code: in.code, patients: in.patients}
		ct.offset = 1
		if len(in.minutes) > 0 {
			if med := HFQuantile(7, 0.5, slices.Sorted(slices.Values(in.minutes))); offsetShare*med > 1 {
				ct.offset = offsetShare * med
			}
		}
		z := make([]float64, len(in.minutes))
		for i, y := range in.minutes {
			z[i] = math.Log(y + ct.offset)
		}
		lo, hi := math.Inf(-1), math.Inf(1)
		if len(z) >= minFenceObservations {
			s := slices.Sorted(slices.Values(z))
			q1, q3 := HFQuantile(7, 0.25, s), HFQuantile(7, 0.75, s)
			if iqr := q3 - q1; iqr > 0 {
				reach := max(fenceK*iqr, minFenceReach)
				lo, hi = q1-reach, q3+reach
			}
		}
		for i, v := range z {
			if v < lo || v > hi {
				h := HeldOut{Tier: in.code, Index: i, CareMinutes: in.raw[i], Side: "above"}
				if v < lo {
					h.Side = "below"
				}
				if dated {
					h.Date = in.dates[i]
				}
				f.held = append(f.held, h)
				continue
			}
			ct.z = append(ct.z, v)
			ct.y = append(ct.y, in.minutes[i])
			if dated {
				d, _ := time.Parse(time.DateOnly, in.dates[i])
				ct.t = append(ct.t, d.Sub(targetDay).Hours()/24)
				key := in.dates[i]
				if i < len(in.shifts) {
					key += "|" + in.shifts[i]
				}
				g, ok := groupID[key]
				if !ok {
					g = len(groupID)
					groupID[key] = g
				}
				ct.group = append(ct.group, g)
			}
		}
		if m := len(ct.z); m > 0 {
			ct.zbar = avg(ct.z)
			ct.level = math.Log(avg(ct.y) + ct.offset)
			if dated {
				ct.tbar = avg(ct.t)
			}
		}
		f.tiers = append(f.tiers, ct)
	}
	f.fitTrend(dated)
	res := f.residuals()
	f.fitEffect(res, len(groupID))
	f.fitSpread()
	return f
}

// fitTrend estimates the common slope β and its cluster-robust SE (slope
// over every tier with two or more values).
func (f *careFit) fitTrend(dated bool) {
	if !dated {
		f.trendNo = "observations carry no dates"
		return
	}
	var used []*careTier
	for k := range f.tiers {
		if len(f.tiers[k].z) >= 2 {
			used = append(used, &f.tiers[k])
		}
	}
	ok, beta, se, df, reason := slope(used, f.spec.jackknife)
	if !ok {
		f.trendNo = reason
		return
	}
	f.trend, f.beta, f.betaSE, f.betaDF = true, beta, se, df
	// The projection follows the trend only when the data show one: its
	// Student t interval at the spec's level excludes 0 (version 2: 95%,
	// the test that makes a projection warn that care time has moved;
	// version 3: 96%, see specV3). Averaging over the two
	// models by their BIC weights (Kass & Raftery 1995, JASA 90(430))
	// was tried and measured by the battery: it never drops below about 13% weight on a flat ward,
	// and the extrapolated line's variance, about four times that of the
	// mean, then cost 0.3-0.4 nurses at a census of 100 (rec − oracle
	// +1.0 against +0.6 to +0.7), while drift was covered either way
	// (true shortfall 0.064 averaged, 0.077 tested).
	if crit := (distuv.StudentsT{Mu: 0, Sigma: 1, Nu: f.betaDF}).Quantile(f.spec.trendQuantile); math.Abs(f.beta/f.betaSE) > crit {
		f.follow = true
	}
}

// residuals returns r = z − z̄_k − β(t − t̄_k) per tier.
func (f *careFit) residuals() [][]float64 {
	res := make([][]float64, len(f.tiers))
	for k, t := range f.tiers {
		res[k] = make([]float64, len(t.z))
		for i, z := range t.z {
			r := z - t.zbar
			if f.trend {
				r -= f.beta * (t.t[i] - t.tbar)
			}
			res[k][i] = r
		}
	}
	return res
}

// fitEffect estimates τ² from residual pairs within shift occurrences.
func (f *careFit) fitEffect(res [][]float64, groups int) {
	if groups == 0 {
		f.effectNo = "observations carry no date and shift, so shifts that are heavier for every patient at once cannot be told apart from single heavy patients"
		return
	}
	sum := make([]float64, groups)
	sq := make([]float64, groups)
	n := make([]int, groups)
	for k, t := range f.tiers {
		if len(t.z) < 2 {
			continue // a lone value's residual is 0 by construction
		}
		// Each residual is taken about the tier's mean without its own
		// shift occurrence: about the full mean, residuals of one tier in
		// one occurrence are pulled together by −(τ² + σ²)/m, which made
		// τ̂² too small (the battery's shift-effect scenario covered 82% at
		// its 90% quantile). Residuals sum to 0 over a tier, so the mean of
		// the others is −R_kg/(m_k − n_kg).
		inG := map[int]float64{}
		cnt := map[int]int{}
		for i, g := range t.group {
			inG[g] += res[k][i]
			cnt[g]++
		}
		m := len(t.z)
		for i, g := range t.group {
			r := res[k][i]
			if cnt[g] < m {
				r += inG[g] / float64(m-cnt[g])
			}
			sum[g] += r
			sq[g] += r * r
			n[g]++
		}
	}
	var u, p []float64
	var su, sp float64
	for g := range sum {
		if n[g] < 2 {
			continue
		}
		ug := (sum[g]*sum[g] - sq[g]) / 2
		pg := float64(n[g]*(n[g]-1)) / 2
		u, p = append(u, ug), append(p, pg)
		su, sp = su+ug, sp+pg
	}
	f.groups = len(u)
	if len(u) < minEffectGroups {
		f.effectNo = fmt.Sprintf("only %d shift occurrences hold two or more observations; at least %d are needed", len(u), minEffectGroups)
		return
	}
	f.effect, f.tau2 = true, su/sp
	var ss float64
	for i := range u {
		d := u[i] - f.tau2*p[i]
		ss += d * d
	}
	g := float64(len(u))
	f.tau2SE = math.Sqrt(g/(g-1)*ss) / sp
	// The projection draws the effect only when the data show one: τ̂²
	// more than the spec's z standard errors above 0 (version 2: 1.96,
	// version 3: 2.326, see specV3). A noisy positive estimate on a ward without a
	// shift-level effect would otherwise put a shared factor on every
	// patient: weighting it by its BIC evidence (Kass & Raftery 1995) was
	// tried and still cost 0.3 nurses at a census of 100 in the battery
	// (census-100: +0.80 against +0.55 tested), with the shift-effect
	// scenario covered either way (true shortfall 0.091 and 0.096).
	if f.tau2 > f.spec.effectZ*f.tau2SE {
		f.draw = true
	}
}

// fitSpread sets each tier's patient-to-patient log variance by matching
// moments on the minutes scale: with ȳ and s² the mean and variance of the
// kept values,
//
//	v_k = ln(1 + s² / (ȳ + c)²)
//
// the log variance of the lognormal with that mean and variance
// (Aitchison & Brown 1957, The Lognormal Distribution, §2.3). Matching
// the variance of minutes rather than of log minutes keeps the sum of many
// patients right whatever the tier's shape: a left-skewed tier on the log
// scale (gamma-like care times) would otherwise be given up to half as
// much variance again as it has (found by the battery, census-100). The
// shift-level part τ̂² is taken out (at most three quarters of v_k), then
// v_k is shrunk towards the pool.
func (f *careFit) fitSpread() {
	// Only a shift-level part the projection draws is taken out of the
	// patients' spread; otherwise that variance would be lost.
	tau2 := f.tau2Used()
	kurt := excessKurtosis(f.tiers)
	var poolSS, poolDF float64
	for k := range f.tiers {
		t := &f.tiers[k]
		m := len(t.y)
		if m < 2 {
			continue
		}
		mean, sd := MeanSD(t.y)
		t.resVar = math.Log1p(sd * sd / ((mean + t.offset) * (mean + t.offset)))
		t.sigma2 = max(t.resVar-tau2, sigmaFloorShare*t.resVar)
		// Degrees of freedom of a sample variance from data with excess
		// kurtosis κ: Var(s²)/σ⁴ = 2/(m−1) + κ/m, so ν = 2/(2/(m−1) + κ/m)
		// (e.g. Kendall & Stuart, The Advanced Theory of Statistics, vol.
		// 1, §10.5, from memory); m − 1 for normal data, far fewer for
		// the right-skewed, heavy-tailed minutes of real tiers.
		fm := float64(m)
		t.df = 2 / (2/(fm-1) + kurt/fm)
		poolSS += t.df * t.sigma2
		poolDF += t.df
		t.weight = clusterWeight(t.group, m)
	}
	for k := range f.tiers {
		t := &f.tiers[k]
		other := poolDF - t.df
		if other < 5 || len(t.z) < 2 {
			continue // nothing worth borrowing
		}
		pool := (poolSS - t.df*t.sigma2) / other
		t.sigma2 = (t.df*t.sigma2 + priorDF*pool) / (t.df + priorDF)
		t.df += priorDF
	}
}

// excessKurtosis is the pooled excess kurtosis of the tiers' kept
// minutes: Σ_k Σ_i (y−ȳ_k)⁴ / Σ_k m_k·s̃_k⁴ − 3 with s̃_k² the plug-in
// variance of tier k, over tiers with 4 or more values, and never below 0
// (a light-tailed estimate would claim more certainty than normal data
// give). Pooled because one tier's fourth moment is very noisy.
func excessKurtosis(tiers []careTier) float64 {
	var s4, s22 float64
	for _, t := range tiers {
		m := len(t.y)
		if m < 4 {
			continue
		}
		mean := avg(t.y)
		var m2, m4 float64
		for _, y := range t.y {
			d := (y - mean) * (y - mean)
			m2 += d
			m4 += d * d
		}
		if m2 == 0 {
			continue
		}
		s4 += m4
		s22 += m2 * m2 / float64(m)
	}
	if s22 == 0 {
		return 0
	}
	return max(0, s4/s22-3)
}

// slopeUsed is the slope the projection extrapolates: β̂ when it follows
// the trend, else 0.
func (f *careFit) slopeUsed() float64 {
	if f.follow {
		return f.beta
	}
	return 0
}

// tau2Used is the shift-level log variance the projection draws around:
// max(0, τ̂²) when it draws the effect, else 0.
func (f *careFit) tau2Used() float64 {
	if f.draw {
		return max(0, f.tau2)
	}
	return 0
}

// avg is the arithmetic mean of a non-empty x.
func avg(x []float64) float64 {
	s := 0.0
	for _, v := range x {
		s += v
	}
	return s / float64(len(x))
}

// tierSlope is the tier's own slope (slope of the one tier), for
// reporting: the model itself uses the common slope.
func (f *careFit) tierSlope(t *careTier) (ok bool, beta, se, df float64, reason string) {
	if t.t == nil {
		return false, 0, 0, 0, "observations carry no dates"
	}
	return slope([]*careTier{t}, f.spec.jackknife)
}

// slope is the pooled within-tier least-squares slope of z on t over the
// given tiers, Σ(t−t̄_k)(z−z̄_k) / Σ(t−t̄_k)², with the cluster-robust
// standard error over shift occurrences G/(G−1)·Σ_g (Σ_{i∈g}(t_i−t̄_k)r_i)²
// / Sxx² (Liang & Zeger 1986; Cameron & Miller 2015, J. Human Resources
// 50(2)) and G − 1 degrees of freedom; with jackknife, the standard error is
// instead the delete-one-occurrence jackknife (slopeJackknife). Not ok, with
// the reason, with fewer than minTrendDates distinct dates or a span under
// minTrendDays.
func slope(tiers []*careTier, jackknife bool) (ok bool, beta, se, df float64, reason string) {
	days := map[float64]bool{}
	first, last := math.Inf(1), math.Inf(-1)
	var sxx, sxy float64
	for _, t := range tiers {
		for i, ti := range t.t {
			days[ti] = true
			first, last = min(first, ti), max(last, ti)
			dt := ti - t.tbar
			sxx += dt * dt
			sxy += dt * (t.z[i] - t.zbar)
		}
	}
	if len(days) < minTrendDates || last-first < minTrendDays || sxx == 0 {
		return false, 0, 0, 0, fmt.Sprintf("a trend needs observations on at least %d dates over at least %d days", minTrendDates, minTrendDays)
	}
	beta = sxy / sxx
	score := map[int]float64{}
	var order []int // first-seen order: sums in a fixed order reproduce bit for bit
	for _, t := range tiers {
		for i, ti := range t.t {
			if _, seen := score[t.group[i]]; !seen {
				order = append(order, t.group[i])
			}
			score[t.group[i]] += (ti - t.tbar) * (t.z[i] - t.zbar - beta*(ti-t.tbar))
		}
	}
	var ss float64
	for _, g := range order {
		ss += score[g] * score[g]
	}
	g := float64(max(len(order), 2))
	se = math.Sqrt(g / (g - 1) * ss / (sxx * sxx))
	if jackknife {
		se = slopeJackknife(tiers, beta, order)
	}
	return true, beta, se, g - 1, ""
}

// slopeJackknife is the delete-one-cluster jackknife (CR3) standard error
// of the pooled within-tier slope β̂ over shift occurrences g = 1..G:
//
//	se² = (G−1)/G · Σ_g (β̂_(g) − β̂)²
//
// where β̂_(g) is the slope refitted without occurrence g (tier means
// recomputed). It corrects the downward bias of the sandwich estimator
// with few clusters (Cameron & Miller 2015, J. Human Resources 50(2),
// §VI.B; MacKinnon & White 1985, J. Econometrics 29(3)). Each β̂_(g) comes
// from per-tier sums less occurrence g's share, so the cost is
// O(n + G·tiers). order lists the occurrences in first-seen order, so the
// sum reproduces bit for bit. Occurrences whose removal leaves no spread of
// dates are skipped; with fewer than 2 left it falls back to +Inf (no
// trend can be shown).
func slopeJackknife(tiers []*careTier, beta float64, order []int) float64 {
	type sums struct{ n, st, sz, stt, stz float64 }
	add := func(s *sums, t, z float64) {
		s.n++
		s.st += t
		s.sz += z
		s.stt += t * t
		s.stz += t * z
	}
	total := make([]sums, len(tiers))
	part := map[int][]sums{}
	for k, t := range tiers {
		for i, ti := range t.t {
			g := t.group[i]
			if part[g] == nil {
				part[g] = make([]sums, len(tiers))
			}
			add(&total[k], ti, t.z[i])
			add(&part[g][k], ti, t.z[i])
		}
	}
	var ss float64
	used := 0
	for _, g := range order {
		var sxx, sxy float64
		for k := range tiers {
			a, b := total[k], part[g][k]
			n := a.n - b.n
			if n < 2 {
				continue
			}
			st, sz := a.st-b.st, a.sz-b.sz
			sxx += (a.stt - b.stt) - st*st/n
			sxy += (a.stz - b.stz) - st*sz/n
		}
		if sxx <= 0 {
			continue
		}
		d := sxy/sxx - beta
		ss += d * d
		used++
	}
	if used < 2 {
		return math.Inf(1)
	}
	G := float64(used)
	return math.Sqrt((G - 1) / G * ss)
}

// clusterWeight is Σ_g (n_g/m)² over the shift occurrences of a tier's m
// values (1/m without occurrences), summed in first-seen order.
func clusterWeight(group []int, m int) float64 {
	if len(group) == 0 {
		return 1 / float64(m)
	}
	count := map[int]int{}
	var order []int
	for _, g := range group {
		if count[g] == 0 {
			order = append(order, g)
		}
		count[g]++
	}
	w := 0.0
	for _, g := range order {
		share := float64(count[g]) / float64(m)
		w += share * share
	}
	return w
}
