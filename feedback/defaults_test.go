package feedback_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Zero is a setting like any other: a zero kinetic fraction gives no
// kicks (it once gave the Sedov-Taylor 28%), zero opacities absorb no
// light, zero photoheating heats nothing, and settings for which zero has
// no meaning are refused; the defaults come from the Default functions.
func TestZeroSettingsMeanZero(t *testing.T) {
	u := units.ParsecSolarMassKms()
	radial := func(t *testing.T, s feedback.Scheme) float64 {
		g := uniformGas(14, 200, 100, 1, u)
		out, _ := coupleOnce(t, g, feedback.Config{Units: u, Scheme: s, Neighbors: 32}, []feedback.Source{supernova(1, u)})
		return out.Ledger.RadialMomentum
	}
	t.Run("kinetic fraction", func(t *testing.T) {
		assert.Zero(t, radial(t, feedback.Kinetic{KineticFraction: 0}))
		assert.Positive(t, radial(t, feedback.DefaultKinetic()))
		assert.Equal(t, feedback.SedovKineticFraction, feedback.DefaultKinetic().KineticFraction)
		k, err := feedback.SchemeByName("kinetic", feedback.SchemeOptions{})
		require.NoError(t, err)
		assert.Equal(t, feedback.Kinetic{}, k)
		k, err = feedback.SchemeByName("kinetic", feedback.DefaultSchemeOptions())
		require.NoError(t, err)
		assert.Equal(t, feedback.DefaultKinetic(), k)
	})
	t.Run("opacities", func(t *testing.T) {
		e := 1e6 * units.SolarLuminosity * units.Megayear / u.EnergyErg()
		rp := feedback.RadiationPressure{MaxInfraredBoost: feedback.DefaultMaxInfraredBoost}
		assert.Zero(t, rp.Momentum(e, 100, 1, u))
		assert.Positive(t, feedback.DefaultRadiationPressure().Momentum(e, 100, 1, u))
	})
	t.Run("settings without a zero", func(t *testing.T) {
		for _, s := range []feedback.Scheme{feedback.StochasticHeating{}, feedback.RadiationPressure{}} {
			_, err := feedback.NewCoupler(feedback.Config{Units: u, Scheme: s})
			assert.ErrorIs(t, err, feedback.ErrInvalidArgument, s.Name())
		}
		_, err := feedback.SchemeByName("stochastic-heating", feedback.SchemeOptions{})
		assert.ErrorIs(t, err, feedback.ErrInvalidArgument)
		pop := defaultPopulation(t)
		cfg := feedback.DefaultStepConfig(feedback.Config{Units: u}, pop)
		cfg.MaxSupernovaePerStep = 0
		_, err = feedback.NewStepper(cfg)
		assert.ErrorIs(t, err, feedback.ErrInvalidArgument)
	})
	t.Run("scheme options", func(t *testing.T) {
		o := feedback.DefaultSchemeOptions()
		for _, tc := range []struct {
			name string
			want feedback.Scheme
		}{
			{"radiation-pressure", feedback.DefaultRadiationPressure()},
			{"stellar-winds", feedback.DefaultWinds(feedback.KimOstriker2015)},
			{"photoionization", feedback.Photoionization{}},
		} {
			s, err := feedback.SchemeByName(tc.name, o)
			require.NoError(t, err)
			assert.Equal(t, tc.want, s, tc.name)
		}
		o.MaxInfraredBoost, o.PhotonReach, o.WindEventEnergy = math.Inf(1), 500, 1e49
		s, err := feedback.SchemeByName("radiation-pressure", o)
		require.NoError(t, err)
		assert.Equal(t, math.Inf(1), s.(feedback.RadiationPressure).MaxInfraredBoost)
		s, err = feedback.SchemeByName("photoionization", o)
		require.NoError(t, err)
		assert.Equal(t, feedback.Photoionization{Reach: 500}, s)
		s, err = feedback.SchemeByName("stellar-winds", o)
		require.NoError(t, err)
		assert.Equal(t, 1e49, s.(feedback.Winds).EventEnergy)
		for _, tc := range []struct {
			name   string
			change func(o *feedback.SchemeOptions)
		}{
			{"radiation-pressure", func(o *feedback.SchemeOptions) { o.MaxInfraredBoost = 0 }},
			{"radiation-pressure", func(o *feedback.SchemeOptions) { o.MaxInfraredBoost = math.NaN() }},
			{"stellar-winds", func(o *feedback.SchemeOptions) { o.WindEventEnergy = 0 }},
			{"photoionization", func(o *feedback.SchemeOptions) { o.PhotonReach = -1 }},
		} {
			o := feedback.DefaultSchemeOptions()
			tc.change(&o)
			_, err := feedback.SchemeByName(tc.name, o)
			assert.ErrorIs(t, err, feedback.ErrInvalidArgument, tc.name)
		}
	})
	t.Run("photoheating", func(t *testing.T) {
		pop := defaultPopulation(t)
		g := uniformGas(15, 400, 100, 1, u)
		f := newTree(t, g)
		myr := units.Megayear / u.TimeS()
		star := feedback.StarParticle{Star: feedback.Star{ID: 1, Mass: 1e4, Metallicity: 0.0134, Age: 0.5 * myr}, FormedMass: 1e4}
		for _, perPhoton := range []float64{0, feedback.DefaultPhotoheatingPerPhoton} {
			cfg := feedback.DefaultStepConfig(feedback.Config{Units: u}, pop)
			cfg.PhotoheatingPerPhoton = perPhoton
			st, err := feedback.NewStepper(cfg)
			require.NoError(t, err)
			var out feedback.StepOutput
			require.NoError(t, st.Step(g.View(), f, []feedback.StarParticle{star}, 0, myr, &out))
			heat := out.Channels[yields.Photoionization].In.Energy
			if perPhoton == 0 {
				assert.Zero(t, heat)
			} else {
				assert.Positive(t, heat)
			}
		}
	})
}
