package yields

// Species is a slot of Abundances: Metals (slot 0) is the total metal mass
// (everything heavier than helium); the other slots hold single elements,
// in the order of the species set the holder is laid out by (SpeciesSet;
// the user's choice). The named slots Hydrogen ... Iron are those of
// DefaultSpeciesSet.
type Species int

// The slots of the default species set, in the order of Abundances.
const (
	Metals Species = iota
	Hydrogen
	Helium
	Carbon
	Nitrogen
	Oxygen
	Neon
	Magnesium
	Silicon
	Sulfur
	Calcium
	Iron
	// NumSpecies is the number of slots of Abundances: the total metals
	// plus MaxElements elements.
	NumSpecies
)

var speciesSymbols = [NumSpecies]string{"Z", "H", "He", "C", "N", "O", "Ne", "Mg", "Si", "S", "Ca", "Fe"}

// Symbol is the short name of the slot in the default species set: "Z" for
// total metals, else the chemical symbol. For another set use
// SpeciesSet.Symbol.
func (s Species) Symbol() string {
	if s < 0 || s >= NumSpecies {
		return "?"
	}
	return speciesSymbols[s]
}

// Abundances holds one number per species (a mass, a yield or a fraction,
// as the holder documents).
type Abundances [NumSpecies]float64

// Channel names a source of stellar release.
type Channel int

// The release channels.
const (
	// CoreCollapse is core-collapse supernovae of massive stars (discrete events).
	CoreCollapse Channel = iota
	// TypeIa is thermonuclear supernovae from the delay-time distribution (discrete events).
	TypeIa
	// MassiveWinds is the continuous mass loss of massive stars before they explode.
	MassiveWinds
	// AGBWinds is the mass loss of intermediate- and low-mass stars on the asymptotic giant branch.
	AGBWinds
	// NumChannels is the number of channels that eject mass (the ejecta
	// of Release.Channels).
	NumChannels
)

// The channels of a population's light, which eject no mass: the feedback
// step couples them as channels of their own.
const (
	// RadiationPressure is the population's light (Release.RadiantEnergy),
	// coupled as radiation pressure.
	RadiationPressure = NumChannels + iota
	// Photoionization is the population's hydrogen-ionizing photons
	// (Release.IonizingPhotons), coupled as photoheating.
	Photoionization
	// PhotoelectricHeating is the population's far-ultraviolet light
	// (Release.FarUltravioletEnergy), coupled as photoelectric heating of
	// the gas by dust grains.
	PhotoelectricHeating
	// NumAllChannels counts every channel, the ejecta channels first.
	NumAllChannels
)

var channelNames = [NumAllChannels]string{"core-collapse", "type-ia", "massive-winds", "agb-winds",
	"radiation-pressure", "photoionization", "photoelectric-heating"}

// String is the channel's name.
func (c Channel) String() string {
	if c < 0 || c >= NumAllChannels {
		return "unknown-channel"
	}
	return channelNames[c]
}

// Discrete reports whether the channel comes as countable events (supernovae).
func (c Channel) Discrete() bool { return c == CoreCollapse || c == TypeIa }

// Ejecta is what one channel releases over an age interval, per solar mass
// of stars formed.
type Ejecta struct {
	// Events is the expected number of discrete events (supernovae) per Msun
	// formed; zero for continuous channels.
	Events float64
	// Mass is the ejected mass in Msun per Msun formed.
	Mass float64
	// Species is the ejected mass of each species in Msun per Msun formed,
	// laid out by the model's species set; Species[Metals] is the total
	// metal mass. With hydrogen and helium in the set, their masses plus
	// the metals equal Mass.
	Species Abundances
	// Energy is the energy released in erg per Msun formed: explosion energy
	// for supernovae, the kinetic energy 1/2 M v^2 of the wind for winds.
	Energy float64
	// WindSpeed is the mass-weighted mean wind speed in km/s for wind
	// channels, zero otherwise.
	WindSpeed float64
}

// Add returns the sum of two releases of the same channel. Wind speeds are
// combined so that mass and kinetic energy both add.
func (e Ejecta) Add(o Ejecta) Ejecta {
	r := Ejecta{Events: e.Events + o.Events, Mass: e.Mass + o.Mass, Energy: e.Energy + o.Energy}
	for i := range r.Species {
		r.Species[i] = e.Species[i] + o.Species[i]
	}
	if e.WindSpeed > 0 || o.WindSpeed > 0 {
		// Mass-weighted mean speed, the definition WindSpeed documents.
		if r.Mass > 0 {
			r.WindSpeed = (e.Mass*e.WindSpeed + o.Mass*o.WindSpeed) / r.Mass
		}
	}
	return r
}

// Release is everything a simple stellar population releases between two
// ages, per solar mass formed.
type Release struct {
	// Age0 and Age1 bound the interval, in Myr since formation.
	Age0, Age1 float64
	// Metallicity is the population's metal mass fraction.
	Metallicity float64
	// Channels holds the ejecta of each channel.
	Channels [NumChannels]Ejecta
	// RadiantEnergy is the bolometric energy emitted over the interval, in
	// erg per Msun formed (the time integral of the luminosity).
	RadiantEnergy float64
	// IonizingPhotons is the number of hydrogen-ionizing photons emitted over
	// the interval per Msun formed.
	IonizingPhotons float64
	// FarUltravioletEnergy is the energy emitted over the interval in the
	// far ultraviolet, between FarUltravioletMinEnergy and
	// HydrogenIonizationEnergy (6–13.6 eV), in erg per Msun formed (the time
	// integral of FarUltravioletLuminosity; part of RadiantEnergy). A table
	// without the far-ultraviolet columns gives zero.
	FarUltravioletEnergy float64
}

// Total is the sum of all channels' ejecta.
func (r Release) Total() Ejecta {
	var t Ejecta
	for _, c := range r.Channels {
		t = t.Add(c)
	}
	return t
}

// Model is a source of releases: the built-in population model or a user
// table. Ages are in Myr, metallicity is a metal mass fraction.
type Model interface {
	// Release returns what one Msun formed releases between age0 and age1.
	// Species amounts are laid out by ModelSpecies(m).
	Release(age0, age1, z float64) (Release, error)
	// Luminosity is the bolometric luminosity at an age, in Lsun per Msun formed.
	Luminosity(age, z float64) (float64, error)
	// IonizingRate is the hydrogen-ionizing photon rate at an age, in photons
	// per second per Msun formed.
	IonizingRate(age, z float64) (float64, error)
	// FarUltravioletLuminosity is the luminosity between 6 and 13.6 eV at an
	// age, in Lsun per Msun formed.
	FarUltravioletLuminosity(age, z float64) (float64, error)
}

// SpeciesModel is a Model that says which species set its releases are
// laid out by. Population and Table are.
type SpeciesModel interface {
	Model
	Species() SpeciesSet
}

// ModelSpecies is the species set of m's releases: m.Species() for a
// SpeciesModel, DefaultSpeciesSet otherwise.
func ModelSpecies(m Model) SpeciesSet {
	if sm, ok := m.(SpeciesModel); ok {
		return sm.Species()
	}
	return DefaultSpeciesSet()
}
