package audit_test

import (
	"encoding/json"
	"fmt"
	"math"
	"slices"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/feedback/feedbacktest"
	"github.com/ejecta-dev/ejecta/yields"
)

// MakeDump runs ejecta's own scheme on the moving scenario and returns the
// gas before and after and the audit's view of the stars.
func makeDump(t *testing.T) (*audit.GasArrays, *audit.GasArrays, []audit.Star) {
	t.Helper()
	before, after, stars, err := feedbacktest.Dump(feedback.TerminalMomentum{}, "overlapping-stars", 1)
	require.NoError(t, err)
	return before, after, stars
}

func TestAuditPassesAnExactDump(t *testing.T) {
	before, after, stars := makeDump(t)
	rep, err := audit.Step(before, after, stars, audit.DefaultOptions())
	require.NoError(t, err)
	assert.False(t, rep.Failed(), "%v", rep.Problems)
}

func TestAuditCatchesPlantedErrors(t *testing.T) {
	cases := []struct {
		name  string
		plant func(after *audit.GasArrays, stars []audit.Star)
		want  string
	}{
		{"lost mass", func(a *audit.GasArrays, s []audit.Star) {
			// One touched element loses a tenth of what it received.
			i := touchedIndex(a, s)
			a.Mass[i] -= 0.1
		}, "mass imbalance"},
		{"wrong frame", func(a *audit.GasArrays, s []audit.Star) {
			// The host forgot that ejecta move with their star: remove
			// M v_star from the element nearest each star.
			for _, st := range s {
				i := feedbacktest.Nearest(a, st.Pos)
				for k := 0; k < 3; k++ {
					a.Vel[k][i] -= st.Mass * st.Vel[k] / a.Mass[i]
				}
			}
		}, "momentum"},
		{"one-sided momentum", func(a *audit.GasArrays, s []audit.Star) {
			// Every touched element gets an extra push along +x.
			for _, st := range s {
				i := feedbacktest.Nearest(a, st.Pos)
				a.Vel[0][i] += 5
			}
		}, "one-sided"},
		{"untouched element changed", func(a *audit.GasArrays, s []audit.Star) {
			for i := range a.Mass {
				if !anyInRange(a, s, i) {
					a.Energy[i] *= 1.5
					return
				}
			}
		}, "no star in range"},
		{"negative energy", func(a *audit.GasArrays, s []audit.Star) {
			i := touchedIndex(a, s)
			a.Energy[i] = -1
		}, "negative internal energy"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			before, after, stars := makeDump(t)
			c.plant(after, stars)
			rep, err := audit.Step(before, after, stars, audit.DefaultOptions())
			require.NoError(t, err)
			require.True(t, rep.Failed())
			assert.True(t, strings.Contains(strings.Join(rep.Problems, "\n"), c.want), "want %q in %v", c.want, rep.Problems)
		})
	}
}

func TestAuditRejectsMismatchedDumps(t *testing.T) {
	before, after, stars := makeDump(t)
	short := after.Clone()
	short.Mass = short.Mass[:1]
	short.ID = short.ID[:1]
	_, err := audit.Step(before, short, stars, audit.DefaultOptions())
	assert.Error(t, err)
	renamed := after.Clone()
	renamed.ID[0] = -99
	_, err = audit.Step(before, renamed, stars, audit.DefaultOptions())
	assert.Error(t, err)
}

