package yields

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/integrate/quad"
)

// IMFForm names a published initial mass function.
type IMFForm int

// The supported initial mass functions.
const (
	// Salpeter is the single power law dN/dm ∝ m^-2.35 (Salpeter 1955, ApJ 121, 161).
	Salpeter IMFForm = iota
	// Kroupa is the broken power law of Kroupa 2001 (MNRAS 322, 231): dN/dm ∝ m^-α
	// with α = 0.3 below 0.08 Msun, 1.3 from 0.08 to 0.5 Msun and 2.3 above,
	// continuous at the breaks.
	Kroupa
	// Chabrier is the Chabrier 2003 (PASP 115, 763) form: a lognormal in log10 m
	// below 1 Msun, dN/dlog10 m ∝ exp(-(log10 m - log10 0.079)² / (2·0.69²)),
	// joined continuously at 1 Msun to dN/dm ∝ m^-2.3 above. From memory these
	// (m_c = 0.079 Msun, σ = 0.69) are the parameters Chabrier gives for
	// individual stars of the Galactic disk; the unresolved-system variant
	// has m_c = 0.22 Msun, σ = 0.57. The shape above is the one in common use.
	Chabrier
	numIMFForms
)

var imfFormNames = [numIMFForms]string{"salpeter", "kroupa", "chabrier"}

// String is the form's lower-case name, as accepted by ParseIMFForm.
func (f IMFForm) String() string {
	if f < 0 || f >= numIMFForms {
		return "unknown-imf"
	}
	return imfFormNames[f]
}

// ParseIMFForm turns "salpeter", "kroupa" or "chabrier" into an IMFForm.
func ParseIMFForm(name string) (IMFForm, error) {
	for i, n := range imfFormNames {
		if n == name {
			return IMFForm(i), nil
		}
	}
	return 0, fmt.Errorf("yields: unknown IMF %q (want salpeter, kroupa or chabrier)", name)
}

// Default IMF mass range in Msun (common practice in the trade).
const (
	DefaultLightestStarMass = 0.1
	DefaultHeaviestStarMass = 100
)

// maxIMFPieces bounds the number of analytic pieces of any supported IMF.
const maxIMFPieces = 3

// imfPiece is one analytic piece of an IMF on [lo, hi]. A power-law piece
// has dN/dm = coef·m^-slope. A lognormal piece has
// dN/dm = coef/(m ln 10)·exp(-(log10 m - mu)²/(2 sigma²)).
type imfPiece struct {
	lo, hi    float64
	lognormal bool
	coef      float64
	slope     float64
	mu, sigma float64
	loT       float64 // lo^(1−slope), for Primitives
}

func (p imfPiece) density(m float64) float64 {
	if p.lognormal {
		d := math.Log10(m) - p.mu
		return p.coef / (m * math.Ln10) * math.Exp(-d*d/(2*p.sigma*p.sigma))
	}
	return p.coef * math.Pow(m, -p.slope)
}

// moment is ∫ m^k dN over [m1, m2] ⊆ [lo, hi], in closed form.
func (p imfPiece) moment(k, m1, m2 float64) float64 {
	if p.lognormal {
		// With x = log10 m, m^k dN = coef·exp(k ln10 x)·exp(-(x-mu)²/(2σ²)) dx;
		// completing the square gives a shifted Gaussian.
		s2 := p.sigma * p.sigma
		shift := math.Ln10 * k * s2
		pre := p.coef * math.Exp(math.Ln10*k*p.mu+0.5*math.Ln10*math.Ln10*k*k*s2) * p.sigma * math.Sqrt(math.Pi/2)
		w := p.sigma * math.Sqrt2
		return pre * erfDiff((math.Log10(m1)-p.mu-shift)/w, (math.Log10(m2)-p.mu-shift)/w)
	}
	q := k - p.slope + 1
	if math.Abs(q) < 1e-12 {
		return p.coef * math.Log(m2/m1)
	}
	return p.coef * (math.Pow(m2, q) - math.Pow(m1, q)) / q
}

