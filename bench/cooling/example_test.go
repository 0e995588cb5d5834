package cooling_test

import (
	"fmt"
	"math"

	"github.com/ejecta-dev/ejecta/bench/cooling"
)

// Cool a parcel of 1e6 K solar-metallicity gas at n_H = 1 cm^-3 for 10 kyr
// and book what it radiated.
func Example() {
	curve, err := cooling.Builtin(1) // Z in solar units
	if err != nil {
		panic(err)
	}
	gas := cooling.DefaultGas()
	cooler, err := cooling.NewCooler(curve, gas)
	if err != nil {
		panic(err)
	}
	rho := gas.MassDensity(1)
	e0 := gas.SpecificEnergy(1e6)
	e1 := cooler.Evolve(rho, e0, 1e4*3.15576e7, math.NaN())
	fmt.Printf("T: %.3g K -> %.3g K, radiated %.3g erg/cm^3\n", gas.Temperature(e0), gas.Temperature(e1), rho*(e0-e1))
	fmt.Printf("equilibrium at n_H = 1: %.0f K, mean mass %.3f\n", curve.EquilibriumTemperature(1), gas.MeanMass(curve.EquilibriumTemperature(1)))
	// Output:
	// T: 1e+06 K -> 9.22e+05 K, radiated 3.65e-11 erg/cm^3
	// equilibrium at n_H = 1: 5006 K, mean mass 1.250
}
