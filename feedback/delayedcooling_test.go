package feedback_test

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/feedbacktest"
	"github.com/ejecta-dev/ejecta/yields/units"
)

func TestDelayedCoolingConserves(t *testing.T) {
	opts := feedbacktest.DefaultOptions()
	opts.Seeds = []uint64{1, 2}
	feedbacktest.Check(t, feedback.DelayedCooling{}, opts)
	opts.Seeds = []uint64{1}
	feedbacktest.Check(t, feedback.DelayedCooling{Scheme: feedback.DefaultKinetic()}, opts)
}

func TestDelayedCoolingFlagsTheInnerDeposit(t *testing.T) {
	// Elements of 100 Msun at n_H = 10 cm^-3, about 1e4 K: each gets the
	// inner scheme's deposit unchanged, plus the hold of the blast-wave
	// estimate t = 10^6.85 yr E51^0.32 n^0.34 (P/1e4 k)^-0.70 (McKee &
	// Ostriker 1977 as used by Stinson et al. 2006, MNRAS 373, 1074).
	u := units.ParsecSolarMassKms()
	for _, inner := range []feedback.Scheme{nil, feedback.Kinetic{}} {
		plain := inner
		if plain == nil {
			plain = feedback.ThermalDump{}
		}
		g := uniformGas(4, 200, 100, 10, u)
		ref, _ := coupleOnce(t, g, feedback.Config{Units: u, Scheme: plain}, []feedback.Source{supernova(1, u)})
		g = uniformGas(4, 200, 100, 10, u)
		before := g.Clone()
		out, _ := coupleOnce(t, g, feedback.Config{Units: u, Scheme: feedback.DelayedCooling{Scheme: inner}}, []feedback.Source{supernova(1, u)})
		require.Len(t, out.Records, len(ref.Records))
		for k, r := range out.Records {
			want := ref.Records[k]
			assert.Equal(t, want.Deposit.Momentum, r.Momentum, plain.Name())
			assert.Equal(t, want.Deposit.Energy, r.Energy, plain.Name())
			assert.Equal(t, want.Deposit.Mass, r.Mass, plain.Name())
			require.NotZero(t, r.Flags&feedback.FlagHoldCooling, plain.Name())
			i := r.GasIndex
			rho := before.Density[i] * u.DensityGCm3()
			n := rho / (feedback.MassPerHydrogen * units.ProtonMass)
			pk := 2.0 / 3 * rho * before.Energy[i] * u.SpecificEnergy() / units.Boltzmann
			hold := feedback.CoolingHoldTime(units.FOE, n, pk) / u.TimeS()
			assert.InEpsilon(t, hold, r.HoldCoolingUntil, 1e-12, plain.Name())
		}
	}
}
