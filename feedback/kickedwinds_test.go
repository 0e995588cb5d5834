package feedback_test

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/feedback/feedbacktest"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// windGas is a ball of n elements of unequal masses (50-150 Msun) at
// 1 cm^-3, with random velocities of rms vel km/s per axis, in pc, Msun,
// km/s.
func windGas(seed uint64, n int, vel float64) *audit.GasArrays {
	u := units.ParsecSolarMassKms()
	g := uniformGas(seed, n, 100, 1, u)
	rng := rand.New(rand.NewPCG(seed, 77))
	for i := range g.Mass {
		g.Mass[i] *= 0.5 + rng.Float64()
		for a := 0; a < 3; a++ {
			g.Vel[a][i] = vel * rng.NormFloat64()
		}
	}
	return g
}

// windStar releases one supernova and newly formed stars from a star
// moving at v (km/s) at pos.
func windStar(id int64, pos, v [3]float64, formed float64) feedback.Source {
	src := supernova(id, units.ParsecSolarMassKms())
	src.Star.Pos, src.Star.Vel = pos, v
	src.NewStellarMass = formed
	return src
}

// kickedMass sums, per star, the gas mass of the elements flagged as
// launched into the wind.
func kickedMass(g *audit.GasArrays, recs []feedback.Record) map[int64]float64 {
	out := map[int64]float64{}
	for _, r := range recs {
		if r.Flags&feedback.FlagHydroDecoupled != 0 {
			out[r.StarID] += g.Mass[r.GasIndex]
		}
	}
	return out
}

func TestKickedWindsExpectedMass(t *testing.T) {
	// The expected kicked mass is eta m_* (Springel & Hernquist 2003,
	// MNRAS 339, 289: the wind's mass rate is eta times the star
	// formation rate). Each of N stars draws independently (keyed by its
	// ID); the mean kicked mass must lie within 4 standard errors of
	// eta m_*, the variance of one star's kicked mass being
	// sum_j m_j^2 p (1 - p).
	u := units.ParsecSolarMassKms()
	g := windGas(3, 200, 0)
	const k, nStars = 40, 3000
	s := feedback.DefaultKickedWinds()
	s.Basis = feedback.LoadPerFormedMass
	s.Seed = 11
	const formed = 250.0 // eta m_* = 500 Msun of about 4000 Msun around each star
	var srcs []feedback.Source
	for i := 0; i < nStars; i++ {
		srcs = append(srcs, windStar(int64(10+i), [3]float64{0.1, 0.2, -0.1}, [3]float64{}, formed))
	}
	out, _ := coupleOnceNoApply(t, g, feedback.Config{Units: u, Scheme: s, Neighbors: k}, srcs)
	// The neighborhood is the same for every star.
	total, sum2 := 0.0, 0.0
	for _, r := range out.Records[:k] {
		m := g.Mass[r.GasIndex]
		total += m
		sum2 += m * m
	}
	p := s.Loading * formed / total
	require.Less(t, p, 1.0)
	mean := 0.0
	for _, m := range kickedMass(g, out.Records) {
		mean += m
	}
	mean /= nStars
	se := math.Sqrt(sum2 * p * (1 - p) / nStars)
	assert.InDelta(t, s.Loading*formed, mean, 4*se, "mean kicked mass %g, want %g +- %g", mean, s.Loading*formed, se)

	// Per supernova energy: m_* = E / 1e49 erg per Msun = 100 Msun, so
	// eta m_* = 200 Msun on average.
	s.Basis = feedback.LoadPerSupernovaEnergy
	out, _ = coupleOnceNoApply(t, g, feedback.Config{Units: u, Scheme: s, Neighbors: k}, srcs)
	p = s.Loading * 100 / total
	mean = 0
	for _, m := range kickedMass(g, out.Records) {
		mean += m
	}
	mean /= nStars
	se = math.Sqrt(sum2 * p * (1 - p) / nStars)
	assert.InDelta(t, s.Loading*100, mean, 4*se)
}

