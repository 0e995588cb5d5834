package yields

import (
	"fmt"
	"math"
)

// Validity range of the lifetime fit in metal mass fraction (Raiteri,
// Villata & Navarro 1996, A&A 315, 105, from memory: fitted to the Padova
// tracks for 7e-5 <= Z <= 0.03). Metallicities outside it are clamped to it
// wherever the lifetime enters.
const (
	LifetimeMinZ = 7e-5
	LifetimeMaxZ = 0.03
)

// Lifetimes is the main-sequence plus post-main-sequence lifetime fit of
// Raiteri, Villata & Navarro 1996 (A&A 315, 105, eq. 3; coefficients from
// memory), at one metallicity:
//
//	log10 τ/yr = a0(Z) + a1(Z)·log10 m + a2(Z)·(log10 m)²
//	a0 = 10.13 + 0.07547·log10 Z − 0.008084·(log10 Z)²
//	a1 = −4.424 − 0.7939·log10 Z − 0.1187·(log10 Z)²
//	a2 = 1.262 + 0.3385·log10 Z + 0.05417·(log10 Z)²
//
// with m in Msun, fitted for 0.6–120 Msun and 7e-5 <= Z <= 0.03 (Z is
// clamped to that range). The parabola in log m has its minimum near
// 100 Msun; above that mass (VertexMass) the lifetime is held at its
// minimum, so stars heavier than VertexMass all end at the same age.
type Lifetimes struct {
	z          float64
	a0, a1, a2 float64
	logMv      float64 // log10 of the vertex mass
	logTmin    float64 // log10 τ/yr at the vertex
}

// NewLifetimes returns the fit at metallicity z (clamped to
// [LifetimeMinZ, LifetimeMaxZ]).
func NewLifetimes(z float64) (Lifetimes, error) {
	if math.IsNaN(z) || z < 0 || z >= 1 {
		return Lifetimes{}, fmt.Errorf("yields: lifetimes: metallicity %g not in [0, 1)", z)
	}
	z = math.Min(math.Max(z, LifetimeMinZ), LifetimeMaxZ)
	lz := math.Log10(z)
	l := Lifetimes{
		z:  z,
		a0: 10.13 + 0.07547*lz - 0.008084*lz*lz,
		a1: -4.424 - 0.7939*lz - 0.1187*lz*lz,
		a2: 1.262 + 0.3385*lz + 0.05417*lz*lz,
	}
	l.logMv = -l.a1 / (2 * l.a2)
	l.logTmin = l.a0 + l.a1*l.logMv + l.a2*l.logMv*l.logMv
	return l, nil
}

// Metallicity is the (clamped) metallicity the fit is evaluated at.
func (l Lifetimes) Metallicity() float64 { return l.z }

// VertexMass is the mass in Msun of the shortest lifetime; heavier stars are
// given that lifetime.
func (l Lifetimes) VertexMass() float64 { return math.Pow(10, l.logMv) }

// MinLifetime is the shortest lifetime in Myr, that of VertexMass and above.
func (l Lifetimes) MinLifetime() float64 { return math.Pow(10, l.logTmin-6) }

// Lifetime is the lifetime in Myr of a star of initial mass m Msun (m > 0).
func (l Lifetimes) Lifetime(m float64) float64 {
	x := math.Min(math.Log10(m), l.logMv)
	return math.Pow(10, l.a0+l.a1*x+l.a2*x*x-6)
}

// TurnoffMass is the initial mass in Msun of the stars that end their lives
// at age Myr: the smaller root of the quadratic in log m. Ages before
// MinLifetime give +Inf (no star has died yet); age 0 or less gives +Inf.
func (l Lifetimes) TurnoffMass(age float64) float64 {
	if !(age > 0) {
		return math.Inf(1)
	}
	lt := math.Log10(age) + 6
	if lt <= l.logTmin {
		return math.Inf(1)
	}
	// a2 x² + a1 x + c = 0 with c = a0 − lt; the root on the falling branch
	// x < logMv is (−a1 − √disc)/(2 a2), written as 2c/(−a1 + √disc) to avoid
	// cancellation near x = 0 (a1 < 0 over the fit's range).
	c := l.a0 - lt
	disc := l.a1*l.a1 - 4*l.a2*c
	x := 2 * c / (-l.a1 + math.Sqrt(disc))
	return math.Pow(10, x)
}
