package cooling

import (
	"errors"
	"fmt"
	"math"
	"sort"
)

// ErrInput marks invalid arguments: a curve with non-increasing or
// non-positive temperatures, a non-finite or non-positive cooling value, a
// negative heating rate, a bad gas description.
var ErrInput = errors.New("invalid input")

// Curve is an optically thin cooling function Λ(T), a piecewise power law
// through its nodes, and a constant heating rate Γ per hydrogen atom. It is
// immutable and safe for concurrent use.
type Curve struct {
	law powerLaw // Λ(T): nodes in K, values in erg cm^3 s^-1
	// peak[k] = max(Λ at nodes 0..k): the lowest node reaching a value is a
	// binary search away.
	peak    []float64
	heating float64 // Γ in erg/s per H
}

// NewCurve builds a curve through nodes (tempK[k], lambda[k]) — temperatures
// in K rising strictly, cooling in erg cm^3 s^-1 finite and > 0, at least
// two nodes — with heating rate Γ per hydrogen atom in erg s^-1 (finite,
// >= 0). The slices are copied. Past the last node the last segment's power
// law continues.
func NewCurve(tempK, lambda []float64, heating float64) (*Curve, error) {
	n := len(tempK)
	if n < 2 || len(lambda) != n {
		return nil, fmt.Errorf("cooling: curve: %d temperatures and %d cooling values, want the same number >= 2: %w", n, len(lambda), ErrInput)
	}
	if !(heating >= 0) || math.IsInf(heating, 0) {
		return nil, fmt.Errorf("cooling: curve: heating %v erg/s, want finite >= 0: %w", heating, ErrInput)
	}
	for k := range n {
		t, l := tempK[k], lambda[k]
		if !(t > 0) || math.IsInf(t, 0) {
			return nil, fmt.Errorf("cooling: curve: node %d: temperature %v K, want finite > 0: %w", k, t, ErrInput)
		}
		if k > 0 && !(t > tempK[k-1]) {
			return nil, fmt.Errorf("cooling: curve: node %d: temperature %v K does not rise after %v K: %w", k, t, tempK[k-1], ErrInput)
		}
		if !(l > 0) || math.IsInf(l, 0) {
			return nil, fmt.Errorf("cooling: curve: node %d: cooling %v erg cm^3/s, want finite > 0: %w", k, l, ErrInput)
		}
	}
	top := (math.Log(lambda[n-1]) - math.Log(lambda[n-2])) / (math.Log(tempK[n-1]) - math.Log(tempK[n-2]))
	c := &Curve{law: newPowerLaw(tempK, lambda, top), peak: make([]float64, n), heating: heating}
	c.peak[0] = lambda[0]
	for k := 1; k < n; k++ {
		c.peak[k] = math.Max(c.peak[k-1], lambda[k])
	}
	return c, nil
}

// Heating is Γ, the heating rate per hydrogen atom in erg s^-1.
func (c *Curve) Heating() float64 { return c.heating }

// MinTemperature is the lowest node temperature in K; below it Λ = 0.
func (c *Curve) MinTemperature() float64 { return c.law.x[0] }

// MaxTemperature is the highest node temperature in K; above it the last
// segment's power law continues.
func (c *Curve) MaxTemperature() float64 { return c.law.x[len(c.law.x)-1] }

// Nodes returns copies of the node temperatures (K) and cooling values
// (erg cm^3 s^-1).
func (c *Curve) Nodes() (tempK, lambda []float64) {
	return append([]float64(nil), c.law.x...), append([]float64(nil), c.law.f...)
}

// Lambda is Λ(T) in erg cm^3 s^-1: zero below the first node.
func (c *Curve) Lambda(t float64) float64 { return c.law.value(t) }

// NetRate is n_H^2 Λ(T) − n_H Γ in erg cm^-3 s^-1 for hydrogen density nH
// (cm^-3): positive where the gas cools.
func (c *Curve) NetRate(nH, t float64) float64 {
	return nH*nH*c.Lambda(t) - nH*c.heating
}

// EquilibriumTemperature is the lowest temperature in K where heating
// balances cooling at hydrogen density nH (cm^-3), n_H Λ(T) = Γ: the floor
// Cooler.Evolve never crosses. Without heating it is the lowest node temperature;
// where heating beats cooling at every node it is +Inf.
func (c *Curve) EquilibriumTemperature(nH float64) float64 {
	if c.heating == 0 || !(nH > 0) {
		return c.law.x[0]
	}
	target := c.heating / nH // Λ(T_eq)
	if c.law.f[0] >= target {
		return c.law.x[0]
	}
	n := len(c.law.x)
	// The first node reaching the target; the root lies in the segment before it.
	if k := sort.SearchFloat64s(c.peak, target); k < n {
		s := c.law.slope[k-1]
		t := c.law.x[k-1] * math.Exp(math.Log(target/c.law.f[k-1])/s)
		return math.Min(math.Max(t, c.law.x[k-1]), c.law.x[k])
	}
	if s := c.law.slope[n-1]; s > 0 {
		return c.law.x[n-1] * math.Exp(math.Log(target/c.law.f[n-1])/s)
	}
	return math.Inf(1)
}
