package pool

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/stat/distuv"

	"wardload/internal/wardload"
)

// handWards is the small case computed by hand below: ward A needs 4, 5 or
// 6 nurses (0.5, 0.3, 0.2) and has 4; ward B needs 3, 4 or 5 (0.6, 0.3,
// 0.1) and has 3. Their excesses are on {0, 1, 2} with the same chances,
// and by convolution S = X_A + X_B has
//
//	P(S=0) = .5·.6                 = .30
//	P(S=1) = .5·.3 + .3·.6         = .33
//	P(S=2) = .5·.1 + .3·.3 + .2·.6 = .26
//	P(S=3) = .3·.1 + .2·.3         = .09
//	P(S=4) = .2·.1                 = .02
//
// so P(S>1) = .37 and P(S>2) = .11: at cover 0.85 (short ≤ .15) the pool
// is F = 2. Alone, A needs 2 extra (P(need>5) = .2 > .15, P(need>6) = 0)
// and B 1 (P(need>4) = .1): 3 in all, a pooling gain of 1; with those
// buffers the chance some ward is short is 1 − (1 − 0)(1 − .1) = .1.
func handWards(t *testing.T) []Ward {
	t.Helper()
	a, err := NewNeed("A", 4, []float64{0.5, 0.3, 0.2}, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	b, err := NewNeed("B", 3, []float64{0.6, 0.3, 0.1}, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	return []Ward{{Need: a, Staff: 4}, {Need: b, Staff: 3}}
}

func TestExactHandCase(t *testing.T) {
	res, err := Exact(handWards(t), 0.85)
	if err != nil {
		t.Fatal(err)
	}
	// Values computed by hand (see handWards).
	if res.Floats != 2 || res.SumBuffers != 3 || res.Gain != 1 || res.Buffers[0] != 2 || res.Buffers[1] != 1 {
		t.Errorf("F=%d buffers=%v sum=%d gain=%d; want 2, [2 1], 3, 1", res.Floats, res.Buffers, res.SumBuffers, res.Gain)
	}
	for _, c := range []struct {
		name      string
		got, want float64
	}{{"short", res.Short, 0.11}, {"fewer", res.ShortFewer, 0.37}, {"any short buffered", res.AnyShortBuffered, 0.1}, {"unplaced", res.Unplaced, 0}} {
		if !scalar.EqualWithinAbs(c.got, c.want, 1e-12) {
			t.Errorf("%s = %.15g; want %g", c.name, c.got, c.want)
		}
	}
	// At cover 0.9 the .11 is too much: F = 3 (P(S>3) = .02).
	res, err = Exact(handWards(t), 0.9)
	if err != nil || res.Floats != 3 || !scalar.EqualWithinAbs(res.Short, 0.02, 1e-12) {
		t.Errorf("cover 0.9: %+v, %v; want F = 3, short .02", res, err)
	}
}

// TestSimulateAgreesWithExact checks the simulation at ρ = 0 against the
// exact convolution: Monte Carlo error only. With n = 200,000 draws the
// SE of a chance near .11 is √(.11·.89/n) ≈ 0.0007; the tolerance is 4 SE.
func TestSimulateAgreesWithExact(t *testing.T) {
	wards := handWards(t)
	ex, err := Exact(wards, 0.85)
	if err != nil {
		t.Fatal(err)
	}
	const n = 200_000
	sim, err := Simulate(wards, 0.85, 0, n, 7)
	if err != nil {
		t.Fatal(err)
	}
	tol := func(p float64) float64 { return 4 * math.Sqrt(p*(1-p)/n) }
	if sim.Floats != ex.Floats || sim.SumBuffers != ex.SumBuffers {
		t.Errorf("simulated F=%d buffers=%d; exact %d, %d", sim.Floats, sim.SumBuffers, ex.Floats, ex.SumBuffers)
	}
	for _, c := range []struct {
		name      string
		got, want float64
	}{{"short", sim.Short, ex.Short}, {"fewer", sim.ShortFewer, ex.ShortFewer}, {"any short buffered", sim.AnyShortBuffered, ex.AnyShortBuffered}} {
		if math.Abs(c.got-c.want) > tol(c.want) {
			t.Errorf("%s: simulated %.5f, exact %.5f (tolerance %.5f)", c.name, c.got, c.want, tol(c.want))
		}
	}
	if !(sim.ShortLow <= ex.Short && ex.Short <= sim.ShortHigh) {
		t.Errorf("exact %.4f outside the Wilson interval %.4f–%.4f", ex.Short, sim.ShortLow, sim.ShortHigh)
	}
	again, _ := Simulate(wards, 0.85, 0, n, 7)
	if again.Short != sim.Short {
		t.Error("same seed, different result")
	}
}

// poissonNeed is Poisson(λ) truncated at top, the rest beyond the table.
func poissonNeed(t *testing.T, name string, lambda float64, top int) Need {
	t.Helper()
	p := distuv.Poisson{Lambda: lambda}
	pmf := make([]float64, top+1)
	sum := 0.0
	for k := range pmf {
		pmf[k] = p.Prob(float64(k))
		sum += pmf[k]
	}
	n, err := NewNeed(name, 0, pmf, max(0, 1-sum), 0)
	if err != nil {
		t.Fatal(err)
	}
	return n
}

// shiftedBinomial is from + Binomial(size, prob).
func shiftedBinomial(t *testing.T, name string, from, size int, prob float64) Need {
	t.Helper()
	b := distuv.Binomial{N: float64(size), P: prob}
	pmf := make([]float64, size+1)
	for k := range pmf {
		pmf[k] = b.Prob(float64(k))
	}
	n, err := NewNeed(name, from, pmf, 0, 0)
	if err != nil {
		t.Fatal(err)
	}
	return n
}

// TestExactAgainstR compares with R 4.2.2's convolution of the same laws:
// testdata/pool_reference.R (convolve(a, rev(b), type = "open") over the
// excess laws, then 1 − cumsum), whose printed lines are quoted here.
func TestExactAgainstR(t *testing.T) {
	lambdas := []float64{5.2, 6.8, 4.1, 7.5, 5.9, 3.3}
	staff := []int{6, 7, 5, 8, 6, 4}
	var pois []Ward
	for i, l := range lambdas {
		pois = append(pois, Ward{Need: poissonNeed(t, string(rune('A'+i)), l, 40), Staff: staff[i]})
	}
	bin := []Ward{
		{Need: shiftedBinomial(t, "P", 3, 8, 0.35), Staff: 5},
		{Need: shiftedBinomial(t, "Q", 4, 10, 0.5), Staff: 8},
		{Need: shiftedBinomial(t, "R", 2, 6, 0.2), Staff: 3},
	}
	for _, c := range []struct {
		name         string
		wards        []Ward
		cover        float64
		floats       int
		short, fewer float64
		buffers      []int
	}{
		// R 4.2.2: F=9 short=0.0685438204359856 fewer=0.102768125643909 buffers=2,3,2,3,3,2
		{"poisson", pois, 0.9, 9, 0.0685438204359856, 0.102768125643909, []int{2, 3, 2, 3, 3, 2}},
		// R 4.2.2: F=6 short=0.0292743505456762 fewer=0.0744354728347254 buffers=3,4,2
		{"binomial", bin, 0.95, 6, 0.0292743505456762, 0.0744354728347254, []int{3, 4, 2}},
	} {
		t.Run(c.name, func(t *testing.T) {
			res, err := Exact(c.wards, c.cover)
			if err != nil {
				t.Fatal(err)
			}
			if res.Floats != c.floats || !scalar.EqualWithinAbsOrRel(res.Short, c.short, 1e-9, 1e-9) ||
				!scalar.EqualWithinAbsOrRel(res.ShortFewer, c.fewer, 1e-9, 1e-9) {
				t.Errorf("F=%d short=%.15g fewer=%.15g; R: %d %.15g %.15g", res.Floats, res.Short, res.ShortFewer, c.floats, c.short, c.fewer)
			}
			sum := 0
			for i, b := range c.buffers {
				sum += b
				if res.Buffers[i] != b {
					t.Errorf("buffers %v; R %v", res.Buffers, c.buffers)
					break
				}
			}
			if res.SumBuffers != sum || res.Gain != sum-c.floats {
				t.Errorf("sum of buffers %d gain %d; want %d, %d", res.SumBuffers, res.Gain, sum, sum-c.floats)
			}
		})
	}
}

// TestCorrelationRaisesPool checks the direction of the sensitivity: a
// common factor fattens the tail of the sum, so the pool cannot shrink as
// ρ grows (0, 0.3, 0.6), while the per-ward buffers stay the same (the
// marginals do not change). Six Poisson wards, 100,000 draws each.
func TestCorrelationRaisesPool(t *testing.T) {
	var wards []Ward
	for i, l := range []float64{5.2, 6.8, 4.1, 7.5, 5.9, 3.3} {
		wards = append(wards, Ward{Need: poissonNeed(t, string(rune('A'+i)), l, 40), Staff: int(math.Round(l))})
	}
	prev := -1
	var first *Result
	for _, rho := range []float64{0, 0.3, 0.6} {
		res, err := Simulate(wards, 0.9, rho, 100_000, 11)
		if err != nil {
			t.Fatal(err)
		}
		if res.Floats < prev {
			t.Errorf("ρ=%g: F=%d below %d at a smaller ρ", rho, res.Floats, prev)
		}
		prev = res.Floats
		if first == nil {
			first = res
		} else if res.SumBuffers != first.SumBuffers {
			t.Errorf("ρ=%g: buffers %d differ from %d", rho, res.SumBuffers, first.SumBuffers)
		}
	}
	if prev <= first.Floats {
		t.Errorf("ρ = 0.6 gives F = %d, not above ρ = 0's %d", prev, first.Floats)
	}
}

func TestFromShortfall(t *testing.T) {
	// A table for 5..8 nurses: P(D>5)=.6, P(D>6)=.25, P(D>7)=.05, P(D>8)=.01.
	n, err := FromShortfall("W", []int{5, 6, 7, 8}, []float64{0.6, 0.25, 0.05, 0.01}, 0)
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{0.4, 0.35, 0.2, 0.04}
	for i, w := range want {
		if !scalar.EqualWithinAbs(n.PMF[i], w, 1e-12) {
			t.Errorf("PMF = %v; want %v", n.PMF, want)
			break
		}
	}
	if n.From != 5 || !scalar.EqualWithinAbs(n.Beyond, 0.01, 1e-15) || !scalar.EqualWithinAbs(n.Above(6), 0.25, 1e-12) {
		t.Errorf("From %d Beyond %g Above(6) %g", n.From, n.Beyond, n.Above(6))
	}
	// A floor of 7: the need is at least 7, so P(need=7) = .4+.35+.2.
	f, _ := FromShortfall("W", []int{5, 6, 7, 8}, []float64{0.6, 0.25, 0.05, 0.01}, 7)
	if f.From != 7 || f.Floor != 7 || len(f.PMF) != 2 || !scalar.EqualWithinAbs(f.PMF[0], 0.95, 1e-12) {
		t.Errorf("floored: %+v", f)
	}
	// A floor above the table keeps the unknown tail apart.
	g, _ := FromShortfall("W", []int{5, 6}, []float64{0.5, 0.1}, 9)
	if g.From != 9 || len(g.PMF) != 1 || !scalar.EqualWithinAbs(g.PMF[0], 0.9, 1e-12) || g.Beyond != 0.1 {
		t.Errorf("floor above the table: %+v", g)
	}
}

func TestBadInput(t *testing.T) {
	wards := handWards(t)
	for _, c := range []struct {
		name, field string
		err         error
	}{
		{"cover low", "cover", func() error { _, err := Exact(wards, 0.4); return err }()},
		{"cover high", "cover", func() error { _, err := Simulate(wards, 1, 0, MinDraws, 1); return err }()},
		{"no wards", "wards", func() error { _, err := Exact(nil, 0.9); return err }()},
		{"negative staff", "staff", func() error { _, err := Exact([]Ward{{Need: wards[0].Need, Staff: -1}}, 0.9); return err }()},
		{"rho", "rho", func() error { _, err := Simulate(wards, 0.9, 0.99, MinDraws, 1); return err }()},
		{"rho quadrature", "rho", func() error { _, err := Correlated(wards, 0.9, MaxRho+1e-9); return err }()},
		{"negative rho", "rho", func() error { _, err := Correlated(wards, 0.9, -0.1); return err }()},
		{"draws above", "draws", func() error { _, err := Simulate(wards, 0.9, 0, MaxDraws+1, 1); return err }()},
		{"tail too big, quadrature", "cover", func() error {
			n, _ := FromShortfall("W", []int{5, 6}, []float64{0.5, 0.3}, 0)
			_, err := Correlated([]Ward{{Need: n, Staff: 5}, wards[0]}, 0.9, 0.3)
			return err
		}()},
		{"tail too big, simulation", "cover", func() error {
			n, _ := FromShortfall("W", []int{5, 6}, []float64{0.5, 0.3}, 0)
			_, err := Simulate([]Ward{{Need: n, Staff: 5}}, 0.9, 0, MinDraws, 1)
			return err
		}()},
		{"draws", "draws", func() error { _, err := Simulate(wards, 0.9, 0, 10, 1); return err }()},
		{"rising table", "need", func() error { _, err := FromShortfall("W", []int{5, 6}, []float64{0.2, 0.3}, 0); return err }()},
		{"gap in table", "need", func() error { _, err := FromShortfall("W", []int{5, 7}, []float64{0.2, 0.1}, 0); return err }()},
		{"not a law", "need", func() error { _, err := NewNeed("W", 1, []float64{0.5, 0.4}, 0, 0); return err }()},
		{"NaN", "need", func() error { _, err := NewNeed("W", 1, []float64{math.NaN(), 1}, 0, 0); return err }()},
		// Beyond .3 > 1 − .9: no headcount of the table reaches the level.
		{"tail too big", "cover", func() error {
			n, _ := FromShortfall("W", []int{5, 6}, []float64{0.5, 0.3}, 0)
			_, err := Exact([]Ward{{Need: n, Staff: 5}}, 0.9)
			return err
		}()},
	} {
		if wardload.ErrorCode(c.err) != wardload.EINVALID || wardload.ErrorField(c.err) != c.field {
			t.Errorf("%s: %v; want EINVALID on %s", c.name, c.err, c.field)
		}
	}
}

// TestUnplacedCountsAsShort: mass beyond a table is short whatever F.
func TestUnplacedCountsAsShort(t *testing.T) {
	n, _ := FromShortfall("W", []int{5, 6, 7}, []float64{0.5, 0.2, 0.04}, 0)
	res, err := Exact([]Ward{{Need: n, Staff: 5}}, 0.9)
	if err != nil {
		t.Fatal(err)
	}
	// P(short | F=1) = P(need > 6) = .2; F = 2: P(need > 7) = .04, all of it beyond.
	if res.Floats != 2 || !scalar.EqualWithinAbs(res.Short, 0.04, 1e-12) || !scalar.EqualWithinAbs(res.Unplaced, 0.04, 1e-12) {
		t.Errorf("exact %+v", res)
	}
	// The same by quadrature at ρ = 0.5: one ward, so ρ changes nothing.
	q, err := Correlated([]Ward{{Need: n, Staff: 5}}, 0.9, 0.5)
	if err != nil || q.Floats != 2 || !scalar.EqualWithinAbs(q.Short, 0.04, 1e-9) || !scalar.EqualWithinAbs(q.Unplaced, 0.04, 1e-9) ||
		!scalar.EqualWithinAbs(q.ShortFewer, 0.2, 1e-9) {
		t.Errorf("quadrature %+v, %v", q, err)
	}
}

// TestJointTailUnreachable: each ward's tail beyond its table (.06) is
// within 1 − cover = .1 alone, but together 1 − .94² = .1164 is not.
func TestJointTailUnreachable(t *testing.T) {
	n, err := NewNeed("W", 5, []float64{0.94}, 0.06, 0)
	if err != nil {
		t.Fatal(err)
	}
	w := []Ward{{Need: n, Staff: 5}, {Need: n, Staff: 5}}
	for name, f := range map[string]func() (*Result, error){
		"exact":      func() (*Result, error) { return Exact(w, 0.9) },
		"quadrature": func() (*Result, error) { return Correlated(w, 0.9, 0) },
		"simulation": func() (*Result, error) { return Simulate(w, 0.9, 0, MinDraws, 1) },
	} {
		if _, err := f(); wardload.ErrorField(err) != "cover" {
			t.Errorf("%s: %v; want EINVALID on cover", name, err)
		}
	}
	if b, err := Buffer(w[0], 0.9); err != nil || b != 0 {
		t.Errorf("one ward alone: buffer %d, %v; want 0", b, err)
	}
}

// TestNeedLimits: the edges of NewNeed's preconditions.
func TestNeedLimits(t *testing.T) {
	for _, c := range []struct {
		name   string
		from   int
		pmf    []float64
		beyond float64
		floor  int
		ok     bool
	}{
		{"last headcount at the limit", MaxHeadcount - 1, []float64{0.5, 0.5}, 0, 0, true},
		{"last headcount past the limit", MaxHeadcount, []float64{0.5, 0.5}, 0, 0, false},
		{"floor at the limit", 1, []float64{1}, 0, MaxHeadcount, true},
		{"floor past the limit", 1, []float64{1}, 0, MaxHeadcount + 1, false},
		{"negative floor", 1, []float64{1}, 0, -1, false},
		{"negative from", -1, []float64{1}, 0, 0, false},
		{"empty", 1, nil, 1, 0, false},
		{"a zero mass", 1, []float64{0.5, 0, 0.5}, 0, 0, true},
		{"a negative mass", 1, []float64{1.5, -0.5}, 0, 0, false},
		{"all beyond", 1, []float64{0}, 1, 0, true},
		{"beyond above 1", 1, []float64{-0.5}, 1.5, 0, false},
		{"sum off by 1e-6", 1, []float64{0.5, 0.5 + 1e-6}, 0, 0, false},
	} {
		_, err := NewNeed("W", c.from, c.pmf, c.beyond, c.floor)
		if (err == nil) != c.ok {
			t.Errorf("%s: %v; want ok = %v", c.name, err, c.ok)
		}
	}
}

// TestBoundaries: a chance exactly at 1 − cover is within the level; the
// largest ρ is allowed.
func TestBoundaries(t *testing.T) {
	// Need 4 or 5 with .75/.25 (exact in binary), staff 4, cover .75:
	// P(short | F=0) = .25 ≤ .25, so F = 0 and the buffer is 0.
	n, _ := NewNeed("W", 4, []float64{0.75, 0.25}, 0, 0)
	w := []Ward{{Need: n, Staff: 4}}
	for _, f := range []func() (*Result, error){
		func() (*Result, error) { return Exact(w, 0.75) },
		func() (*Result, error) { return Correlated(w, 0.75, MaxRho) },
		// Not at the boundary (Monte Carlo would decide it): cover .7.
		func() (*Result, error) { return Simulate(w, 0.7, MaxRho, MinDraws, 1) },
	} {
		res, err := f()
		if err != nil || res.Floats != 0 || res.Buffers[0] != 0 {
			t.Errorf("%+v, %v; want F = 0 and buffer 0", res, err)
		}
	}
	if n.Above(4) != 0.25 || n.Above(3) != 1 || n.Above(5) != 0 {
		t.Errorf("Above(3, 4, 5) = %g, %g, %g; want 1, .25, 0", n.Above(3), n.Above(4), n.Above(5))
	}
}

// TestCorrelatedAgainstExactAndSimulation: the quadrature equals the
// convolution at ρ = 0 (1e-9) and agrees with the simulation at ρ = 0.3
// and 0.6 within 4 Monte Carlo standard errors (200,000 draws), on six
// Poisson wards (as TestExactAgainstR) and on the hand case.
func TestCorrelatedAgainstExactAndSimulation(t *testing.T) {
	var pois []Ward
	for i, l := range []float64{5.2, 6.8, 4.1, 7.5, 5.9, 3.3} {
		pois = append(pois, Ward{Need: poissonNeed(t, string(rune('A'+i)), l, 40), Staff: []int{6, 7, 5, 8, 6, 4}[i]})
	}
	for _, c := range []struct {
		name  string
		wards []Ward
		cover float64
	}{{"poisson", pois, 0.9}, {"hand", handWards(t), 0.85}} {
		ex, err := Exact(c.wards, c.cover)
		if err != nil {
			t.Fatal(err)
		}
		q0, err := Correlated(c.wards, c.cover, 0)
		if err != nil {
			t.Fatal(err)
		}
		if q0.Floats != ex.Floats || q0.Gain != ex.Gain || q0.SumBuffers != ex.SumBuffers || !scalar.EqualWithinAbs(q0.Short, ex.Short, 1e-9) ||
			!scalar.EqualWithinAbs(q0.ShortFewer, ex.ShortFewer, 1e-9) || !scalar.EqualWithinAbs(q0.AnyShortBuffered, ex.AnyShortBuffered, 1e-9) {
			t.Errorf("%s ρ=0: quadrature %+v; exact %+v", c.name, q0, ex)
		}
		for _, rho := range []float64{0.3, 0.6} {
			const n = 200_000
			q, err := Correlated(c.wards, c.cover, rho)
			if err != nil {
				t.Fatal(err)
			}
			sim, err := Simulate(c.wards, c.cover, rho, n, 5)
			if err != nil {
				t.Fatal(err)
			}
			se := func(p float64) float64 { return 4 * math.Sqrt(p*(1-p)/n) }
			t.Logf("%s ρ=%g: quadrature F=%d short=%.5f fewer=%.5f; simulation F=%d short=%.5f", c.name, rho, q.Floats, q.Short, q.ShortFewer, sim.Floats, sim.Short)
			if q.Floats != sim.Floats || math.Abs(q.Short-sim.Short) > se(q.Short) ||
				math.Abs(q.ShortFewer-sim.ShortFewer) > se(q.ShortFewer) || math.Abs(q.AnyShortBuffered-sim.AnyShortBuffered) > se(q.AnyShortBuffered) {
				t.Errorf("%s ρ=%g: quadrature %+v; simulation %+v", c.name, rho, q, sim)
			}
		}
	}
}
