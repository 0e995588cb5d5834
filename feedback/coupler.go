package feedback

import (
	"fmt"
	"math"
	"slices"
	"sync"

	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Config sets up a Coupler. Lengths, masses, velocities and energies in the
// gas and the sources are in the code units given here.
type Config struct {
	// Units are the host's code units.
	Units units.CodeUnits
	// Scheme splits each release; nil means TerminalMomentum with the
	// Kim & Ostriker 2015 fit. A scheme with a Validate() error method
	// (the built-in ones with settings) is checked by NewCoupler.
	Scheme Scheme
	// Weighting shares the release among neighbors before the isotropy
	// correction.
	Weighting Weighting
	// SkipIsotropyCorrection turns the isotropy correction off (for
	// comparisons); the net momentum is still removed so that momentum is
	// conserved, and the residual is reported.
	SkipIsotropyCorrection bool
	// Neighbors is the number of nearest gas elements each star couples
	// to; 0 means 32. Ignored when Radius > 0.
	Neighbors int
	// Radius, when positive, couples each star to all gas within this
	// distance (code length) instead of a fixed number of neighbors. With
	// host-supplied neighbor lists, a huge radius takes whole rows.
	Radius float64
	// Workers is the number of goroutines; 0 means 1. Results are bitwise
	// the same for any number.
	Workers int
	// Box is the periodic box (zero for none), used for star-to-gas
	// separations.
	Box neighbor.Box
	// Species is the species set the sources' species masses, the records
	// and the gas species columns (Gas.Species slots) are laid out by: the
	// user's choice of tracked elements; the zero value is
	// yields.DefaultSpeciesSet. A gas column naming a slot the set does
	// not use is refused; errors name species by the set's symbols. A
	// Stepper fills it from its yields model.
	Species yields.SpeciesSet
}

// DefaultNeighbors is the neighbor count used when Config.Neighbors is 0.
const DefaultNeighbors = 32

// Coupler deposits releases into gas. It holds per-worker scratch and is
// reused from call to call; one Coupler must not run two Couple calls at
// once (create one per concurrent simulation).
type Coupler struct {
	cfg     Config
	scheme  Scheme
	workers []workerScratch
	slots   []slot
	order   []int
	mu      sync.Mutex
	call    callState
	pool    workerPool
}

// callState is what the workers of one Couple call share; it lives in the
// Coupler so a call allocates nothing.
type callState struct {
	gas       *Gas
	finder    neighbor.Finder
	sources   []Source
	out       *Output
	fixed     bool
	metals    Column
	hasMetals bool
}

type slot struct {
	worker, start, count int
	ledger               Ledger
	err                  error
}

type workerScratch struct {
	nb      Neighborhood
	found   []neighbor.Neighbor
	grown   []neighbor.Neighbor
	deps    []Deposit
	records []Record
}

// NewCoupler checks the configuration and prepares a coupler.
func NewCoupler(cfg Config) (*Coupler, error) {
	if err := cfg.Units.Validate(); err != nil {
		return nil, errorf(ErrInvalidArgument, "coupler: %w", err)
	}
	if cfg.Scheme == nil {
		cfg.Scheme = TerminalMomentum{Fit: KimOstriker2015}
	}
	if cfg.Neighbors == 0 {
		cfg.Neighbors = DefaultNeighbors
	}
	if cfg.Neighbors < 0 {
		return nil, errorf(ErrInvalidArgument, "coupler: neighbor count %d must be positive", cfg.Neighbors)
	}
	if !(cfg.Radius >= 0) {
		return nil, errorf(ErrInvalidArgument, "coupler: radius %g must be non-negative", cfg.Radius)
	}
	if cfg.Workers == 0 {
		cfg.Workers = 1
	}
	if cfg.Workers < 0 || cfg.Workers > 4096 {
		return nil, errorf(ErrInvalidArgument, "coupler: worker count %d outside 1..4096", cfg.Workers)
	}
	if v, ok := cfg.Scheme.(interface{ Validate() error }); ok {
		if err := v.Validate(); err != nil {
			return nil, fmt.Errorf("coupler: scheme %s: %w", cfg.Scheme.Name(), err)
		}
	}
	if cfg.Weighting != KernelVolume && cfg.Weighting != SolidAngle {
		return nil, errorf(ErrInvalidArgument, "coupler: unknown weighting %d", cfg.Weighting)
	}
	for a := 0; a < 3; a++ {
		if !(cfg.Box.Size[a] >= 0) || math.IsInf(cfg.Box.Size[a], 0) {
			return nil, errorf(ErrInvalidArgument, "coupler: box size %g on axis %d must be finite and non-negative", cfg.Box.Size[a], a)
		}
	}
	c := &Coupler{cfg: cfg, scheme: cfg.Scheme, workers: make([]workerScratch, cfg.Workers)}
	for i := range c.workers {
		c.workers[i].nb.correct = !cfg.SkipIsotropyCorrection
		c.workers[i].nb.Units = cfg.Units
	}
	return c, nil
}

// Config returns the configuration in force (with defaults filled in).
func (c *Coupler) Config() Config { return c.cfg }

// Couple deposits every source's release into the gas around it. finder
// must have been built on the same gas (the same element order). Records
// are written to out.Records (not applied: call Apply, or send them to the
// owning rank first), and out.Ledger accounts for everything. A source
// that cannot be coupled (bad values, no neighbors, a neighbor with bad
// fields) is returned whole (out.Undeposited, and the ledger's Undeposited
// when its amounts are finite) and listed in out.Problems; Couple's error
// is for problems with the call itself.
func (c *Coupler) Couple(gas *Gas, finder neighbor.Finder, sources []Source, out *Output) error {
	if !c.mu.TryLock() {
		return fmt.Errorf("couple: coupler %w", ErrBusy)
	}
	defer c.mu.Unlock()
	if out == nil {
		return errorf(ErrInvalidArgument, "couple: nil output")
	}
	out.Records = out.Records[:0]
	out.Problems = out.Problems[:0]
	out.Undeposited = out.Undeposited[:0]
	out.Ledger = Ledger{}
	if err := gas.Validate(); err != nil {
		return fmt.Errorf("couple: %w", err)
	}
	if err := checkGasSpecies(gas, c.cfg.Species); err != nil {
		return fmt.Errorf("couple: %w", err)
	}
	if finder == nil {
		return errorf(ErrInvalidArgument, "couple: nil neighbor finder")
	}
	n := len(sources)
	if cap(out.Undeposited) < n {
		out.Undeposited = make([]Quantities, n)
	}
	out.Undeposited = out.Undeposited[:n]
	if cap(c.slots) < n {
		c.slots = make([]slot, n)
		c.order = make([]int, n)
	}
	c.slots = c.slots[:n]
	c.order = c.order[:n]
	for w := range c.workers {
		c.workers[w].records = c.workers[w].records[:0]
	}
	metals, hasMetals := gas.speciesColumn(yields.Metals)

	// With a fixed neighbor count every star's records go straight to
	// their final place in out.Records (k slots per star, compacted after);
	// with a radius they collect in per-worker buffers and are copied.
	_, grows := c.grower()
	fixed := c.cfg.Radius == 0 && !grows
	k := c.cfg.Neighbors
	if fixed {
		if cap(out.Records) < n*k {
			out.Records = make([]Record, n*k)
		}
		out.Records = out.Records[:n*k]
	}
	cs := &c.call
	cs.gas, cs.finder, cs.sources, cs.out, cs.fixed = gas, finder, sources, out, fixed
	cs.metals, cs.hasMetals = metals, hasMetals
	err := c.pool.run(c, len(c.workers), n)
	cs.gas, cs.finder, cs.sources, cs.out, cs.metals = nil, nil, nil, nil, Column{}
	if err != nil {
		// A worker panicked: nothing of the call is deposited.
		out.Records, out.Undeposited = out.Records[:0], out.Undeposited[:0]
		return fmt.Errorf("couple: %w", err)
	}

	kept := 0
	for i := range c.slots {
		sl := &c.slots[i]
		if fixed {
			if kept != sl.start {
				copy(out.Records[kept:], out.Records[sl.start:sl.start+sl.count])
			}
			kept += sl.count
		} else {
			out.Records = append(out.Records, c.workers[sl.worker].records[sl.start:sl.start+sl.count]...)
		}
		out.Undeposited[i] = sl.ledger.Undeposited
		if sl.err != nil {
			// A source with a problem is returned whole, also when its
			// ledger could not book it.
			out.Undeposited[i] = sourceQuantities(&sources[i])
			out.Problems = append(out.Problems, Problem{StarID: sources[i].Star.ID, Index: i, Channel: sources[i].Channel, Err: sl.err})
		}
		c.order[i] = i
	}
	if fixed {
		out.Records = out.Records[:kept]
	}
	// Sum ledgers in star-ID order so the totals do not depend on the input
	// order of the stars.
	slices.SortFunc(c.order, func(a, b int) int {
		if d := cmpInt64(sources[a].Star.ID, sources[b].Star.ID); d != 0 {
			return d
		}
		return a - b
	})
	for _, i := range c.order {
		out.Ledger.Add(&c.slots[i].ledger)
	}
	return nil
}

func cmpInt64(a, b int64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// runItem couples source i on worker w's scratch, writing its slot.
func (c *Coupler) runItem(w, i int) {
	cs := &c.call
	ws := &c.workers[w]
	k := c.cfg.Neighbors
	sl := &c.slots[i]
	sl.worker = w
	var dst []Record
	if cs.fixed {
		sl.start = i * k
		dst = cs.out.Records[i*k : i*k : i*k+k]
	} else {
		sl.start = len(ws.records)
		dst = ws.records
	}
	dst, sl.ledger, sl.err = c.coupleOne(ws, cs.gas, cs.finder, &cs.sources[i], i, cs.metals, cs.hasMetals, dst)
	if cs.fixed {
		sl.count = len(dst)
	} else {
		sl.count = len(dst) - sl.start
		ws.records = dst
	}
}

// depositsFinite reports whether every amount of every deposit is finite.
func depositsFinite(deps []Deposit) bool {
	for j := range deps {
		d := &deps[j]
		sum := d.Mass + d.Energy + d.Heat + d.Radiated + d.HoldCoolingUntil + d.HydroDecoupledUntil + d.FUVField +
			d.Momentum[0] + d.Momentum[1] + d.Momentum[2]
		for _, m := range d.Species {
			sum += m
		}
		// A sum of finite numbers can overflow to Inf: check it, and fall
		// back to one by one only then.
		if !finite(sum) {
			vals := [...]float64{d.Mass, d.Energy, d.Heat, d.Radiated, d.HoldCoolingUntil, d.HydroDecoupledUntil, d.FUVField,
				d.Momentum[0], d.Momentum[1], d.Momentum[2]}
			for _, v := range vals {
				if !finite(v) {
					return false
				}
			}
			for _, m := range d.Species {
				if !finite(m) {
					return false
				}
			}
		}
	}
	return true
}

// quantitiesFinite reports whether every amount of q is finite.
func quantitiesFinite(q *Quantities) bool {
	sum := q.Mass + q.Energy + q.Momentum[0] + q.Momentum[1] + q.Momentum[2]
	for _, m := range q.Species {
		sum += m
	}
	if finite(sum) {
		return true
	}
	// A sum of finite amounts can overflow: look at them one by one.
	for _, v := range [...]float64{q.Mass, q.Energy, q.Momentum[0], q.Momentum[1], q.Momentum[2]} {
		if !finite(v) {
			return false
		}
	}
	for _, m := range q.Species {
		if !finite(m) {
			return false
		}
	}
	return true
}

// undeposited books a whole source as returned to the caller.
func undeposited(src *Source, err error) (Ledger, error) {
	l := Ledger{Stars: 1, Skipped: 1}
	l.In = sourceQuantities(src)
	l.Undeposited = l.In
	l.EnergyScale = math.Abs(l.In.Energy)
	return l, err
}

// coupleOne handles one source: find its gas, weigh it, let the scheme
// split the release, and append records.
func (c *Coupler) coupleOne(ws *workerScratch, gas *Gas, finder neighbor.Finder, src *Source, idx int, metals Column, hasMetals bool, recs []Record) ([]Record, Ledger, error) {
	l, err := c.coupleInto(ws, gas, finder, src, idx, metals, hasMetals, &recs)
	return recs, l, err
}

// coupleInto does the work of coupleOne, appending records to *recs.
func (c *Coupler) coupleInto(ws *workerScratch, gas *Gas, finder neighbor.Finder, src *Source, idx int, metals Column, hasMetals bool, recs *[]Record) (Ledger, error) {
	if err := src.ValidateIn(c.cfg.Species); err != nil {
		// A refused release is returned whole (Couple writes it to
		// Output.Undeposited). The ledger books it, as going in and coming
		// back, only when its amounts are finite: a NaN would spoil every
		// sum.
		if q := sourceQuantities(src); quantitiesFinite(&q) {
			return undeposited(src, err)
		}
		return Ledger{Stars: 1, Skipped: 1}, err
	}
	if src.Mass == 0 && src.Energy == 0 && src.Photons == 0 {
		// Nothing released: nothing to find or book.
		return Ledger{Stars: 1}, nil
	}
	q := neighbor.Query{Pos: src.Star.Pos, Star: idx}
	var err error
	if c.cfg.Radius > 0 {
		ws.found, err = finder.Within(q, c.cfg.Radius, ws.found)
	} else {
		ws.found, err = finder.Nearest(q, c.cfg.Neighbors, ws.found)
	}
	if err != nil {
		return undeposited(src, errorf(ErrNoNeighbors, "star %d: neighbor search: %w", src.Star.ID, err))
	}
	k := len(ws.found)
	if c.cfg.Radius == 0 && k > c.cfg.Neighbors {
		return undeposited(src, errorf(ErrNoNeighbors, "star %d: finder returned %d neighbors, %d asked for", src.Star.ID, k, c.cfg.Neighbors))
	}
	if k == 0 {
		return undeposited(src, errorf(ErrNoNeighbors, "star %d: no gas neighbors", src.Star.ID))
	}
	kinetic, err := c.gather(ws, gas, src, metals, hasMetals)
	if err != nil {
		return undeposited(src, err)
	}
	nb := &ws.nb
	if g, ok := c.grower(); ok {
		kinetic = c.grow(g, ws, gas, finder, q, src, metals, hasMetals, kinetic)
		k = nb.Len()
	}
	baseWeights(c.cfg.Weighting, nb.Dist, nb.Mass, nb.Density, nb.Weight)
	if nb.correct {
		tilt(nb.Weight, nb.Dir, nb.scratch)
		normalize(nb.Weight)
	}
	copy(nb.EnergyWeight, nb.Weight)
	if cap(ws.deps) < k {
		ws.deps = make([]Deposit, k)
	}
	deps := ws.deps[:k]
	radiated, err := c.scheme.Deposit(nb, deps)
	if err != nil {
		return undeposited(src, fmt.Errorf("star %d: scheme %s: %w", src.Star.ID, c.scheme.Name(), err))
	}
	// Extreme but finite gas values (1e300) can overflow inside a scheme:
	// such a star is returned, never written as non-finite records.
	if !finite(radiated) || !finite(nb.returned) || !depositsFinite(deps) {
		return undeposited(src, errorf(ErrBadValue, "star %d: scheme %s produced non-finite amounts (gas or release values out of floating-point range)", src.Star.ID, c.scheme.Name()))
	}
	l := Ledger{Stars: 1, Radiated: radiated}
	l.In = sourceQuantities(src)
	l.Undeposited.Energy = nb.returned
	l.Photons, l.EscapedPhotons = src.Photons, nb.escaped
	for j := range deps {
		d := &deps[j]
		l.Deposited.Mass += d.Mass
		for sp := range d.Species {
			l.Deposited.Species[sp] += d.Species[sp]
		}
		for a := 0; a < 3; a++ {
			l.Deposited.Momentum[a] += d.Momentum[a]
		}
		l.Deposited.Energy += d.Energy
		m := nb.Mass[j]
		mt := m + d.Mass
		var dv, kick [3]float64
		for a := 0; a < 3; a++ {
			dv[a] = (d.Momentum[a] - d.Mass*nb.Vel[j][a]) / mt
			kick[a] = d.Momentum[a] - d.Mass*src.Star.Vel[a]
		}
		w := nb.RelVel[j]
		l.KickEnergy += (2*m*dot(w, kick) + dot(kick, kick) - m*d.Mass*dot(w, w)) / (2 * mt)
		l.Heat += d.Heat
		*recs = append(*recs, Record{
			GasIndex: nb.Index[j], GasID: nb.ID[j], StarID: src.Star.ID, Channel: src.Channel,
			Deposit: *d, Kick: norm(dv), Heating: d.Heat / mt,
		})
	}
	if nb.capped {
		l.Capped = 1
	}
	if nb.limited {
		l.Limited = 1
	}
	l.MaxIsotropyResidual = nb.residual
	l.SumIsotropyResidual = nb.residual
	l.RadialMomentum = nb.radial
	l.MomentumScale = nb.pscale + math.Sqrt(dot(l.In.Momentum, l.In.Momentum))
	l.EnergyScale = kinetic + math.Abs(l.In.Energy)
	return l, nil
}

// gather reads the neighbors in ws.found into ws.nb, checks them and
// derives distances, directions and star-frame velocities; it returns the
// neighbors' lab-frame kinetic energy.
func (c *Coupler) gather(ws *workerScratch, gas *Gas, src *Source, metals Column, hasMetals bool) (float64, error) {
	k := len(ws.found)
	nb := &ws.nb
	nb.resize(k)
	nb.Source = src
	vs := src.Star.Vel
	// Gather first, in a tight loop that keeps many cache misses in
	// flight (neighbors are scattered in the host's memory); check and
	// derive afterwards. Positions wait in Dir until then.
	for j, f := range ws.found {
		i := f.Index
		if i < 0 || i >= gas.N {
			return 0, errorf(ErrNoNeighbors, "star %d: neighbor index %d outside the gas (%d elements)", src.Star.ID, i, gas.N)
		}
		nb.Index[j] = i
		nb.ID[j] = gas.ID.Int(i)
		nb.Mass[j], nb.Density[j], nb.InternalEnergy[j] = gas.Mass.At(i), gas.Density.At(i), gas.InternalEnergy.At(i)
		nb.Dir[j] = gas.position(i)
		nb.Vel[j] = gas.velocity(i)
	}
	if hasMetals {
		for j, i := range nb.Index {
			nb.Metallicity[j] = metals.At(i)
		}
	} else {
		for j := range nb.Metallicity {
			nb.Metallicity[j] = src.Star.Metallicity
		}
	}
	kinetic := 0.0
	for j := range nb.Index {
		m, rho, u, z := nb.Mass[j], nb.Density[j], nb.InternalEnergy[j], nb.Metallicity[j]
		if !(m > 0) || !(rho > 0) || !(u >= 0) || math.IsInf(m, 0) || math.IsInf(rho, 0) || math.IsInf(u, 0) {
			return 0, errorf(ErrBadValue, "star %d: gas element %d (ID %d) has mass %g, density %g, internal energy %g: need positive finite mass and density and finite non-negative energy", src.Star.ID, nb.Index[j], nb.ID[j], m, rho, u)
		}
		p, v := nb.Dir[j], nb.Vel[j]
		var d [3]float64
		for a := 0; a < 3; a++ {
			d[a] = p[a] - src.Star.Pos[a]
		}
		d = c.cfg.Box.MinImage(d)
		r := math.Sqrt(dot(d, d))
		if !(z >= 0 && z <= 1) {
			return 0, errorf(ErrBadValue, "star %d: gas element %d (ID %d) has metal mass fraction %g, outside [0, 1]", src.Star.ID, nb.Index[j], nb.ID[j], z)
		}
		if !finite(r) || !finite(dot(v, v)) {
			return 0, errorf(ErrBadValue, "star %d: gas element %d (ID %d) has a non-finite position or velocity", src.Star.ID, nb.Index[j], nb.ID[j])
		}
		nb.Dist[j] = r
		if r > 0 {
			nb.Dir[j] = [3]float64{d[0] / r, d[1] / r, d[2] / r}
		} else {
			nb.Dir[j] = [3]float64{}
		}
		nb.RelVel[j] = [3]float64{v[0] - vs[0], v[1] - vs[1], v[2] - vs[2]}
		kinetic += 0.5 * m * dot(v, v)
	}
	return kinetic, nil
}

// neighborGrower is a scheme that may need more gas than the coupler's
// neighbors (photoionization, whose photons can reach beyond them):
// neighborsWanted returns how many nearest neighbors it wants, or no more
// than nb.Len() when it has enough.
type neighborGrower interface {
	neighborsWanted(nb *Neighborhood) int
	// reachLimit is the most neighbors it may ever want.
	reachLimit() int
}

// grower returns the scheme as a neighborGrower if it may want more
// neighbors than the coupler finds.
func (c *Coupler) grower() (neighborGrower, bool) {
	g, ok := c.scheme.(neighborGrower)
	if !ok || (c.cfg.Radius == 0 && g.reachLimit() <= c.cfg.Neighbors) {
		return nil, false
	}
	return g, true
}

// grow extends ws.nb, nearest first, for as long as the scheme wants more
// neighbors and the finder can give them; where it cannot (the gas runs
// out, the host's lists are shorter, a neighbor has bad fields), the
// neighborhood found last is kept. It returns the kinetic energy of the
// neighborhood kept.
func (c *Coupler) grow(g neighborGrower, ws *workerScratch, gas *Gas, finder neighbor.Finder, q neighbor.Query, src *Source, metals Column, hasMetals bool, kinetic float64) float64 {
	for {
		k := ws.nb.Len()
		want := min(g.neighborsWanted(&ws.nb), gas.N)
		if want <= k {
			return kinetic
		}
		found, err := finder.Nearest(q, want, ws.grown)
		ws.grown = found
		if err != nil || len(found) <= k {
			return kinetic
		}
		ws.found, ws.grown = ws.grown, ws.found
		ke, err := c.gather(ws, gas, src, metals, hasMetals)
		if err != nil {
			// Keep the neighborhood that was fine (it gathers again
			// without error: the same elements).
			ws.found, ws.grown = ws.grown, ws.found
			kinetic, _ = c.gather(ws, gas, src, metals, hasMetals)
			return kinetic
		}
		kinetic = ke
	}
}