func TestKickedWindsKickSpeedIsExactlyTheWindSpeed(t *testing.T) {
	// Every kicked element's velocity changes by exactly v_w relative to
	// the mass-weighted velocity of the element and the ejecta it takes in,
	// in the star's frame, along the chosen direction; the recoil goes to
	// the others.
	u := units.ParsecSolarMassKms()
	vStar := [3]float64{120, -40, 15}
	for _, dir := range []feedback.KickDirection{feedback.KickRadial, feedback.KickAlongAxis, feedback.KickAlongRotationAxis} {
		g := windGas(5, 300, 30)
		s := feedback.DefaultKickedWinds()
		s.Basis = feedback.LoadPerFormedMass
		s.Direction = dir
		s.Axis = [3]float64{0, 0.6, 0.8}
		s.Seed = 2
		var srcs []feedback.Source
		for i := 0; i < 6; i++ {
			src := windStar(int64(1+i), [3]float64{float64(3 * i), 0, 1}, vStar, 300)
			src.Energy *= 10 // enough for every kick at full speed
			srcs = append(srcs, src)
		}
		before := g.Clone()
		out, _ := coupleOnceNoApply(t, g, feedback.Config{Units: u, Scheme: s, Neighbors: 48}, srcs)
		kicked := 0
		for _, r := range out.Records {
			if r.Flags&feedback.FlagHydroDecoupled == 0 {
				continue
			}
			kicked++
			i := r.GasIndex
			m := before.Mass[i]
			var kick [3]float64
			for a := 0; a < 3; a++ {
				kick[a] = (r.Momentum[a] - r.Mass*vStar[a]) / (m + r.Mass)
			}
			speed := math.Sqrt(kick[0]*kick[0] + kick[1]*kick[1] + kick[2]*kick[2])
			assert.InEpsilon(t, float64(feedback.DefaultWindSpeed), speed, 1e-12)
			if dir == feedback.KickAlongAxis {
				assert.InDelta(t, 1, math.Abs(kick[1]*0.6+kick[2]*0.8)/speed, 1e-12, "along the axis")
			}
			if dir == feedback.KickRadial {
				src := srcs[r.StarID-1].Star.Pos
				var d [3]float64
				for a := 0; a < 3; a++ {
					d[a] = before.Pos[a][i] - src[a]
				}
				dn := math.Sqrt(d[0]*d[0] + d[1]*d[1] + d[2]*d[2])
				assert.InDelta(t, 1, (kick[0]*d[0]+kick[1]*d[1]+kick[2]*d[2])/(dn*speed), 1e-12, "radial")
			}
		}
		assert.Greater(t, kicked, 6, "direction %d", dir)
		// Decoupled for 20 kpc / 484 km/s = 40.4 Myr.
		want := 20e3 * units.Parsec / (484 * units.Kilometer) / u.TimeS()
		for _, r := range out.Records {
			if r.Flags&feedback.FlagHydroDecoupled != 0 {
				assert.InEpsilon(t, want, r.HydroDecoupledUntil, 1e-12)
				assert.InDelta(t, 40.4, r.HydroDecoupledUntil*u.TimeS()/units.Megayear, 0.1)
			} else {
				assert.Zero(t, r.HydroDecoupledUntil)
			}
		}
	}
}

func TestMomentumDrivenScalings(t *testing.T) {
	// Oppenheimer & Davé 2006 (MNRAS 373, 1265; from memory):
	// v_w = 3 sigma sqrt(f_L - 1), eta = sigma_0 / sigma, sigma_0 = 300 km/s.
	s := feedback.DefaultMomentumDrivenWinds()
	cases := []struct {
		sigma, fL, eta, vw float64
	}{
		{100, 2, 3, 300},
		{300, 2, 1, 900},
		{75, 1.05, 4, 3 * 75 * math.Sqrt(0.05)},
		{1, 2, 30, 30}, // below the 10 km/s floor
	}
	for _, c := range cases {
		s.LuminosityFactor = c.fL
		eta, vw := s.LoadingAndSpeed(c.sigma)
		assert.InEpsilon(t, c.eta, eta, 1e-12, "sigma %g", c.sigma)
		assert.InEpsilon(t, c.vw, vw, 1e-12, "sigma %g", c.sigma)
	}
	// Constant winds ignore sigma.
	eta, vw := feedback.DefaultKickedWinds().LoadingAndSpeed(100)
	assert.Equal(t, 2.0, eta)
	assert.Equal(t, 484.0, vw)

	// Through the coupler: a host-given dispersion of 150 km/s launches at
	// 450 km/s.
	u := units.ParsecSolarMassKms()
	g := windGas(8, 200, 5)
	md := feedback.DefaultMomentumDrivenWinds()
	md.Basis = feedback.LoadPerFormedMass
	md.Seed = 4
	var srcs []feedback.Source
	for i := 0; i < 20; i++ {
		src := windStar(int64(1+i), [3]float64{0, float64(i % 5), 0}, [3]float64{}, 100)
		src.Energy *= 10
		src.Dispersion = 150
		srcs = append(srcs, src)
	}
	before := g.Clone()
	out, _ := coupleOnceNoApply(t, g, feedback.Config{Units: u, Scheme: md, Neighbors: 48}, srcs)
	n := 0
	for _, r := range out.Records {
		if r.Flags&feedback.FlagHydroDecoupled != 0 {
			n++
			kick := math.Sqrt(r.Momentum[0]*r.Momentum[0]+r.Momentum[1]*r.Momentum[1]+r.Momentum[2]*r.Momentum[2]) / (before.Mass[r.GasIndex] + r.Mass)
			assert.InEpsilon(t, 450, kick, 1e-12)
		}
	}
	assert.Greater(t, n, 0)
}