// Dumps ejecta makes itself pass for every scenario, seed and scheme: the
// balances per group of stars and the round-off floor of the star-frame
// balance must not flag exact deposits.
func TestStepPassesExactDumps(t *testing.T) {
	for _, seed := range []uint64{1, 2} {
		for _, sc := range feedbacktest.Scenarios(seed) {
			for _, scheme := range []feedback.Scheme{feedback.TerminalMomentum{}, feedback.ThermalDump{}} {
				t.Run(fmt.Sprintf("%s/%s/seed=%d", sc.Name, scheme.Name(), seed), func(t *testing.T) {
					before, after, stars, err := feedbacktest.Dump(scheme, sc.Name, seed)
					require.NoError(t, err)
					opts := audit.DefaultOptions()
					opts.Box = sc.Box
					rep, err := audit.Step(before, after, stars, opts)
					require.NoError(t, err)
					assert.False(t, rep.Failed(), "%v", rep.Problems)
					for _, im := range rep.Imbalances {
						assert.Empty(t, im.Elements, im.Quantity)
					}
				})
			}
		}
	}
}

// Every failed balance names the element behind it, not only the totals.
func TestStepNamesOffendingElements(t *testing.T) {
	cases := []struct {
		name  string
		plant func(b, a *audit.GasArrays, s []audit.Star) int // returns the spoiled element
		// quantities whose balance must fail and name the element, first
		// among the named in the quantities of first
		quantities, first []string
		exact             bool // the element is the only one named
	}{
		{"lost mass", func(b, a *audit.GasArrays, s []audit.Star) int {
			i := feedbacktest.Nearest(a, s[0].Pos)
			a.Mass[i] = 0.9 * b.Mass[i] // it lost mass
			return i
		}, []string{"mass", "species Fe", "energy"}, []string{"mass"}, false},
		{"lost iron", func(b, a *audit.GasArrays, s []audit.Star) int {
			i := feedbacktest.Nearest(a, s[0].Pos)
			c := fe(a)
			a.Fractions[c][i] = 0.5 * b.Fractions[c][i] * b.Mass[i] / a.Mass[i] // half its iron gone
			return i
		}, []string{"species Fe"}, []string{"species Fe"}, false},
		{"extra push", func(_, a *audit.GasArrays, s []audit.Star) int {
			i := feedbacktest.Nearest(a, s[0].Pos)
			a.Vel[1][i] += 5
			return i
		}, []string{"momentum y", "energy"}, nil, false},
		{"extra heat", func(_, a *audit.GasArrays, s []audit.Star) int {
			i := feedbacktest.Nearest(a, s[0].Pos)
			a.Energy[i] *= 1.01
			return i
		}, []string{"energy"}, nil, false},
		{"heated out of range", func(_, a *audit.GasArrays, s []audit.Star) int {
			for i := range a.Mass {
				if !anyInRange(a, s, i) {
					a.Energy[i] *= 1.5
					return i
				}
			}
			panic("no element out of range")
		}, []string{"energy"}, []string{"energy"}, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			before, after, stars := makeDump(t)
			i := c.plant(before, after, stars)
			id := after.ID[i]
			rep, err := audit.Step(before, after, stars, audit.DefaultOptions())
			require.NoError(t, err)
			require.True(t, rep.Failed())
			rows := map[string]audit.Imbalance{}
			for _, im := range rep.Imbalances {
				rows[im.Quantity] = im
				if !im.Failed {
					assert.Empty(t, im.Elements, "%s passed but names elements", im.Quantity)
				}
			}
			for _, q := range c.quantities {
				im := rows[q]
				require.True(t, im.Failed, "%s balance should fail", q)
				assert.Contains(t, im.Elements, id, q)
				if slices.Contains(c.first, q) {
					assert.Equal(t, id, im.Elements[0], "%s: the spoiled element first", q)
				}
				if c.exact {
					assert.Equal(t, []int64{id}, im.Elements, q)
				}
			}
			assert.Contains(t, strings.Join(rep.Problems, "\n"), fmt.Sprint(id))
		})
	}
}

