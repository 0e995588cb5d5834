package feedback

import "github.com/ejecta-dev/ejecta/yields/units"

// DelayedCooling is the delayed-cooling method of Stinson et al. 2006
// (MNRAS 373, 1074): the release is coupled by another scheme (a thermal
// dump when Scheme is nil), and every element that receives a share of a
// supernova's energy is flagged FlagHoldCooling with HoldCoolingUntil set
// to the blast-wave time CoolingHoldTime of the release at the element's
// density and pressure. The host switches the element's cooling off until
// then; without that, the deposit is the inner scheme's. Energy, momentum
// and mass are exactly the inner scheme's. A Stepper configured with
// StepConfig.DelayedCooling flags its supernova records the same way.
type DelayedCooling struct {
	// Scheme couples the release; nil means ThermalDump.
	Scheme Scheme
}

// Name is "delayed-cooling".
func (DelayedCooling) Name() string { return "delayed-cooling" }

// Deposit implements Scheme.
func (s DelayedCooling) Deposit(nb *Neighborhood, out []Deposit) (float64, error) {
	inner := s.Scheme
	if inner == nil {
		inner = ThermalDump{}
	}
	rad, err := inner.Deposit(nb, out)
	if err != nil {
		return rad, err
	}
	e := nb.Source.Energy - nb.returned
	if !(e > 0) {
		return rad, nil
	}
	for j := range out {
		if nb.EnergyWeight[j] == 0 {
			continue
		}
		out[j].Flags |= FlagHoldCooling
		out[j].HoldCoolingUntil = holdCoolingTime(e, nb.Density[j], nb.InternalEnergy[j], nb.Units)
	}
	return rad, nil
}

// holdCoolingTime is CoolingHoldTime for a release of energy e in gas of
// density rho and specific internal energy u, all in code units, in code
// time: the thermal pressure over k_B is (2/3) rho u / k_B for a
// monatomic gas.
func holdCoolingTime(e, rho, u float64, cu units.CodeUnits) float64 {
	n := hydrogenDensity(rho, cu)
	pk := 2.0 / 3 * rho * cu.DensityGCm3() * u * cu.SpecificEnergy() / units.Boltzmann
	return CoolingHoldTime(e*cu.EnergyErg(), n, pk) / cu.TimeS()
}
