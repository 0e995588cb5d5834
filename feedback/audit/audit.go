package audit

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
)

// Star is one star of a host's feedback step as the audit sees it:
// where it was, how it moved, how far its feedback may reach, and what it
// released (star frame: the ejecta move with the star) and booked as
// radiated. Amounts in the host's code units.
type Star struct {
	ID       int64
	Pos, Vel [3]float64
	// Radius is the coupling radius: gas farther away must not change.
	Radius float64
	// Mass, Species and Energy are the released ejecta mass, species
	// masses and energy; Radiated is the energy the host booked as lost.
	Mass     float64
	Species  yields.Abundances
	Energy   float64
	Radiated float64
}

// Options set the audit's tolerances. Every value means what it says
// (a zero tolerance accepts only exact balances); DefaultOptions gives the
// usual ones.
type Options struct {
	// Box is the periodic box (zero for none).
	Box neighbor.Box
	// Tolerance is the largest relative imbalance accepted for each
	// conserved quantity, finite and non-negative.
	Tolerance float64
	// IsotropyTolerance is the largest net star-frame momentum accepted, as
	// a fraction of the momentum a star handed out, finite and
	// non-negative.
	IsotropyTolerance float64
	// Species is the species set the species slots of the gas and the
	// stars are laid out by (the user's choice of tracked elements); the
	// zero value is yields.DefaultSpeciesSet. It names the species in the
	// report.
	Species yields.SpeciesSet
}

// Default tolerances: a float64 step conserves to about 1e-14 of the gas
// totals, so 1e-10 of the release leaves room for round-off in large
// snapshots; an isotropy-corrected deposit leaves a net star-frame
// momentum of round-off, while a one-sided one leaves an order-one
// fraction.
const (
	DefaultTolerance         = 1e-10
	DefaultIsotropyTolerance = 1e-6
)

// DefaultOptions are the usual tolerances, DefaultTolerance and
// DefaultIsotropyTolerance, with an open box.
func DefaultOptions() Options {
	return Options{Tolerance: DefaultTolerance, IsotropyTolerance: DefaultIsotropyTolerance}
}

// Validate refuses tolerances that are negative or not finite (a NaN
// tolerance would accept any dump).
func (o *Options) Validate() error {
	if !(o.Tolerance >= 0) || math.IsInf(o.Tolerance, 0) {
		return fmt.Errorf("tolerance %g must be finite and non-negative", o.Tolerance)
	}
	if !(o.IsotropyTolerance >= 0) || math.IsInf(o.IsotropyTolerance, 0) {
		return fmt.Errorf("isotropy tolerance %g must be finite and non-negative", o.IsotropyTolerance)
	}
	return o.Box.Validate()
}

// Imbalance is the balance of one conserved quantity: what the gas gained,
// what the stars' releases say it should have gained, and the difference
// in absolute terms and relative to the larger of the release and the
// momentum handed out. When it failed, Elements names the gas elements
// (by ID) the failure is traced to and Stars the stars involved: elements
// that changed with no star in range, then the elements of every star, or
// group of stars sharing gas, whose own balance fails (the ones that lost
// the quantity first, then by the size of their change). The totals alone
// cannot tell which element of a group is wrong, so every element of a
// failing group is named.
type Imbalance struct {
	Quantity string  `json:"quantity"`
	Gained   float64 `json:"gained"`
	Expected float64 `json:"expected"`
	Absolute float64 `json:"absolute"`
	Relative float64 `json:"relative"`
	Failed   bool    `json:"failed"`
	Elements []int64 `json:"elements"`
	Stars    []int64 `json:"stars"`
}

// StarIsotropy is the momentum a star handed out in its own frame: the
// magnitude of the vector sum over the gas it touched, less its ejecta's
// momentum, and the sum of the magnitudes. Stars whose ranges share changed
// elements cannot be told apart, so they are judged as one group (Stars
// lists them; the frame is their ejecta-mass-weighted mean velocity).
// Elements counts the changed elements of the group.
type StarIsotropy struct {
	Stars    []int64 `json:"stars"`
	Net      float64 `json:"net"`
	Total    float64 `json:"total"`
	Relative float64 `json:"relative"`
	Failed   bool    `json:"failed"`
	Elements int     `json:"elements"`
}

