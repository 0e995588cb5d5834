package feedback_test

import (
	"errors"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// kindsOf lists the kinds of failure err matches.
func kindsOf(err error) []error {
	var out []error
	for _, k := range []error{feedback.ErrInvalidArgument, feedback.ErrBadValue, feedback.ErrNoNeighbors,
		feedback.ErrUndeposited, feedback.ErrUnknownGas, feedback.ErrUnknownName, feedback.ErrImbalance,
		feedback.ErrBusy, feedback.ErrInternal} {
		if errors.Is(err, k) {
			out = append(out, k)
		}
	}
	return out
}

// Every failure matches the sentinel of its kind with errors.Is, and no
// other (an undeposited release also matches its reason's kind).
func TestErrorKinds(t *testing.T) {
	u := units.ParsecSolarMassKms()
	coupleOne := func(t *testing.T, mutate func(g *audit.GasArrays, src *feedback.Source), cfg feedback.Config, finder func(g *audit.GasArrays) neighbor.Finder) error {
		g := uniformGas(21, 40, 10, 1, u)
		src := supernova(5, u)
		src.Star.Pos = [3]float64{g.Pos[0][0] + 1e-3, g.Pos[1][0], g.Pos[2][0]}
		mutate(g, &src)
		cfg.Units = u
		c, err := feedback.NewCoupler(cfg)
		require.NoError(t, err)
		var f neighbor.Finder
		if finder != nil {
			f = finder(g)
		} else {
			f, err = neighbor.NewTree(g.Packed(), g.ID, neighbor.Box{})
			require.NoError(t, err)
		}
		var out feedback.Output
		if err := c.Couple(g.View(), f, []feedback.Source{src}, &out); err != nil {
			return err
		}
		require.NoError(t, out.Ledger.Balanced(1e-12), "nothing lost")
		return out.Err()
	}
	none := func(*audit.GasArrays, *feedback.Source) {}
	cases := []struct {
		name string
		err  func(t *testing.T) error
		want []error
	}{
		{"negative neighbor count", func(t *testing.T) error {
			_, err := feedback.NewCoupler(feedback.Config{Units: u, Neighbors: -1})
			return err
		}, []error{feedback.ErrInvalidArgument}},
		{"nil output", func(t *testing.T) error {
			c, err := feedback.NewCoupler(feedback.Config{Units: u})
			require.NoError(t, err)
			g := uniformGas(1, 10, 10, 1, u)
			f := newTree(t, g)
			return c.Couple(g.View(), f, nil, nil)
		}, []error{feedback.ErrInvalidArgument}},
		{"columns of different lengths", func(t *testing.T) error {
			g := uniformGas(1, 10, 10, 1, u)
			v := g.View()
			v.Density = feedback.Float64s(g.Density[:5])
			return v.Validate()
		}, []error{feedback.ErrInvalidArgument}},
		{"nan release", func(t *testing.T) error {
			return coupleOne(t, func(_ *audit.GasArrays, s *feedback.Source) { s.Energy = math.NaN() }, feedback.Config{Neighbors: 8}, nil)
		}, []error{feedback.ErrBadValue, feedback.ErrUndeposited}},
		{"gas metal fraction above one", func(t *testing.T) error {
			return coupleOne(t, func(g *audit.GasArrays, _ *feedback.Source) { g.Fractions[0][0] = 1.5 }, feedback.Config{Neighbors: 8}, nil)
		}, []error{feedback.ErrBadValue, feedback.ErrUndeposited}},
		{"fewer host candidates than neighbors", func(t *testing.T) error {
			return coupleOne(t, none, feedback.Config{Neighbors: 8}, func(g *audit.GasArrays) neighbor.Finder {
				f, err := neighbor.NewHostLists(g.Packed(), g.ID, neighbor.Box{}, []int{0, 3}, []int{0, 1, 2})
				require.NoError(t, err)
				return f
			})
		}, []error{feedback.ErrNoNeighbors, feedback.ErrUndeposited}},
		{"empty host row", func(t *testing.T) error {
			return coupleOne(t, none, feedback.Config{Radius: 1e30}, func(g *audit.GasArrays) neighbor.Finder {
				f, err := neighbor.NewHostLists(g.Packed(), g.ID, neighbor.Box{}, []int{0, 0}, nil)
				require.NoError(t, err)
				return f
			})
		}, []error{feedback.ErrNoNeighbors, feedback.ErrUndeposited}},
		{"record for an element the gas lacks", func(t *testing.T) error {
			g := uniformGas(1, 10, 10, 1, u)
			_, _, err := new(feedback.Applier).Apply(g.View(), []feedback.Record{{GasIndex: 10, GasID: 1}}, nil)
			return err
		}, []error{feedback.ErrUnknownGas}},
		{"record for an ID not held here", func(t *testing.T) error {
			g := uniformGas(1, 10, 10, 1, u)
			x, err := feedback.NewIDIndex(g.View())
			require.NoError(t, err)
			return x.Resolve([]feedback.Record{{GasID: -7}})
		}, []error{feedback.ErrUnknownGas}},
		{"record with a negative mass", func(t *testing.T) error {
			g := uniformGas(1, 10, 10, 1, u)
			r := feedback.Record{GasIndex: 0, GasID: g.ID[0]}
			r.Mass = -1
			_, _, err := new(feedback.Applier).Apply(g.View(), []feedback.Record{r}, nil)
			return err
		}, []error{feedback.ErrBadValue}},
		{"record with a negative far-ultraviolet field", func(t *testing.T) error {
			g := uniformGas(1, 10, 10, 1, u)
			r := feedback.Record{GasIndex: 0, GasID: g.ID[0]}
			r.FUVField = -1
			_, _, err := new(feedback.Applier).Apply(g.View(), []feedback.Record{r}, nil)
			return err
		}, []error{feedback.ErrBadValue}},
		{"unknown scheme", func(t *testing.T) error {
			_, err := feedback.SchemeByName("no-such-scheme", feedback.SchemeOptions{})
			return err
		}, []error{feedback.ErrUnknownName}},
		{"unknown remnant fit", func(t *testing.T) error {
			_, err := feedback.ParseRemnantFit("no-such-fit")
			return err
		}, []error{feedback.ErrUnknownName}},
		{"unbalanced ledger", func(t *testing.T) error {
			l := feedback.Ledger{In: feedback.Quantities{Mass: 1}}
			return l.Balanced(1e-12)
		}, []error{feedback.ErrImbalance}},
		{"star particle with negative mass", func(t *testing.T) error {
			pop := defaultPopulation(t)
			st, err := feedback.NewStepper(feedback.DefaultStepConfig(feedback.Config{Units: u}, pop))
			require.NoError(t, err)
			g := uniformGas(1, 40, 10, 1, u)
			f := newTree(t, g)
			var out feedback.StepOutput
			star := feedback.StarParticle{Star: feedback.Star{ID: 1, Mass: -1}, FormedMass: 1}
			return st.Step(g.View(), f, []feedback.StarParticle{star}, 0, units.Megayear/u.TimeS(), &out)
		}, []error{feedback.ErrBadValue}},
		{"coupler in use", func(t *testing.T) error {
			g := uniformGas(1, 40, 10, 1, u)
			f := newTree(t, g)
			entered, release := make(chan struct{}), make(chan struct{})
			c, err := feedback.NewCoupler(feedback.Config{Units: u, Scheme: blocking{entered, release}})
			require.NoError(t, err)
			done := make(chan error)
			go func() {
				var out feedback.Output
				done <- c.Couple(g.View(), f, []feedback.Source{supernova(1, u)}, &out)
			}()
			<-entered
			var out feedback.Output
			err = c.Couple(g.View(), f, []feedback.Source{supernova(2, u)}, &out)
			close(release)
			require.NoError(t, <-done)
			return err
		}, []error{feedback.ErrBusy}},
		{"panicking scheme", func(t *testing.T) error {
			return coupleOne(t, none, feedback.Config{Scheme: panicking{star: 5}}, nil)
		}, []error{feedback.ErrInternal}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := c.err(t)
			require.Error(t, err)
			assert.ElementsMatch(t, c.want, kindsOf(err), "%v", err)
		})
	}
}

// blocking is a scheme that signals when it runs and waits to be released.
type blocking struct{ entered, release chan struct{} }

func (blocking) Name() string { return "blocking" }

func (s blocking) Deposit(nb *feedback.Neighborhood, out []feedback.Deposit) (float64, error) {
	close(s.entered)
	<-s.release
	return feedback.ThermalDump{}.Deposit(nb, out)
}
