package hydro

import (
	"errors"
	"fmt"
	"math"
)

// NumScalars is the number of passive scalars carried by every state.
const NumScalars = 2

// ErrState marks a state with non-positive or non-finite density or
// pressure.
var ErrState = errors.New("unphysical state")

// Prim is a primitive state: density, velocity (Vx normal to the interface
// being evaluated, Vy and Vz transverse), pressure, and passive scalars as
// mass fractions.
type Prim struct {
	Rho, Vx, Vy, Vz, P float64
	Scalar             [NumScalars]float64
}

// Cons is a conserved state per unit volume — mass, momentum and total
// energy density, and the scalar densities ρX — or a flux of those.
type Cons struct {
	Mass, MomX, MomY, MomZ, Energy float64
	Scalar                         [NumScalars]float64
}

// Add returns u + s v, component by component.
func (u Cons) Add(s float64, v Cons) Cons {
	u.Mass += s * v.Mass
	u.MomX += s * v.MomX
	u.MomY += s * v.MomY
	u.MomZ += s * v.MomZ
	u.Energy += s * v.Energy
	for i := range u.Scalar {
		u.Scalar[i] += s * v.Scalar[i]
	}
	return u
}

// Scale returns s u.
func (u Cons) Scale(s float64) Cons {
	u.Mass *= s
	u.MomX *= s
	u.MomY *= s
	u.MomZ *= s
	u.Energy *= s
	for i := range u.Scalar {
		u.Scalar[i] *= s
	}
	return u
}

// Axis names a Cartesian direction.
type Axis uint8

// The three axes.
const (
	X Axis = iota
	Y
	Z
)

// permute reorders a vector's components so that axis a's comes first and
// the other two follow in cyclic order: for Y (y, z, x), for Z (z, x, y).
func permute(a Axis, x, y, z float64) (float64, float64, float64) {
	switch a {
	case Y:
		return y, z, x
	case Z:
		return z, x, y
	}
	return x, y, z
}

// unpermute undoes permute.
func unpermute(a Axis, x, y, z float64) (float64, float64, float64) {
	switch a {
	case Y:
		return z, x, y
	case Z:
		return y, z, x
	}
	return x, y, z
}

// Permute returns w with axis a's velocity as Vx and the other two, in
// cyclic order, as Vy and Vz: for Y (vy, vz, vx), for Z (vz, vx, vy).
func (w Prim) Permute(a Axis) Prim {
	w.Vx, w.Vy, w.Vz = permute(a, w.Vx, w.Vy, w.Vz)
	return w
}

// Permute on a conserved state, like Prim.Permute.
func (u Cons) Permute(a Axis) Cons {
	u.MomX, u.MomY, u.MomZ = permute(a, u.MomX, u.MomY, u.MomZ)
	return u
}

// Unpermute undoes Permute on a conserved state or flux: the x-normal
// components of a flux through an a-face go back to their Cartesian slots.
func (u Cons) Unpermute(a Axis) Cons {
	u.MomX, u.MomY, u.MomZ = unpermute(a, u.MomX, u.MomY, u.MomZ)
	return u
}

// IdealGas is a gamma-law equation of state, p = (γ − 1) ρ e.
type IdealGas struct {
	// Gamma is the adiabatic index γ > 1.
	Gamma float64
}

// Monatomic is the ideal gas with γ = 5/3.
func Monatomic() IdealGas { return IdealGas{Gamma: 5.0 / 3} }

// Validate reports an error unless 1 < Gamma < Inf.
func (g IdealGas) Validate() error {
	if !(g.Gamma > 1) || math.IsInf(g.Gamma, 0) {
		return fmt.Errorf("hydro: adiabatic index %v, want > 1: %w", g.Gamma, ErrState)
	}
	return nil
}

// Cons converts a primitive state to conserved variables.
func (g IdealGas) Cons(w Prim) Cons {
	u := Cons{
		Mass:   w.Rho,
		MomX:   w.Rho * w.Vx,
		MomY:   w.Rho * w.Vy,
		MomZ:   w.Rho * w.Vz,
		Energy: w.P/(g.Gamma-1) + 0.5*w.Rho*(w.Vx*w.Vx+w.Vy*w.Vy+w.Vz*w.Vz),
	}
	for i, s := range w.Scalar {
		u.Scalar[i] = w.Rho * s
	}
	return u
}

// Prim converts conserved variables to a primitive state. It does not
// check the result: see CheckPrim.
func (g IdealGas) Prim(u Cons) Prim {
	inv := 1 / u.Mass
	w := Prim{Rho: u.Mass, Vx: u.MomX * inv, Vy: u.MomY * inv, Vz: u.MomZ * inv}
	w.P = (g.Gamma - 1) * (u.Energy - 0.5*(u.MomX*w.Vx+u.MomY*w.Vy+u.MomZ*w.Vz))
	for i, s := range u.Scalar {
		w.Scalar[i] = s * inv
	}
	return w
}

// CheckPrim reports ErrState unless density and pressure are finite and
// positive and the velocities finite.
func CheckPrim(w Prim) error {
	if !(w.Rho > 0) || !(w.P > 0) || math.IsInf(w.Rho, 0) || math.IsInf(w.P, 0) ||
		math.IsNaN(w.Vx+w.Vy+w.Vz) || math.IsInf(w.Vx, 0) || math.IsInf(w.Vy, 0) || math.IsInf(w.Vz, 0) {
		return fmt.Errorf("hydro: state %+v: %w", w, ErrState)
	}
	return nil
}

// SoundSpeed is sqrt(γ p / ρ).
func (g IdealGas) SoundSpeed(w Prim) float64 { return math.Sqrt(g.Gamma * w.P / w.Rho) }

// InternalEnergy is the specific internal energy p / ((γ − 1) ρ).
func (g IdealGas) InternalEnergy(w Prim) float64 { return w.P / ((g.Gamma - 1) * w.Rho) }

// Flux is the physical flux of w through an x-normal face.
func (g IdealGas) Flux(w Prim) Cons {
	return physicalFlux(w, g.Cons(w).Energy)
}
