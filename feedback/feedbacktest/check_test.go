package feedbacktest_test

import (
	"strings"
	"testing"

	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/feedbacktest"
)

func TestBuiltInSchemesPass(t *testing.T) {
	// Shortfall bounds for the twelve-overlapping-star scenario, as a
	// fraction of the energy released, set from the worst of 59 seeds
	// measured with a margin (kernel-volume / solid-angle): kinetic 0.001 /
	// 0.24, pure kinetic 0.005 / 0.70, terminal momentum 0.05 / 0.05
	// (Kim & Ostriker) and 0.07 / 0.25 (Cioffi et al.). Solid-angle weights
	// give the nearest element up to half of a star's release, so coherent
	// kicks of neighboring stars concentrate there.
	schemes := []struct {
		name   string
		scheme feedback.Scheme
		bound  [2]float64 // kernel-volume, solid-angle
	}{
		{"thermal-dump", feedback.ThermalDump{}, [2]float64{1e-9, 1e-9}},
		{"kinetic-sedov", feedback.DefaultKinetic(), [2]float64{0.01, 0.3}},
		{"kinetic-pure", feedback.Kinetic{KineticFraction: 1}, [2]float64{0.01, 0.8}},
		{"terminal-ko15", feedback.TerminalMomentum{Fit: feedback.KimOstriker2015}, [2]float64{0.1, 0.1}},
		{"terminal-cmb88", feedback.TerminalMomentum{Fit: feedback.CioffiMcKeeBertschinger1988}, [2]float64{0.1, 0.3}},
	}
	for _, s := range schemes {
		for i, w := range []feedback.Weighting{feedback.KernelVolume, feedback.SolidAngle} {
			t.Run(s.name+"/"+w.String(), func(t *testing.T) {
				opts := feedbacktest.DefaultOptions()
				opts.Weighting, opts.Seeds, opts.ShortfallBound = w, []uint64{1, 2, 3, 4}, s.bound[i]
				feedbacktest.Check(t, s.scheme, opts)
			})
		}
	}
}

// losesMass drops one percent of the ejected mass.
type losesMass struct{ feedback.TerminalMomentum }

func (losesMass) Name() string { return "loses-mass" }
func (s losesMass) Deposit(nb *feedback.Neighborhood, out []feedback.Deposit) (float64, error) {
	rad, err := s.TerminalMomentum.Deposit(nb, out)
	for j := range out {
		out[j].Mass *= 0.99
	}
	return rad, err
}

// wrongFrame forgets that the ejecta move with the star.
type wrongFrame struct{ feedback.Kinetic }

func (wrongFrame) Name() string { return "wrong-frame" }
func (s wrongFrame) Deposit(nb *feedback.Neighborhood, out []feedback.Deposit) (float64, error) {
	rad, err := s.Kinetic.Deposit(nb, out)
	for j := range out {
		for a := 0; a < 3; a++ {
			out[j].Momentum[a] -= out[j].Mass * nb.Source.Star.Vel[a]
		}
	}
	return rad, err
}

// oneSided pushes every neighbor along +x, energy accounted but momentum
// created.
type oneSided struct{ feedback.Kinetic }

func (oneSided) Name() string { return "one-sided" }
func (s oneSided) Deposit(nb *feedback.Neighborhood, out []feedback.Deposit) (float64, error) {
	rad, err := s.Kinetic.Deposit(nb, out)
	for j := range out {
		out[j].Momentum[0] += 0.01 * nb.Mass[j]
	}
	return rad, err
}

// unbalancedRadial hands out equal radial momenta with no isotropy
// correction at all, keeping conservation by letting the heat close the
// energy (momentum is balanced by the coupler's net removal only if it uses
// CoupleRadial; here it does not).
type unbalancedRadial struct{}

func (unbalancedRadial) Name() string { return "unbalanced-radial" }
func (unbalancedRadial) Deposit(nb *feedback.Neighborhood, out []feedback.Deposit) (float64, error) {
	src := nb.Source
	for j := range out {
		w := nb.Weight[j]
		out[j] = feedback.Deposit{Mass: w * src.Mass}
		for a := 0; a < 3; a++ {
			out[j].Momentum[a] = w*src.Mass*src.Star.Vel[a] + 1e-3*nb.Dir[j][a]
		}
		out[j].Energy = w * src.Energy
	}
	return 0, nil
}

func TestBrokenSchemesFail(t *testing.T) {
	cases := []struct {
		scheme feedback.Scheme
		want   string
	}{
		{losesMass{}, "mass"},
		{wrongFrame{feedback.DefaultKinetic()}, "momentum"},
		{oneSided{}, "momentum"},
		{unbalancedRadial{}, "momentum"},
	}
	for _, c := range cases {
		t.Run(c.scheme.Name(), func(t *testing.T) {
			opts := feedbacktest.DefaultOptions()
			opts.Seeds = []uint64{1}
			errs := feedbacktest.Run(c.scheme, opts)
			require.NotEmpty(t, errs, "a broken scheme must fail the harness")
			found := false
			for _, e := range errs {
				if strings.Contains(e.Error(), c.want) {
					found = true
				}
			}
			require.True(t, found, "expected a %q violation, got %v", c.want, errs[0])
		})
	}
}

func TestUncorrectedWeightsFailIsotropy(t *testing.T) {
	opts := feedbacktest.DefaultOptions()
	opts.Seeds, opts.SkipIsotropyCorrection = []uint64{1}, true
	errs := feedbacktest.Run(feedback.DefaultKinetic(), opts)
	found := false
	for _, e := range errs {
		if strings.Contains(e.Error(), "isotropic") {
			found = true
		}
	}
	require.True(t, found, "uncorrected radial kicks in clustered gas must exceed the isotropy bound")
}

// The zero Options are not the defaults: no seeds and zero tolerances are
// refused with a pointer to DefaultOptions.
func TestZeroOptionsAreRefused(t *testing.T) {
	errs := feedbacktest.Run(feedback.ThermalDump{}, feedbacktest.Options{})
	require.Len(t, errs, 1)
	require.ErrorContains(t, errs[0], "DefaultOptions")
	opts := feedbacktest.DefaultOptions()
	opts.Tolerance = -1
	require.Len(t, feedbacktest.Run(feedback.ThermalDump{}, opts), 1)
}
