// Package feedback couples what star particles release into the gas around
// them, conserving mass, every species, momentum and energy to round-off.
//
// # Two layers
//
// A Coupler couples prepared releases: one Source per star (what it
// releases this call, for one channel), through one Scheme, into Records
// and a Ledger (Config, Couple, Output). A Stepper is built on Couplers:
// given star particles (StarParticle: a Star with its formed mass) and a
// yields.Model, it works out each star's releases over a step, draws the
// supernovae, searches each star's neighbors once and couples every
// channel (supernovae, winds, radiation pressure, photoionization,
// photoelectric heating) through a Coupler of its own, using only what Couple returns (StepConfig, Step,
// StepOutput). Use a Coupler when the host computes releases itself, a
// Stepper when ejecta should.
//
// # Data
//
// Gas is a view on the host's gas, column by column: each Column has a base
// address, a byte stride and an element type (float64 or float32; IDs may be
// int64 or int32), so struct-of-arrays and array-of-structs hosts are read
// and written in place. Everything is in the host's code units, stated once
// in Config.Units; the few published fits that need physical units
// (terminal momentum, cooling radius) convert inside.
//
// A Source is one star's release for one call: ejected mass and species,
// energy, number of events, and an optional radial momentum budget
// (radiation), all in the star's frame.
//
// # Weights and the isotropy correction
//
// Each star couples to its k nearest gas elements (or all within a radius,
// or a host-supplied list). Neighbor j gets a base weight: KernelVolume,
// the star's cubic-spline kernel at the neighbor times its volume m/rho, or
// SolidAngle, the share of the sky the neighbor covers seen from the star.
//
// The base weights are then corrected so that the weighted sum of unit
// vectors from the star to its neighbors vanishes, keeping every weight
// positive. Among all positive weights with that property and the same
// total, the correction picks the one closest to the base weights in
// relative entropy (sum w' log(w'/w)); the answer is an exponential tilt
// w'_j ∝ w_j exp(lambda · n_j), with the 3-vector lambda found by Newton's
// method on a convex function (weights.go has the details). The same
// correction is applied to the radial momenta a scheme asks for, since they
// differ from the weights by per-neighbor factors. When the gas lies in
// one half-space around the star, no positive correction exists: the tilt
// stops at a bounded lambda, and the residual |sum p_j n_j| / sum |p_j| is
// reported (Ledger.MaxIsotropyResidual), never hidden. Whatever net vector
// remains is removed in proportion to the weights, so the kicks always sum
// to zero in the star's frame and momentum is conserved.
//
// # Schemes
//
// A Scheme decides how much of each neighbor's share becomes radial
// momentum and how much heat it keeps: ThermalDump (all heat), Kinetic (a
// fixed kinetic fraction), TerminalMomentum (energy-conserving sweep-up
// while the cooling radius is resolved, switching at the fit's own
// shell-formation or snowplough-onset point to the radiative momentum of
// a published fit — Kim & Ostriker 2015 or Cioffi, McKee & Bertschinger
// 1988 — once it is not, with the post-cooling heat of Thornton et al.
// 1998 and the rest booked as radiated; the star's total is computed from
// the coupled mass and then shared, so it does not depend on the
// weighting, and N supernovae in a step are N remnants). The light
// channels have schemes of their own: RadiationPressure, Photoionization,
// and PhotoelectricHeating, which gives every neighbor the far-ultraviolet
// field G0 it sees (Deposit.FUVField) and the heat dust photoelectrons
// deposit (Bakes & Tielens 1994). KickedWinds is the decoupled-wind subgrid
// variant explicit feedback is compared with (Springel & Hernquist 2003;
// momentum-driven scalings of Oppenheimer & Davé 2006): it launches gas
// drawn at random at the wind speed, paid from the supernova energy, and
// flags it for the host to keep out of hydrodynamic forces
// (FlagHydroDecoupled). Users write their own Scheme and check it with
// package feedbacktest.
//
// # Frames and energy
//
// Momentum is split in the star's frame; the ejecta carry the star's
// velocity into the lab frame. Neighbor j's heat is its energy share less
// its gain of kinetic energy in the star's frame; because the star-frame
// kicks sum to zero, the lab-frame energy deposited equals the released
// energy plus the ejecta's lab-frame kinetic energy, less what is radiated,
// for a moving star in moving gas. If any neighbor's heat would be
// negative (gas already moving outward fast), all the star's kicks are
// scaled down together, which keeps momentum conserved (FlagLimited).
//
// # Records, the Applier and the ledger
//
// Couple writes Records (gas index and ID, star ID, dm, dm per species,
// lab-frame dp, total energy change, heat, flags, kick and heating for the
// host's timestep limiter) and a Ledger: In = Deposited + Radiated +
// Undeposited to round-off, with a star that has no gas around it returned
// undeposited. Records can be applied in place (Applier.Apply, which keeps its
// scratch from step to step) or routed to the rank
// that owns a ghost element first (IDIndex). The Applier sums each element's
// records in a fixed order (gas ID, then star ID, then channel) and sets the
// internal energy so the element's total energy grows by exactly the
// records' energy: the final gas is bitwise the same for any number of
// workers, any order of stars and any number of ranks.
//
// When several stars kick one element in the same direction in one step,
// the element gains more kinetic energy than the deposits assumed
// (|p1 + p2|^2 > |p1|^2 + |p2|^2); the energy those stars booked as radiated
// for the element pays for it first (ApplyReport.Reclaimed), and any rest
// is booked as ApplyReport.Shortfall rather than letting the internal
// energy go negative.
//
// # Errors
//
// Every failure matches one kind with errors.Is: ErrInvalidArgument,
// ErrBadValue, ErrNoNeighbors, ErrUnknownGas, ErrUnknownName, ErrImbalance,
// ErrBusy or ErrInternal. A release that cannot be coupled is not an error
// of the call: it is returned undeposited, booked in the ledger and listed
// in Output.Problems; Output.Err turns the list into an error matching
// ErrUndeposited and the first problem's kind. A panic in any worker
// goroutine (a user's scheme or finder, a fault reading host memory) is
// recovered and returned as ErrInternal with nothing deposited.
//
// # Concurrency
//
// A Coupler runs its stars on Config.Workers goroutines with per-worker
// scratch and allocates nothing per star in steady state. One Coupler
// serves one Couple call at a time; separate Couplers are independent.
package feedback