func TestKickedWindsEnergyBudget(t *testing.T) {
	u := units.ParsecSolarMassKms()
	e := units.FOE / u.EnergyErg()
	for _, c := range []struct {
		name     string
		leftover feedback.LeftoverEnergy
		energy   float64 // multiple of 1e51 erg
		limited  bool
		gasVel   float64
	}{
		{"heats", feedback.LeftoverHeats, 3, false, 10},
		{"returned", feedback.LeftoverReturned, 3, false, 10},
		// Gas at rest around a star at rest: no element can lose kinetic
		// energy, so the kicks take exactly what the budget holds.
		{"short-budget", feedback.LeftoverHeats, 1e-3, true, 0},
	} {
		t.Run(c.name, func(t *testing.T) {
			g := windGas(9, 200, c.gasVel)
			s := feedback.DefaultKickedWinds()
			s.Basis = feedback.LoadPerFormedMass
			s.Leftover = c.leftover
			s.Seed = 3
			// About 1/2 eta m_* v_w^2 = 1/2 300 Msun (484 km/s)^2 = 7e50 erg
			// expected of the 3e51 erg budget.
			vStar := [3]float64{20, 0, 0}
			if c.gasVel == 0 {
				vStar = [3]float64{}
			}
			src := windStar(1, [3]float64{}, vStar, 150)
			src.Energy = c.energy * e
			out, _ := coupleOnceNoApply(t, g, feedback.Config{Units: u, Scheme: s, Neighbors: 64}, []feedback.Source{src})
			l := out.Ledger
			assert.Zero(t, l.Radiated)
			assert.Greater(t, l.KickEnergy, 0.0)
			// Used plus left is the budget.
			assert.InEpsilon(t, src.Energy, l.KickEnergy+l.Heat+l.Undeposited.Energy, 1e-12)
			switch {
			case c.limited:
				assert.Equal(t, 1, l.Limited)
				// The kicks take (to the bisection's precision) the whole
				// budget and are slower than v_w.
				assert.InEpsilon(t, src.Energy, l.KickEnergy, 1e-9)
				for _, r := range out.Records {
					assert.NotZero(t, r.Flags&feedback.FlagLimited)
					if r.Flags&feedback.FlagHydroDecoupled != 0 {
						assert.Less(t, r.Kick, 0.1*feedback.DefaultWindSpeed)
					}
				}
			case c.leftover == feedback.LeftoverReturned:
				assert.Zero(t, l.Limited)
				assert.InEpsilon(t, src.Energy-l.KickEnergy-l.Heat, l.Undeposited.Energy, 1e-12)
				// Only elements whose own motion the kick slowed keep heat.
				assert.Less(t, l.Heat, 0.1*l.KickEnergy)
			default:
				assert.Zero(t, l.Limited)
				assert.Zero(t, l.Undeposited.Energy)
				assert.Less(t, l.KickEnergy, src.Energy)
				assert.Greater(t, l.Heat, 0.5*src.Energy, "the leftover heats")
			}
		})
	}
}

