package cooling

import (
	"fmt"
	"math"
)

// KoyamaInutsukaHeating is Γ = 2e-26 erg s^-1 per hydrogen atom, the
// heating rate of the Koyama & Inutsuka 2002 fit (ApJ 564, L97).
const KoyamaInutsukaHeating = 2e-26

// Temperatures (K) where the built-in fit changes form.
const (
	// lowFitTop is the top of the Koyama & Inutsuka range.
	lowFitTop = 1e4
	// ionizedBottom is the bottom of the collisional-ionization-equilibrium range.
	ionizedBottom = 1e5
)

// Tabulation of the built-in fit.
const (
	builtinMinTemp      = 10.0
	builtinMaxTemp      = 1e9
	builtinNodesPerDex  = 200
	builtinDecades      = 8
	builtinNumNodes     = builtinNodesPerDex*builtinDecades + 1
	helium              = 0.0851 // He/H by number (Asplund et al. 2009, ARA&A 47, 481; from memory)
	freeFreeGaunt       = 1.2    // mean Gaunt factor (Rybicki & Lightman 1979, sect. 5.2)
	freeFreeCoefficient = 1.4e-27
)

// KoyamaInutsukaLambda is the low-temperature cooling function of Koyama &
// Inutsuka 2002 (ApJ 564, L97) in the form corrected by Vázquez-Semadeni et
// al. 2007 (ApJ 657, 870), in erg cm^3 s^-1:
//
//	Λ = Γ [1e7 exp(−1.184e5/(T + 1000)) + 1.4e-2 sqrt(T) exp(−92/T) zeta],
//
// Γ = KoyamaInutsukaHeating, with the metal fine-structure term scaled by
// the metallicity zeta in solar units (our own extension; the paper is for
// solar gas).
func KoyamaInutsukaLambda(t, zeta float64) float64 {
	return KoyamaInutsukaHeating * (1e7*math.Exp(-1.184e5/(t+1000)) + 1.4e-2*math.Sqrt(t)*math.Exp(-92/t)*zeta)
}

// MetalLineLambda is the collisional-ionization-equilibrium cooling of
// solar-metallicity gas between 1e5 and 2e7 K, 1.1e-22 T6^-0.7
// erg cm^3 s^-1 per n_H^2 (Draine 2011, Physics of the Interstellar and
// Intergalactic Medium, eq. 34.4; from memory). Builtin scales it by the
// metallicity and uses it at all T >= 1e5 K.
func MetalLineLambda(t float64) float64 {
	return 1.1e-22 * math.Pow(t/1e6, -0.7)
}

// FreeFreeLambda is the free–free (bremsstrahlung) cooling of fully ionized
// hydrogen and helium per n_H^2 in erg cm^3 s^-1: 1.4e-27 g T^1/2 n_e
// Σ n_i Z_i^2 (Rybicki & Lightman 1979, eq. 5.15b) with mean Gaunt factor
// g = 1.2 and He/H = 0.0851 by number, so n_e = (1 + 2 y) n_H and
// Σ n_i Z_i^2 = (1 + 4 y) n_H.
func FreeFreeLambda(t float64) float64 {
	const per = freeFreeCoefficient * freeFreeGaunt * (1 + 2*helium) * (1 + 4*helium)
	return per * math.Sqrt(t)
}

// BuiltinLambda is the built-in cooling function at temperature t (K) and
// metallicity zeta (solar units) in erg cm^3 s^-1: Koyama & Inutsuka below
// 1e4 K, metal lines times zeta plus free–free above 1e5 K, and a power law
// joining the two in between (see the package documentation).
func BuiltinLambda(t, zeta float64) float64 {
	switch {
	case t <= lowFitTop:
		return KoyamaInutsukaLambda(t, zeta)
	case t >= ionizedBottom:
		return zeta*MetalLineLambda(t) + FreeFreeLambda(t)
	}
	lo := math.Log(KoyamaInutsukaLambda(lowFitTop, zeta))
	hi := math.Log(zeta*MetalLineLambda(ionizedBottom) + FreeFreeLambda(ionizedBottom))
	f := math.Log(t/lowFitTop) / math.Log(ionizedBottom/lowFitTop)
	return math.Exp(lo + f*(hi-lo))
}

// Builtin tabulates BuiltinLambda at metallicity zeta (solar units, finite
// and >= 0) on 200 nodes per decade from 10 K to 1e9 K, with heating
// KoyamaInutsukaHeating.
func Builtin(zeta float64) (*Curve, error) {
	if !(zeta >= 0) || math.IsInf(zeta, 0) {
		return nil, fmt.Errorf("cooling: built-in fit: metallicity %v solar, want finite >= 0: %w", zeta, ErrInput)
	}
	temp := make([]float64, builtinNumNodes)
	lambda := make([]float64, builtinNumNodes)
	for k := range temp {
		temp[k] = builtinMinTemp * math.Pow(10, float64(k)/builtinNodesPerDex)
		// Nodes at exact decades keep the piece boundaries on nodes.
		lambda[k] = BuiltinLambda(temp[k], zeta)
	}
	temp[builtinNumNodes-1] = builtinMaxTemp
	c, err := NewCurve(temp, lambda, KoyamaInutsukaHeating)
	if err != nil {
		return nil, fmt.Errorf("cooling: built-in fit: %w", err)
	}
	return c, nil
}
