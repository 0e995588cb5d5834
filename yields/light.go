package yields

// starLight is the light of one star, or an integral of it over stars or
// time: bolometric luminosity in Lsun, hydrogen-ionizing photon rate in
// photons/s and far-ultraviolet luminosity in Lsun.
type starLight struct{ lum, ionizing, fuv float64 }

func (a starLight) add(b starLight) starLight {
	return starLight{a.lum + b.lum, a.ionizing + b.ionizing, a.fuv + b.fuv}
}

func (a starLight) scale(f float64) starLight {
	return starLight{a.lum * f, a.ionizing * f, a.fuv * f}
}

// light is the zero-age light of a star of initial mass m Msun, its
// spectrum a blackbody at its effective temperature.
func (s ZAMS) light(m float64) starLight {
	if !(m > 0) {
		return starLight{}
	}
	l, t := s.state(m)
	return starLight{
		lum:      l,
		ionizing: blackbodyPhotonRate(l, t, HydrogenIonizationEnergy),
		fuv:      l * blackbodyBandFraction(t, FarUltravioletMinEnergy, HydrogenIonizationEnergy),
	}
}

// IonizingRate is the hydrogen-ionizing photon rate in photons/s of a star
// of initial mass m Msun on the zero-age main sequence, taken as a
// blackbody at its effective temperature (see Population for the bias of
// that approximation).
func (s ZAMS) IonizingRate(m float64) float64 { return s.light(m).ionizing }

// FarUltravioletLuminosity is the luminosity in Lsun between
// FarUltravioletMinEnergy and HydrogenIonizationEnergy (6–13.6 eV) of a
// star of initial mass m Msun on the zero-age main sequence, taken as a
// blackbody at its effective temperature.
func (s ZAMS) FarUltravioletLuminosity(m float64) float64 { return s.light(m).fuv }
