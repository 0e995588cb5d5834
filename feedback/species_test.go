package feedback_test

import (
	"errors"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// A simulation tracking its own choice of elements (here iron, then
// oxygen) steps with a population laid out by that set: the gas columns
// for slots 1 and 2 receive exactly the iron and oxygen the population
// released (the same amounts the default layout carries in its Iron and
// Oxygen slots), the metals column the metals, and the ledger balances.
func TestStepperWithChosenSpecies(t *testing.T) {
	u := units.ParsecSolarMassKms()
	cfg := yields.DefaultConfig()
	var err error
	cfg.Species, err = yields.ParseSpeciesSet("Fe,O")
	require.NoError(t, err)
	pop, err := yields.NewPopulation(cfg)
	require.NoError(t, err)
	ref := defaultPopulation(t)

	g := uniformGas(11, 400, 1e4, 1, u)
	n := g.Len()
	g.Species = []yields.Species{yields.Metals, 1, 2}
	g.Fractions = [][]float64{make([]float64, n), make([]float64, n), make([]float64, n)}
	f := newTree(t, g)
	sc := feedback.DefaultStepConfig(feedback.Config{Units: u}, pop)
	sc.Seed, sc.SkipRadiation, sc.SkipPhotoionization = 3, true, true
	st, err := feedback.NewStepper(sc)
	require.NoError(t, err)

	myr := units.Megayear / u.TimeS()
	const formed = 1e4
	star := feedback.StarParticle{Star: feedback.Star{ID: 9, Mass: formed, Metallicity: 0.0134, Age: 5 * myr}, FormedMass: formed}
	var out feedback.StepOutput
	view := g.View()
	require.NoError(t, st.Step(view, f, []feedback.StarParticle{star}, 0, 30*myr, &out))
	require.NoError(t, out.Ledger.Balanced(1e-12))
	_, _, err = new(feedback.Applier).Apply(view, out.Records, nil)
	require.NoError(t, err)

	gained := func(c int) float64 {
		s := 0.0
		for i := 0; i < n; i++ {
			s += g.Fractions[c][i] * g.Mass[i]
		}
		return s
	}
	in := out.Ledger.In.Species
	assert.InEpsilon(t, in[1], gained(1), 1e-9, "iron column")
	assert.InEpsilon(t, in[2], gained(2), 1e-9, "oxygen column")
	assert.InEpsilon(t, in[yields.Metals], gained(0), 1e-9, "metals column")

	// The same step with the default layout (same seed, star and step:
	// the same supernova draws) takes in the same iron and oxygen, in the
	// Iron and Oxygen slots.
	g2 := uniformGas(11, 400, 1e4, 1, u)
	cfg2 := feedback.DefaultStepConfig(feedback.Config{Units: u}, ref)
	cfg2.Seed, cfg2.SkipRadiation, cfg2.SkipPhotoionization = 3, true, true
	st2, err := feedback.NewStepper(cfg2)
	require.NoError(t, err)
	var out2 feedback.StepOutput
	require.NoError(t, st2.Step(g2.View(), f, []feedback.StarParticle{star}, 0, 30*myr, &out2))
	def := out2.Ledger.In.Species
	require.Positive(t, def[yields.Iron])
	assert.Equal(t, def[yields.Iron], in[1])
	assert.Equal(t, def[yields.Oxygen], in[2])
	assert.Equal(t, def[yields.Metals], in[yields.Metals])
	assert.Equal(t, out2.Ledger.In.Mass, out.Ledger.In.Mass)
	for s := 3; s < int(yields.NumSpecies); s++ {
		assert.Zero(t, in[s], "slot %d is unused", s)
	}
}

func TestChosenSpeciesMismatches(t *testing.T) {
	u := units.ParsecSolarMassKms()
	feo, err := yields.ParseSpeciesSet("Fe,O")
	require.NoError(t, err)
	cfg := yields.DefaultConfig()
	cfg.Species = feo
	pop, err := yields.NewPopulation(cfg)
	require.NoError(t, err)

	// A coupling set that is not the model's is refused.
	other, err := yields.ParseSpeciesSet("O,Fe")
	require.NoError(t, err)
	_, err = feedback.NewStepper(feedback.DefaultStepConfig(feedback.Config{Units: u, Species: other}, pop))
	require.ErrorIs(t, err, feedback.ErrInvalidArgument)
	assert.Contains(t, err.Error(), "differs from the yields model's Fe,O")

	// A gas column naming a slot the set does not use is refused.
	g := uniformGas(5, 100, 1e4, 1, u)
	g.Species = []yields.Species{yields.Metals, yields.Iron}
	g.Fractions = [][]float64{make([]float64, g.Len()), make([]float64, g.Len())}
	f := newTree(t, g)
	cp, err := feedback.NewCoupler(feedback.Config{Units: u, Species: feo})
	require.NoError(t, err)
	var out feedback.Output
	err = cp.Couple(g.View(), f, nil, &out)
	require.True(t, errors.Is(err, feedback.ErrInvalidArgument), "%v", err)
	assert.Contains(t, err.Error(), "names slot 11, but the species set Fe,O uses slots 0 (Z) to 2")

	// Errors name species by the set's symbols.
	src := feedback.Source{Star: feedback.Star{ID: 4, Mass: 1}, Mass: 1}
	src.Species[2] = 2 // more oxygen than ejecta
	g.Species = g.Species[:1]
	g.Fractions = g.Fractions[:1]
	require.NoError(t, cp.Couple(g.View(), f, []feedback.Source{src}, &out))
	require.Len(t, out.Problems, 1)
	assert.Contains(t, out.Problems[0].Err.Error(), "species O mass 2 exceeds")
}
