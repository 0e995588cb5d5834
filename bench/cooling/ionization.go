package cooling

import "math"

// IonizationEquilibrium is the collisional ionization equilibrium of
// hydrogen and helium at temperature t (K): the ionized fraction of
// hydrogen, n(H+)/n_H, and the fractions of helium singly and doubly
// ionized, n(He+)/n_He and n(He++)/n_He. Each state's collisional
// ionization by electrons balances the recombination of the next state
// (radiative, and dielectronic for He+), so the fractions depend on
// temperature only. The rate coefficients are those of Cen 1992 (ApJS 78,
// 341) as listed by Katz, Weinberg & Hernquist 1996 (ApJS 105, 19, table 2;
// from memory), with the balance of their eqs. 33–38 without photoionization:
//
//	α(H+)   = 8.40e-11 T^-1/2 T3^-0.2 / (1 + T6^0.7)
//	α(He+)  = 1.50e-10 T^-0.6353
//	α_d     = 1.9e-3 T^-1.5 exp(−470000/T) (1 + 0.3 exp(−94000/T))
//	α(He++) = 3.36e-10 T^-1/2 T3^-0.2 / (1 + T6^0.7)
//	Γ(H0)   = 5.85e-11 T^1/2 exp(−157809.1/T) / (1 + T5^1/2)
//	Γ(He0)  = 2.38e-11 T^1/2 exp(−285335.4/T) / (1 + T5^1/2)
//	Γ(He+)  = 5.68e-12 T^1/2 exp(−631515/T)   / (1 + T5^1/2)
//
// in cm^3 s^-1, with Tn = T / 10^n. With these rates hydrogen is half
// ionized at 1.6e4 K, half the helium is ionized at 3.0e4 K, and half is
// doubly ionized at 8.3e4 K.
func IonizationEquilibrium(t float64) (hydrogen, heliumSingle, heliumDouble float64) {
	if !(t > 0) {
		return 0, 0, 0
	}
	sq := math.Sqrt(t)
	shape := 1 / (1 + math.Sqrt(t/1e5))
	recomb := math.Pow(t/1e3, -0.2) / (sq * (1 + math.Pow(t/1e6, 0.7)))
	aH := 8.40e-11 * recomb
	aHe2 := 3.36e-10 * recomb
	aHe1 := 1.50e-10*math.Pow(t, -0.6353) + 1.9e-3*math.Pow(t, -1.5)*math.Exp(-470000/t)*(1+0.3*math.Exp(-94000/t))
	gH := 5.85e-11 * sq * math.Exp(-157809.1/t) * shape
	gHe0 := 2.38e-11 * sq * math.Exp(-285335.4/t) * shape
	gHe1 := 5.68e-12 * sq * math.Exp(-631515/t) * shape
	hydrogen = gH / (aH + gH)
	// n(He0) : n(He+) : n(He++) = α(He+)/Γ(He0) : 1 : Γ(He+)/α(He++),
	// multiplied through by Γ(He0) α(He++) so that no rate divides.
	n0, n1, n2 := aHe1*aHe2, gHe0*aHe2, gHe0*gHe1
	sum := n0 + n1 + n2
	return hydrogen, n1 / sum, n2 / sum
}

// particlesPerProtonMass is the number of free particles (atoms, ions and
// electrons) per proton mass of gas with hydrogen, helium and metal mass
// fractions x, y, z at temperature t in collisional ionization equilibrium:
// the inverse of the mean mass per particle μ in proton masses. Helium atoms
// weigh four proton masses. Metals count z/2 particles per proton mass
// times the ionized fraction of hydrogen: their ions and electrons once
// ionized (the usual fully ionized approximation, about half a particle
// per proton mass), nothing while hydrogen is neutral (their atoms, about
// z/16, are 0.1% of the particles of solar gas and are left out).
func particlesPerProtonMass(x, y, z, t float64) float64 {
	h, he1, he2 := IonizationEquilibrium(t)
	return x*(1+h) + y/4*(1+he1+2*he2) + z/2*h
}