// Report is what Step found. Its lists are empty, never nil.
type Report struct {
	Imbalances []Imbalance    `json:"imbalances"`
	Isotropy   []StarIsotropy `json:"isotropy"`
	// NegativeMass and NegativeEnergy list elements (by ID) whose mass or
	// internal energy is not positive (not non-negative) after the step.
	NegativeMass   []int64 `json:"negative_mass"`
	NegativeEnergy []int64 `json:"negative_energy"`
	// Unexplained lists elements that changed with no star in range.
	Unexplained []int64 `json:"unexplained"`
	// Problems are human-readable failures, one per line; empty when the
	// dump passes.
	Problems []string `json:"problems"`
}

// Failed reports whether any check failed.
func (r *Report) Failed() bool { return len(r.Problems) > 0 }

// component is one conserved quantity as a balance sees it.
type component struct {
	name string
	get  func(q *feedback.Quantities) float64
	// sink: the gas can only gain this quantity from feedback.
	sink bool
	// momentum: judged against the momentum handed out.
	momentum bool
}

func components(species []yields.Species, set yields.SpeciesSet) []component {
	cs := []component{{name: "mass", get: func(q *feedback.Quantities) float64 { return q.Mass }, sink: true}}
	for _, sp := range species {
		cs = append(cs, component{name: "species " + set.Symbol(sp), get: func(q *feedback.Quantities) float64 { return q.Species[sp] }, sink: true})
	}
	for k, axis := range []string{"x", "y", "z"} {
		cs = append(cs, component{name: "momentum " + axis, get: func(q *feedback.Quantities) float64 { return q.Momentum[k] }, momentum: true})
	}
	return append(cs, component{name: "energy", get: func(q *feedback.Quantities) float64 { return q.Energy }})
}

// group is a set of stars whose ranges share changed elements, with the
// elements they changed.
type group struct {
	stars    []int
	ids      []int64
	elements []int // before-indices
	want     feedback.Quantities
	pej, vm  [3]float64
	mej      float64
	net      [3]float64
	total    float64
	held     float64 // sum of |momentum| before and after, for round-off
}

