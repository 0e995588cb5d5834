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
	temp    []float64 // node temperatures in K, rising
	logTemp []float64 // ln temp
	lambda  []float64 // Λ at the nodes, erg cm^3 s^-1
	slope   []float64 // d ln Λ / d ln T on [temp[k], temp[k+1]); the last entry continues past the top node
	// evol[k] = Y(temp[k]) = ∫_{temp[k]}^{temp[top]} dT/Λ(T), in K / (erg cm^3 s^-1);
	// it falls with k and is 0 at the top node.
	evol []float64
	// peak[k] = max(lambda[0..k]): the lowest node reaching a value is a
	// binary search away.
	peak    []float64
	heating float64 // Γ in erg/s per H
}

// NewCurve builds a curve through nodes (tempK[k], lambda[k]) — temperatures
// in K rising strictly, cooling in erg cm^3 s^-1 finite and > 0, at least
// two nodes — with heating rate Γ per hydrogen atom in erg s^-1 (finite,
// >= 0). The slices are copied.
func NewCurve(tempK, lambda []float64, heating float64) (*Curve, error) {
	n := len(tempK)
	if n < 2 || len(lambda) != n {
		return nil, fmt.Errorf("cooling: curve: %d temperatures and %d cooling values, want the same number >= 2: %w", n, len(lambda), ErrInput)
	}
	if !(heating >= 0) || math.IsInf(heating, 0) {
		return nil, fmt.Errorf("cooling: curve: heating %v erg/s, want finite >= 0: %w", heating, ErrInput)
	}
	c := &Curve{
		temp:    append([]float64(nil), tempK...),
		logTemp: make([]float64, n),
		lambda:  append([]float64(nil), lambda...),
		slope:   make([]float64, n),
		evol:    make([]float64, n),
		peak:    make([]float64, n),
		heating: heating,
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
		c.logTemp[k] = math.Log(t)
	}
	c.peak[0] = c.lambda[0]
	for k := 1; k < n; k++ {
		c.peak[k] = math.Max(c.peak[k-1], c.lambda[k])
	}
	for k := 0; k < n-1; k++ {
		c.slope[k] = (math.Log(c.lambda[k+1]) - math.Log(c.lambda[k])) / (c.logTemp[k+1] - c.logTemp[k])
	}
	c.slope[n-1] = c.slope[n-2]
	for k := n - 2; k >= 0; k-- {
		c.evol[k] = c.evol[k+1] + c.segmentIntegral(k, c.temp[k], c.temp[k+1])
	}
	return c, nil
}

// Heating is Γ, the heating rate per hydrogen atom in erg s^-1.
func (c *Curve) Heating() float64 { return c.heating }

// MinTemperature is the lowest node temperature in K; below it Λ = 0.
func (c *Curve) MinTemperature() float64 { return c.temp[0] }

// MaxTemperature is the highest node temperature in K; above it the last
// segment's power law continues.
func (c *Curve) MaxTemperature() float64 { return c.temp[len(c.temp)-1] }

// Nodes returns copies of the node temperatures (K) and cooling values
// (erg cm^3 s^-1).
func (c *Curve) Nodes() (tempK, lambda []float64) {
	return append([]float64(nil), c.temp...), append([]float64(nil), c.lambda...)
}

// segment is the index k of the segment holding T: temp[k] <= T < temp[k+1],
// or the last node for T at or above it. T must be >= temp[0].
func (c *Curve) segment(t float64) int {
	n := len(c.temp)
	if t >= c.temp[n-1] {
		return n - 1
	}
	// First node above t, minus one.
	return sort.SearchFloat64s(c.temp, math.Nextafter(t, math.Inf(1))) - 1
}

// Lambda is Λ(T) in erg cm^3 s^-1: zero below the first node.
func (c *Curve) Lambda(t float64) float64 {
	if !(t >= c.temp[0]) {
		return 0
	}
	k := c.segment(t)
	return c.lambda[k] * math.Exp(c.slope[k]*(math.Log(t)-c.logTemp[k]))
}

// NetRate is n_H^2 Λ(T) − n_H Γ in erg cm^-3 s^-1 for hydrogen density nH
// (cm^-3): positive where the gas cools.
func (c *Curve) NetRate(nH, t float64) float64 {
	return nH*nH*c.Lambda(t) - nH*c.heating
}

// segmentIntegral is ∫_a^b dT/Λ(T) on segment k (a, b inside it).
func (c *Curve) segmentIntegral(k int, a, b float64) float64 {
	tk, s := c.temp[k], c.slope[k]
	// Λ = Λ_k x^s with x = T/T_k; ∫ dT/Λ = (T_k/Λ_k) ∫ x^-s dx.
	xa, xb := a/tk, b/tk
	if math.Abs(1-s) < 1e-12 {
		return tk / c.lambda[k] * math.Log(xb/xa)
	}
	return tk / c.lambda[k] * (math.Pow(xb, 1-s) - math.Pow(xa, 1-s)) / (1 - s)
}

