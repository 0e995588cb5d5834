package yields

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"github.com/ejecta-dev/ejecta/yields/units"
	"gonum.org/v1/gonum/integrate/quad"
)

// ErrInput marks an invalid argument (NaN, negative or reversed ages, a
// metallicity outside [0, 1)); test for it with errors.Is.
var ErrInput = errors.New("invalid input")

// Grid of the cumulative light and wind tables (see Population).
const (
	tableMinAge    = 1e-2 // Myr, first node after age 0
	tableMaxAge    = 1e6  // Myr, last node
	tablePerDecade = 32   // nodes per decade of age
	tableZNodes    = 25   // nodes in log Z over [LifetimeMinZ, LifetimeMaxZ]
	glNodes        = 12   // Gauss–Legendre nodes per smooth mass sub-interval
	lightPerDecade = 2    // mass sub-intervals per decade for the light integrals (1e-9 relative, measured)
)

// Population is the built-in Model: a simple stellar population (a single
// burst) with an IMF, stellar lifetimes, the four release channels and the
// light of its stars, configured by Config.
//
// Every quantity is a cumulative function of age C(t) — what has been
// released from formation to age t — and Release(age0, age1, z) returns
// C(age1) − C(age0), so the releases of consecutive intervals add up to the
// release of their union to round-off. Supernova counts and ejecta (and AGB
// ejecta) are closed-form IMF integrals above the turn-off mass.
//
// Light. Each star shines from birth to the end of its lifetime with its
// zero-age main-sequence luminosity and effective temperature (ZAMS, the
// fits of Tout et al. 1996), and its spectrum is taken to be a blackbody at
// that temperature: the hydrogen-ionizing photon rate is the blackbody's
// photon rate above HydrogenIonizationEnergy, and the far-ultraviolet
// luminosity is its luminosity between FarUltravioletMinEnergy and
// HydrogenIonizationEnergy. Against model atmospheres the blackbody gives
// the ionizing rate of early O stars to a few hundredths of a dex and
// overestimates it for late O and B stars (by about 0.2 dex at 33000 K and
// 0.5 dex at 30000 K, against the dwarf O-star scale of Martins, Schaerer &
// Hillier 2005, A&A 436, 1049), whose atmospheres have a strong Lyman edge;
// a young population's ionizing photons come mostly from stars above
// 30 Msun, so its rate is overestimated by a few tens of per cent at most.
// Stars brighten on the main sequence and giants are left out, so the
// light of an older population is underestimated.
//
// Radiant energy, ionizing photons, far-ultraviolet energy and massive-star
// winds, which a star emits all through its life, are tabulated at
// construction: cumulative values on a
// grid of 32 nodes per decade of age from 0.01 Myr to 1e6 Myr (and age 0)
// and 25 nodes in log Z, computed by Gauss–Legendre quadrature over mass
// together with their rates (the time derivatives, known in closed form),
// interpolated by monotone cubic Hermite polynomials in age (Fritsch &
// Carlson 1980 slope limiting; exact for a constant rate) and linearly in
// log Z: about 1e-4 relative at a metallicity node and 2e-3 between nodes. Past 1e6 Myr the last rate continues.
//
// A Population is immutable after NewPopulation and safe for concurrent
// use; Release allocates nothing.
type Population struct {
	cfg    Config
	imf    IMF
	iaCoef float64 // A in R(t) = A/t
	windTo float64 // per-unit-s wind factor: LostFractionAt100/100
	windEV float64 // erg per Msun of massive-star wind
	agbEV  float64 // erg per Msun of AGB wind
	ccPat  Abundances
	// lightEdges splits the IMF's mass range into sub-intervals on which
	// the light of a star times the IMF is smooth; gx, gw are the
	// Gauss–Legendre nodes and weights on [−1, 1] used on each.
	lightEdges []float64
	gx, gw     []float64
	// Mass ranges of the closed-form channels, with the IMF primitives at their ends.
	ccNS, ccBH, ccNew, agb tailSegment
	tabT                   []float64 // node ages, Myr; tabT[0] = 0
	tabLZ                  []float64 // node log10 Z
	rad                    []float64 // cumulative radiant energy, Lsun Myr, [iz*nt+it]
	phot                   []float64 // cumulative ionizing photons, photons/s Myr
	fuv                    []float64 // cumulative far-ultraviolet energy, Lsun Myr
	wind                   []float64 // cumulative massive-wind mass per unit metallicity factor, Msun
	// Rates at the nodes (the cumulative values' time derivatives), limited
	// so that the cubic Hermite interpolant is monotone.
	dRad, dPhot, dFUV, dWind []float64
}

