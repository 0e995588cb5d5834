// Package hydro is the finite-volume kernel the ejecta solvers share: an
// ideal gas, primitive and conserved states, limited linear reconstruction,
// and interface fluxes from the HLLC approximate Riemann solver, with an
// exact Riemann solver as reference.
//
// Every call works on one interface whose normal is x: states carry the
// normal velocity Vx, two transverse velocities Vy and Vz, and NumScalars
// passive scalars (mass fractions, advected with the flow). A Cartesian
// solver evaluates y- and z-faces by permuting components (Prim.Permute,
// Cons.Unpermute) so that the face normal becomes x, calls the same code,
// and permutes back. Nothing here allocates, and nothing keeps state
// between calls: the functions are safe for concurrent use.
//
// Sources: the HLLC solver follows Toro, Spruce & Speares 1994 (Shock
// Waves 4, 25) as written in Toro 2009 (Riemann Solvers and Numerical
// Methods for Fluid Dynamics, 3rd ed., sect. 10.4, eqs. 10.37–10.39), with
// wave speeds from Einfeldt's estimate (Einfeldt 1988, SIAM J. Numer. Anal.
// 25, 294; Toro 2009 sect. 10.5.1) using Roe averages. The intermediate
// states are written so that two identical states at rest give exactly the
// physical flux (zero mass and energy flux, momentum flux p): a uniform
// medium at rest stays at rest bit for bit. The exact solver follows Toro
// 2009, ch. 4.
package hydro
