// Package yields says what a stellar population releases as it ages: the
// number of core-collapse and Type Ia supernovae, the mass, metals and energy
// they eject, the mass lost in winds, and the light, ionizing photons and
// far-ultraviolet light the stars emit, per solar mass of stars formed, as a
// function of age and metallicity.
//
// Ages are in Myr, masses in Msun (per Msun formed), energies in erg, wind
// speeds in km/s, metallicity a metal mass fraction in [0, 1); see package
// units for the constants behind conversions.
//
// # Models
//
// A Model answers Release(age0, age1, z): everything one Msun formed releases
// between two ages, channel by channel (CoreCollapse, TypeIa, MassiveWinds,
// AGBWinds), with per-species masses, plus the radiant energy, the ionizing
// photons and the far-ultraviolet (6–13.6 eV) energy emitted. Luminosity,
// IonizingRate and FarUltravioletLuminosity give the same light as rates at
// one age. Which species are tracked is the user's choice (SpeciesSet): the
// total metals always, and up to MaxElements elements named by chemical
// symbol (ParseSpeciesSet("H,He,O,Fe")), in the user's order. The default,
// DefaultSpeciesSet, is H, He, C, N, O, Ne, Mg, Si, S, Ca and Fe, the
// elements that dominate the radiative cooling of gas as chosen by Wiersma,
// Schaye & Smith (2009, MNRAS 393, 99). With H and He tracked, H + He +
// metals is the ejected mass. Two models are provided:
//
//   - Population, the built-in simple stellar population, configured by
//     Config (DefaultConfig documents every default and its source): an IMF
//     (Salpeter 1955, Kroupa 2001 or Chabrier 2003; NewIMF), lifetimes from
//     the fit of Raiteri, Villata & Navarro 1996 (Lifetimes), core-collapse
//     supernovae in a progenitor window, Type Ia supernovae from a t^-1
//     delay-time distribution, winds of massive stars spread over their
//     lives, AGB mass loss from an initial–final mass relation, and the
//     light of the stars still alive: zero-age main-sequence luminosities
//     and radii from the fits of Tout et al. 1996 (ZAMS), with a blackbody
//     spectrum at each star's effective temperature for the ionizing photons
//     and the far-ultraviolet light.
//   - Table, read from a user's CSV file (ReadTable), for the output of any
//     population-synthesis model; WriteTable writes any Model in the format.
//
// In both, each quantity is a cumulative function of age and a release is
// the difference C(age1) − C(age0): releases of consecutive intervals add up
// to the release of their union to round-off, so a star's total does not
// depend on the time steps it was advanced with. Release allocates nothing
// and is safe for concurrent use.
//
// # Table format
//
// A table is a CSV file. Lines starting with # are comments. The first
// other line is the header: every column is named quantity[unit], with the
// unit written exactly as below (a different unit is an error, not a
// conversion). Each following row is one grid point:
//
//	age[Myr]                       age since formation, > 0
//	metallicity[mass_fraction]     metal mass fraction, in (0, 1)
//	luminosity[Lsun/Msun]          bolometric luminosity at that age
//	ionizing_rate[photons/s/Msun]  hydrogen-ionizing photon rate at that age
//	radiant_energy[erg/Msun]       cumulative: light emitted since formation
//	ionizing_photons[photons/Msun] cumulative: ionizing photons since formation
//	fuv_luminosity[Lsun/Msun]      optional: 6–13.6 eV luminosity at that age
//	fuv_energy[erg/Msun]           optional, cumulative: 6–13.6 eV light since formation
//
// and, for each channel prefix ccsn, snia, massive_wind and agb_wind, all
// cumulative since formation:
//
//	<prefix>_events[1/Msun]        supernovae (ccsn and snia only)
//	<prefix>_mass[Msun/Msun]       ejected mass
//	<prefix>_energy[erg/Msun]      explosion energy, or wind kinetic energy
//	<prefix>_z[Msun/Msun]          metals; _h and _he likewise (required)
//	<prefix>_fe[Msun/Msun]         optional: any element, by its symbol in lower case
//	                               (_c _n _o _fe, or _ni _ba ...; at most MaxElements
//	                               elements in all, H and He included)
//
// Every value is a finite number >= 0. Rows come in blocks of one
// metallicity, blocks in rising metallicity, each block with the same
// strictly rising ages. Cumulative columns must not fall with age (a fall is
// a negative rate). In each row and channel H + He + metals must equal the
// mass to 1e-6 (the mass is then taken as that sum) and the elements must
// not exceed the metals. Absent optional elements read as zero. The two
// far-ultraviolet columns come together or not at all; a table without them
// has no far-ultraviolet light (Table.HasFarUltraviolet reports which). Any defect
// is an ErrTable error naming its line. (Package csvtable reads the layout
// this format shares with the project's other tables.) A table carrying only default-set
// elements releases in the default set's layout; one carrying others in the
// layout of what it carries (Table.Carried); Table.WithSpecies chooses.
//
// Between grid points a table is interpolated linearly in log age and log
// metallicity. Before the first age cumulative values grow linearly from
// zero; after the last they stay constant; metallicities outside the grid
// are clamped to it. Wind speeds are recovered as sqrt(2 E / M). The file
// testdata/yields/example_table.csv at the module root is an example,
// written from the built-in Kroupa population.
//
// # Discrete events
//
// Supernova counts in a step are drawn with Poisson from a CounterRNG keyed
// by (seed, star ID, step, stream): the draw is a pure function of those
// numbers, so it is the same whatever thread, rank or order makes it.
package yields
