// Package remnant is the reference for a single supernova remnant: a
// spherically symmetric hydrodynamics solver with optically thin radiative
// cooling that follows one explosion in uniform gas from free expansion
// through the Sedov–Taylor phase, shell formation and the pressure-driven
// snowplough, and a calibration over density and metallicity that feeds the
// table-driven remnant fit of package feedback.
//
// # Solver
//
// The Euler equations for an ideal gas (γ = 5/3 by default) in spherical
// symmetry are solved with a conservative finite-volume scheme on shells
// of equal width: limited linear reconstruction of the primitive variables,
// HLLC fluxes (package hydro) and second-order strong-stability-preserving
// Runge–Kutta steps (Shu & Osher 1988, J. Comput. Phys. 77, 439). The
// geometric source of the momentum equation, p (A_R − A_L) per zone, is
// folded into the pressure flux so that a uniform medium at rest stays at
// rest bit for bit. The center reflects; the outer edge lets gas out and
// books what leaves. The step is the Courant step (CFL 0.4), shortened to
// 0.3 of the shortest cooling time of gas hotter than 2e4 K but never below
// a tenth of the Courant step.
//
// Cooling (package cooling) follows each hydrodynamic step: every zone's
// internal energy is integrated exactly over the step at its density with
// the curve's net rate (Townsend 2009), never below the zone's equilibrium
// temperature.
//
// # Cold, fast gas
//
// Behind shell formation the swept-up gas is cold and moves at tens to
// hundreds of km/s: its heat is a few percent of its kinetic energy or
// less, and a total-energy scheme must get that heat as a small difference
// of large numbers. Two measures keep it right.
//
// The velocity slope of each zone is capped so that the kinetic energy of
// its reconstructed linear velocity profile, ρ Δv^2/24 per unit volume
// (Δv the velocity change across the zone), is at most VelocitySlopeCap
// (default 0.3) of the zone's internal energy (hydro.CapVelocitySlope, our
// own limiter). Uncapped, the monotonized-central slopes at the inner edge
// of the cold shell, where hot interior gas meets the shell at about
// 100 km/s, give the face states more kinetic energy than the zone holds
// beyond its mean motion; the energy fluxes then drain the zone's heat
// below zero while the momentum fluxes keep its kinetic energy. At n_H = 1
// with 100 zones per shell radius that needed 0.70 of the explosion energy
// of heat added back (1.10 at 200 zones) over ten shell-formation times
// with μ held at 0.6, 1.07 with the ionization-dependent μ of
// cooling.DefaultGas, all of it radiated again. With the cap none is needed, and the shell
// formation point does not move (it precedes the cold shell).
//
// Each zone also carries its internal energy ρe as a separate quantity,
// advected with the mass and changed by its own p dV work, −p ∇·v with the
// face velocities of the same HLLC solutions (the dual-energy formalism of
// Bryan et al. 1995, Comput. Phys. Commun. 89, 149). Where the thermal
// energy the total energy implies falls below InternalEnergySwitch (default
// 1e-3) of the total, the separate internal energy is used instead and the
// total energy reset to match; the energy this adds or removes is booked as
// SwitchAdded. Elsewhere the separate internal energy is reset to the
// total-energy value. The internal-energy equation misses the heat of
// shocks, and in a radiative shell the shocked gas cools at once and never
// shows its heat to the switch, so a large switch removes that heat: with
// 0.01 it booked −7% of the explosion energy at n_H = 100, with 1e-3 under
// 0.1% at every density tested. The switch alone does not cure the drained
// heat above: without the velocity cap it books as much energy as the floor
// did (0.65 of the explosion energy at n_H = 1).
//
// Where a zone would still end up colder than 1 K, its internal energy is
// raised to 1 K and the energy added is booked as FloorAdded. The ledger
// Initial = Total + Radiated + Outflow − FloorAdded − SwitchAdded closes to
// round-off.
//
// # Initial remnant
//
// The ejecta (EjectaMass, default 3 Msun) fill the innermost InitialZones
// zones (default 8, about a thirtieth of the estimated shell-formation
// radius, well inside the r_sf/3 that Kim & Ostriker 2015 require) at
// uniform density on top of the ambient gas, expanding homologously
// (v ∝ r), with a share ThermalFraction of the energy as heat (0.5 in
// DefaultConfig) and the rest kinetic. The ambient gas is at rest at
// hydrogen density Density and, by default, the thermal equilibrium
// temperature of the cooling curve at that density.
//
// # Grid and run length
//
// Both scale with the shell-formation fits of Kim & Ostriker 2015 (used
// only for sizing): the zone width is r_sf/ZonesPerShellRadius (default
// 100), the grid reaches DomainShellRadii r_sf (default 3) and the run
// lasts EndShellTimes t_sf (default 10).
//
// # Diagnostics
//
// A log-spaced History of Samples records the shock radius (the outer face
// of the outermost zone denser than 1.1 times the ambient gas), the mass
// inside it, the total radial momentum, the kinetic energy, the thermal
// energy above that of undisturbed gas, the energy radiated so far (net of
// heating and of the floor) and the mass of hot gas (T > 2e4 K).
//
// Shell formation is defined as Kim & Ostriker 2015 (ApJ 802, 99, sect.
// 3.1; from memory) define it: the time at which the mass of hot gas
// reaches its maximum, after which radiative cooling moves the swept-up gas
// into the cold shell faster than the shock heats new gas. The
// ShellFormation point reports that time, the shock radius, the mass inside
// it and the radial momentum. The Late point is the state at the end of the
// run (ten shell-formation times by default), where Kim & Ostriker find the
// momentum about 30% above its shell-formation value.
//
// # Calibration
//
// Calibrate runs a grid of densities and metallicities in parallel (one run
// per worker, each deterministic and independent of the others) and
// returns the shell-formation and late points of every case, in the form
// package feedback reads as a remnant table.
package remnant
