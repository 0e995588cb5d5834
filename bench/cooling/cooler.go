package cooling

import (
	"fmt"
	"math"
)

// Cooler applies a Curve to a Gas: it advances the specific internal energy
// of gas at fixed density over a time step with the curve's cooling and
// heating, exactly (Townsend 2009, ApJS 181, 391) and never past the
// thermal equilibrium, for a mean mass per particle that changes with
// temperature. It is immutable and safe for concurrent use; build it once
// per curve and gas, outside hot loops.
type Cooler struct {
	curve *Curve
	gas   Gas
	// law is Λ as a function of θ = T/μ(T) (K), through the curve's nodes
	// and the gas's mean-mass nodes: between two of them Λ and θ are both
	// power laws in T, so Λ is a power law in θ.
	law powerLaw
	// kelvinPerEnergy is θ per unit specific energy, (γ − 1) m_p / k_B.
	kelvinPerEnergy float64
}

// NewCooler binds curve c to gas g (valid: see Gas.Validate).
func NewCooler(c *Curve, g Gas) (*Cooler, error) {
	if c == nil {
		return nil, fmt.Errorf("cooling: cooler: no curve: %w", ErrInput)
	}
	if err := g.Validate(); err != nil {
		return nil, fmt.Errorf("cooling: cooler: %w", err)
	}
	// Merge the curve's nodes with the gas's above the curve's first node;
	// a gas node within 1e-9 of a curve node is that node.
	ct, gt := c.law.x, g.energy.temp
	temps := make([]float64, 0, len(ct)+len(gt))
	i, j := 0, 0
	for i < len(ct) || j < len(gt) {
		switch {
		case j < len(gt) && gt[j] <= ct[0]:
			j++
		case j == len(gt) || (i < len(ct) && ct[i] <= gt[j]):
			temps = append(temps, ct[i])
			if j < len(gt) && math.Abs(gt[j]-ct[i]) <= 1e-9*ct[i] {
				j++
			}
			i++
		default:
			if i == len(ct) || math.Abs(gt[j]-ct[i]) > 1e-9*ct[i] {
				temps = append(temps, gt[j])
			}
			j++
		}
	}
	theta := make([]float64, len(temps))
	lambda := make([]float64, len(temps))
	for k, t := range temps {
		theta[k] = g.energy.thetaAt(t)
		lambda[k] = c.Lambda(t)
		if k > 0 && !(theta[k] > theta[k-1]) {
			return nil, fmt.Errorf("cooling: cooler: T/μ does not rise between %v K and %v K: %w", temps[k-1], t, ErrInput)
		}
	}
	// Past the last node the curve continues its last power law in T and
	// μ is constant, so the slope in θ is the curve's.
	top := c.law.slope[len(ct)-1]
	return &Cooler{curve: c, gas: g, law: newPowerLaw(theta, lambda, top), kelvinPerEnergy: g.kelvinPerEnergy()}, nil
}

// Curve is the cooler's cooling curve.
func (k *Cooler) Curve() *Curve { return k.curve }

// Gas is the cooler's gas.
func (k *Cooler) Gas() Gas { return k.gas }

// EquilibriumEnergy is the specific internal energy (erg g^-1) at the
// curve's equilibrium temperature for mass density rho (g cm^-3): the
// floor Evolve never crosses. It is +Inf where heating beats cooling at
// every temperature.
func (k *Cooler) EquilibriumEnergy(rho float64) float64 {
	t := k.curve.EquilibriumTemperature(k.gas.HydrogenDensity(rho))
	if math.IsInf(t, 1) {
		return t
	}
	return k.gas.SpecificEnergy(t)
}

// Evolve advances the specific internal energy e (erg g^-1) of gas of mass
// density rho (g cm^-3) over dt seconds and returns the new value; the
// energy radiated per unit volume is rho (e − eNew) (negative when heated).
// With θ = T/μ(T), the heat per unit volume is ρ e = C θ with
// C = ρ k_B / ((γ − 1) m_p) fixed at fixed density, so above the equilibrium
// eeq = EquilibriumEnergy(rho) the equation C dθ/dt = −n_H^2 Λ is
// integrated exactly (Townsend 2009) in θ, stopping at eeq; below it the
// gas heats at n_H Γ and stops at eeq (see the package documentation).
// Pass eeq from a previous call at the same density to skip its search, or
// a NaN to have it computed. Gas within 1e-12 (relative) of eeq is returned
// unchanged.
func (k *Cooler) Evolve(rho, e, dt, eeq float64) (eNew float64) {
	if !(dt > 0) || !(rho > 0) {
		return e
	}
	if math.IsNaN(eeq) {
		eeq = k.EquilibriumEnergy(rho)
	}
	nH := k.gas.HydrogenDensity(rho)
	perTheta := rho / k.kelvinPerEnergy // C: heat per unit volume per kelvin of θ
	th := e * k.kelvinPerEnergy
	th1 := k.law.relax(th, dt, nH*nH/perTheta, nH*k.curve.heating/perTheta, eeq*k.kelvinPerEnergy)
	if th1 == th {
		return e
	}
	return th1 / k.kelvinPerEnergy
}

// CoolingTime is the time in s for gas of mass density rho (g cm^-3) and
// specific internal energy e (erg g^-1) to lose its thermal energy at the
// present net rate, ρ e / |n_H^2 Λ(T) − n_H Γ|; +Inf where the rate is 0.
func (k *Cooler) CoolingTime(rho, e float64) float64 {
	l := math.Abs(k.curve.NetRate(k.gas.HydrogenDensity(rho), k.gas.Temperature(e)))
	if l == 0 {
		return math.Inf(1)
	}
	return rho * e / l
}