// Tabulation of the mean mass per particle: 200 nodes per decade from 1e3 K
// (hydrogen ionized to 1e-60) to 1e8 K (helium doubly ionized to 1e-9).
const (
	meanMassMinTemp     = 1e3
	meanMassNodesPerDex = 200
	meanMassDecades     = 5
	meanMassNumNodes    = meanMassNodesPerDex*meanMassDecades + 1
)

// energyTemperature holds θ(T) = T / μ(T), the temperature over the mean
// mass per particle, to which the specific internal energy is proportional:
// e = k_B θ / ((γ − 1) m_p). θ is tabulated at nodes rising in T and is a
// power law in T between them, T/μ(T_0) below the first node and
// T/μ(T_last) above the last; with no nodes it is T/mu everywhere. θ rises
// strictly with T, so T(θ) is its exact inverse.
type energyTemperature struct {
	temp  []float64 // node temperatures, K; 10^(logT0 + k/perDex)
	theta []float64 // θ at the nodes
	expo  []float64 // d ln θ / d ln T on [temp[k], temp[k+1])
	logT0 float64   // log10 temp[0]
	// muLow and muHigh are μ below the first and above the last node.
	muLow, muHigh float64
}

// newEnergyTemperature tabulates θ = T/μ(T) for mean mass mu(T) on the
// mean-mass grid. It reports false unless every μ is finite and positive and
// θ rises strictly.
func newEnergyTemperature(mu func(t float64) float64) (*energyTemperature, bool) {
	n := meanMassNumNodes
	et := &energyTemperature{
		temp: make([]float64, n), theta: make([]float64, n), expo: make([]float64, n-1),
		logT0: math.Log10(meanMassMinTemp),
	}
	for k := range n {
		t := meanMassMinTemp * math.Pow(10, float64(k)/meanMassNodesPerDex)
		m := mu(t)
		if !(m > 0) || math.IsInf(m, 0) {
			return nil, false
		}
		et.temp[k], et.theta[k] = t, t/m
		if k == 0 {
			et.muLow = m
		}
		et.muHigh = m
		if k > 0 {
			if !(et.theta[k] > et.theta[k-1]) {
				return nil, false
			}
			et.expo[k-1] = math.Log(et.theta[k]/et.theta[k-1]) / math.Log(t/et.temp[k-1])
		}
	}
	return et, true
}

// theta is θ(T) for t >= 0.
func (et *energyTemperature) thetaAt(t float64) float64 {
	last := len(et.temp) - 1
	if last < 0 || t <= et.temp[0] {
		return t / et.muLow
	}
	if t >= et.temp[last] {
		return t / et.muHigh
	}
	k := int((math.Log10(t) - et.logT0) * meanMassNodesPerDex)
	k = max(0, min(k, last-1))
	for k > 0 && t < et.temp[k] {
		k--
	}
	for k < last-1 && t >= et.temp[k+1] {
		k++
	}
	th := et.theta[k] * math.Exp(et.expo[k]*math.Log(t/et.temp[k]))
	return math.Min(math.Max(th, et.theta[k]), et.theta[k+1])
}

// temperatureAt is T(θ), the inverse of thetaAt, for th >= 0.
func (et *energyTemperature) temperatureAt(th float64) float64 {
	last := len(et.theta) - 1
	if last < 0 || th <= et.theta[0] {
		return th * et.muLow
	}
	if th >= et.theta[last] {
		return th * et.muHigh
	}
	// Segment k with theta[k] <= th < theta[k+1]: T/μ lies between T/μLow
	// and T/μHigh, so k is within a few nodes of the guess for either; a
	// binary search over the whole grid is just as cheap and simpler.
	lo, hi := 0, last
	for hi-lo > 1 {
		m := (lo + hi) / 2
		if et.theta[m] <= th {
			lo = m
		} else {
			hi = m
		}
	}
	k := lo
	t := et.temp[k] * math.Exp(math.Log(th/et.theta[k])/et.expo[k])
	return math.Min(math.Max(t, et.temp[k]), et.temp[k+1])
}

// meanMass is μ(T).
func (et *energyTemperature) meanMass(t float64) float64 {
	if !(t > 0) {
		return et.muLow
	}
	return t / et.thetaAt(t)
}
