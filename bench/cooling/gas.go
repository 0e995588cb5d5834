package cooling

import (
	"fmt"
	"math"

	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Gas states how temperature, density and internal energy relate: the gas
// mass per hydrogen atom, the mean mass per particle (both in proton
// masses) and the adiabatic index. The mean mass per particle is held fixed
// at every temperature.
type Gas struct {
	// MassPerHydrogen is ρ / (n_H m_p).
	MassPerHydrogen float64
	// MeanMass is μ, the mean particle mass in proton masses.
	MeanMass float64
	// Gamma is the adiabatic index.
	Gamma float64
}

// DefaultGas is MassPerHydrogen 1/X with X = yields.SolarHydrogen, the
// solar hydrogen mass fraction the library uses everywhere (about 1.355,
// the same conversion as feedback.MassPerHydrogen), MeanMass 0.6 (solar gas
// fully ionized, where remnants cool; common practice) and Gamma 5/3.
func DefaultGas() Gas {
	return Gas{MassPerHydrogen: 1 / yields.SolarHydrogen, MeanMass: 0.6, Gamma: 5.0 / 3}
}

// Validate reports an error unless every field is finite and positive and
// Gamma > 1.
func (g Gas) Validate() error {
	ok := func(v float64) bool { return v > 0 && !math.IsInf(v, 0) }
	if !ok(g.MassPerHydrogen) || !ok(g.MeanMass) || !ok(g.Gamma) || !(g.Gamma > 1) {
		return fmt.Errorf("cooling: gas %+v: want finite positive masses and gamma > 1: %w", g, ErrInput)
	}
	return nil
}

// HydrogenDensity is n_H in cm^-3 for mass density rho in g cm^-3.
func (g Gas) HydrogenDensity(rho float64) float64 {
	return rho / (g.MassPerHydrogen * units.ProtonMass)
}

// MassDensity is ρ in g cm^-3 for hydrogen density nH in cm^-3.
func (g Gas) MassDensity(nH float64) float64 {
	return nH * g.MassPerHydrogen * units.ProtonMass
}

// Temperature is T in K for specific internal energy e in erg g^-1:
// T = (γ − 1) μ m_p e / k_B.
func (g Gas) Temperature(e float64) float64 {
	return (g.Gamma - 1) * g.MeanMass * units.ProtonMass / units.Boltzmann * e
}

// SpecificEnergy is e in erg g^-1 at temperature t in K (the inverse of
// Temperature).
func (g Gas) SpecificEnergy(t float64) float64 {
	return t * units.Boltzmann / ((g.Gamma - 1) * g.MeanMass * units.ProtonMass)
}

// HeatCapacity is ρ de/dT = n k_B / (γ − 1) in erg K^-1 cm^-3 for mass
// density rho in g cm^-3.
func (g Gas) HeatCapacity(rho float64) float64 {
	return rho * units.Boltzmann / ((g.Gamma - 1) * g.MeanMass * units.ProtonMass)
}

// CoolSpecificEnergy advances the specific internal energy e (erg g^-1) of
// gas of mass density rho (g cm^-3) over dt seconds with curve c (see
// Curve.Evolve) and returns the new value. The energy radiated per unit
// volume is rho (e − eNew). teq is the equilibrium temperature at this
// density, or NaN to compute it.
func (g Gas) CoolSpecificEnergy(c *Curve, rho, e, dt, teq float64) (eNew float64) {
	t := g.Temperature(e)
	t1 := c.Evolve(g.HydrogenDensity(rho), t, dt, g.HeatCapacity(rho), teq)
	if t1 == t {
		return e
	}
	return g.SpecificEnergy(t1)
}