// Step checks one feedback step done by any code: the gas before and after
// (matched by ID; the order may differ) and the stars with what they
// released. It checks that mass, every species, momentum and energy gained
// by the gas equal the releases (ejecta moving with their star; energy
// less what was booked radiated), in total and for every star or group of
// stars sharing gas; that each star's kicks sum to zero in its frame; that
// no mass or internal energy went negative; and that no element out of
// every star's range changed. Ejecta mass moves with its star, so the net
// star-frame momentum of a star (or of a group of stars sharing gas) is
// the gas's momentum gain less the ejecta's momentum. Every failed balance
// names the elements it is traced to (see Imbalance).
func Step(before, after *GasArrays, stars []Star, opts Options) (*Report, error) {
	if err := opts.Validate(); err != nil {
		return nil, fmt.Errorf("audit: %w", err)
	}
	if before == nil || after == nil {
		return nil, errors.New("audit: missing gas")
	}
	if err := before.check("before"); err != nil {
		return nil, fmt.Errorf("audit: %w", err)
	}
	if err := after.check("after"); err != nil {
		return nil, fmt.Errorf("audit: %w", err)
	}
	if before.Len() != after.Len() {
		return nil, fmt.Errorf("audit: %d elements before, %d after: elements must not appear or vanish", before.Len(), after.Len())
	}
	if err := checkSlots("gas before", before.Species, opts.Species); err != nil {
		return nil, fmt.Errorf("audit: %w", err)
	}
	if !sameSpecies(before.Species, after.Species) {
		return nil, fmt.Errorf("audit: the gas tracks species %s before and %s after: they must be the same",
			symbols(before.Species, opts.Species), symbols(after.Species, opts.Species))
	}
	idx := make(map[int64]int, after.Len())
	for i, id := range after.ID {
		if _, dup := idx[id]; dup {
			return nil, fmt.Errorf("audit: gas ID %d appears twice after the step", id)
		}
		idx[id] = i
	}
	match := make([]int, before.Len())
	for i, id := range before.ID {
		j, ok := idx[id]
		if !ok {
			return nil, fmt.Errorf("audit: gas ID %d is missing after the step", id)
		}
		match[i] = j
	}
	for _, s := range stars {
		if !(s.Radius >= 0) || math.IsInf(s.Radius, 0) {
			return nil, fmt.Errorf("audit: star %d: radius %g must be finite and non-negative", s.ID, s.Radius)
		}
	}
	rep := &Report{Imbalances: []Imbalance{}, Isotropy: []StarIsotropy{}, NegativeMass: []int64{},
		NegativeEnergy: []int64{}, Unexplained: []int64{}, Problems: []string{}}

	// What each element gained, and the scales its round-off is judged by.
	n := before.Len()
	gain := make([]feedback.Quantities, n)
	held := make([]feedback.Quantities, n) // |before| + |after|, component by component
	kick := make([]float64, n)             // |star-frame kick| in the mean star frame
	vmean := meanStarVel(stars)
	for i := range gain {
		b, a := before.Element(i), after.Element(match[i])
		gain[i] = a
		gain[i].Sub(&b)
		held[i] = absSum(&b, &a)
		var dp [3]float64
		for k := 0; k < 3; k++ {
			dp[k] = gain[i].Momentum[k] - gain[i].Mass*vmean[k]
		}
		kick[i] = norm(dp)
	}

	// Group the stars that share changed elements (union-find), and find
	// the elements that changed with no star in range.
	parent := make([]int, len(stars))
	for i := range parent {
		parent[i] = i
	}
	find := func(x int) int {
		for parent[x] != x {
			parent[x] = parent[parent[x]]
			x = parent[x]
		}
		return x
	}
	inRange := func(s *Star, i int) bool {
		d := [3]float64{before.Pos[0][i] - s.Pos[0], before.Pos[1][i] - s.Pos[1], before.Pos[2][i] - s.Pos[2]}
		d = opts.Box.MinImage(d)
		return d[0]*d[0]+d[1]*d[1]+d[2]*d[2] <= s.Radius*s.Radius
	}
	owner := make([]int, n) // a star in range of each changed element, or -1
	var owners []int
	for i := range owner {
		j := match[i]
		owner[i] = -1
		if !(after.Mass[j] > 0) {
			rep.NegativeMass = append(rep.NegativeMass, before.ID[i])
		}
		if !(after.Energy[j] >= 0) {
			rep.NegativeEnergy = append(rep.NegativeEnergy, before.ID[i])
		}
		if !changed(before, after, i, j) {
			continue
		}
		owners = owners[:0]
		for s := range stars {
			if inRange(&stars[s], i) {
				owners = append(owners, s)
			}
		}
		if len(owners) == 0 {
			rep.Unexplained = append(rep.Unexplained, before.ID[i])
			continue
		}
		owner[i] = owners[0]
		for _, o := range owners[1:] {
			parent[find(o)] = find(owners[0])
		}
	}
	slices.Sort(rep.Unexplained)
	groups := map[int]*group{}
	var order []*group
	for s := range stars {
		r := find(s)
		g := groups[r]
		if g == nil {
			g = &group{}
			groups[r] = g
			order = append(order, g)
		}
		st := &stars[s]
		g.stars = append(g.stars, s)
		g.ids = append(g.ids, st.ID)
		g.mej += st.Mass
		v2 := 0.0
		for k := 0; k < 3; k++ {
			g.pej[k] += st.Mass * st.Vel[k]
			v2 += st.Vel[k] * st.Vel[k]
		}
		g.want.Mass += st.Mass
		for sp := range g.want.Species {
			g.want.Species[sp] += st.Species[sp]
		}
		for k := 0; k < 3; k++ {
			g.want.Momentum[k] += st.Mass * st.Vel[k]
		}
		g.want.Energy += st.Energy + 0.5*st.Mass*v2 - st.Radiated
	}
	for _, g := range order {
		for k := 0; k < 3; k++ {
			if g.mej > 0 {
				g.vm[k] = g.pej[k] / g.mej
			}
			g.net[k] = -g.pej[k]
		}
	}
	unexplained := make([]int, 0, len(rep.Unexplained))
	for i := range owner {
		if owner[i] < 0 {
			if changed(before, after, i, match[i]) {
				unexplained = append(unexplained, i)
			}
			continue
		}
		g := groups[find(owner[i])]
		g.elements = append(g.elements, i)
		var dp [3]float64
		for k := 0; k < 3; k++ {
			g.net[k] += gain[i].Momentum[k]
			dp[k] = gain[i].Momentum[k] - gain[i].Mass*g.vm[k]
		}
		g.total += norm(dp)
		g.held += held[i].Momentum[0] + held[i].Momentum[1] + held[i].Momentum[2]
	}

	// Balances, in total and per group. Each is judged relative to the
	// release (or, for momentum, the momentum handed out), plus the
	// round-off of the gas amounts the difference was taken from (1e-14
	// of them).
	var want, total, heldAll feedback.Quantities
	handed := 0.0
	for _, g := range order {
		want.Add(&g.want)
	}
	for i := range gain {
		total.Add(&gain[i])
		heldAll.Add(&held[i])
		handed += kick[i]
	}
	fails := func(c component, gained, expected, ref, roundoff float64) (abs, rel float64, failed bool) {
		abs = gained - expected
		ref = math.Max(ref, math.Abs(expected))
		if ref > 0 {
			rel = math.Abs(abs) / ref
		}
		return abs, rel, math.Abs(abs) > opts.Tolerance*ref+1e-14*roundoff || math.IsNaN(abs)
	}
	for _, c := range components(before.Species, opts.Species) {
		ref := 0.0
		if c.momentum {
			ref = handed
		}
		abs, rel, failed := fails(c, c.get(&total), c.get(&want), ref, c.get(&heldAll))
		im := Imbalance{Quantity: c.name, Gained: c.get(&total), Expected: c.get(&want), Absolute: abs, Relative: rel,
			Failed: failed, Elements: []int64{}, Stars: []int64{}}
		// Trace the balance to elements: unexplained changes, then the
		// groups whose own balance fails.
		for _, i := range unexplained {
			if c.get(&gain[i]) != 0 {
				im.Elements = append(im.Elements, before.ID[i])
			}
		}
		var worst *group
		worstRel := -1.0
		var failing []*group
		for _, g := range order {
			var gg, gh feedback.Quantities
			for _, i := range g.elements {
				gg.Add(&gain[i])
				gh.Add(&held[i])
			}
			ref := 0.0
			if c.momentum {
				ref = g.total
			}
			_, grel, gfailed := fails(c, c.get(&gg), c.get(&g.want), ref, c.get(&gh))
			if gfailed {
				failing = append(failing, g)
			}
			if grel > worstRel || math.IsNaN(grel) {
				worst, worstRel = g, grel
			}
			if gfailed && !failed {
				rep.Problems = append(rep.Problems, fmt.Sprintf("%s imbalance within stars %v: their gas gained %.6g, they released %.6g (relative %.3g > %.3g) while the totals balance: elements %s",
					c.name, g.ids, c.get(&gg), c.get(&g.want), grel, opts.Tolerance, listIDs(groupElements(c, g, gain, before.ID))))
			}
		}
		if failed && len(failing) == 0 && len(im.Elements) == 0 && worst != nil {
			// The totals fail by accumulation: name the worst group.
			failing = append(failing, worst)
		}
		for _, g := range failing {
			im.Stars = append(im.Stars, g.ids...)
			im.Elements = append(im.Elements, groupElements(c, g, gain, before.ID)...)
		}
		im.Failed = failed || len(failing) > 0
		if failed {
			var where []string
			if len(im.Stars) > 0 {
				where = append(where, fmt.Sprintf("stars %v", im.Stars))
			}
			where = append(where, "elements "+listIDs(im.Elements))
			rep.Problems = append(rep.Problems, fmt.Sprintf("%s imbalance: gas gained %.6g, releases give %.6g (relative %.3g > %.3g): %s",
				c.name, im.Gained, im.Expected, rel, opts.Tolerance, strings.Join(where, ", ")))
		}
		rep.Imbalances = append(rep.Imbalances, im)
	}

	for _, g := range order {
		net := norm(g.net)
		iso := StarIsotropy{Stars: g.ids, Net: net, Total: g.total, Elements: len(g.elements)}
		if g.total > 0 {
			iso.Relative = net / g.total
		}
		// The net is a difference of the elements' momenta: it is judged
		// with their round-off (1e-14 of them) on top of the tolerance.
		iso.Failed = net > opts.IsotropyTolerance*g.total+1e-14*g.held || math.IsNaN(net)
		if iso.Failed {
			rep.Problems = append(rep.Problems, fmt.Sprintf("stars %v: net momentum in their own frame %.6g of %.6g handed out (relative %.3g > %.3g): one-sided or wrong-frame kicks",
				g.ids, net, g.total, iso.Relative, opts.IsotropyTolerance))
		}
		rep.Isotropy = append(rep.Isotropy, iso)
	}
	if len(rep.NegativeMass) > 0 {
		rep.Problems = append(rep.Problems, fmt.Sprintf("%d elements with non-positive mass after the step: %s", len(rep.NegativeMass), listIDs(rep.NegativeMass)))
	}
	if len(rep.NegativeEnergy) > 0 {
		rep.Problems = append(rep.Problems, fmt.Sprintf("%d elements with negative internal energy after the step: %s", len(rep.NegativeEnergy), listIDs(rep.NegativeEnergy)))
	}
	if len(rep.Unexplained) > 0 {
		rep.Problems = append(rep.Problems, fmt.Sprintf("%d elements changed with no star in range: %s", len(rep.Unexplained), listIDs(rep.Unexplained)))
	}
	return rep, nil
}