// Mass moved from an element a star touched to one no star reaches leaves
// the totals balanced: the balance of the star's own gas fails and names
// both elements.
func TestStepCatchesMassMovedOutOfRange(t *testing.T) {
	before, after, stars := makeDump(t)
	in := feedbacktest.Nearest(after, stars[0].Pos)
	out := -1
	for i := range after.Mass {
		if !anyInRange(after, stars, i) {
			out = i
			break
		}
	}
	require.GreaterOrEqual(t, out, 0)
	// Move mass at fixed velocity and specific energy: the totals of mass
	// and species do not change.
	dm := 0.01 * after.Mass[in]
	after.Mass[in] -= dm
	after.Mass[out] += dm
	rep, err := audit.Step(before, after, stars, audit.DefaultOptions())
	require.NoError(t, err)
	var mass audit.Imbalance
	for _, im := range rep.Imbalances {
		if im.Quantity == "mass" {
			mass = im
		}
	}
	assert.InDelta(t, mass.Expected, mass.Gained, 1e-9*mass.Expected, "the totals balance")
	assert.True(t, mass.Failed)
	require.NotEmpty(t, mass.Elements)
	assert.Equal(t, after.ID[out], mass.Elements[0], "the out-of-range element first")
	assert.Contains(t, mass.Elements, after.ID[in])
	assert.Equal(t, []int64{after.ID[out]}, rep.Unexplained)
}

func TestStepRefusesBadTolerances(t *testing.T) {
	before, after, stars := makeDump(t)
	for _, c := range []struct {
		name     string
		tol, iso float64
	}{
		{"NaN tolerance", math.NaN(), 1e-6},
		{"NaN isotropy tolerance", 1e-10, math.NaN()},
		{"negative tolerance", -1e-10, 1e-6},
		{"negative isotropy tolerance", 1e-10, -1},
		{"infinite tolerance", math.Inf(1), 1e-6},
		{"infinite isotropy tolerance", 1e-10, math.Inf(1)},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := audit.Step(before, after, stars, audit.Options{Tolerance: c.tol, IsotropyTolerance: c.iso})
			require.Error(t, err)
			assert.Contains(t, err.Error(), "finite and non-negative")
		})
	}
	// Zero is a tolerance like any other: only exact balances pass.
	rep, err := audit.Step(before, before.Clone(), nil, audit.Options{})
	require.NoError(t, err)
	assert.False(t, rep.Failed(), "%v", rep.Problems)
}

// The report's JSON uses snake_case keys and empty lists, never null.
func TestReportJSON(t *testing.T) {
	before, after, stars := makeDump(t)
	rep, err := audit.Step(before, after, stars, audit.DefaultOptions())
	require.NoError(t, err)
	raw, err := json.Marshal(rep)
	require.NoError(t, err)
	assert.NotContains(t, string(raw), "null")
	var doc map[string]any
	require.NoError(t, json.Unmarshal(raw, &doc))
	for _, key := range []string{"imbalances", "isotropy", "negative_mass", "negative_energy", "unexplained", "problems"} {
		assert.Contains(t, doc, key)
	}
	row := doc["imbalances"].([]any)[0].(map[string]any)
	for _, key := range []string{"quantity", "gained", "expected", "absolute", "relative", "failed", "elements", "stars"} {
		assert.Contains(t, row, key)
	}
	iso := doc["isotropy"].([]any)[0].(map[string]any)
	for _, key := range []string{"stars", "net", "total", "relative", "failed", "elements"} {
		assert.Contains(t, iso, key)
	}
}

func fe(g *audit.GasArrays) int {
	for c, sp := range g.Species {
		if sp == yields.Iron {
			return c
		}
	}
	panic("no iron column")
}

func touchedIndex(g *audit.GasArrays, s []audit.Star) int { return feedbacktest.Nearest(g, s[0].Pos) }

func anyInRange(g *audit.GasArrays, s []audit.Star, i int) bool {
	for _, st := range s {
		d := 0.0
		for k := 0; k < 3; k++ {
			d += (g.Pos[k][i] - st.Pos[k]) * (g.Pos[k][i] - st.Pos[k])
		}
		if d <= st.Radius*st.Radius {
			return true
		}
	}
	return false
}
