package feedback

import (
	"math"

	"github.com/ejecta-dev/ejecta/neighbor"
)

// Weighting chooses how a release is shared among a star's neighbors
// before the isotropy correction.
type Weighting uint8

const (
	// KernelVolume weighs neighbor j by W(r_j, H) V_j: the star's cubic
	// spline kernel (Monaghan & Lattanzio 1985) at the neighbor's distance,
	// with support H = 1.1 times the distance of the farthest neighbor so
	// that every neighbor gets a positive weight, times the neighbor's
	// volume V_j = m_j / rho_j.
	KernelVolume Weighting = iota
	// SolidAngle weighs neighbor j by the fraction of the sky it covers as
	// seen from the star, taking the element as a disc of its
	// volume-equivalent radius R_j = (3 V_j / 4 pi)^(1/3) facing the star:
	// dOmega_j / 4 pi = (1 - 1/sqrt(1 + R_j^2 / r_j^2)) / 2, the solid angle
	// of a disc seen on its axis.
	SolidAngle
)

// String names the weighting.
func (w Weighting) String() string {
	switch w {
	case KernelVolume:
		return "kernel-volume"
	case SolidAngle:
		return "solid-angle"
	}
	return "unknown-weighting"
}

// kernelSupportFactor sets the kernel support H relative to the farthest
// neighbor's distance.
const kernelSupportFactor = 1.1

// baseWeights fills w with the chosen weighting, normalized to sum to one.
func baseWeights(kind Weighting, dist, mass, density, w []float64) {
	switch kind {
	case SolidAngle:
		for j := range w {
			v := mass[j] / density[j]
			r3 := 3 * v / (4 * math.Pi)
			d := dist[j]
			if d == 0 {
				w[j] = 0.5
				continue
			}
			// (R/r)^2 with R = r3^(1/3).
			x := math.Cbrt(r3) / d
			w[j] = 0.5 * (1 - 1/math.Sqrt(1+x*x))
		}
	default:
		rmax := 0.0
		for _, d := range dist {
			rmax = math.Max(rmax, d)
		}
		// The cubic spline of package neighbor, with support h (its
		// normalization cancels in the shares); gas all at the star's
		// position shares by volume.
		h := kernelSupportFactor * rmax
		for j := range w {
			w[j] = mass[j] / density[j]
			if h > 0 {
				w[j] *= neighbor.CubicSplineW(dist[j], h)
			}
		}
	}
	normalize(w)
}

// normalize scales a to sum to one; an all-zero a becomes uniform.
func normalize(a []float64) {
	s := 0.0
	for _, v := range a {
		s += v
	}
	if !(s > 0) || math.IsInf(s, 0) {
		for j := range a {
			a[j] = 1 / float64(len(a))
		}
		return
	}
	inv := 1 / s
	for j := range a {
		a[j] *= inv
	}
}

// netVector is |sum a_j n_j| / sum a_j, the isotropy residual of
// non-negative amounts a along unit directions n.
func netVector(a []float64, n [][3]float64) float64 {
	var sx, sy, sz, s float64
	for j, v := range a {
		sx += v * n[j][0]
		sy += v * n[j][1]
		sz += v * n[j][2]
		s += v
	}
	if s == 0 {
		return 0
	}
	return math.Sqrt(sx*sx+sy*sy+sz*sz) / s
}

// Isotropy correction: minimum relative entropy tilting.
//
// Given positive amounts a_j along unit directions n_j, the correction finds
// the positive amounts a'_j closest to a_j in relative entropy,
// sum a'_j log(a'_j / a_j), with the same total and with sum a'_j n_j = 0.
// The minimizer is an exponential tilt, a'_j = a_j exp(lambda . n_j) / Z,
// where the 3-vector lambda minimizes the convex function
// F(lambda) = log sum_j a_j exp(lambda . n_j); the gradient of F is the
// normalized net vector and its Hessian is the covariance of the n_j under
// a'. Newton's method with a backtracking line search converges in a handful
// of iterations. A positive solution exists exactly when the origin lies
// strictly inside the convex hull of the directions; when all gas lies in a
// closed half-space, F has no minimum, lambda runs off, and the iteration
// stops at |lambda| = maxTilt with the residual it reached, which the
// caller reports. Elements at the star's position (n_j = 0) keep their share
// of the tilt normalization but carry no direction.

const (
	maxTilt       = 40.0
	tiltTolerance = 1e-10
	maxTiltSteps  = 40
	maxBacktracks = 20
	maxTiltStep   = 5.0
	// newtonRegion is the gradient below which full Newton steps are taken.
	newtonRegion = 1e-3
)