func TestKickedWindsPassTheHarness(t *testing.T) {
	// Kicked winds make no isotropy claim: one or two elements are kicked.
	// Fast kicks of overlapping stars on one element add coherently; the
	// shortfall bounds (fraction of the energy released) are the worst of
	// 40 seeds measured, with a margin: constant 0.12, momentum-driven
	// 0.03, formed-mass loading with the leftover returned (no heat to
	// reclaim) 0.30, rotation axis 0.07.
	formed := func(s feedback.Star) feedback.Source {
		src := feedbacktest.SupernovaRelease(s)
		src.NewStellarMass = 150
		return src
	}
	for _, c := range []struct {
		name      string
		scheme    feedback.KickedWinds
		release   func(feedback.Star) feedback.Source
		shortfall float64
	}{
		{"constant", feedback.DefaultKickedWinds(), nil, 0.2},
		{"momentum-driven", feedback.DefaultMomentumDrivenWinds(), nil, 0.05},
		{"formed-mass-returned", func() feedback.KickedWinds {
			s := feedback.DefaultKickedWinds()
			s.Basis, s.Leftover = feedback.LoadPerFormedMass, feedback.LeftoverReturned
			return s
		}(), formed, 0.45},
		{"rotation-axis", func() feedback.KickedWinds {
			s := feedback.DefaultKickedWinds()
			s.Direction = feedback.KickAlongRotationAxis
			return s
		}(), nil, 0.12},
	} {
		t.Run(c.name, func(t *testing.T) {
			c.scheme.Seed = 17
			opts := feedbacktest.DefaultOptions()
			opts.Release, opts.IsotropyBound, opts.ShortfallBound, opts.Seeds = c.release, math.Inf(1), c.shortfall, []uint64{1, 2}
			feedbacktest.Check(t, c.scheme, opts)
		})
	}
}

func TestKickedWindsBitwiseForAnyWorkerCount(t *testing.T) {
	u := units.ParsecSolarMassKms()
	base := windGas(12, 600, 20)
	var srcs []feedback.Source
	for i := 0; i < 90; i++ {
		j := 6 * i
		srcs = append(srcs, windStar(int64(1000+3*i), [3]float64{base.Pos[0][j], base.Pos[1][j] + 0.3, base.Pos[2][j]},
			[3]float64{10, 0, -5}, 200))
	}
	var ref *audit.GasArrays
	for _, workers := range []int{1, 2, 3, 8} {
		g := base.Clone()
		s := feedback.DefaultKickedWinds()
		s.Seed = 99
		coupleOnce(t, g, feedback.Config{Units: u, Scheme: s, Neighbors: 32, Workers: workers}, srcs)
		if ref == nil {
			ref = g
			continue
		}
		for i := range g.Mass {
			for a := 0; a < 3; a++ {
				require.Equal(t, math.Float64bits(ref.Vel[a][i]), math.Float64bits(g.Vel[a][i]), "workers %d", workers)
			}
			require.Equal(t, math.Float64bits(ref.Energy[i]), math.Float64bits(g.Energy[i]), "workers %d", workers)
		}
	}
}

func TestKickedWindsRefusesBadSettings(t *testing.T) {
	cases := map[string]func(*feedback.KickedWinds){
		"negative-loading": func(s *feedback.KickedWinds) { s.Loading = -1 },
		"nan-speed":        func(s *feedback.KickedWinds) { s.Speed = math.NaN() },
		"zero-axis":        func(s *feedback.KickedWinds) { s.Direction = feedback.KickAlongAxis },
		"low-luminosity": func(s *feedback.KickedWinds) {
			s.Scaling, s.LuminosityFactor = feedback.MomentumDrivenWind, 0.5
		},
		"zero-floor": func(s *feedback.KickedWinds) {
			s.Scaling, s.DispersionFloor = feedback.MomentumDrivenWind, 0
		},
		"zero-energy-per-mass": func(s *feedback.KickedWinds) { s.SupernovaEnergyPerMass = 0 },
		"unknown-leftover":     func(s *feedback.KickedWinds) { s.Leftover = 7 },
		"inf-decoupling":       func(s *feedback.KickedWinds) { s.DecouplingLength = math.Inf(1) },
	}
	for name, spoil := range cases {
		t.Run(name, func(t *testing.T) {
			s := feedback.DefaultKickedWinds()
			spoil(&s)
			assert.ErrorIs(t, s.Validate(), feedback.ErrInvalidArgument)
		})
	}
	assert.NoError(t, feedback.DefaultKickedWinds().Validate())
	assert.NoError(t, feedback.DefaultMomentumDrivenWinds().Validate())
}

