// Package yields says what a stellar population releases as it ages: the
// number of core-collapse and Type Ia supernovae, the mass, metals and energy
// they eject, the mass lost in winds, and the light and ionising photons the
// stars emit, per solar mass of stars formed, as a function of age and
// metallicity.
//
// Ages are in Myr, masses in Msun (per Msun formed), energies in erg, wind
// speeds in km/s; see package units for the constants behind conversions.
package yields
