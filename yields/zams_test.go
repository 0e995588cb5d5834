package yields

import (
	"math"
	"testing"

	"github.com/ejecta-dev/ejecta/yields/units"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/integrate/quad"
)

// The Sun on the zero-age main sequence at Z = 0.02: about 0.70 Lsun and
// 0.89 Rsun (standard solar models brighten by about 30% to today's Sun,
// e.g. Bahcall, Pinsonneault & Basu 2001, ApJ 555, 990; the Tout et al.
// 1996 fit passes through 0.70 Lsun and 0.89 Rsun; from memory).
func TestZAMSSun(t *testing.T) {
	s, err := NewZAMS(0.02)
	require.NoError(t, err)
	assert.InEpsilon(t, 0.70, s.Luminosity(1), 0.03)
	assert.InEpsilon(t, 0.89, s.Radius(1), 0.02)
	// Stefan–Boltzmann at the nominal solar Teff of 5772 K (IAU 2015
	// Resolution B3): Teff = 5772 K (L/R²)^(1/4).
	want := 5772 * math.Pow(s.Luminosity(1)/(s.Radius(1)*s.Radius(1)), 0.25)
	assert.InEpsilon(t, want, s.EffectiveTemperature(1), 1e-4)
}

// Massive stars on the zero-age main sequence at Z = 0.02, against the
// Geneva models of Schaller et al. 1992 (A&AS 96, 269; ZAMS luminosities
// from memory): within 0.1 dex. The textbook power law this fit replaced
// was 0.4 dex too bright at 40 and 100 Msun.
func TestZAMSMassiveStars(t *testing.T) {
	s, err := NewZAMS(0.02)
	require.NoError(t, err)
	tests := []struct{ m, logL float64 }{
		{20, 4.65}, {40, 5.36}, {60, 5.73}, {85, 6.02}, {120, 6.25},
	}
	for _, tc := range tests {
		assert.InDelta(t, tc.logL, math.Log10(s.Luminosity(tc.m)), 0.1, "%g Msun", tc.m)
	}
	// O-dwarf effective temperatures lie between 30000 and 50000 K
	// (Martins, Schaerer & Hillier 2005, A&A 436, 1049, O9.5V–O3V; from
	// memory): ZAMS stars of 20–100 Msun at solar metallicity fall in it.
	for _, m := range []float64{20, 40, 60, 100} {
		te := s.EffectiveTemperature(m)
		assert.Greater(t, te, 30000.0, "%g Msun", m)
		assert.Less(t, te, 50000.0, "%g Msun", m)
	}
}

// Metal-poor stars of the same mass are hotter, and above the Sun's mass
// smaller, on the zero-age main sequence (Tout et al. 1996, figs 2–3;
// common practice), and the fits
// are smooth and increasing in mass over their range.
func TestZAMSMetallicityAndShape(t *testing.T) {
	poor, err := NewZAMS(0.001)
	require.NoError(t, err)
	rich, err := NewZAMS(0.02)
	require.NoError(t, err)
	for _, m := range []float64{1, 3, 10, 30, 100} {
		if m > 1 { // near 1 Msun the two radii are within 1% of each other
			assert.Less(t, poor.Radius(m), rich.Radius(m), "%g Msun", m)
		}
		assert.Greater(t, poor.EffectiveTemperature(m), rich.EffectiveTemperature(m), "%g Msun", m)
	}
	for _, s := range []ZAMS{poor, rich} {
		prevL, prevT := 0.0, 0.0
		for m := 0.1; m <= 100; m *= 1.05 {
			l, te := s.Luminosity(m), s.EffectiveTemperature(m)
			assert.Greater(t, l, prevL, "L at %g Msun", m)
			assert.Greater(t, te, prevT, "Teff at %g Msun", m)
			prevL, prevT = l, te
		}
	}
	// Metallicities outside the fits' range are clamped; bad ones rejected.
	low, err := NewZAMS(0)
	require.NoError(t, err)
	assert.Equal(t, ZAMSMinZ, low.Metallicity())
	high, err := NewZAMS(0.5)
	require.NoError(t, err)
	assert.Equal(t, ZAMSMaxZ, high.Metallicity())
	for _, z := range []float64{-0.1, 1, math.NaN()} {
		_, err := NewZAMS(z)
		assert.ErrorIs(t, err, ErrInput)
	}
	assert.Zero(t, rich.Luminosity(0))
	assert.Zero(t, rich.Radius(-1))
	assert.Zero(t, rich.EffectiveTemperature(math.NaN()))
	assert.Zero(t, rich.IonizingRate(0))
}