// coupleOnceNoApply couples and checks the ledger without applying.
func coupleOnceNoApply(t *testing.T, g *audit.GasArrays, cfg feedback.Config, srcs []feedback.Source) (*feedback.Output, error) {
	t.Helper()
	c, err := feedback.NewCoupler(cfg)
	require.NoError(t, err)
	out := &feedback.Output{}
	require.NoError(t, c.Couple(g.View(), treeOf(t, g), srcs, out))
	require.Empty(t, out.Problems)
	require.NoError(t, out.Ledger.Balanced(1e-12))
	return out, nil
}

func TestStepperWithKickedWindsIsBitwiseForAnyWorkerCount(t *testing.T) {
	// Kicked winds as the stepper's supernova scheme: the wind follows the
	// supernovae drawn (loaded per supernova energy), the books balance,
	// and the gas ends bitwise the same for any worker count.
	u := units.ParsecSolarMassKms()
	pop, err := yields.NewPopulation(yields.DefaultConfig())
	require.NoError(t, err)
	base := windGas(21, 800, 15)
	myr := units.Megayear / u.TimeS()
	var stars []feedback.StarParticle
	for s := 0; s < 30; s++ {
		i := s * 25
		stars = append(stars, feedback.StarParticle{Star: feedback.Star{ID: int64(70 + s), Mass: 2e4, Metallicity: 0.0134,
			Pos: [3]float64{base.Pos[0][i], base.Pos[1][i] + 0.2, base.Pos[2][i]}, Age: float64(4+s%10) * myr}, FormedMass: 2e4})
	}
	var ref *audit.GasArrays
	for _, workers := range []int{1, 2, 3} {
		g := base.Clone()
		s := feedback.DefaultKickedWinds()
		s.Seed = 5
		cfg := feedback.DefaultStepConfig(feedback.Config{Units: u, Workers: workers, Scheme: s}, pop)
		cfg.Seed = 8
		st, err := feedback.NewStepper(cfg)
		require.NoError(t, err)
		var out feedback.StepOutput
		view := g.View()
		require.NoError(t, st.Step(view, treeOf(t, g), stars, 3, myr, &out))
		require.NoError(t, out.Err())
		require.NoError(t, out.Ledger.Balanced(1e-12))
		cc := out.Channels[yields.CoreCollapse]
		require.Positive(t, out.Supernovae[yields.CoreCollapse])
		assert.Positive(t, cc.KickEnergy)
		// Stars at rest: what was deposited is what the kicks used plus the
		// leftover heat.
		assert.InEpsilon(t, cc.Deposited.Energy, cc.KickEnergy+cc.Heat, 1e-9)
		decoupled := 0
		for _, r := range out.Records {
			if r.Flags&feedback.FlagHydroDecoupled != 0 {
				decoupled++
				assert.Equal(t, yields.CoreCollapse, r.Channel)
			}
		}
		assert.Positive(t, decoupled)
		_, _, err = new(feedback.Applier).Apply(view, out.Records, nil)
		require.NoError(t, err)
		if ref == nil {
			ref = g
			continue
		}
		for i := range g.Mass {
			for a := 0; a < 3; a++ {
				require.Equal(t, math.Float64bits(ref.Vel[a][i]), math.Float64bits(g.Vel[a][i]), "workers %d", workers)
			}
			require.Equal(t, math.Float64bits(ref.Energy[i]), math.Float64bits(g.Energy[i]), "workers %d", workers)
		}
	}
}

func TestNewSchemesAllocateNothingInSteadyState(t *testing.T) {
	u := units.ParsecSolarMassKms()
	g := windGas(1, 2000, 10)
	var srcs []feedback.Source
	for i := 0; i < 100; i++ {
		s := windStar(int64(i+1), [3]float64{g.Pos[0][i], g.Pos[1][i], g.Pos[2][i] + 0.1}, [3]float64{5, 0, 0}, 300)
		s.Duration = 0.1 * units.Megayear / u.TimeS() // for the light scheme
		srcs = append(srcs, s)
	}
	short := feedback.DefaultKickedWinds() // 1e51 erg cannot pay every kick: the limited path too
	short.Basis = feedback.LoadPerFormedMass
	for _, scheme := range []feedback.Scheme{feedback.DefaultKickedWinds(), feedback.DefaultMomentumDrivenWinds(), short,
		feedback.DefaultPhotoelectricHeating()} {
		c, err := feedback.NewCoupler(feedback.Config{Units: u, Scheme: scheme})
		require.NoError(t, err)
		var out feedback.Output
		view := g.View()
		f := treeOf(t, g)
		require.NoError(t, c.Couple(view, f, srcs, &out))
		require.Empty(t, out.Problems)
		allocs := testing.AllocsPerRun(5, func() { _ = c.Couple(view, f, srcs, &out) })
		assert.Zero(t, allocs, "%s: allocations per call of 100 stars", scheme.Name())
	}
}