// NewPopulation checks cfg and builds the population and its tables.
func NewPopulation(cfg Config) (*Population, error) {
	if err := cfg.validate(); err != nil {
		return nil, fmt.Errorf("yields: population config: %w", err)
	}
	for _, e := range cfg.Species.Elements() {
		if !DefaultSpeciesSet().Has(e) {
			return nil, fmt.Errorf("yields: population config: no built-in yields for %s (the built-in population has %s; bring other elements in a rates table): %w",
				e.Symbol(), DefaultSpeciesSet(), ErrSpecies)
		}
	}
	imf, err := NewIMF(cfg.IMF, cfg.LightestStarMass, cfg.HeaviestStarMass)
	if err != nil {
		return nil, fmt.Errorf("yields: population config: %w", err)
	}
	p := &Population{
		cfg:    cfg,
		imf:    imf,
		windTo: cfg.MassiveWinds.LostFractionAt100 / 100,
	}
	if cfg.TypeIa.EventsPerMsun > 0 {
		if cfg.TypeIa.MinDelay >= HubbleTime {
			return nil, fmt.Errorf("yields: population config: TypeIa.MinDelay %g Myr not below the Hubble time %g Myr", cfg.TypeIa.MinDelay, HubbleTime)
		}
		p.iaCoef = cfg.TypeIa.EventsPerMsun / math.Log(HubbleTime/cfg.TypeIa.MinDelay)
	}
	v := cfg.MassiveWinds.Speed * units.Kilometer
	p.windEV = 0.5 * units.SolarMass * v * v
	v = cfg.AGB.Speed * units.Kilometer
	p.agbEV = 0.5 * units.SolarMass * v * v
	p.ccPat = cfg.CoreCollapse.NewMetalPattern
	cc := cfg.CoreCollapse
	bh := cfg.Remnants.BlackHoleMinMass
	p.ccNS = p.segment(cc.MinMass, math.Min(bh, cc.MaxMass))
	p.ccBH = p.segment(math.Max(bh, cc.MinMass), cc.MaxMass)
	p.ccNew = p.segment(math.Max(cc.NewMetalsMinMass, cc.MinMass), cc.MaxMass)
	// An AGB star sheds (1 − slope)·m − intercept, positive above this mass.
	p.agb = p.segment(cfg.AGB.FinalMassIntercept/(1-cfg.AGB.FinalMassSlope), cfg.AGB.MaxMass)
	if err := p.checkMassBudget(); err != nil {
		return nil, fmt.Errorf("yields: population config: %w", err)
	}
	p.gx = make([]float64, glNodes)
	p.gw = make([]float64, glNodes)
	quad.Legendre{}.FixedLocations(p.gx, p.gw, -1, 1)
	p.lightEdges = p.massEdges()
	if err := p.buildTables(); err != nil {
		return nil, fmt.Errorf("yields: population tables: %w", err)
	}
	return p, nil
}

// Config is the configuration the population was built from.
func (p *Population) Config() Config { return p.cfg }

// IMF is the population's initial mass function.
func (p *Population) IMF() IMF { return p.imf }

// Species is the set of elements the population's releases report, in
// their slot order.
func (p *Population) Species() SpeciesSet { return p.cfg.Species }

// remnant is the remnant mass of a massive star of initial mass m.
func (p *Population) remnant(m float64) float64 {
	if m < p.cfg.Remnants.BlackHoleMinMass {
		return p.cfg.Remnants.NeutronStarMass
	}
	return p.cfg.Remnants.BlackHoleMass
}

