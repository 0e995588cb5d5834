// Package bench holds the standard gas set-ups and the runner that compares
// coupling schemes on the same gas.
//
// # Set-ups
//
// StandardSetups generates, in code and from a seed, a uniform lattice, a
// glass-like jittered lattice, a two-phase interface (a star at the face of
// a slab 100 times denser than its surroundings) and the demo scenario, a
// clumpy cloud around a young cluster whose numbers are invented. Each is
// built at any hydrogen density (cm^-3) and gas element mass (Msun) with
// the same geometry, only scaled, in parsec, solar mass and km/s (Units).
// Every star releases one supernova of SupernovaEnergyErg with
// EjectaMassMsun of ejecta.
//
// # What the runner measures
//
// Run couples every scheme (Schemes: one line per variant, the isotropy
// correction switched off in the "-uncorrected" ones) on every case of a
// Suite, and reports per scheme:
//
//   - Convergence: the radial momentum handed out per supernova
//     (feedback.Ledger.RadialMomentum in Msun km/s) against gas element
//     mass at each density, beside the energy-conserving momentum of the
//     coupled mass, p_EC = sqrt(2 E (M_ej + 0.28 M_sw)) (Sedov kinetic
//     fraction, Chevalier 1974), and the terminal momentum of the Kim &
//     Ostriker 2015 fit, shared over the coupled gas as the scheme shared
//     the release.
//   - Isotropy: the residual |sum p_j| / sum |p_j| of the radial momenta
//     before the coupler removes their net vector
//     (feedback.Ledger.MaxIsotropyResidual), worst star per set-up.
//   - Energy: kinetic, thermal, radiated and undeposited shares of the
//     energy in.
//   - Speed: stars and gas elements per second of Couple plus Apply, and
//     the ratio of its time to the touch-only floor (TouchFloor: the same
//     neighbor search, gathers and scatters with no physics) measured on
//     the same gas in the same run.
//   - Outcome (Suite.Outcome): what each scheme delivers once its remnant
//     has evolved. Its supernova goes into a periodic 3D grid of uniform gas
//     through the coupler and Apply, the grid evolves it with cooling
//     (package testbed), and at 3 and 10 shell-formation times the radial
//     momentum about the star, the kinetic, thermal and radiated energy and
//     the hot gas are set beside the 1D reference remnant's (package
//     remnant) at the same time, against cell mass in units of the
//     reference's cooling mass. Most of a suite's time goes here.
//
// WriteResults writes results.json, a CSV per table and PNG plots
// (Figures): momentum against gas element mass per set-up (zero momenta
// said in words, the cooling mass marked), the isotropy residual, the
// energy split against gas element mass per set-up, the speed, and for
// the outcome the delivered over reference momentum against cell mass
// (outcome_momentum.png, the headline), momentum against time beside the
// 1D curve, and density and temperature slices through the star. Every
// figure keeps its key in a column of its own and writes log-axis ticks
// by one rule (0.01 to 1000 as decimals, 1e<k> beyond). The ejecta command
// runs all this as "ejecta bench".
//
// # A user's own gas
//
// ReadGasDir reads gas from NumPy .npy arrays in a directory, in the code
// units the caller states (the command's -length-unit-cm, -mass-unit-g
// and -velocity-unit-cms flags):
//
//	pos.npy              (n, 3)  positions                      [length]
//	vel.npy              (n, 3)  velocities                     [velocity]
//	mass.npy             (n,)    element masses                 [mass]
//	density.npy          (n,)    mass densities                 [mass / length^3]
//	internal_energy.npy  (n,)    specific internal energies     [velocity^2]
//	id.npy               (n,)    unique integer IDs             (optional: 1..n)
//	metallicity.npy      (n,)    metal mass fractions           (optional)
//	stars.npy            (s, 3)  star positions                 (optional) [length]
//
// Arrays may be float32 or float64 (IDs int32 or int64), either byte
// order, C or Fortran order. Without stars.npy one star is placed at the
// densest element. RunCase then compares the schemes on that gas.
package bench
