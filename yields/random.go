package yields

import "math"

// CounterRNG is a counter-based random number generator: the n-th number it
// gives is a pure function of (seed, starID, step, stream, n), so a star's
// draws at a step do not depend on which thread or rank makes them, or in
// what order.
//
// Construction. The key is folded from the four inputs with the SplitMix64
// finalizer (Steele, Lea & Flood 2014, "Fast splittable pseudorandom number
// generators", OOPSLA; the mixing constants are Stafford's "Mix13"):
//
//	key = mix(mix(mix(mix(seed ⊕ c0) ⊕ starID) ⊕ step) ⊕ stream)
//
// and the n-th output (n = 1, 2, ...) is mix(key + n·γ) with γ the 64-bit
// golden-ratio increment 0x9E3779B97F4A7C15 — the SplitMix64 sequence
// started from state key. mix is a bijection of 64-bit words, so distinct
// counters under one key never collide; distinct keys collide only by the
// 2^-64 chance of a 64-bit hash.
//
// The zero value is a valid generator (key 0). Copy it to replay a sequence.
type CounterRNG struct {
	key     uint64
	counter uint64
}

const (
	golden   = 0x9E3779B97F4A7C15
	keySalt0 = 0x6A09E667F3BCC909 // fractional part of √2 (SHA-512 IV), so seed 0 is not key 0
)

// mix64 is the SplitMix64 output finalizer (Mix13).
func mix64(z uint64) uint64 {
	z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9
	z = (z ^ (z >> 27)) * 0x94D049BB133111EB
	return z ^ (z >> 31)
}

// NewCounterRNG returns the generator keyed by a simulation seed, a star's
// ID, the step index and a stream number (one per use, so different draws
// of one star at one step are independent).
func NewCounterRNG(seed, starID, step, stream uint64) CounterRNG {
	k := mix64(seed ^ keySalt0)
	k = mix64(k ^ starID)
	k = mix64(k ^ step)
	k = mix64(k ^ stream)
	return CounterRNG{key: k}
}

// Counter is how many numbers have been drawn.
func (r *CounterRNG) Counter() uint64 { return r.counter }

// Uint64 returns the next 64 uniformly distributed bits.
func (r *CounterRNG) Uint64() uint64 {
	r.counter++
	return mix64(r.key + r.counter*golden)
}

// Float64 returns a uniform number in [0, 1) with 53 random bits.
func (r *CounterRNG) Float64() float64 {
	return float64(r.Uint64()>>11) * (1.0 / (1 << 53))
}

// maxPoissonMean is the largest mean Poisson accepts; larger means are
// clamped to it (a count that large does not fit the algorithms' int range
// comfortably, and no stellar population produces it).
const maxPoissonMean = 1 << 52

// poissonInversionLimit is the mean below which Poisson uses inversion.
const poissonInversionLimit = 10

// Poisson draws a Poisson-distributed count with the given mean from r.
//
// For mean < 10 it inverts the cumulative distribution by sequential search
// (exact up to floating-point). For larger means it uses PTRS, the
// transformed rejection method with squeeze of Hörmann 1993 ("The
// transformed rejection method for generating Poisson random variables",
// Insurance: Mathematics and Economics 12, 39), which is exact and takes
// about 1.1 pairs of uniforms per draw.
//
// A mean that is NaN or <= 0 gives 0; a mean above 2^52 is clamped to 2^52.
func Poisson(r *CounterRNG, mean float64) int {
	if !(mean > 0) {
		return 0
	}
	mean = math.Min(mean, maxPoissonMean)
	if mean < poissonInversionLimit {
		u := r.Float64()
		p := math.Exp(-mean)
		cdf := p
		k := 0
		// The tail mass beyond k = 200 is below 1e-100 for mean < 10; the cap
		// only guards against u landing in the round-off gap of the sum.
		for u >= cdf && k < 200 {
			k++
			p *= mean / float64(k)
			cdf += p
		}
		return k
	}
	// PTRS (Hörmann 1993, algorithm PTRS with the constants of his table).
	slam := math.Sqrt(mean)
	loglam := math.Log(mean)
	b := 0.931 + 2.53*slam
	a := -0.059 + 0.02483*b
	invalpha := 1.1239 + 1.1328/(b-3.4)
	vr := 0.9277 - 3.6224/(b-2)
	for {
		u := r.Float64() - 0.5
		v := r.Float64()
		us := 0.5 - math.Abs(u)
		k := math.Floor((2*a/us+b)*u + mean + 0.43)
		if us >= 0.07 && v <= vr {
			return int(k)
		}
		if k < 0 || (us < 0.013 && v > us) {
			continue
		}
		lg, _ := math.Lgamma(k + 1)
		if math.Log(v)+math.Log(invalpha)-math.Log(a/(us*us)+b) <= -mean+k*loglam-lg {
			return int(k)
		}
	}
}
