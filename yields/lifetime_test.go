package yields

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// Main-sequence lifetimes near solar metallicity: about 10 Gyr at 1 Msun and
// roughly 30–40 Myr at 8 Msun (common practice, from memory).
// "About 10 Gyr" is checked as 8–12 Gyr.
func TestLifetimesAgainstKnownStars(t *testing.T) {
	for _, z := range []float64{0.0134, 0.02} {
		l, err := NewLifetimes(z)
		require.NoError(t, err)
		assert.InDelta(t, 10000, l.Lifetime(1), 2000, "1 Msun at Z=%g", z)
		t8 := l.Lifetime(8)
		assert.GreaterOrEqual(t, t8, 30.0, "8 Msun at Z=%g", z)
		assert.LessOrEqual(t, t8, 40.0, "8 Msun at Z=%g", z)
	}
}

func TestLifetimeTurnoffRoundTrip(t *testing.T) {
	for _, z := range []float64{0, 1e-4, 0.004, 0.0134, 0.03, 0.5} {
		l, err := NewLifetimes(z)
		require.NoError(t, err)
		for _, m := range []float64{0.2, 0.6, 1, 2.5, 8, 20, 60, 95} {
			if m >= l.VertexMass() {
				continue
			}
			got := l.TurnoffMass(l.Lifetime(m))
			assert.InEpsilon(t, m, got, 1e-12, "Z=%g m=%g", z, m)
		}
		for _, age := range []float64{5, 40, 1e3, 1e4} {
			assert.InEpsilon(t, age, l.Lifetime(l.TurnoffMass(age)), 1e-12, "Z=%g age=%g", z, age)
		}
		// Nothing has died before the shortest lifetime.
		assert.True(t, math.IsInf(l.TurnoffMass(0.99*l.MinLifetime()), 1))
		assert.True(t, math.IsInf(l.TurnoffMass(0), 1))
		// Lifetimes fall with mass up to the vertex and are flat beyond.
		assert.Greater(t, l.Lifetime(10), l.Lifetime(11))
		assert.Equal(t, l.Lifetime(l.VertexMass()), l.Lifetime(150))
	}
}

func TestLifetimeMetallicityRange(t *testing.T) {
	for _, z := range []float64{-0.1, 1, math.NaN()} {
		_, err := NewLifetimes(z)
		assert.Error(t, err, "Z=%g", z)
	}
	l, err := NewLifetimes(0.5)
	require.NoError(t, err)
	assert.Equal(t, LifetimeMaxZ, l.Metallicity())
}