// evolution is Y(T) = ∫_T^{T_top} dT'/Λ(T') for T >= temp[0]; negative above
// the top node.
func (c *Curve) evolution(t float64) float64 {
	k := c.segment(t)
	return c.evol[k] - c.segmentIntegral(k, c.temp[k], t)
}

// inverseEvolution is the temperature T >= temp[0] with Y(T) = y, for
// y <= evol[0].
func (c *Curve) inverseEvolution(y float64) float64 {
	n := len(c.temp)
	// Segment k with evol[k+1] <= y <= evol[k]; evol falls with k.
	var k int
	if y <= 0 {
		k = n - 1
	} else {
		k = sort.Search(n, func(i int) bool { return c.evol[i] < y }) - 1
		if k < 0 {
			return c.temp[0]
		}
	}
	tk, s := c.temp[k], c.slope[k]
	// Y(T) = evol[k] − (T_k/Λ_k) (x^{1−s} − 1)/(1 − s), x = T/T_k.
	d := (c.evol[k] - y) * c.lambda[k] / tk
	var x float64
	if math.Abs(1-s) < 1e-12 {
		x = math.Exp(d)
	} else {
		u := 1 + (1-s)*d
		if !(u > 0) {
			// Past the end of a segment whose power law never reaches y
			// (only possible above the top node with slope > 1): the gas
			// cools from infinity in finite time; stay at the start.
			return math.Inf(1)
		}
		x = math.Pow(u, 1/(1-s))
	}
	t := tk * x
	// Round-off must not move T out of its segment.
	if k+1 < n && t > c.temp[k+1] {
		t = c.temp[k+1]
	}
	if t < tk {
		t = tk
	}
	return t
}

// EquilibriumTemperature is the lowest temperature in K where heating
// balances cooling at hydrogen density nH (cm^-3), n_H Λ(T) = Γ: the floor
// Evolve never crosses. Without heating it is the lowest node temperature;
// where heating beats cooling at every node it is +Inf.
func (c *Curve) EquilibriumTemperature(nH float64) float64 {
	if c.heating == 0 || !(nH > 0) {
		return c.temp[0]
	}
	target := c.heating / nH // Λ(T_eq)
	if c.lambda[0] >= target {
		return c.temp[0]
	}
	n := len(c.temp)
	// The first node reaching the target; the root lies in the segment before it.
	if k := sort.SearchFloat64s(c.peak, target); k < n {
		s := c.slope[k-1]
		t := c.temp[k-1] * math.Exp(math.Log(target/c.lambda[k-1])/s)
		return math.Min(math.Max(t, c.temp[k-1]), c.temp[k])
	}
	if s := c.slope[n-1]; s > 0 {
		return c.temp[n-1] * math.Exp(math.Log(target/c.lambda[n-1])/s)
	}
	return math.Inf(1)
}

// equilibriumTolerance is the relative distance from the equilibrium
// temperature within which gas counts as in equilibrium and is left alone:
// round-off in converting densities and energies between unit systems must
// not make gas at rest cool or heat.
const equilibriumTolerance = 1e-12

// Evolve advances the temperature t (K) of gas at fixed hydrogen density nH
// (cm^-3) over dt seconds, with heatCapacity = n k_B / (γ − 1) the heat
// capacity per unit volume in erg K^-1 cm^-3 (Gas.HeatCapacity). Above the
// equilibrium temperature teq = EquilibriumTemperature(nH) the cooling is
// integrated exactly (Townsend 2009) and stops at teq; below it, the gas
// heats at n_H Γ and stops at teq. The energy lost per unit volume is
// heatCapacity × (t − tNew) (negative when heated). Pass teq from a
// previous call at the same density to skip its search, or a NaN to have it
// computed. Gas within 1e-12 (relative) of teq is returned unchanged.
func (c *Curve) Evolve(nH, t, dt, heatCapacity, teq float64) (tNew float64) {
	if !(dt > 0) || !(nH > 0) || !(heatCapacity > 0) {
		return t
	}
	if math.IsNaN(teq) {
		teq = c.EquilibriumTemperature(nH)
	}
	if math.Abs(t-teq) <= equilibriumTolerance*teq {
		return t // at equilibrium up to round-off in the density or temperature
	}
	switch {
	case t > teq:
		if t < c.temp[0] {
			return t // below the table: no cooling
		}
		y := c.evolution(t) + nH*nH*dt/heatCapacity
		if y >= c.evol[0] {
			return math.Max(teq, c.temp[0])
		}
		return math.Max(c.inverseEvolution(y), teq)
	case t < teq:
		return math.Min(t+nH*c.heating*dt/heatCapacity, teq)
	}
	return t
}

// CoolingTime is the time in s for gas at hydrogen density nH and
// temperature t to lose its thermal energy at the current net rate,
// heatCapacity × t / |L|; +Inf where L = 0.
func (c *Curve) CoolingTime(nH, t, heatCapacity float64) float64 {
	l := math.Abs(c.NetRate(nH, t))
	if l == 0 {
		return math.Inf(1)
	}
	return heatCapacity * t / l
}
