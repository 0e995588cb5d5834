package cooling

import (
	"math"
	"sort"
)

// powerLaw is a positive function f(x) through nodes (x[k], f[k]) with x
// rising: a power law between nodes, zero below the first node, and above
// the last node a power law of slope top. It tabulates the evolution
// integral of Townsend 2009 (ApJS 181, 391),
//
//	Y(x) = ∫_x^{x_last} dx'/f(x'),
//
// in closed form per segment, so that dx/dt = −r f(x) is integrated
// exactly: Y(x(t)) = Y(x(0)) + r t. It is immutable.
type powerLaw struct {
	x     []float64 // nodes, rising
	logX  []float64 // ln x
	f     []float64 // f at the nodes, > 0
	slope []float64 // d ln f / d ln x on [x[k], x[k+1]); the last entry continues past the top node
	// evol[k] = Y(x[k]); it falls with k and is 0 at the top node.
	evol []float64
}

// newPowerLaw builds the law through the nodes (copied; at least two, x
// rising and positive, f positive: the caller checks) with slope top past
// the last node.
func newPowerLaw(x, f []float64, top float64) powerLaw {
	n := len(x)
	p := powerLaw{
		x:     append([]float64(nil), x...),
		logX:  make([]float64, n),
		f:     append([]float64(nil), f...),
		slope: make([]float64, n),
		evol:  make([]float64, n),
	}
	for k := range n {
		p.logX[k] = math.Log(x[k])
	}
	for k := 0; k < n-1; k++ {
		p.slope[k] = (math.Log(p.f[k+1]) - math.Log(p.f[k])) / (p.logX[k+1] - p.logX[k])
	}
	p.slope[n-1] = top
	for k := n - 2; k >= 0; k-- {
		p.evol[k] = p.evol[k+1] + p.segmentIntegral(k, p.x[k], p.x[k+1])
	}
	return p
}

// segment is the index k of the segment holding x: x[k] <= x < x[k+1], or
// the last node for x at or above it. x must be >= x[0].
func (p *powerLaw) segment(x float64) int {
	n := len(p.x)
	if x >= p.x[n-1] {
		return n - 1
	}
	// First node above x, minus one.
	return sort.SearchFloat64s(p.x, math.Nextafter(x, math.Inf(1))) - 1
}

// value is f(x): zero below the first node.
func (p *powerLaw) value(x float64) float64 {
	if !(x >= p.x[0]) {
		return 0
	}
	k := p.segment(x)
	return p.f[k] * math.Exp(p.slope[k]*(math.Log(x)-p.logX[k]))
}

// segmentIntegral is ∫_a^b dx/f(x) on segment k (a, b inside it).
func (p *powerLaw) segmentIntegral(k int, a, b float64) float64 {
	xk, s := p.x[k], p.slope[k]
	// f = f_k u^s with u = x/x_k; ∫ dx/f = (x_k/f_k) ∫ u^-s du.
	ua, ub := a/xk, b/xk
	if math.Abs(1-s) < 1e-12 {
		return xk / p.f[k] * math.Log(ub/ua)
	}
	return xk / p.f[k] * (math.Pow(ub, 1-s) - math.Pow(ua, 1-s)) / (1 - s)
}

// evolution is Y(x) for x >= x[0]; negative above the top node.
func (p *powerLaw) evolution(x float64) float64 {
	k := p.segment(x)
	return p.evol[k] - p.segmentIntegral(k, p.x[k], x)
}

// inverseEvolution is the x >= x[0] with Y(x) = y, for y <= evol[0]; +Inf
// where the law past the top node never reaches y.
func (p *powerLaw) inverseEvolution(y float64) float64 {
	n := len(p.x)
	// Segment k with evol[k+1] <= y <= evol[k]; evol falls with k.
	var k int
	if y <= 0 {
		k = n - 1
	} else {
		k = sort.Search(n, func(i int) bool { return p.evol[i] < y }) - 1
		if k < 0 {
			return p.x[0]
		}
	}
	xk, s := p.x[k], p.slope[k]
	// Y(x) = evol[k] − (x_k/f_k) (u^{1−s} − 1)/(1 − s), u = x/x_k.
	d := (p.evol[k] - y) * p.f[k] / xk
	var u float64
	if math.Abs(1-s) < 1e-12 {
		u = math.Exp(d)
	} else {
		v := 1 + (1-s)*d
		if !(v > 0) {
			// Past the end of a segment whose power law never reaches y
			// (only possible above the top node with slope > 1): the gas
			// cools from infinity in finite time.
			return math.Inf(1)
		}
		u = math.Pow(v, 1/(1-s))
	}
	x := xk * u
	// Round-off must not move x out of its segment.
	if k+1 < n && x > p.x[k+1] {
		x = p.x[k+1]
	}
	if x < xk {
		x = xk
	}
	return x
}

// equilibriumTolerance is the relative distance from the equilibrium
// within which gas counts as in equilibrium and is left alone: round-off in
// converting densities and energies between unit systems must not make gas
// at rest cool or heat.
const equilibriumTolerance = 1e-12

// relax advances x under dx/dt = −rate f(x) + heat toward the equilibrium
// xeq over dt, the way Cooler.Evolve describes: above xeq the cooling alone,
// exactly, stopping at xeq; below it the heating alone, stopping at xeq;
// within equilibriumTolerance of xeq nothing.
func (p *powerLaw) relax(x, dt, rate, heat, xeq float64) float64 {
	if math.Abs(x-xeq) <= equilibriumTolerance*xeq {
		return x
	}
	switch {
	case x > xeq:
		if x < p.x[0] {
			return x // below the table: no cooling
		}
		y := p.evolution(x) + rate*dt
		if y >= p.evol[0] {
			return math.Max(xeq, p.x[0])
		}
		return math.Max(p.inverseEvolution(y), xeq)
	case x < xeq:
		return math.Min(x+heat*dt, xeq)
	}
	return x
}
