package yields

import (
	"math"

	"github.com/ejecta-dev/ejecta/yields/units"
)

// Photon energy bands, in eV.
const (
	// HydrogenIonizationEnergy is the ionization energy of atomic hydrogen
	// from its ground state, 13.598 eV (NIST Atomic Spectra Database; from
	// memory, 13.598434 eV): photons above it ionize hydrogen.
	HydrogenIonizationEnergy = 13.598434
	// FarUltravioletMinEnergy is the lower edge of the far-ultraviolet band
	// that heats neutral gas through photoelectrons from small dust grains,
	// 6 eV (Bakes & Tielens 1994, ApJ 427, 822; common practice): the band is
	// 6 eV to HydrogenIonizationEnergy.
	FarUltravioletMinEnergy = 6.0
)

// planckIntegral2 and planckIntegral3 are ∫_0^∞ t^n/(e^t − 1) dt for n = 2
// and 3: Γ(n+1) ζ(n+1), that is 2 ζ(3) and π⁴/15.
const (
	planckIntegral2 = 2 * 1.2020569031595942853997 // ζ(3), Apéry's constant
	planckIntegral3 = math.Pi * math.Pi * math.Pi * math.Pi / 15
)

// bernoulli returns the Bernoulli numbers B_k, k = 0..14 (B_1 = −1/2; odd
// k > 1 vanish), of t/(e^t − 1) = Σ B_k t^k / k!.
func bernoulli() [15]float64 {
	return [15]float64{1, -0.5, 1.0 / 6, 0, -1.0 / 30, 0, 1.0 / 42, 0, -1.0 / 30, 0, 5.0 / 66, 0, -691.0 / 2730, 0, 7.0 / 6}
}

// planckTail is ∫_x^∞ t^n/(e^t − 1) dt for n = 2 or 3 and x >= 0, to about
// 1e-15 relative. For x >= 1 it sums Σ_k e^{−kx} Σ_j n!/(n−j)! x^{n−j}/k^{j+1}
// (the term-by-term integral of the geometric series of 1/(e^t − 1)); for
// x < 1 it subtracts from the whole integral the part below x, from the
// Bernoulli series of t/(e^t − 1), which converges for t < 2π.
func planckTail(n int, x float64) float64 {
	whole := planckIntegral2
	if n == 3 {
		whole = planckIntegral3
	}
	switch {
	case !(x > 0):
		return whole
	case x < 1:
		// ∫_0^x t^{n−1} Σ_k B_k t^k/k! dt = Σ_k B_k x^{n+k} / (k! (n+k)).
		var low, fact float64 = 0, 1
		xp := math.Pow(x, float64(n))
		for k, b := range bernoulli() {
			if k > 0 {
				fact *= float64(k)
				xp *= x
			}
			low += b * xp / (fact * float64(n+k))
		}
		return whole - low
	case x > 700:
		return 0
	}
	e1 := math.Exp(-x)
	var s float64
	e := 1.0
	for k := 1; k <= 64; k++ {
		e *= e1 // e^{−kx}
		if e == 0 {
			break
		}
		// Σ_j n!/(n−j)! x^{n−j} / k^{j+1}, Horner in u = 1/k.
		u := 1 / float64(k)
		var poly float64
		if n == 2 {
			poly = u * (x*x + u*(2*x+u*2))
		} else {
			poly = u * (x*x*x + u*(3*x*x+u*(6*x+u*6)))
		}
		term := e * poly
		s += term
		if term < 1e-17*s {
			break
		}
	}
	return s
}

// blackbodyPhotonRate is the number of photons per second above energy e
// (eV) that a blackbody of luminosity lum (Lsun) and temperature t (K)
// emits: L/(kT) · (15/π⁴) ∫_x^∞ t²/(e^t − 1) dt with x = e/kT.
func blackbodyPhotonRate(lum, t, e float64) float64 {
	if !(lum > 0 && t > 0) {
		return 0
	}
	kt := units.Boltzmann * t
	x := e * units.ElectronVolt / kt
	return lum * units.SolarLuminosity / kt * planckTail(2, x) / planckIntegral3
}

// blackbodyBandFraction is the fraction of a blackbody's bolometric
// luminosity at temperature t (K) emitted between photon energies e0 < e1
// (eV): (15/π⁴) ∫_{x0}^{x1} t³/(e^t − 1) dt.
func blackbodyBandFraction(t, e0, e1 float64) float64 {
	if !(t > 0) {
		return 0
	}
	kt := units.Boltzmann * t / units.ElectronVolt // eV
	return math.Max(0, planckTail(3, e0/kt)-planckTail(3, e1/kt)) / planckIntegral3
}
