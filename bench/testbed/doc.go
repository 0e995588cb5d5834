// Package testbed is a three-dimensional hydrodynamics solver with
// radiative cooling on which coupling schemes inject their supernova
// through the library's real path, so that what a scheme delivers to the
// gas once the remnant has evolved can be measured against the
// one-dimensional reference of package remnant.
//
// # The solver
//
// Grid is a periodic cube of N^3 equal cells holding an ideal gas
// (γ = 5/3 by default) with optically thin cooling. The Euler equations
// are solved in finite volumes, dimensionally split in Strang's alternating
// order (x y z, then z y x), each sweep a MUSCL–Hancock step of package
// hydro: limited linear reconstruction of the primitive variables
// (monotonized central by default), the Hancock half-step predictor and the
// HLLC flux through every face, with the transverse velocities and the
// metal mass fraction carried along. The flux through the face where a
// periodic pencil closes on itself is computed once and used on both
// sides, so mass, momentum and energy are conserved to round-off. After the
// hydrodynamics, every cell's cooling is integrated exactly over the step
// (cooling.Cooler.Evolve, Townsend 2009), and the energy removed, net of
// heating, is booked in the grid's Ledger: the total energy is the initial
// energy plus what feedback injected minus what was radiated, to
// round-off. The step is Courant × dx over the largest signal speed.
//
// # Parallel passes
//
// Every pass over the grid (a sweep along one axis, the cooling, a sum) is
// cut into planes of N^2 cells; Workers goroutines take planes from a
// shared counter. A sweep plane holds whole pencils, so no two workers
// touch one cell, and every reduction is summed within a plane in cell
// order, then over planes in plane order: the grid is bitwise the same for
// any number of workers. Buffers are per worker and kept, so a step
// allocates nothing.
//
// # Feedback through the host's path
//
// The grid's cells are the gas: Grid.Gas is a feedback.Gas whose columns
// point at the solver's own arrays (mass, velocity, specific internal
// energy, density, metal fraction, cell centres, IDs), so records are
// applied in place. An Injector couples stars with a feedback.Coupler on a
// neighbor.Tree of the cell centres and applies the records with
// feedback.Apply; the grid then follows (Grid.AfterApply): densities from
// the new masses, and a cell flagged feedback.FlagHoldCooling has its
// cooling held until the time the record says.
//
// # The experiment
//
// Run evolves one supernova per case: every Variant (a scheme and its
// coupler settings, the library's or a user's) in each Medium (uniform gas,
// or the clumpy demo medium) at each mean density, at cell masses given in units of the cooling mass of the
// one-dimensional reference (package remnant: its mass inside the shock at
// shell formation, with the same cooling curve, ambient temperature,
// energy and ejecta). The box is BoxMargin times wider than the
// reference's remnant at the last measurement time, and at least MinCells
// cells across, with the star at its centre, a cell corner. The supernova
// goes in at t = 0; energy a scheme hands back undeposited is carried by
// the star and released again at the next step, as a host would. Steps
// are the Courant step, never longer than StepFraction of the time since
// the explosion (so that large cells do not jump over the early evolution
// in one step). At each measurement time (in shell-formation times of the
// reference) the grid's radial momentum about the star, kinetic energy,
// thermal energy above the ambient gas's, energy radiated (by the grid's
// cooling and by the scheme at injection) and hot-gas mass (T > 2e4 K) are
// set beside the reference's at the same time (Outcome). Cases run
// Workers at a time, each on one goroutine, so results do not depend on
// the worker count.
package testbed