// Kicked winds loaded per formed mass work inside a stepper: each star
// particle's NewStellarMass reaches its core-collapse source, and the
// expected kicked mass is eta times it (Springel & Hernquist 2003, MNRAS
// 339, 289), paid from the supernovae of the particle's older stars. The
// mean over many stars lies within 4 standard errors of eta m_*, the
// variance of one star's kicked mass being sum_j m_j^2 p (1 - p). Without
// new stellar mass nothing is launched (before StarParticle carried it,
// that was every star: the variant launched no wind in a stepper and its
// energy became heat).
func TestStepperLoadsKickedWindsOnNewStellarMass(t *testing.T) {
	u := units.ParsecSolarMassKms()
	pop, err := yields.NewPopulation(yields.DefaultConfig())
	require.NoError(t, err)
	g := windGas(23, 800, 0)
	myr := units.Megayear / u.TimeS()
	s := feedback.DefaultKickedWinds()
	s.Basis, s.Seed = feedback.LoadPerFormedMass, 13
	cfg := feedback.DefaultStepConfig(feedback.Config{Units: u, Scheme: s}, pop)
	cfg.Seed = 4
	cfg.SkipWinds, cfg.SkipRadiation, cfg.SkipPhotoionization, cfg.SkipPhotoelectric = true, true, true, true
	st, err := feedback.NewStepper(cfg)
	require.NoError(t, err)
	const formed = 150.0 // eta m_* = 300 Msun of about 3200 Msun around each star: 7e50 erg of kicks
	for _, newMass := range []float64{formed, 0} {
		var stars []feedback.StarParticle
		for k := 0; k < 200; k++ {
			i := k * 4
			stars = append(stars, feedback.StarParticle{Star: feedback.Star{ID: int64(100 + k), Mass: 2e4, Metallicity: 0.0134,
				Pos: [3]float64{g.Pos[0][i], g.Pos[1][i] + 0.2, g.Pos[2][i]}, Age: 10 * myr}, FormedMass: 2e4, NewStellarMass: newMass})
		}
		var out feedback.StepOutput
		require.NoError(t, st.Step(g.View(), treeOf(t, g), stars, 1, myr, &out))
		require.NoError(t, out.Err())
		require.NoError(t, out.Ledger.Balanced(1e-12))
		cc := out.Channels[yields.CoreCollapse]
		require.Positive(t, cc.In.Energy)
		kicked := kickedMass(g, out.Records)
		if newMass == 0 {
			assert.Empty(t, kicked, "no new stars, no wind")
			assert.Zero(t, cc.KickEnergy)
			continue
		}
		// Each star's neighborhood, from its core-collapse records.
		total, sum2 := map[int64]float64{}, map[int64]float64{}
		for _, r := range out.Records {
			if r.Channel == yields.CoreCollapse {
				m := g.Mass[r.GasIndex]
				total[r.StarID] += m
				sum2[r.StarID] += m * m
			}
		}
		require.Len(t, total, len(stars))
		mean, variance := 0.0, 0.0
		for id, m := range total {
			p := s.Loading * newMass / m
			require.Less(t, p, 1.0)
			mean += kicked[id]
			variance += sum2[id] * p * (1 - p)
		}
		n := float64(len(stars))
		mean /= n
		se := math.Sqrt(variance) / n
		assert.InDelta(t, s.Loading*newMass, mean, 4*se, "mean kicked mass %g, want %g +- %g", mean, s.Loading*newMass, se)
		// The supernovae (about 7 per star) pay for the kicks but in the
		// rare star that kicks far more than its expected mass.
		assert.Less(t, cc.Limited, len(stars)/20)
		t.Logf("supernovae per star %.2f, limited %d, mean kicked %.1f Msun (want %.1f +- %.1f)", float64(out.Supernovae[yields.CoreCollapse])/n, cc.Limited, mean, s.Loading*newMass, se)
		assert.Positive(t, cc.KickEnergy)
	}
}
