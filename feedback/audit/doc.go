// Package audit checks one feedback step done by any code, ejecta or a
// host's own injection, from a before/after dump: the gas before and after
// the step (matched by ID) and each star's release and radiated energy.
// Step checks that mass, every species, momentum and energy gained by the
// gas equal the releases, that each star's kicks sum to zero in its own
// frame, that no mass or internal energy went negative and that no element
// out of every star's range changed, and names the elements behind every
// failure.
//
// GasArrays holds gas in plain Go slices; View binds a feedback.Gas to it.
//
// # Dumps
//
// A dump is the gas before and after a step and the stars' releases as
// NumPy .npy arrays named by a JSON manifest (Manifest; its species keys
// follow the user's species set, yields.SpeciesSet). ReadDump reads one,
// as the ejecta command's audit does; WriteDump writes one, and WriteGas,
// WriteStars and WriteManifest write it piece by piece, as the C ABI's
// dump calls do for hosts in C, C++ and Fortran. ReadArray, ReadIDs,
// WriteArray and WriteIDs are the .npy reader and writer both use.
package audit
