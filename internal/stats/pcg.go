package stats

import "math/bits"

// pcg is math/rand/v2's PCG (128-bit LCG with the DXSM output function),
// copied as a value type so the hot bootstrap loop can keep its state in
// registers instead of calling through *rand.PCG. It must produce exactly
// the sequence of rand.NewPCG(seed1, seed2); TestPCGMatchesStdlib checks.
//
// Reference: O'Neill, M. E. (2014). PCG: A family of simple fast
// space-efficient statistically good algorithms for random number
// generation. HMC-CS-2014-0905; DXSM as in pcg-cpp and NumPy.
type pcg struct{ hi, lo uint64 }

func newPCG(seed1, seed2 uint64) pcg { return pcg{seed1, seed2} }

// Uint64 advances the state and returns the next 64-bit output.
func (p *pcg) Uint64() uint64 {
	const (
		mulHi    = 2549297995355413924
		mulLo    = 4865540595714422341
		incHi    = 6364136223846793005
		incLo    = 1442695040888963407
		cheapMul = 0xda942042e4dd58b5
	)
	hi, lo := bits.Mul64(p.lo, mulLo)
	hi += p.hi*mulLo + p.lo*mulHi
	lo, c := bits.Add64(lo, incLo, 0)
	hi, _ = bits.Add64(hi, incHi, c)
	p.lo, p.hi = lo, hi
	hi ^= hi >> 32
	hi *= cheapMul
	hi ^= hi >> 48
	hi *= lo | 1
	return hi
}

// rejectLow finishes Lemire's (2019) bounded-integer method: p is x·n for a
// 32-bit x whose low word fell under n. If that low word is also under
// 2³² mod n the product is biased and x is redrawn (from the low half of a
// fresh output) until it is not. Returns the accepted product; its high word
// is the uniform integer in [0, n). Rare (probability < n/2³²), so kept out
// of line.
func (p *pcg) rejectLow(prod uint64, n uint32) uint64 {
	thresh := -n % n
	for uint32(prod) < thresh {
		prod = uint64(uint32(p.Uint64())) * uint64(n)
	}
	return prod
}