// windScale is the metallicity factor of massive winds, (Z/Zsun)^exponent
// with Z clamped to the lifetime fit's range.
func (p *Population) windScale(z float64) float64 {
	z = math.Min(math.Max(z, LifetimeMinZ), LifetimeMaxZ)
	return math.Pow(z/SolarMetals, p.cfg.MassiveWinds.MetallicityExponent)
}

// checkMassBudget makes sure that, at the highest metallicity factor, no
// massive star loses more in winds than it has, and no supernova makes more
// new metals than it ejects.
func (p *Population) checkMassBudget() error {
	sMax := p.windScale(LifetimeMaxZ)
	lo := p.cfg.MassiveWinds.MinMass
	hi := p.imf.MaxMass()
	if hi <= lo {
		return nil
	}
	const n = 2000
	for i := 0; i <= n; i++ {
		m := lo * math.Pow(hi/lo, float64(i)/n)
		r := p.remnant(m)
		f := p.windTo * m * sMax
		if f >= 1 {
			return fmt.Errorf("a %.4g Msun star would lose a fraction %.3g >= 1 of its mass in winds at Z = %g", m, f, LifetimeMaxZ)
		}
		if m < p.cfg.CoreCollapse.MinMass || m > p.cfg.CoreCollapse.MaxMass {
			continue
		}
		ej := (m - r) * (1 - f)
		nm := p.cfg.CoreCollapse.NewMetalsPerMsun * math.Max(0, m-p.cfg.CoreCollapse.NewMetalsMinMass)
		if nm > ej {
			return fmt.Errorf("a %.4g Msun supernova would make %.3g Msun of new metals but eject only %.3g Msun", m, nm, ej)
		}
	}
	return nil
}

