// Package cooling holds optically thin radiative cooling and heating of
// interstellar gas: published fits, a user's own table, and the exact
// integration of the cooling over a time step.
//
// # Rates
//
// The net loss of thermal energy per unit volume is
//
//	L = n_H^2 Λ(T) − n_H Γ   (erg cm^-3 s^-1),
//
// with n_H the hydrogen number density, Λ the cooling function
// (erg cm^3 s^-1) and Γ the heating rate per hydrogen atom (erg s^-1).
// A Curve holds Λ as a piecewise power law in T (straight segments in
// log T, log Λ) and a constant Γ.
//
// # Built-in fits
//
// Builtin(zeta) tabulates, at metallicity zeta in solar units:
//
//   - below 1e4 K, the fit of Koyama & Inutsuka 2002 (ApJ 564, L97) in the
//     form corrected by Vázquez-Semadeni et al. 2007 (ApJ 657, 870):
//     Λ/Γ = 1e7 exp(−1.184e5/(T + 1000)) + 1.4e-2 sqrt(T) exp(−92/T) cm^3,
//     Γ = 2e-26 erg s^-1. The first term is hydrogen Lyman-alpha, the second
//     the fine-structure lines of metals; we scale the second by zeta (our
//     own choice: Koyama & Inutsuka fitted solar-neighborhood gas only).
//   - above 1e5 K, collisional-ionization-equilibrium line cooling of the
//     metals, zeta × 1.1e-22 T6^-0.7 (Draine 2011, Physics of the
//     Interstellar and Intergalactic Medium, eq. 34.4, for solar gas between
//     1e5 and 2e7 K; from memory), plus the free–free emission of fully
//     ionized hydrogen and helium (Rybicki & Lightman 1979, Radiative
//     Processes in Astrophysics, eq. 5.15b, with a mean Gaunt factor of 1.2),
//     which dominates above a few 1e7 K.
//   - between 1e4 and 1e5 K, a power law joining the two (our own bridge:
//     neither fit covers the hydrogen ionization range). Below about 0.1
//     solar this bridge misses the hydrogen and helium line peaks that
//     dominate metal-poor gas there; bring a table for such gas.
//
// The tabulation has 200 nodes per decade from 10 K to 1e9 K; beyond the
// last node the last segment continues, below the first there is no
// cooling.
//
// # Tables
//
// ReadTable reads a user's cooling function in a CSV format of our own:
// an optional run of '#' comment lines, a header row naming each column as
// name[unit] with the unit written exactly as here, then one row per
// (metallicity, temperature):
//
//	log10_temperature[K],metallicity[solar],cooling[erg cm^3 s^-1],heating[erg s^-1]
//	1.0,1.0,1.2e-28,2e-26
//	...
//
// The heating column is optional (no heating when absent) and must be the
// same on every row of one metallicity. Rows come in blocks of rising
// metallicity, each block with the same rising temperatures (at least two);
// every value is finite, metallicity and cooling are > 0, heating >= 0.
// Any defect is an error naming the line. Table.Curve(zeta) interpolates
// log Λ and Γ linearly in log zeta between blocks; a zeta outside the
// table's range is an error (ErrOutsideTable), never a clamp.
//
// # Gas
//
// Gas relates temperature, density and specific internal energy:
// e = k_B T / ((γ − 1) μ(T) m_p), with μ the mean mass per particle in
// proton masses. NewGas (and DefaultGas, with the library's solar X, Y, Z:
// yields.SolarHydrogen, yields.SolarHelium, yields.SolarMetals) lets μ follow
// the collisional ionization equilibrium of hydrogen and helium
// (IonizationEquilibrium: the rates of Cen 1992 as listed by Katz, Weinberg
// & Hernquist 1996): particles per proton mass
//
//	1/μ = X (1 + x_H) + (Y/4) (1 + x_He+ + 2 x_He++) + (Z/2) x_H,
//
// from 1/(X + Y/4) = 1.250 in neutral gas to 1/(2X + 3Y/4 + Z/2) = 0.599
// fully ionized, the change happening between 1e4 and 1e5 K (hydrogen half
// ionized at 1.6e4 K). Metals count as fully ionized (Z/2, the usual
// approximation) in proportion to hydrogen's ionized fraction; ionization
// energy is not part of e (common practice in hydrodynamics with cooling
// functions). μ is tabulated at 200 nodes per decade from 1e3 to 1e8 K with
// T/μ a power law in T between nodes (constant μ outside), so T(e) is
// found in closed form, rises with e, and inverts e(T) to round-off.
// NewFixedMeanMassGas keeps μ fixed at every temperature.
//
// # Exact integration
//
// A Cooler applies a Curve to a Gas. Over a step at fixed density the heat
// per unit volume is ρ e = C θ with θ = T/μ(T) and C = ρ k_B / ((γ − 1) m_p)
// fixed, so the energy equation is the autonomous C dθ/dt = −L. Between
// two nodes of the curve or of the gas's mean-mass table both Λ and θ are
// power laws in T, so Λ is a power law in θ, and Cooler.Evolve integrates
// the cooling term exactly (Townsend 2009, ApJS 181, 391): with
// Y(θ) = ∫_θ^{θ_top} dθ'/Λ(θ'), known in closed form per segment, the new
// θ solves Y(θ_new) = Y(θ) + n_H^2 dt / C. The result never crosses the
// floor. The floor is the equilibrium temperature T_eq(n_H), the lowest T
// where n_H Λ(T) = Γ: gas above it cools exactly (heating neglected there,
// where Λ ≫ Γ/n_H except close to T_eq), gas below it heats at the constant
// rate n_H Γ (cooling neglected) and stops at T_eq. Gas at T_eq stays
// there. Near T_eq, where the two terms are comparable, this split relaxes
// to T_eq faster than the net equation would; the equilibrium state itself
// is exact.
package cooling