// erfDiff is erf(b) - erf(a), computed from erfc in the tails to keep precision.
func erfDiff(a, b float64) float64 {
	switch {
	case a > 0 && b > 0:
		return math.Erfc(a) - math.Erfc(b)
	case a < 0 && b < 0:
		return math.Erfc(-b) - math.Erfc(-a)
	default:
		return math.Erf(b) - math.Erf(a)
	}
}

// IMF is an initial mass function normalized to one solar mass formed over
// its mass range: Mass(MinMass(), MaxMass()) == 1 (to round-off). Density is
// dN/dm in stars per Msun per Msun formed. An IMF is a small value: copy it
// freely; it holds no slices.
type IMF struct {
	form    IMFForm
	lo, hi  float64
	n       int
	pieces  [maxIMFPieces]imfPiece
	offsets [maxIMFPieces][3]float64 // Primitives at each piece's lower end
}

// NewIMF builds the given form over [minMass, maxMass] in Msun, normalized to
// one Msun formed over that range.
func NewIMF(form IMFForm, minMass, maxMass float64) (IMF, error) {
	if form < 0 || form >= numIMFForms {
		return IMF{}, fmt.Errorf("yields: IMF form %d out of range", int(form))
	}
	if !(minMass > 0) || !(maxMass > minMass) || math.IsInf(maxMass, 0) {
		return IMF{}, fmt.Errorf("yields: %v IMF range [%g, %g] Msun: want 0 < min < max < Inf", form, minMass, maxMass)
	}
	// Full-range pieces with unnormalized, continuous coefficients.
	var full []imfPiece
	switch form {
	case Salpeter:
		full = []imfPiece{{lo: 0, hi: math.Inf(1), coef: 1, slope: 2.35}}
	case Kroupa:
		// Continuity at a break b: k2 = k1·b^(α2-α1).
		k1 := 1.0
		k2 := k1 * math.Pow(0.08, 1.3-0.3)
		k3 := k2 * math.Pow(0.5, 2.3-1.3)
		full = []imfPiece{
			{lo: 0, hi: 0.08, coef: k1, slope: 0.3},
			{lo: 0.08, hi: 0.5, coef: k2, slope: 1.3},
			{lo: 0.5, hi: math.Inf(1), coef: k3, slope: 2.3},
		}
	case Chabrier:
		mu := math.Log10(0.079)
		sigma := 0.69
		ln := imfPiece{lo: 0, hi: 1, lognormal: true, coef: 1, mu: mu, sigma: sigma}
		// Continuity at 1 Msun: the power law's coefficient is the lognormal density there.
		full = []imfPiece{ln, {lo: 1, hi: math.Inf(1), coef: ln.density(1), slope: 2.3}}
	}
	f := IMF{form: form, lo: minMass, hi: maxMass}
	for _, p := range full {
		lo, hi := math.Max(p.lo, minMass), math.Min(p.hi, maxMass)
		if lo >= hi {
			continue
		}
		p.lo, p.hi = lo, hi
		p.loT = math.Pow(lo, 1-p.slope)
		f.pieces[f.n] = p
		f.n++
	}
	var mass float64
	for _, p := range f.pieces[:f.n] {
		mass += p.moment(1, p.lo, p.hi)
	}
	if !(mass > 0) || math.IsInf(mass, 0) {
		return IMF{}, fmt.Errorf("yields: %v IMF over [%g, %g] Msun cannot be normalized (mass integral %g)", form, minMass, maxMass, mass)
	}
	for i := range f.pieces[:f.n] {
		f.pieces[i].coef /= mass
	}
	var acc [3]float64
	for i, p := range f.pieces[:f.n] {
		f.offsets[i] = acc
		for k := range acc {
			acc[k] += p.moment(float64(k), p.lo, p.hi)
		}
	}
	return f, nil
}

// Form is the IMF's published form.
func (f IMF) Form() IMFForm { return f.form }

// MinMass is the lower end of the mass range in Msun.
func (f IMF) MinMass() float64 { return f.lo }

// MaxMass is the upper end of the mass range in Msun.
func (f IMF) MaxMass() float64 { return f.hi }