// buildTables tabulates the cumulative radiant energy, ionizing photons,
// far-ultraviolet energy and massive-wind mass.
func (p *Population) buildTables() error {
	nt := 1 + tablePerDecade*int(math.Round(math.Log10(tableMaxAge/tableMinAge))) + 1
	p.tabT = make([]float64, nt)
	for i := 1; i < nt; i++ {
		p.tabT[i] = tableMinAge * math.Pow(10, float64(i-1)/tablePerDecade)
	}
	p.tabLZ = make([]float64, tableZNodes)
	l0, l1 := math.Log10(LifetimeMinZ), math.Log10(LifetimeMaxZ)
	for i := range p.tabLZ {
		p.tabLZ[i] = l0 + (l1-l0)*float64(i)/(tableZNodes-1)
	}
	n := nt * tableZNodes
	p.rad, p.phot, p.fuv, p.wind = make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	p.dRad, p.dPhot, p.dFUV, p.dWind = make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)

	lo, hi := p.imf.MinMass(), p.imf.MaxMass()
	wlo := math.Max(p.cfg.MassiveWinds.MinMass, lo)
	for iz, lz := range p.tabLZ {
		z := math.Pow(10, lz)
		lt, err := NewLifetimes(z)
		if err != nil {
			return err
		}
		ms, err := NewZAMS(z)
		if err != nil {
			return err
		}
		// Integrands, per unit mass, sharing one evaluation of a star's
		// light: the light of the living stars (a rate), the light of stars
		// that have died (emitted over their whole life) and the wind rate
		// of living massive stars.
		terms := func(m float64) tableTerms {
			f := p.imf.Density(m)
			tau := lt.Lifetime(m)
			l := ms.light(m)
			t := tableTerms{alive: l.scale(f), dead: l.scale(tau * f)}
			if m >= wlo {
				t.wind = p.windTo * m * (m - p.remnant(m)) / tau * f
			}
			return t
		}
		edges := p.edges(lt.VertexMass(), wlo)
		ne := len(edges) - 1 // sub-intervals
		sufD := make([]starLight, ne+1)
		preA := make([]starLight, ne+1)
		preW := make([]float64, ne+1)
		full := make([]tableTerms, ne)
		for j := range full {
			full[j] = integrateLogMass(p.gx, p.gw, terms, edges[j], edges[j+1])
		}
		for j := ne - 1; j >= 0; j-- {
			sufD[j] = sufD[j+1].add(full[j].dead)
		}
		for j := 0; j < ne; j++ {
			preA[j+1] = preA[j].add(full[j].alive)
			preW[j+1] = preW[j] + full[j].wind
		}
		for it, t := range p.tabT {
			x := math.Min(lt.TurnoffMass(t), hi)
			var d, a starLight
			var aW float64
			switch {
			case x >= hi:
				a, aW = preA[ne], preW[ne]
			case x <= lo:
				d = sufD[0]
			default:
				j := sort.SearchFloat64s(edges, x) // edges[j-1] < x <= edges[j]
				if edges[j] == x {
					d, a, aW = sufD[j], preA[j], preW[j]
				} else {
					// The stars in (x, edges[j]] have died; the living ones
					// of the cell are the cell minus them.
					part := integrateLogMass(p.gx, p.gw, terms, x, edges[j])
					d = part.dead.add(sufD[j])
					a = preA[j].add(part.alive.scale(-1))
					a = starLight{math.Max(a.lum, 0), math.Max(a.ionizing, 0), math.Max(a.fuv, 0)}
					aW = math.Max(preW[j]-part.wind, 0)
				}
			}
			// The rates are the light of the living stars and the wind of the
			// living massive stars (the terms from stars dying at t cancel):
			// the cumulative light is t times the living stars' light plus
			// the whole-life light of the dead ones.
			cum := a.scale(t).add(d)
			// Winds: living stars have lost t/τ of their wind mass, dead ones all of it.
			w := t*aW + p.windTo*p.massiveMoment2(math.Max(x, wlo), hi)
			if math.IsNaN(cum.lum) || math.IsNaN(cum.ionizing) || math.IsNaN(cum.fuv) || math.IsNaN(w) {
				return fmt.Errorf("NaN at age %g Myr, log Z %g", t, lz)
			}
			k := iz*nt + it
			p.rad[k], p.phot[k], p.fuv[k], p.wind[k] = cum.lum, cum.ionizing, cum.fuv, w
			p.dRad[k], p.dPhot[k], p.dFUV[k], p.dWind[k] = a.lum, a.ionizing, a.fuv, aW
			if it > 0 { // keep the tables monotone against quadrature round-off
				for _, tab := range [][]float64{p.rad, p.phot, p.fuv, p.wind} {
					tab[k] = math.Max(tab[k], tab[k-1])
				}
			}
		}
		for _, tab := range [][2][]float64{{p.rad, p.dRad}, {p.phot, p.dPhot}, {p.fuv, p.dFUV}, {p.wind, p.dWind}} {
			limitSlopes(p.tabT, tab[0][iz*nt:(iz+1)*nt], tab[1][iz*nt:(iz+1)*nt])
		}
	}
	return nil
}

// tableTerms are the integrands over mass of the light and wind tables.
type tableTerms struct {
	alive, dead starLight
	wind        float64
}

func (a tableTerms) add(b tableTerms) tableTerms {
	return tableTerms{a.alive.add(b.alive), a.dead.add(b.dead), a.wind + b.wind}
}

func (a tableTerms) scale(f float64) tableTerms {
	return tableTerms{a.alive.scale(f), a.dead.scale(f), a.wind * f}
}

// integrateLogMass integrates g over [a, b] in ln m with the Gauss–Legendre
// nodes gx and weights gw on [−1, 1]; [a, b] lies inside one smooth piece
// of g.
func integrateLogMass(gx, gw []float64, g func(float64) tableTerms, a, b float64) tableTerms {
	var s tableTerms
	if !(a < b) {
		return s
	}
	la, lb := math.Log(a), math.Log(b)
	h := (lb - la) / 2
	for j, x := range gx {
		m := math.Exp(la + h*(x+1))
		s = s.add(g(m).scale(h * gw[j] * m))
	}
	return s
}