// groupElements lists the IDs of a group's elements for a failed balance
// of c: for a quantity the gas can only gain, the elements that lost it
// first; then by the size of their change.
func groupElements(c component, g *group, gain []feedback.Quantities, ids []int64) []int64 {
	els := slices.Clone(g.elements)
	slices.SortStableFunc(els, func(a, b int) int {
		da, db := c.get(&gain[a]), c.get(&gain[b])
		if c.sink && (da < 0) != (db < 0) {
			if da < 0 {
				return -1
			}
			return 1
		}
		switch {
		case math.Abs(da) > math.Abs(db):
			return -1
		case math.Abs(da) < math.Abs(db):
			return 1
		}
		return 0
	})
	out := make([]int64, len(els))
	for k, i := range els {
		out[k] = ids[i]
	}
	return out
}

// listIDs prints element IDs, at most ten of them.
func listIDs(ids []int64) string {
	const most = 10
	if len(ids) == 0 {
		return "none in range"
	}
	parts := make([]string, 0, most+1)
	for k, id := range ids {
		if k == most {
			parts = append(parts, fmt.Sprintf("and %d more", len(ids)-most))
			break
		}
		parts = append(parts, fmt.Sprint(id))
	}
	return strings.Join(parts, ", ")
}

// meanStarVel is the frame the momentum scale is measured in: the mean
// star velocity (the scale only needs the right magnitude).
func meanStarVel(stars []Star) [3]float64 {
	var v [3]float64
	for _, s := range stars {
		for k := 0; k < 3; k++ {
			v[k] += s.Vel[k] / float64(len(stars))
		}
	}
	return v
}