// Density is dN/dm at mass m: stars per Msun of stellar mass per Msun
// formed. It is zero outside the mass range.
func (f IMF) Density(m float64) float64 {
	if !(m >= f.lo && m <= f.hi) {
		return 0
	}
	for _, p := range f.pieces[:f.n] {
		if m <= p.hi {
			return p.density(m)
		}
	}
	return 0
}

// Moment is ∫ m^k dN over [m1, m2] ∩ [MinMass, MaxMass], in closed form
// (power laws piece by piece; the lognormal through erf). k = 0 counts stars,
// k = 1 weighs them. An empty or inverted interval gives zero.
func (f IMF) Moment(k, m1, m2 float64) float64 {
	m1, m2 = math.Max(m1, f.lo), math.Min(m2, f.hi)
	if !(m1 < m2) {
		return 0
	}
	var s float64
	for _, p := range f.pieces[:f.n] {
		a, b := math.Max(m1, p.lo), math.Min(m2, p.hi)
		if a < b {
			s += p.moment(k, a, b)
		}
	}
	return s
}

// Number is the number of stars with masses in [m1, m2] per Msun formed.
func (f IMF) Number(m1, m2 float64) float64 { return f.Moment(0, m1, m2) }

// Mass is the stellar mass in [m1, m2], in Msun per Msun formed.
func (f IMF) Mass(m1, m2 float64) float64 { return f.Moment(1, m1, m2) }

// MomentQuad is Moment computed numerically with gonum's Gauss–Legendre
// rule in log m on each analytic piece (n nodes per piece). It exists to
// check the closed forms and to integrate IMF-weighted functions that have
// none: weight(m) multiplies m^k (nil means 1).
func (f IMF) MomentQuad(k, m1, m2 float64, weight func(m float64) float64, n int) (float64, error) {
	if n < 1 {
		return 0, errors.New("yields: MomentQuad needs at least one node")
	}
	if math.IsNaN(m1) || math.IsNaN(m2) {
		return 0, errors.New("yields: MomentQuad bounds are NaN")
	}
	m1, m2 = math.Max(m1, f.lo), math.Min(m2, f.hi)
	if !(m1 < m2) {
		return 0, nil
	}
	var s float64
	for _, p := range f.pieces[:f.n] {
		a, b := math.Max(m1, p.lo), math.Min(m2, p.hi)
		if !(a < b) {
			continue
		}
		g := func(lm float64) float64 {
			m := math.Exp(lm)
			v := m * math.Pow(m, k) * p.density(m) // dm = m dln m
			if weight != nil {
				v *= weight(m)
			}
			return v
		}
		s += quad.Fixed(g, math.Log(a), math.Log(b), n, quad.Legendre{}, 0)
	}
	return s, nil
}

// Primitives returns the antiderivatives F_k(m) = ∫ m'^k dN over
// [MinMass, m] for k = 0, 1, 2 (m clamped to the mass range), so that
// Moment(k, a, b) = F_k(b) − F_k(a) to round-off. It costs one power (or,
// on the lognormal piece, three erf) whatever k, which is why the hot paths
// of Population use it.
func (f IMF) Primitives(m float64) [3]float64 {
	m = math.Min(math.Max(m, f.lo), f.hi)
	i := 0
	for i < f.n-1 && m > f.pieces[i].hi {
		i++
	}
	p := f.pieces[i]
	out := f.offsets[i]
	if m <= p.lo {
		return out
	}
	if p.lognormal {
		for k := range out {
			out[k] += p.moment(float64(k), p.lo, m)
		}
		return out
	}
	// m^(k+1−α) = m^(1−α)·m^k: one power for all three.
	t := math.Pow(m, 1-p.slope)
	t0 := p.loT
	mk, lk := 1.0, 1.0
	for k := range out {
		q := float64(k) + 1 - p.slope
		if math.Abs(q) < 1e-12 {
			out[k] += p.coef * math.Log(m/p.lo)
		} else {
			out[k] += p.coef * (t*mk - t0*lk) / q
		}
		mk *= m
		lk *= p.lo
	}
	return out
}