// limitSlopes makes the cubic Hermite interpolant of the non-decreasing
// values y with slopes d monotone, by the Fritsch & Carlson 1980 (SIAM J.
// Numer. Anal. 17, 238) condition: in each cell, with Δ the secant slope,
// the slopes are zero if Δ = 0 and otherwise scaled down so that
// (d_i/Δ)² + (d_{i+1}/Δ)² <= 9. Scaling a slope down never breaks the
// condition in the neighboring cell.
func limitSlopes(t, y, d []float64) {
	for i := range d {
		d[i] = math.Max(d[i], 0)
	}
	for i := 0; i+1 < len(t); i++ {
		delta := (y[i+1] - y[i]) / (t[i+1] - t[i])
		if !(delta > 0) {
			d[i], d[i+1] = 0, 0
			continue
		}
		a, b := d[i]/delta, d[i+1]/delta
		if r := a*a + b*b; r > 9 {
			s := 3 / math.Sqrt(r)
			d[i], d[i+1] = s*d[i], s*d[i+1]
		}
	}
}

// massEdges lists the IMF range's ends, the IMF's breaks and a grid of
// lightPerDecade masses per decade: the sub-intervals on which the light of
// the living stars is integrated.
func (p *Population) massEdges() []float64 {
	lo, hi := p.imf.MinMass(), p.imf.MaxMass()
	b := []float64{lo, hi}
	for _, pc := range p.imf.pieces[:p.imf.n] {
		b = append(b, pc.lo, pc.hi)
	}
	for k := math.Floor(math.Log10(lo) * lightPerDecade); ; k++ {
		m := math.Pow(10, k/lightPerDecade)
		if m >= hi {
			break
		}
		b = append(b, m)
	}
	return sortedInside(b, lo, hi)
}

// edges lists the light's sub-interval edges and the masses where a
// tabulated integrand has a kink (the lifetime's vertex mass, the lightest
// massive star with winds, the lightest black-hole progenitor), sorted and
// without repeats.
func (p *Population) edges(vertex, wlo float64) []float64 {
	b := append([]float64{vertex, wlo, p.cfg.Remnants.BlackHoleMinMass}, p.lightEdges...)
	return sortedInside(b, p.imf.MinMass(), p.imf.MaxMass())
}

// sortedInside sorts b and keeps the values in [lo, hi] without repeats.
func sortedInside(b []float64, lo, hi float64) []float64 {
	sort.Float64s(b)
	out := b[:0]
	for _, v := range b {
		if v >= lo && v <= hi && (len(out) == 0 || v > out[len(out)-1]) {
			out = append(out, v)
		}
	}
	return out
}

// massiveMoment2 is ∫ m (m − remnant(m)) dN over [a, b].
func (p *Population) massiveMoment2(a, b float64) float64 {
	if !(a < b) {
		return 0
	}
	f := &p.imf
	bh := p.cfg.Remnants.BlackHoleMinMass
	ns, bhm := p.cfg.Remnants.NeutronStarMass, p.cfg.Remnants.BlackHoleMass
	var s float64
	if u := math.Min(b, bh); a < u {
		s += f.Moment(2, a, u) - ns*f.Moment(1, a, u)
	}
	if u := math.Max(a, bh); u < b {
		s += f.Moment(2, u, b) - bhm*f.Moment(1, u, b)
	}
	return s
}

// evalContext holds what depends only on the metallicity of a call.
type evalContext struct {
	z     float64
	life  Lifetimes
	comp  Abundances
	wsc   float64 // massive-wind metallicity factor
	iz    int     // lower log Z table node
	wz    float64 // weight of node iz+1
	agbEn [3]float64
	heEn  float64
}

func (p *Population) context(z float64) (evalContext, error) {
	life, err := NewLifetimes(z)
	if err != nil {
		return evalContext{}, err
	}
	comp, err := InitialComposition(z)
	if err != nil {
		return evalContext{}, err
	}
	c := evalContext{z: z, life: life, comp: comp, wsc: p.windScale(z)}
	u := (math.Log10(life.Metallicity()) - p.tabLZ[0]) / (p.tabLZ[1] - p.tabLZ[0])
	c.iz = min(max(int(math.Floor(u)), 0), tableZNodes-2)
	c.wz = math.Min(math.Max(u-float64(c.iz), 0), 1)
	// Enrichment is made from hydrogen; never take more than there is.
	c.heEn = math.Min(p.cfg.MassiveWinds.HeliumEnrichment, comp[Hydrogen])
	a := p.cfg.AGB
	e := [3]float64{a.HeliumEnrichment, a.CarbonEnrichment, a.NitrogenEnrichment}
	if tot := e[0] + e[1] + e[2]; tot > comp[Hydrogen] {
		for i := range e {
			e[i] *= comp[Hydrogen] / tot
		}
	}
	c.agbEn = e
	return c, nil
}

