package yields

import (
	"math"
	"sync"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/stat/distuv"
)

// The n-th draw depends only on (seed, star, step, stream, n): drawing the
// same keys from many goroutines in any order gives the serial result.
func TestCounterRNGIndependentOfCallOrder(t *testing.T) {
	const stars, draws = 200, 16
	serial := make([][draws]uint64, stars)
	for s := 0; s < stars; s++ {
		r := NewCounterRNG(42, uint64(s), 7, 1)
		for i := range serial[s] {
			serial[s][i] = r.Uint64()
		}
	}
	parallel := make([][draws]uint64, stars)
	var wg sync.WaitGroup
	for w := 0; w < 8; w++ {
		wg.Add(1)
		go func(w int) {
			defer wg.Done()
			// Each worker takes stars in its own order, from the back.
			for s := stars - 1 - w; s >= 0; s -= 8 {
				r := NewCounterRNG(42, uint64(s), 7, 1)
				for i := range parallel[s] {
					parallel[s][i] = r.Uint64()
				}
			}
		}(w)
	}
	wg.Wait()
	assert.Equal(t, serial, parallel)

	// Changing any part of the key changes the sequence.
	base := NewCounterRNG(1, 2, 3, 4)
	for _, other := range []CounterRNG{NewCounterRNG(0, 2, 3, 4), NewCounterRNG(1, 0, 3, 4), NewCounterRNG(1, 2, 0, 4), NewCounterRNG(1, 2, 3, 0)} {
		b, o := base, other
		assert.NotEqual(t, b.Uint64(), o.Uint64())
	}
	// A copy replays.
	a := NewCounterRNG(9, 9, 9, 9)
	a.Uint64()
	b := a
	assert.Equal(t, a.Uint64(), b.Uint64())
	assert.Equal(t, uint64(2), a.Counter())
}

// Uniformity of Float64: chi-square over 100 equal bins, compared with the
// 0.9999 quantile of the chi-square law with 99 degrees of freedom (gonum
// distuv), so a correct generator fails once in 1e4 keys; the key is fixed,
// so the test is deterministic.
func TestFloat64Uniform(t *testing.T) {
	const n, bins = 200000, 100
	var count [bins]float64
	r := NewCounterRNG(2024, 1, 0, 0)
	for i := 0; i < n; i++ {
		u := r.Float64()
		require.True(t, u >= 0 && u < 1)
		count[int(u*bins)]++
	}
	var chi2 float64
	for _, c := range count {
		d := c - n/bins
		chi2 += d * d / (n / bins)
	}
	limit := distuv.ChiSquared{K: bins - 1}.Quantile(0.9999)
	assert.Less(t, chi2, limit)
}

// Poisson draws: sample mean and variance within 5 standard errors of the
// mean μ (standard error √(μ/N) for the mean and √((μ+2μ²)/N) for the
// variance, the Poisson fourth central moment being μ+3μ²), for means on
// both sides of the switch from inversion to PTRS.
func TestPoissonMeanVariance(t *testing.T) {
	const n = 20000
	for _, mu := range []float64{0.01, 0.3, 1, 4.5, 9.99, 10, 31.7, 1000, 2.5e5} {
		r := NewCounterRNG(7, uint64(mu*1000), 3, 2)
		var s, s2 float64
		for i := 0; i < n; i++ {
			k := float64(Poisson(&r, mu))
			require.GreaterOrEqual(t, k, 0.0)
			s += k
			s2 += k * k
		}
		mean := s / n
		variance := s2/n - mean*mean
		assert.InDelta(t, mu, mean, 5*math.Sqrt(mu/n), "mean for μ=%g", mu)
		assert.InDelta(t, mu, variance, 5*math.Sqrt((mu+2*mu*mu)/n), "variance for μ=%g", mu)
	}
}

// Poisson shape: chi-square of the counts against the Poisson probabilities
// (gonum distuv.Poisson), pooling the tails so every bin expects at least
// 20, against the 0.9999 quantile.
func TestPoissonChiSquare(t *testing.T) {
	const n = 100000
	for _, mu := range []float64{3, 50} {
		r := NewCounterRNG(11, 0, 0, uint64(mu))
		counts := map[int]float64{}
		for i := 0; i < n; i++ {
			counts[Poisson(&r, mu)]++
		}
		pd := distuv.Poisson{Lambda: mu}
		lo, hi := 0, int(mu)
		for pd.CDF(float64(lo))*n < 20 {
			lo++
		}
		for (1-pd.CDF(float64(hi)))*n >= 20 {
			hi++
		}
		var chi2 float64
		var obsLo, obsHi float64
		for k, c := range counts {
			if k <= lo {
				obsLo += c
			} else if k > hi {
				obsHi += c
			}
		}
		add := func(obs, p float64) {
			e := p * n
			chi2 += (obs - e) * (obs - e) / e
		}
		add(obsLo, pd.CDF(float64(lo)))
		for k := lo + 1; k <= hi; k++ {
			add(counts[k], pd.Prob(float64(k)))
		}
		add(obsHi, 1-pd.CDF(float64(hi)))
		dof := float64(hi - lo + 1)
		assert.Less(t, chi2, distuv.ChiSquared{K: dof}.Quantile(0.9999), "μ=%g", mu)
	}
}

func TestPoissonEdgeMeans(t *testing.T) {
	r := NewCounterRNG(1, 1, 1, 1)
	assert.Zero(t, Poisson(&r, 0))
	assert.Zero(t, Poisson(&r, -3))
	assert.Zero(t, Poisson(&r, math.NaN()))
	k := Poisson(&r, math.Inf(1))
	assert.InEpsilon(t, float64(maxPoissonMean), float64(k), 1e-6)
}

func BenchmarkPoisson(b *testing.B) {
	for _, mu := range []float64{0.05, 5, 500} {
		b.Run("mean="+distName(mu), func(b *testing.B) {
			r := NewCounterRNG(1, 2, 3, 4)
			var s int
			for b.Loop() {
				s += Poisson(&r, mu)
			}
			_ = s
		})
	}
}

func distName(mu float64) string {
	switch {
	case mu < 1:
		return "small"
	case mu < 10:
		return "inversion"
	}
	return "ptrs"
}
