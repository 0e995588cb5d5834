package audit_test

import (
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/feedback/feedbacktest"
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
	rep, err := audit.Step(before, after, stars, audit.Options{})
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
				i := nearest(a, st)
				for k := 0; k < 3; k++ {
					a.Vel[k][i] -= st.Mass * st.Vel[k] / a.Mass[i]
				}
			}
		}, "momentum"},
		{"one-sided momentum", func(a *audit.GasArrays, s []audit.Star) {
			// Every touched element gets an extra push along +x.
			for _, st := range s {
				i := nearest(a, st)
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
			rep, err := audit.Step(before, after, stars, audit.Options{})
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
	_, err := audit.Step(before, short, stars, audit.Options{})
	assert.Error(t, err)
	renamed := after.Clone()
	renamed.ID[0] = -99
	_, err = audit.Step(before, renamed, stars, audit.Options{})
	assert.Error(t, err)
}

func nearest(g *audit.GasArrays, s audit.Star) int {
	best, bd := 0, 1e300
	for i := range g.Mass {
		d := 0.0
		for k := 0; k < 3; k++ {
			d += (g.Pos[k][i] - s.Pos[k]) * (g.Pos[k][i] - s.Pos[k])
		}
		if d < bd {
			best, bd = i, d
		}
	}
	return best
}

func touchedIndex(g *audit.GasArrays, s []audit.Star) int { return nearest(g, s[0]) }

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