// cumulative is everything released from formation to one age.
type cumulative struct {
	ccN, ccMass, ccNew float64
	iaN                float64
	windMass, agbMass  float64
	light              starLight // Lsun Myr, photons/s Myr, Lsun Myr
}

// tableAt interpolates the light and wind tables at an age.
func (p *Population) tableAt(c *evalContext, age float64) (light starLight, wind float64) {
	nt := len(p.tabT)
	var i int
	if age >= p.tabT[1] {
		i = 1 + int(math.Floor(math.Log10(age/tableMinAge)*tablePerDecade))
		i = min(max(i, 1), nt-2)
		for i > 1 && age < p.tabT[i] {
			i--
		}
		for i < nt-2 && age >= p.tabT[i+1] {
			i++
		}
	}
	t0, t1 := p.tabT[i], p.tabT[i+1]
	h := t1 - t0
	k0 := c.iz*nt + i
	k1 := k0 + nt
	if age >= p.tabT[nt-1] {
		// Past the last node the last rate continues.
		dt := age - p.tabT[nt-1]
		last := func(y, d []float64, k int) float64 { return y[k+1] + d[k+1]*dt }
		mix := func(y, d []float64) float64 {
			a, b := last(y, d, k0), last(y, d, k1)
			return a + c.wz*(b-a)
		}
		return starLight{mix(p.rad, p.dRad), mix(p.phot, p.dPhot), mix(p.fuv, p.dFUV)}, mix(p.wind, p.dWind) * c.wsc
	}
	// Cubic Hermite basis on the cell.
	u := (age - t0) / h
	u2, u3 := u*u, u*u*u
	h00, h10 := 2*u3-3*u2+1, u3-2*u2+u
	h01, h11 := -2*u3+3*u2, u3-u2
	herm := func(y, d []float64, k int) float64 {
		return h00*y[k] + h10*h*d[k] + h01*y[k+1] + h11*h*d[k+1]
	}
	mix := func(y, d []float64) float64 {
		a, b := herm(y, d, k0), herm(y, d, k1)
		return a + c.wz*(b-a)
	}
	return starLight{mix(p.rad, p.dRad), mix(p.phot, p.dPhot), mix(p.fuv, p.dFUV)}, mix(p.wind, p.dWind) * c.wsc
}

// tailSegment is a mass range [lo, hi] of a closed-form channel with the
// IMF primitives at its ends.
type tailSegment struct {
	lo, hi   float64
	plo, phi [3]float64
}

func (p *Population) segment(lo, hi float64) tailSegment {
	if !(lo < hi) {
		return tailSegment{lo: lo, hi: lo}
	}
	return tailSegment{lo: lo, hi: hi, plo: p.imf.Primitives(lo), phi: p.imf.Primitives(hi)}
}

// above returns the moments k = 0, 1, 2 of the IMF over [max(x, lo), hi],
// given the primitives px at x: the stars of the range that have died when
// the turn-off mass is x.
func (s *tailSegment) above(x float64, px *[3]float64) [3]float64 {
	switch {
	case x >= s.hi:
		return [3]float64{}
	case x <= s.lo:
		return [3]float64{s.phi[0] - s.plo[0], s.phi[1] - s.plo[1], s.phi[2] - s.plo[2]}
	}
	return [3]float64{s.phi[0] - px[0], s.phi[1] - px[1], s.phi[2] - px[2]}
}

