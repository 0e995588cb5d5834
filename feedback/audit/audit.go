package audit

import (
	"errors"
	"fmt"
	"math"
	"sort"

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

// Options set the audit's tolerances.
type Options struct {
	// Box is the periodic box (zero for none).
	Box neighbor.Box
	// Tolerance is the largest relative imbalance accepted for each
	// conserved quantity; 0 means 1e-10.
	Tolerance float64
	// IsotropyTolerance is the largest net star-frame momentum accepted, as
	// a fraction of the momentum a star handed out; 0 means 1e-6.
	IsotropyTolerance float64
}

// Imbalance is the balance of one conserved quantity: what the gas gained,
// what the stars' releases say it should have gained, and the difference
// in absolute terms and relative to Scale (the larger of the two, or the
// round-off scale of the gas total).
type Imbalance struct {
	Quantity           string
	Gained, Expected   float64
	Absolute, Relative float64
	Failed             bool
}

// StarIsotropy is the momentum a star handed out in its own frame: the
// magnitude of the vector sum over the gas it touched, less its ejecta's
// momentum, and the sum of the magnitudes. Stars whose ranges share changed
// elements cannot be told apart, so they are judged as one group (Stars
// lists them; the frame is their ejecta-mass-weighted mean velocity).
type StarIsotropy struct {
	Stars      []int64
	Net, Total float64
	Relative   float64
	Failed     bool
	Elements   int
}

// Report is what Step found.
type Report struct {
	Imbalances []Imbalance
	Isotropy   []StarIsotropy
	// NegativeMass and NegativeEnergy list elements (by ID) whose mass or
	// internal energy is not positive (not non-negative) after the step.
	NegativeMass, NegativeEnergy []int64
	// Unexplained lists elements that changed with no star in range.
	Unexplained []int64
	// Problems are human-readable failures, one per line; empty when the
	// dump passes.
	Problems []string
}

// Failed reports whether any check failed.
func (r *Report) Failed() bool { return len(r.Problems) > 0 }

// Step checks one feedback step done by any code: the gas before and
// after (matched by ID; the order may differ) and the stars with what they
// released. It checks that mass, every species, momentum and energy gained
// by the gas equal the releases (ejecta moving with their star; energy
// less what was booked radiated), that each star's kicks sum to zero in
// its frame (elements in range of several stars are shared equally among
// them), that no mass or internal energy went negative, and that no element
// out of every star's range changed. Ejecta mass moves with its star, so
// the net star-frame momentum of a star (or of a group of stars sharing
// gas) is the gas's momentum gain less the ejecta's momentum.
func Step(before, after *GasArrays, stars []Star, opts Options) (*Report, error) {
	if opts.Tolerance == 0 {
		opts.Tolerance = 1e-10
	}
	if opts.IsotropyTolerance == 0 {
		opts.IsotropyTolerance = 1e-6
	}
	if before == nil || after == nil {
		return nil, errors.New("audit: missing gas")
	}
	if before.Len() != after.Len() {
		return nil, fmt.Errorf("audit: %d elements before, %d after: elements must not appear or vanish", before.Len(), after.Len())
	}
	if err := opts.Box.Validate(); err != nil {
		return nil, fmt.Errorf("audit: %w", err)
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
	rep := &Report{}

	// Global balances.
	b, a := before.Totals(), after.Totals()
	var want feedback.Quantities
	for _, s := range stars {
		want.Mass += s.Mass
		v2 := 0.0
		for k := 0; k < 3; k++ {
			want.Momentum[k] += s.Mass * s.Vel[k]
			v2 += s.Vel[k] * s.Vel[k]
		}
		want.Energy += s.Energy + 0.5*s.Mass*v2 - s.Radiated
		for sp := range want.Species {
			want.Species[sp] += s.Species[sp]
		}
	}
	// Each imbalance is judged relative to the release (or, for momentum,
	// the momentum handed out), plus the round-off of the gas totals the
	// difference was taken from (1e-14 of them).
	pscale, handed := 0.0, 0.0
	vmean := meanStarVel(stars)
	for i := range before.Mass {
		j := match[i]
		dm := after.Mass[j] - before.Mass[i]
		var kick [3]float64
		for k := 0; k < 3; k++ {
			pscale += math.Abs(before.Mass[i]*before.Vel[k][i]) + math.Abs(after.Mass[j]*after.Vel[k][j])
			kick[k] = after.Mass[j]*after.Vel[k][j] - before.Mass[i]*before.Vel[k][i] - dm*vmean[k]
		}
		handed += math.Sqrt(kick[0]*kick[0] + kick[1]*kick[1] + kick[2]*kick[2])
	}
	check := func(name string, gained, expected, ref, roundoff float64) {
		abs := gained - expected
		ref = math.Max(ref, math.Abs(expected))
		rel := 0.0
		if ref > 0 {
			rel = math.Abs(abs) / ref
		}
		failed := math.Abs(abs) > opts.Tolerance*ref+1e-14*roundoff || math.IsNaN(abs)
		rep.Imbalances = append(rep.Imbalances, Imbalance{Quantity: name, Gained: gained, Expected: expected, Absolute: abs, Relative: rel, Failed: failed})
		if failed {
			rep.Problems = append(rep.Problems, fmt.Sprintf("%s imbalance: gas gained %.6g, releases give %.6g (relative %.3g > %.3g)", name, gained, expected, rel, opts.Tolerance))
		}
	}
	check("mass", a.Mass-b.Mass, want.Mass, 0, b.Mass+a.Mass)
	tracked := map[yields.Species]bool{}
	for _, s := range before.Species {
		tracked[s] = true
	}
	for sp := yields.Species(0); sp < yields.NumSpecies; sp++ {
		if tracked[sp] {
			check("species "+sp.Symbol(), a.Species[sp]-b.Species[sp], want.Species[sp], 0, b.Mass+a.Mass)
		}
	}
	for k, axis := range []string{"x", "y", "z"} {
		check("momentum "+axis, a.Momentum[k]-b.Momentum[k], want.Momentum[k], handed, pscale)
	}
	check("energy", a.Energy-b.Energy, want.Energy, 0, math.Abs(b.Energy)+math.Abs(a.Energy))

	// Per-element checks and attribution.
	inRange := func(s *Star, i int) bool {
		d := [3]float64{before.Pos[0][i] - s.Pos[0], before.Pos[1][i] - s.Pos[1], before.Pos[2][i] - s.Pos[2]}
		d = opts.Box.MinImage(d)
		return d[0]*d[0]+d[1]*d[1]+d[2]*d[2] <= s.Radius*s.Radius
	}
	// Group stars that share changed elements (union-find).
	parent := make([]int, len(stars))
	for i := range parent {
		parent[i] = i
	}
	var find func(int) int
	find = func(x int) int {
		for parent[x] != x {
			parent[x] = parent[parent[x]]
			x = parent[x]
		}
		return x
	}
	owner := make([]int, before.Len()) // a star in range of each changed element, or -1
	var owners []int
	for i := range before.Mass {
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
	// Per group: ejecta momentum and mass-weighted frame.
	type group struct {
		ids      []int64
		pej, vm  [3]float64
		mej      float64
		net      [3]float64
		total    float64
		elements int
	}
	groups := map[int]*group{}
	var roots []int
	for s := range stars {
		r := find(s)
		g := groups[r]
		if g == nil {
			g = &group{}
			groups[r] = g
			roots = append(roots, r)
		}
		g.ids = append(g.ids, stars[s].ID)
		g.mej += stars[s].Mass
		for k := 0; k < 3; k++ {
			g.pej[k] += stars[s].Mass * stars[s].Vel[k]
		}
	}
	for _, g := range groups {
		for k := 0; k < 3; k++ {
			if g.mej > 0 {
				g.vm[k] = g.pej[k] / g.mej
			}
			g.net[k] = -g.pej[k]
		}
	}
	for i := range before.Mass {
		if owner[i] < 0 {
			continue
		}
		g := groups[find(owner[i])]
		j := match[i]
		dm := after.Mass[j] - before.Mass[i]
		var kick [3]float64
		for k := 0; k < 3; k++ {
			dp := after.Mass[j]*after.Vel[k][j] - before.Mass[i]*before.Vel[k][i]
			g.net[k] += dp
			kick[k] = dp - dm*g.vm[k]
		}
		g.total += math.Sqrt(kick[0]*kick[0] + kick[1]*kick[1] + kick[2]*kick[2])
		g.elements++
	}
	for _, r := range roots {
		g := groups[r]
		net := math.Sqrt(g.net[0]*g.net[0] + g.net[1]*g.net[1] + g.net[2]*g.net[2])
		iso := StarIsotropy{Stars: g.ids, Net: net, Total: g.total, Elements: g.elements}
		if g.total > 0 {
			iso.Relative = net / g.total
		}
		iso.Failed = iso.Relative > opts.IsotropyTolerance
		if iso.Failed {
			rep.Problems = append(rep.Problems, fmt.Sprintf("stars %v: net momentum in their own frame %.6g of %.6g handed out (relative %.3g > %.3g): one-sided or wrong-frame kicks", g.ids, net, g.total, iso.Relative, opts.IsotropyTolerance))
		}
		rep.Isotropy = append(rep.Isotropy, iso)
	}
	sort.Slice(rep.Unexplained, func(i, j int) bool { return rep.Unexplained[i] < rep.Unexplained[j] })
	if n := len(rep.NegativeMass); n > 0 {
		rep.Problems = append(rep.Problems, fmt.Sprintf("%d elements with non-positive mass after the step (first ID %d)", n, rep.NegativeMass[0]))
	}
	if n := len(rep.NegativeEnergy); n > 0 {
		rep.Problems = append(rep.Problems, fmt.Sprintf("%d elements with negative internal energy after the step (first ID %d)", n, rep.NegativeEnergy[0]))
	}
	if n := len(rep.Unexplained); n > 0 {
		rep.Problems = append(rep.Problems, fmt.Sprintf("%d elements changed with no star in range (first ID %d)", n, rep.Unexplained[0]))
	}
	return rep, nil
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
	for c := range b.Fractions {
		if c < len(a.Fractions) && b.Fractions[c][i] != a.Fractions[c][j] {
			return true
		}
	}
	return false
}