// tilt applies the isotropy correction to a in place (keeping its sum) and
// returns the residual |sum a'_j n_j| / sum a'_j it reached. scratch must
// have len(a) elements.
func tilt(a []float64, n [][3]float64, scratch []float64) float64 {
	total := 0.0
	for _, v := range a {
		total += v
	}
	if !(total > 0) || math.IsInf(total, 0) || len(a) < 2 {
		return netVector(a, n)
	}
	var lam [3]float64
	f, g, h := tiltState(a, n, lam, scratch)
	current := true // scratch holds the amounts at lam
	for it := 0; it < maxTiltSteps; it++ {
		gn := math.Sqrt(g[0]*g[0] + g[1]*g[1] + g[2]*g[2])
		if gn < tiltTolerance {
			break
		}
		step, ok := solve3(h, g)
		if !ok {
			// Singular covariance (all directions in a plane or a line):
			// fall back to a gradient step.
			step = g
		}
		// A nearly singular covariance (gas concentrated in one direction)
		// asks for huge steps: no step moves lambda by more than maxTiltStep.
		if sn := math.Sqrt(step[0]*step[0] + step[1]*step[1] + step[2]*step[2]); sn > maxTiltStep {
			for d := 0; d < 3; d++ {
				step[d] *= maxTiltStep / sn
			}
		}
		// Newton direction is -step. Close to the minimum (small gradient)
		// Newton converges quadratically and F changes by less than its
		// round-off, so the full step is taken; farther out, backtrack
		// until F decreases. A step to a non-finite state is never taken.
		var nl [3]float64
		var nf float64
		var ng [3]float64
		var nh [6]float64
		accepted := false
		t := 1.0
		for bt := 0; bt < maxBacktracks; bt++ {
			for d := 0; d < 3; d++ {
				nl[d] = lam[d] - t*step[d]
			}
			nf, ng, nh = tiltState(a, n, nl, scratch)
			current = false
			if finite(nf) && finite(ng[0]+ng[1]+ng[2]) &&
				(gn < newtonRegion || nf <= f-1e-4*t*(g[0]*step[0]+g[1]*step[1]+g[2]*step[2])) {
				accepted, current = true, true
				break
			}
			t *= 0.5
		}
		if !accepted {
			break
		}
		lam, f, g, h = nl, nf, ng, nh
		if lam[0]*lam[0]+lam[1]*lam[1]+lam[2]*lam[2] > maxTilt*maxTilt {
			break
		}
	}
	if !current {
		tiltState(a, n, lam, scratch)
	}
	// Write the tilted amounts, rescaled to the original total.
	s := 0.0
	for j := range a {
		s += scratch[j]
	}
	scale := total / s
	for j := range a {
		a[j] = scratch[j] * scale
	}
	return netVector(a, n)
}

// tiltState evaluates F, its gradient and Hessian (packed xx, xy, xz, yy,
// yz, zz) at lambda, leaving the unnormalized tilted amounts in t.
func tiltState(a []float64, n [][3]float64, lam [3]float64, t []float64) (float64, [3]float64, [6]float64) {
	zero := lam == [3]float64{}
	// Shift the exponent by its maximum for stability.
	emax := 0.0
	if !zero {
		emax = math.Inf(-1)
		for j := range a {
			e := lam[0]*n[j][0] + lam[1]*n[j][1] + lam[2]*n[j][2]
			t[j] = e
			if e > emax {
				emax = e
			}
		}
	}
	var s float64
	var m [3]float64
	var q [6]float64
	for j := range a {
		v := a[j]
		if !zero {
			v *= expNonPositive(t[j] - emax)
		}
		t[j] = v
		s += v
		x, y, z := n[j][0], n[j][1], n[j][2]
		m[0] += v * x
		m[1] += v * y
		m[2] += v * z
		q[0] += v * x * x
		q[1] += v * x * y
		q[2] += v * x * z
		q[3] += v * y * y
		q[4] += v * y * z
		q[5] += v * z * z
	}
	inv := 1 / s
	g := [3]float64{m[0] * inv, m[1] * inv, m[2] * inv}
	h := [6]float64{
		q[0]*inv - g[0]*g[0], q[1]*inv - g[0]*g[1], q[2]*inv - g[0]*g[2],
		q[3]*inv - g[1]*g[1], q[4]*inv - g[1]*g[2], q[5]*inv - g[2]*g[2],
	}
	return math.Log(s) + emax, g, h
}

// expNonPositive is e^x for x <= 0, accurate to about 1e-13 relative and
// several times faster than math.Exp: x = k ln 2 + r with |r| <= ln2/2
// (Cody–Waite reduction), e^r by its Taylor series to degree 11, times 2^k
// set in the exponent bits. The tilt needs no more: it balances the
// weights it actually computes, whatever small error the exponential has.
func expNonPositive(x float64) float64 {
	if x < -700 {
		return 0
	}
	const (
		log2e = 1.4426950408889634
		ln2hi = 6.93147180369123816490e-01
		ln2lo = 1.90821492927058770002e-10
	)
	k := math.Floor(float64(x*log2e) + 0.5)
	r := float64(x-float64(k*ln2hi)) - float64(k*ln2lo)
	p := 1 + r*(1+r*(1.0/2+r*(1.0/6+r*(1.0/24+r*(1.0/120+r*(1.0/720+r*(1.0/5040+r*(1.0/40320+r*(1.0/362880+r*(1.0/3628800+r*(1.0/39916800)))))))))))
	return p * math.Float64frombits(uint64(int64(k)+1023)<<52)
}

// solve3 solves the symmetric 3x3 system h x = b (h packed xx, xy, xz, yy,
// yz, zz) by Cholesky factorisation with a small ridge; ok is false when h
// is not positive definite.
func solve3(h [6]float64, b [3]float64) ([3]float64, bool) {
	ridge := 1e-12 * (h[0] + h[3] + h[5])
	a00, a10, a20 := h[0]+ridge, h[1], h[2]
	a11, a21, a22 := h[3]+ridge, h[4], h[5]+ridge
	if a00 <= 0 {
		return b, false
	}
	l00 := math.Sqrt(a00)
	l10 := a10 / l00
	l20 := a20 / l00
	d1 := a11 - l10*l10
	if d1 <= 0 {
		return b, false
	}
	l11 := math.Sqrt(d1)
	l21 := (a21 - l20*l10) / l11
	d2 := a22 - l20*l20 - l21*l21
	if d2 <= 0 {
		return b, false
	}
	l22 := math.Sqrt(d2)
	y0 := b[0] / l00
	y1 := (b[1] - l10*y0) / l11
	y2 := (b[2] - l20*y0 - l21*y1) / l22
	x2 := y2 / l22
	x1 := (y1 - l21*x2) / l11
	x0 := (y0 - l10*x1 - l20*x2) / l00
	return [3]float64{x0, x1, x2}, true
}
