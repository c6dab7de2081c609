package stats

// pcg wraps pcgNext as a generator value for tests and benchmarks, which
// compare it with rand.NewPCG (TestPCGMatchesStdlib) and use it to make
// seeded invented data; the bootstrap itself calls pcgNext directly.
type pcg struct{ hi, lo uint64 }

// newPCG seeds like rand.NewPCG(seed1, seed2).
func newPCG(seed1, seed2 uint64) pcg { return pcg{seed1, seed2} }

// Uint64 advances the state and returns the next 64-bit output.
func (p *pcg) Uint64() uint64 {
	var out uint64
	p.hi, p.lo, out = pcgNext(p.hi, p.lo)
	return out
}
