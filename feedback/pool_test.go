package feedback_test

import (
	"errors"
	"fmt"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// panicking is a scheme that panics for one star and deposits like a
// thermal dump for the others.
type panicking struct{ star int64 }

func (panicking) Name() string { return "panicking" }

func (s panicking) Deposit(nb *feedback.Neighborhood, out []feedback.Deposit) (float64, error) {
	if nb.Source.Star.ID == s.star {
		panic(fmt.Sprintf("deliberate panic for star %d", s.star))
	}
	return feedback.ThermalDump{}.Deposit(nb, out)
}

// panickingFinder panics on every search: a host's neighbor lists read
// through a bad pointer fail this way.
type panickingFinder struct{ neighbor.Finder }

func (panickingFinder) Nearest(neighbor.Query, int, []neighbor.Neighbor) ([]neighbor.Neighbor, error) {
	panic("deliberate finder panic")
}

// A panic in any worker goroutine (a user's scheme here) is recovered and
// returned as ErrInternal through the normal error path, at any worker
// count; nothing is deposited and the coupler serves the next call.
func TestCouplerRecoversWorkerPanics(t *testing.T) {
	u := units.ParsecSolarMassKms()
	g := uniformGas(5, 2000, 100, 1, u)
	var srcs []feedback.Source
	for s := 0; s < 100; s++ {
		src := supernova(int64(s+1), u)
		i := 17 * s
		src.Star.Pos = [3]float64{g.Pos[0][i], g.Pos[1][i], g.Pos[2][i]}
		srcs = append(srcs, src)
	}
	f := newTree(t, g)
	for _, workers := range []int{1, 4} {
		// The panicking star is late in the batch, so with 4 workers it
		// falls to a goroutine other than the caller's.
		for _, star := range []int64{3, 90} {
			t.Run(fmt.Sprintf("workers=%d/star=%d", workers, star), func(t *testing.T) {
				c, err := feedback.NewCoupler(feedback.Config{Units: u, Scheme: panicking{star: star}, Workers: workers})
				require.NoError(t, err)
				var out feedback.Output
				err = c.Couple(g.View(), f, srcs, &out)
				require.Error(t, err)
				assert.True(t, errors.Is(err, feedback.ErrInternal), "%v", err)
				assert.Contains(t, err.Error(), fmt.Sprintf("deliberate panic for star %d", star))
				assert.Len(t, out.Records, 0, "nothing deposited")
				// The coupler is usable again: without the bad star the
				// call succeeds and balances.
				var rest []feedback.Source
				for _, s := range srcs {
					if s.Star.ID != star {
						rest = append(rest, s)
					}
				}
				require.NoError(t, c.Couple(g.View(), f, rest, &out))
				require.Empty(t, out.Problems)
				require.NoError(t, out.Ledger.Balanced(1e-12))
			})
		}
	}
}

// The stepper recovers panics in its shared neighbor search and in every
// channel's coupler the same way.
func TestStepperRecoversWorkerPanics(t *testing.T) {
	u := units.ParsecSolarMassKms()
	pop := defaultPopulation(t)
	g := uniformGas(8, 1500, 100, 3, u)
	myr := units.Megayear / u.TimeS()
	var stars []feedback.StarParticle
	for s := 0; s < 60; s++ {
		i := 23 * s
		stars = append(stars, feedback.StarParticle{Star: feedback.Star{ID: int64(100 + s), Mass: 3e4, Metallicity: 0.0134,
			Pos: [3]float64{g.Pos[0][i], g.Pos[1][i], g.Pos[2][i]}, Age: 5 * myr}, FormedMass: 3e4})
	}
	tree := newTree(t, g)
	cases := []struct {
		name   string
		cfg    func(c *feedback.StepConfig)
		finder neighbor.Finder
		want   string
	}{
		{"wind scheme", func(c *feedback.StepConfig) { c.Winds = panicking{star: 150} }, tree, "deliberate panic for star 150"},
		{"supernova scheme", func(c *feedback.StepConfig) { c.Coupling.Scheme = panicking{star: 101} }, tree, "deliberate panic for star 101"},
		{"neighbor search", func(*feedback.StepConfig) {}, panickingFinder{tree}, "deliberate finder panic"},
	}
	for _, workers := range []int{1, 4} {
		for _, c := range cases {
			t.Run(fmt.Sprintf("%s/workers=%d", c.name, workers), func(t *testing.T) {
				cfg := feedback.DefaultStepConfig(feedback.Config{Units: u, Workers: workers}, pop)
				cfg.Seed = 2
				c.cfg(&cfg)
				st, err := feedback.NewStepper(cfg)
				require.NoError(t, err)
				var out feedback.StepOutput
				err = st.Step(g.View(), c.finder, stars, 3, myr, &out)
				require.Error(t, err)
				assert.True(t, errors.Is(err, feedback.ErrInternal), "%v", err)
				assert.Contains(t, err.Error(), c.want)
				assert.Len(t, out.Records, 0, "nothing deposited")
			})
		}
	}
}
