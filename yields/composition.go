package yields

import (
	"fmt"
	"math"
)

// Solar composition, mass fractions of the present-day solar photosphere
// (Asplund, Grevesse, Sauval & Scott 2009, ARA&A 47, 481; from memory).
const (
	SolarHydrogen = 0.7381
	SolarHelium   = 0.2485
	SolarMetals   = 0.0134
)

// PrimordialHelium is the helium mass fraction of metal-free gas (from
// memory: big-bang nucleosynthesis with the Planck baryon density gives
// about 0.245). Helium grows linearly with metallicity from it to the
// solar value: Y(Z) = Yp + (Ysun − Yp)·Z/Zsun.
const PrimordialHelium = 0.245

// solarElementFractions holds each metal's mass fraction of the solar metal
// mass, from the Asplund et al. 2009 solar mass fractions (from memory):
// C 2.37e-3, N 6.93e-4, O 5.73e-3, Ne 1.26e-3, Mg 7.08e-4, Si 6.65e-4,
// S 3.09e-4, Ca 6.4e-5, Fe 1.29e-3, each divided by Zsun = 0.0134. They sum
// to 0.977; the rest is elements not tracked (Ar, Al, Na, Ni, ...).
func solarElementFractions() Abundances {
	var a Abundances
	a[Carbon] = 2.37e-3 / SolarMetals
	a[Nitrogen] = 6.93e-4 / SolarMetals
	a[Oxygen] = 5.73e-3 / SolarMetals
	a[Neon] = 1.26e-3 / SolarMetals
	a[Magnesium] = 7.08e-4 / SolarMetals
	a[Silicon] = 6.65e-4 / SolarMetals
	a[Sulfur] = 3.09e-4 / SolarMetals
	a[Calcium] = 6.4e-5 / SolarMetals
	a[Iron] = 1.29e-3 / SolarMetals
	return a
}

// InitialComposition is the mass fractions of gas of metal mass fraction z,
// scaled from the solar mixture: every metal in solar proportion to z,
// helium from PrimordialHelium rising linearly to the solar value at Zsun
// (capped at 1 − z), hydrogen the rest. Fractions[Metals] is z and
// Fractions[Hydrogen] + Fractions[Helium] + Fractions[Metals] is 1 to
// round-off.
func InitialComposition(z float64) (Abundances, error) {
	if math.IsNaN(z) || z < 0 || z >= 1 {
		return Abundances{}, fmt.Errorf("yields: metallicity %g not in [0, 1)", z)
	}
	a := solarElementFractions()
	for s := Carbon; s < NumSpecies; s++ {
		a[s] *= z
	}
	a[Metals] = z
	y := PrimordialHelium + (SolarHelium-PrimordialHelium)*z/SolarMetals
	y = math.Min(y, 1-z)
	a[Helium] = y
	a[Hydrogen] = math.Max(0, 1-z-y)
	return a, nil
}
