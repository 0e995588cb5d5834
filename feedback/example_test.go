package feedback_test

import (
	"fmt"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Couple one supernova into a small cube of gas held in Go slices, apply
// the records, and check the ledger.
func ExampleCoupler_Couple() {
	// Code units: parsec, solar mass, km/s.
	u := units.CodeUnits{LengthCm: units.Parsec, MassG: units.SolarMass, VelocityCmPS: units.Kilometer}
	const side = 6
	n := side * side * side
	var x, y, z, vx, vy, vz, m, rho, eint []float64
	ids := make([]int64, n)
	for i := 0; i < n; i++ {
		x = append(x, float64(i%side)*3)
		y = append(y, float64(i/side%side)*3)
		z = append(z, float64(i/(side*side))*3)
		vx, vy, vz = append(vx, 0), append(vy, 0), append(vz, 0)
		m = append(m, 1000)
		rho = append(rho, 1000/27.0)
		eint = append(eint, 100)
		ids[i] = int64(i + 1)
	}
	gas := &feedback.Gas{N: n,
		Pos:  [3]feedback.Column{feedback.Float64s(x), feedback.Float64s(y), feedback.Float64s(z)},
		Vel:  [3]feedback.Column{feedback.Float64s(vx), feedback.Float64s(vy), feedback.Float64s(vz)},
		Mass: feedback.Float64s(m), Density: feedback.Float64s(rho),
		InternalEnergy: feedback.Float64s(eint), ID: feedback.Int64s(ids),
	}
	finder, err := neighbor.NewTree(gas.PackedPositions(nil), gas.IDs(nil), neighbor.Box{})
	if err != nil {
		panic(err)
	}
	coupler, err := feedback.NewCoupler(feedback.Config{Units: u,
		Scheme: feedback.TerminalMomentum{Fit: feedback.KimOstriker2015}, Neighbors: 32})
	if err != nil {
		panic(err)
	}
	sn := feedback.Source{Star: feedback.Star{ID: 1, Pos: [3]float64{7.4, 7.5, 7.6}, Mass: 1e4, Metallicity: 0.0134},
		Channel: yields.CoreCollapse, Mass: 10, Events: 1, Energy: units.FOE / u.EnergyErg()}
	var out feedback.Output
	if err := coupler.Couple(gas, finder, []feedback.Source{sn}, &out); err != nil {
		panic(err)
	}
	var applier feedback.Applier // keep it from step to step
	if _, _, err := applier.Apply(gas, out.Records, nil); err != nil {
		panic(err)
	}
	fmt.Println("records:", len(out.Records))
	fmt.Println("balanced:", out.Ledger.Balanced(1e-12) == nil)
	fmt.Println("capped at terminal momentum:", out.Ledger.Capped == 1)
	// Output:
	// records: 32
	// balanced: true
	// capped at terminal momentum: true
}