// changed reports whether element i (before) / j (after) differs in any
// field.
func changed(b, a *GasArrays, i, j int) bool {
	if b.Mass[i] != a.Mass[j] || b.Energy[i] != a.Energy[j] {
		return true
	}
	for k := 0; k < 3; k++ {
		if b.Vel[k][i] != a.Vel[k][j] {
			return true
		}
	}
	for c, sp := range b.Species {
		if ac := a.column(sp); b.Fractions[c][i] != a.Fractions[ac][j] {
			return true
		}
	}
	return false
}

func absSum(b, a *feedback.Quantities) feedback.Quantities {
	q := feedback.Quantities{Mass: math.Abs(b.Mass) + math.Abs(a.Mass), Energy: math.Abs(b.Energy) + math.Abs(a.Energy)}
	for sp := range q.Species {
		q.Species[sp] = math.Abs(b.Species[sp]) + math.Abs(a.Species[sp])
	}
	for k := 0; k < 3; k++ {
		q.Momentum[k] = math.Abs(b.Momentum[k]) + math.Abs(a.Momentum[k])
	}
	return q
}

func norm(v [3]float64) float64 { return math.Sqrt(v[0]*v[0] + v[1]*v[1] + v[2]*v[2]) }

func sameSpecies(a, b []yields.Species) bool {
	if len(a) != len(b) {
		return false
	}
	for _, sp := range a {
		if !slices.Contains(b, sp) {
			return false
		}
	}
	return true
}

// symbols names species slots in the set.
func symbols(sp []yields.Species, set yields.SpeciesSet) string {
	s := make([]string, len(sp))
	for i, x := range sp {
		s[i] = set.Symbol(x)
	}
	return "[" + strings.Join(s, " ") + "]"
}
