package feedback_test

import (
	"fmt"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Step a young star particle through one Myr: the stepper asks the
// population model what it releases, draws its supernovae and couples
// every channel; the records are then applied.
func ExampleStepper_Step() {
	u := units.CodeUnits{LengthCm: units.Parsec, MassG: units.SolarMass, VelocityCmPS: units.Kilometer}
	gas := uniformGas(1, 500, 1e3, 1, u) // test helper: a ball of gas in Go slices
	view := gas.View()
	finder, err := neighbor.NewTree(view.PackedPositions(nil), view.IDs(nil), neighbor.Box{})
	if err != nil {
		panic(err)
	}
	pop, err := yields.NewPopulation(yields.DefaultConfig())
	if err != nil {
		panic(err)
	}
	cfg := feedback.DefaultStepConfig(feedback.Config{Units: u}, pop)
	cfg.Seed = 1
	stepper, err := feedback.NewStepper(cfg)
	if err != nil {
		panic(err)
	}
	myr := units.Megayear / u.TimeS()
	star := feedback.StarParticle{Star: feedback.Star{ID: 1, Mass: 1e5, Metallicity: 0.0134, Age: 10 * myr}, FormedMass: 1e5}
	var out feedback.StepOutput
	if err := stepper.Step(view, finder, []feedback.StarParticle{star}, 0, myr, &out); err != nil {
		panic(err)
	}
	var applier feedback.Applier // keep it from step to step
	if _, _, err := applier.Apply(view, out.Records, nil); err != nil {
		panic(err)
	}
	fmt.Println("balanced:", out.Ledger.Balanced(1e-12) == nil)
	fmt.Println("supernovae drawn:", out.Supernovae[yields.CoreCollapse] > 0)
	fmt.Println("mass returned to the gas:", out.MassLoss[0] > 0)
	// Output:
	// balanced: true
	// supernovae drawn: true
	// mass returned to the gas: true
}