// planckTail is the integral ∫_x^∞ t^n/(e^t − 1) dt: checked against
// gonum's Gauss–Legendre quadrature of the integrand (the definition), on
// both sides of the switch between its two series, and against the closed
// forms of the whole integral, 2ζ(3) and π⁴/15.
func TestPlanckTail(t *testing.T) {
	assert.InEpsilon(t, 2.404113806319188, planckTail(2, 0), 1e-15)
	assert.InEpsilon(t, math.Pow(math.Pi, 4)/15, planckTail(3, 0), 1e-15)
	for _, n := range []int{2, 3} {
		for _, x := range []float64{1e-6, 0.01, 0.3, 0.999, 1, 1.001, 2.5, 7, 30, 100} {
			f := func(u float64) float64 {
				// t = x + u/(1 − u) maps [0, 1) onto [x, ∞).
				tt := x + u/(1-u)
				return math.Pow(tt, float64(n)) / math.Expm1(tt) / ((1 - u) * (1 - u))
			}
			var want float64
			cuts := []float64{0, 0.5, 0.8, 0.9, 0.95, 0.98, 0.995, 0.999, 1}
			for i := 0; i+1 < len(cuts); i++ {
				want += quad.Fixed(f, cuts[i], cuts[i+1], 200, quad.Legendre{}, 0)
			}
			assert.InEpsilon(t, want, planckTail(n, x), 1e-11, "n=%d x=%g", n, x)
		}
	}
	assert.Zero(t, planckTail(3, 800))
}

// A blackbody's photon rate above 13.6 eV: the number of photons it emits
// per unit luminosity, (15/π⁴)(1/kT) ∫ t²/(e^t − 1) dt over all energies,
// is 2ζ(3)·15/π⁴ / kT ≈ 0.3702/kT (the mean photon energy of a blackbody
// is 2.701 kT; textbook, e.g. Rybicki & Lightman 1979). The band fractions
// add up to one.
func TestBlackbodyRates(t *testing.T) {
	const temp = 40000.0
	lum := 1e5
	all := blackbodyPhotonRate(lum, temp, 0)
	kt := units.Boltzmann * temp
	assert.InEpsilon(t, lum*units.SolarLuminosity/(2.701178*kt), all, 1e-6)
	fuv := blackbodyBandFraction(temp, FarUltravioletMinEnergy, HydrogenIonizationEnergy)
	below := blackbodyBandFraction(temp, 0, FarUltravioletMinEnergy)
	above := blackbodyBandFraction(temp, HydrogenIonizationEnergy, math.Inf(1))
	assert.InDelta(t, 1, fuv+below+above, 1e-14)
	assert.Zero(t, blackbodyPhotonRate(0, temp, 13.6))
	assert.Zero(t, blackbodyBandFraction(0, 6, 13.6))
}

// The blackbody approximation of the ionizing photon rate, against the
// non-LTE, line-blanketed model atmospheres of the dwarf O-star scale of
// Martins, Schaerer & Hillier 2005 (A&A 436, 1049, table 1; Teff, log L
// and log Q from memory): at the effective temperature and luminosity of
// O3V–O6V the blackbody is within 0.1 dex; at O9.5V (30500 K) it is too
// high by more than 0.3 dex, the bias the Population documentation states.
func TestBlackbodyIonizingRateAgainstODwarfs(t *testing.T) {
	tests := []struct {
		class          string
		teff, logL, lq float64
	}{
		{"O3V", 44616, 5.83, 49.64},
		{"O5V", 41540, 5.49, 49.26},
		{"O6V", 38151, 5.32, 48.96},
	}
	for _, tc := range tests {
		q := blackbodyPhotonRate(math.Pow(10, tc.logL), tc.teff, HydrogenIonizationEnergy)
		assert.InDelta(t, tc.lq, math.Log10(q), 0.1, tc.class)
	}
	q := blackbodyPhotonRate(math.Pow(10, 4.62), 30488, HydrogenIonizationEnergy)
	assert.Greater(t, math.Log10(q)-47.56, 0.3, "O9.5V")
}
