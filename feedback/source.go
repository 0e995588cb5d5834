package feedback

import (
	"math"

	"github.com/ejecta-dev/ejecta/yields"
)

// Star is one star particle, in code units. Age is in code time units since
// formation. ID must be unique among the stars of a call: it orders records.
type Star struct {
	ID          int64
	Pos         [3]float64
	Vel         [3]float64
	Mass        float64
	Metallicity float64
	Age         float64
}

// Validate checks a star: finite position and velocity (with finite
// squares), finite non-negative mass and age, metallicity in [0, 1). Every
// check of a star, in a Source, a StarParticle or from the C ABI, is this
// one.
func (s *Star) Validate() error {
	if !finite(dot(s.Pos, s.Pos)) || !finite(dot(s.Vel, s.Vel)) {
		return errorf(ErrBadValue, "star %d: position %v or velocity %v not finite (or too large to square)", s.ID, s.Pos, s.Vel)
	}
	for _, f := range [...]struct {
		name string
		v    float64
	}{{"mass", s.Mass}, {"age", s.Age}} {
		if !(f.v >= 0) || math.IsInf(f.v, 0) {
			return errorf(ErrBadValue, "star %d: %s %g must be finite and non-negative", s.ID, f.name, f.v)
		}
	}
	if !(s.Metallicity >= 0 && s.Metallicity < 1) {
		return errorf(ErrBadValue, "star %d: metallicity %g outside [0, 1)", s.ID, s.Metallicity)
	}
	return nil
}

// Source is what one star releases into its gas in one call, in code units
// and in the star's rest frame: the ejected mass (which moves with the star),
// its species, and the energy (explosion energy for supernovae, wind kinetic
// energy for winds, emitted light for radiation pressure). Events is the
// number of discrete events (supernovae) the energy comes from, 0 for
// continuous release. Photons is the number of hydrogen-ionizing photons
// emitted over the step and Duration the step's length (code time), used by
// the photoionization scheme.
type Source struct {
	Star     Star
	Channel  yields.Channel
	Mass     float64
	Species  yields.Abundances
	Energy   float64
	Events   float64
	Photons  float64
	Duration float64
	// Step is the host's step index, which keys counter-based draws.
	Step uint64
	// NewStellarMass is the stellar mass (code mass) the star formed that
	// this release launches a wind for, used by KickedWinds loaded per
	// formed mass; zero otherwise.
	NewStellarMass float64
	// Dispersion is the velocity dispersion (code velocity, one
	// dimensional) of the star's galaxy, when the host knows it, used by
	// momentum-driven KickedWinds; zero lets the scheme measure it from
	// the gas around the star.
	Dispersion float64
}

// Validate checks the star (Star.Validate), that the release is finite
// and non-negative, that no species outweighs the ejected mass and that
// no mass is given at a code past the species set. Errors name species as in
// yields.DefaultSpeciesSet; a Coupler names them by its Config.Species.
func (s *Source) Validate() error { return s.ValidateIn(yields.SpeciesSet{}) }

// ValidateIn is Validate for a release laid out by the species set set:
// errors name its species by set's symbols.
func (s *Source) ValidateIn(set yields.SpeciesSet) error {
	if err := s.Star.Validate(); err != nil {
		return err
	}
	vals := [...]struct {
		name string
		v    float64
	}{{"mass", s.Mass}, {"energy", s.Energy}, {"events", s.Events}, {"photons", s.Photons},
		{"duration", s.Duration}, {"new stellar mass", s.NewStellarMass}, {"dispersion", s.Dispersion}}
	for _, f := range vals {
		if !finite(f.v) {
			return errorf(ErrBadValue, "star %d: release %s %g is not finite", s.Star.ID, f.name, f.v)
		}
	}
	if v2 := dot(s.Star.Vel, s.Star.Vel); !finite(0.5 * s.Mass * v2) {
		return errorf(ErrBadValue, "star %d: the ejecta's kinetic energy overflows (speed %g, mass %g)", s.Star.ID, math.Sqrt(math.Abs(v2)), s.Mass)
	}
	if s.Mass < 0 || s.Energy < 0 || s.Events < 0 || s.Photons < 0 || s.Duration < 0 {
		return errorf(ErrBadValue, "star %d: negative release (mass %g, energy %g, events %g, photons %g, duration %g)", s.Star.ID, s.Mass, s.Energy, s.Events, s.Photons, s.Duration)
	}
	if s.NewStellarMass < 0 || s.Dispersion < 0 {
		return errorf(ErrBadValue, "star %d: negative new stellar mass %g or velocity dispersion %g", s.Star.ID, s.NewStellarMass, s.Dispersion)
	}
	for sp, m := range s.Species {
		if sp >= set.Slots() && m != 0 {
			return errorf(ErrBadValue, "star %d: species mass %g at code %d, past the codes 0..%d of the species set %s",
				s.Star.ID, m, sp, set.Slots()-1, set)
		}
		if !finite(m) || m < 0 {
			return errorf(ErrBadValue, "star %d: species %s mass %g is not finite and non-negative", s.Star.ID, set.Symbol(yields.Species(sp)), m)
		}
		if m > s.Mass*(1+1e-12) {
			return errorf(ErrBadValue, "star %d: species %s mass %g exceeds the ejected mass %g", s.Star.ID, set.Symbol(yields.Species(sp)), m, s.Mass)
		}
	}
	return nil
}

// sourceQuantities is what a source brings in, lab frame: the ejecta carry
// the star's velocity, so their momentum is M v and their kinetic energy
// 1/2 M v^2 on top of the released energy.
func sourceQuantities(s *Source) Quantities {
	q := Quantities{Mass: s.Mass, Species: s.Species}
	v2 := 0.0
	for a := 0; a < 3; a++ {
		q.Momentum[a] = s.Mass * s.Star.Vel[a]
		v2 += s.Star.Vel[a] * s.Star.Vel[a]
	}
	q.Energy = s.Energy + 0.5*s.Mass*v2
	return q
}
