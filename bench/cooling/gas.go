package cooling

import (
	"fmt"
	"math"

	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Gas states how temperature, density and internal energy relate: the gas
// mass per hydrogen atom, the mean mass per particle μ(T) and the adiabatic
// index. Build one with NewGas (μ from the ionization equilibrium of the
// gas's hydrogen and helium), NewFixedMeanMassGas (μ the same at every
// temperature) or DefaultGas; the zero Gas is invalid. A Gas is a small
// value over an immutable table: copies are cheap and safe for concurrent
// use.
type Gas struct {
	// Gamma is the adiabatic index γ > 1. It may be changed on a copy: the
	// mean-mass table does not depend on it.
	Gamma float64

	massPerH float64            // ρ / (n_H m_p)
	energy   *energyTemperature // θ(T) = T/μ(T); nil only in the zero Gas
}

// kelvinPerEnergy is (γ − 1) m_p / k_B: θ = T/μ per unit specific energy.
func (g Gas) kelvinPerEnergy() float64 {
	return (g.Gamma - 1) * units.ProtonMass / units.Boltzmann
}

// NewGas is gas of hydrogen, helium and metal mass fractions x, y and z
// (each in [0, 1], x > 0, summing to 1 within 1e-6) and adiabatic index
// gamma, whose mean mass per particle follows the collisional ionization
// equilibrium of its hydrogen and helium (IonizationEquilibrium; metals
// counted as in the package documentation): μ = 1/(x + y/4) for neutral
// gas, 1/(2x + 3y/4 + z/2) fully ionized. μ is tabulated at 200 nodes per
// decade from 1e3 to 1e8 K and interpolated so that T/μ is a power law in T
// between nodes; it is constant outside that range.
func NewGas(x, y, z, gamma float64) (Gas, error) {
	in := func(v float64) bool { return v >= 0 && v <= 1 }
	if !in(x) || !(x > 0) || !in(y) || !in(z) || math.Abs(x+y+z-1) > 1e-6 {
		return Gas{}, fmt.Errorf("cooling: gas: mass fractions X %v, Y %v, Z %v: want each in [0, 1], X > 0, summing to 1: %w", x, y, z, ErrInput)
	}
	if !(gamma > 1) || math.IsInf(gamma, 0) {
		return Gas{}, fmt.Errorf("cooling: gas: adiabatic index %v, want finite > 1: %w", gamma, ErrInput)
	}
	et, ok := newEnergyTemperature(func(t float64) float64 { return 1 / particlesPerProtonMass(x, y, z, t) })
	if !ok {
		return Gas{}, fmt.Errorf("cooling: gas: X %v, Y %v, Z %v: the mean mass does not fall with temperature: %w", x, y, z, ErrInput)
	}
	return Gas{Gamma: gamma, massPerH: 1 / x, energy: et}, nil
}

// NewFixedMeanMassGas is gas of massPerHydrogen proton masses per hydrogen
// atom whose mean mass per particle is meanMass proton masses at every
// temperature (both finite and > 0), with adiabatic index gamma.
func NewFixedMeanMassGas(massPerHydrogen, meanMass, gamma float64) (Gas, error) {
	ok := func(v float64) bool { return v > 0 && !math.IsInf(v, 0) }
	if !ok(massPerHydrogen) || !ok(meanMass) || !(gamma > 1) || math.IsInf(gamma, 0) {
		return Gas{}, fmt.Errorf("cooling: gas: mass per hydrogen %v, mean mass %v, adiabatic index %v: want finite positive masses and gamma > 1: %w",
			massPerHydrogen, meanMass, gamma, ErrInput)
	}
	return Gas{Gamma: gamma, massPerH: massPerHydrogen, energy: &energyTemperature{muLow: meanMass, muHigh: meanMass}}, nil
}

// DefaultGas is NewGas with the solar mass fractions the library uses
// everywhere (yields.SolarHydrogen, yields.SolarHelium, yields.SolarMetals:
// about 1.355 proton masses per hydrogen atom, the conversion of
// feedback.MassPerHydrogen) and γ = 5/3: μ = 1.250 in neutral gas, 0.599
// fully ionized (feedback.IonizedMeanMolecularWeight).
func DefaultGas() Gas {
	g, err := NewGas(yields.SolarHydrogen, yields.SolarHelium, yields.SolarMetals, 5.0/3)
	if err != nil {
		panic(err) // the library's own constants
	}
	return g
}

// Validate reports an error for the zero Gas or a Gamma that is not finite
// and > 1.
func (g Gas) Validate() error {
	if g.energy == nil || !(g.massPerH > 0) || !(g.Gamma > 1) || math.IsInf(g.Gamma, 0) {
		return fmt.Errorf("cooling: gas with mass per hydrogen %v and gamma %v: want a Gas from NewGas or NewFixedMeanMassGas and gamma > 1: %w",
			g.massPerH, g.Gamma, ErrInput)
	}
	return nil
}

// MassPerHydrogen is ρ / (n_H m_p), the gas mass per hydrogen atom in proton
// masses.
func (g Gas) MassPerHydrogen() float64 { return g.massPerH }

// MeanMass is μ, the mean mass per particle in proton masses, at
// temperature t (K).
func (g Gas) MeanMass(t float64) float64 { return g.energy.meanMass(t) }

// HydrogenDensity is n_H in cm^-3 for mass density rho in g cm^-3.
func (g Gas) HydrogenDensity(rho float64) float64 {
	return rho / (g.massPerH * units.ProtonMass)
}

// MassDensity is ρ in g cm^-3 for hydrogen density nH in cm^-3.
func (g Gas) MassDensity(nH float64) float64 {
	return nH * g.massPerH * units.ProtonMass
}

// Temperature is T in K for specific internal energy e in erg g^-1, the
// solution of e = k_B T / ((γ − 1) μ(T) m_p). It rises with e, allocates
// nothing, and inverts SpecificEnergy to round-off.
func (g Gas) Temperature(e float64) float64 {
	return g.energy.temperatureAt(e * g.kelvinPerEnergy())
}

// SpecificEnergy is e = k_B T / ((γ − 1) μ(T) m_p) in erg g^-1 at
// temperature t in K.
func (g Gas) SpecificEnergy(t float64) float64 {
	return g.energy.thetaAt(t) / g.kelvinPerEnergy()
}