// cumulativeAt is C(age).
func (p *Population) cumulativeAt(c *evalContext, age float64) cumulative {
	var r cumulative
	x := c.life.TurnoffMass(age) // stars above x have died
	px := p.imf.Primitives(x)
	cc := &p.cfg.CoreCollapse
	rm := &p.cfg.Remnants
	ns := p.ccNS.above(x, &px)
	bh := p.ccBH.above(x, &px)
	r.ccN = ns[0] + bh[0]
	// Ejecta per star: (m − remnant)·(1 − windTo·s·m).
	m1 := (ns[1] - rm.NeutronStarMass*ns[0]) + (bh[1] - rm.BlackHoleMass*bh[0])
	m2 := (ns[2] - rm.NeutronStarMass*ns[1]) + (bh[2] - rm.BlackHoleMass*bh[1])
	r.ccMass = m1 - p.windTo*c.wsc*m2
	nm := p.ccNew.above(x, &px)
	r.ccNew = cc.NewMetalsPerMsun * (nm[1] - cc.NewMetalsMinMass*nm[0])
	ag := p.agb.above(x, &px)
	r.agbMass = (1-p.cfg.AGB.FinalMassSlope)*ag[1] - p.cfg.AGB.FinalMassIntercept*ag[0]
	if age > p.cfg.TypeIa.MinDelay {
		r.iaN = p.iaCoef * math.Log(age/p.cfg.TypeIa.MinDelay)
	}
	r.light, r.windMass = p.tableAt(c, age)
	return r
}

func checkAges(age0, age1, z float64) error {
	switch {
	case math.IsNaN(age0) || math.IsNaN(age1) || math.IsInf(age0, 0) || math.IsInf(age1, 0):
		return fmt.Errorf("yields: ages [%g, %g] Myr must be finite: %w", age0, age1, ErrInput)
	case age0 < 0:
		return fmt.Errorf("yields: age %g Myr is negative: %w", age0, ErrInput)
	case age1 < age0:
		return fmt.Errorf("yields: age interval [%g, %g] Myr is reversed: %w", age0, age1, ErrInput)
	case math.IsNaN(z) || z < 0 || z >= 1:
		return fmt.Errorf("yields: metallicity %g not in [0, 1): %w", z, ErrInput)
	}
	return nil
}

// Release returns what one Msun formed releases between age0 and age1 Myr
// at metal mass fraction z: C(age1) − C(age0) for every quantity.
func (p *Population) Release(age0, age1, z float64) (Release, error) {
	if err := checkAges(age0, age1, z); err != nil {
		return Release{}, err
	}
	c, err := p.context(z)
	if err != nil {
		return Release{}, fmt.Errorf("yields: release: %w", err)
	}
	c0 := p.cumulativeAt(&c, age0)
	c1 := p.cumulativeAt(&c, age1)
	r := Release{Age0: age0, Age1: age1, Metallicity: z}

	// Core collapse: new metals with their pattern, the rest as born.
	cc := &r.Channels[CoreCollapse]
	cc.Events = c1.ccN - c0.ccN
	cc.Mass = c1.ccMass - c0.ccMass
	cc.Energy = p.cfg.CoreCollapse.Energy * cc.Events
	newZ := c1.ccNew - c0.ccNew
	born := math.Max(0, cc.Mass-newZ)
	cc.Species[Hydrogen] = c.comp[Hydrogen] * born
	cc.Species[Helium] = c.comp[Helium] * born
	cc.Species[Metals] = c.comp[Metals]*born + newZ
	for s := Carbon; s < NumSpecies; s++ {
		cc.Species[s] = c.comp[s]*born + p.ccPat[s]*newZ
	}

	ia := &r.Channels[TypeIa]
	ia.Events = c1.iaN - c0.iaN
	ia.Mass = p.cfg.TypeIa.EjectaMass * ia.Events
	ia.Energy = p.cfg.TypeIa.Energy * ia.Events
	ia.Species[Metals] = ia.Mass
	for s := Carbon; s < NumSpecies; s++ {
		ia.Species[s] = p.cfg.TypeIa.ElementMass[s] * ia.Events
	}

	mw := &r.Channels[MassiveWinds]
	mw.Mass = c1.windMass - c0.windMass
	mw.Energy = p.windEV * mw.Mass
	for s := range mw.Species {
		mw.Species[s] = c.comp[s] * mw.Mass
	}
	mw.Species[Hydrogen] = (c.comp[Hydrogen] - c.heEn) * mw.Mass
	mw.Species[Helium] = (c.comp[Helium] + c.heEn) * mw.Mass
	if mw.Mass > 0 {
		mw.WindSpeed = p.cfg.MassiveWinds.Speed
	}

	ag := &r.Channels[AGBWinds]
	ag.Mass = c1.agbMass - c0.agbMass
	ag.Energy = p.agbEV * ag.Mass
	for s := range ag.Species {
		ag.Species[s] = c.comp[s] * ag.Mass
	}
	e := c.agbEn
	ag.Species[Hydrogen] = (c.comp[Hydrogen] - e[0] - e[1] - e[2]) * ag.Mass
	ag.Species[Helium] = (c.comp[Helium] + e[0]) * ag.Mass
	ag.Species[Carbon] = (c.comp[Carbon] + e[1]) * ag.Mass
	ag.Species[Nitrogen] = (c.comp[Nitrogen] + e[2]) * ag.Mass
	ag.Species[Metals] = (c.comp[Metals] + e[1] + e[2]) * ag.Mass
	if ag.Mass > 0 {
		ag.WindSpeed = p.cfg.AGB.Speed
	}

	if set := p.cfg.Species; !set.IsDefault() {
		// Computed in the default layout; restated in the chosen one.
		for ch := range r.Channels {
			r.Channels[ch].Species, _, _ = Restate(&r.Channels[ch].Species, DefaultSpeciesSet(), set)
		}
	}
	r.RadiantEnergy = (c1.light.lum - c0.light.lum) * units.SolarLuminosity * units.Megayear
	r.IonizingPhotons = (c1.light.ionizing - c0.light.ionizing) * units.Megayear
	r.FarUltravioletEnergy = (c1.light.fuv - c0.light.fuv) * units.SolarLuminosity * units.Megayear
	return r, nil
}

func checkAge(age, z float64) error {
	switch {
	case math.IsNaN(age) || math.IsInf(age, 0) || age < 0:
		return fmt.Errorf("yields: age %g Myr must be finite and >= 0: %w", age, ErrInput)
	case math.IsNaN(z) || z < 0 || z >= 1:
		return fmt.Errorf("yields: metallicity %g not in [0, 1): %w", z, ErrInput)
	}
	return nil
}

// Luminosity is the bolometric luminosity at an age in Lsun per Msun
// formed: the zero-age luminosity of the stars still alive, integrated over
// the IMF at the metallicity z itself (not interpolated between table
// nodes).
func (p *Population) Luminosity(age, z float64) (float64, error) {
	l, err := p.lightAt(age, z)
	return l.lum, err
}

// IonizingRate is the hydrogen-ionizing photon rate at an age in photons/s
// per Msun formed, computed as Luminosity.
func (p *Population) IonizingRate(age, z float64) (float64, error) {
	l, err := p.lightAt(age, z)
	return l.ionizing, err
}

// FarUltravioletLuminosity is the far-ultraviolet (6–13.6 eV) luminosity at
// an age in Lsun per Msun formed, computed as Luminosity.
func (p *Population) FarUltravioletLuminosity(age, z float64) (float64, error) {
	l, err := p.lightAt(age, z)
	return l.fuv, err
}

// lightAt integrates the light of the stars alive at an age over the IMF.
func (p *Population) lightAt(age, z float64) (starLight, error) {
	if err := checkAge(age, z); err != nil {
		return starLight{}, err
	}
	life, err := NewLifetimes(z)
	if err != nil {
		return starLight{}, err
	}
	ms, err := NewZAMS(z)
	if err != nil {
		return starLight{}, err
	}
	x := math.Min(life.TurnoffMass(age), p.imf.MaxMass())
	alive := func(m float64) tableTerms { return tableTerms{alive: ms.light(m).scale(p.imf.Density(m))} }
	var s tableTerms
	for j := 0; j+1 < len(p.lightEdges) && p.lightEdges[j] < x; j++ {
		s = s.add(integrateLogMass(p.gx, p.gw, alive, p.lightEdges[j], math.Min(x, p.lightEdges[j+1])))
	}
	return s.alive, nil
}
