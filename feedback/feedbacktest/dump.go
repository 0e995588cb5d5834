package feedbacktest

import (
	"fmt"
	"math"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
)

// Dump runs scheme on a standard scenario (see Scenarios) and returns the
// gas before and after one applied step, with each star's release and
// radiated energy as an audit reads them: a dump made by ejecta itself,
// for testing audits and as an example of the format's content. A star's
// radius is the distance of the farthest element it touched.
func Dump(scheme feedback.Scheme, scenario string, seed uint64) (before, after *audit.GasArrays, stars []audit.Star, err error) {
	var sc *Scenario
	all := Scenarios(seed)
	for i := range all {
		if all[i].Name == scenario {
			sc = &all[i]
		}
	}
	if sc == nil {
		return nil, nil, nil, fmt.Errorf("dump: no scenario %q", scenario)
	}
	r, err := couple(scheme, *sc, DefaultOptions(), 1, sc.Sources)
	if err != nil {
		return nil, nil, nil, fmt.Errorf("dump: %w", err)
	}
	if len(r.out.Problems) > 0 {
		return nil, nil, nil, fmt.Errorf("dump: star %d: %w", r.out.Problems[0].StarID, r.out.Problems[0].Err)
	}
	radiated := 0.0
	for _, s := range sc.Sources {
		st := audit.Star{ID: s.Star.ID, Pos: s.Star.Pos, Vel: s.Star.Vel, Mass: s.Mass, Species: s.Species, Energy: s.Energy}
		for _, rec := range r.out.Records {
			if rec.StarID != s.Star.ID {
				continue
			}
			st.Radiated += rec.Radiated
			i := indexOf(sc.Gas, rec.GasID)
			d := [3]float64{sc.Gas.Pos[0][i] - s.Star.Pos[0], sc.Gas.Pos[1][i] - s.Star.Pos[1], sc.Gas.Pos[2][i] - s.Star.Pos[2]}
			d = sc.Box.MinImage(d)
			st.Radius = math.Max(st.Radius, math.Sqrt(d[0]*d[0]+d[1]*d[1]+d[2]*d[2])*(1+1e-12))
		}
		radiated += st.Radiated
		stars = append(stars, st)
	}
	// Radiated energy Apply took back for coherent kicks, and energy it
	// added where overlapping kicks would have left an element's internal
	// energy negative (feedback.ApplyReport), are shared among the stars in
	// proportion to what they radiated (a step whose stars overlap is one
	// group to the audit).
	if back := r.report.Reclaimed + r.report.Shortfall; back > 0 {
		for i := range stars {
			share := 1 / float64(len(stars))
			if radiated > 0 {
				share = stars[i].Radiated / radiated
			}
			stars[i].Radiated -= back * share
		}
	}
	return sc.Gas.Clone(), r.gas, stars, nil
}

// Nearest is the index of the element of g nearest pos (the first of
// equally near ones): where tests of an audit plant errors, next to a star
// of a Dump.
func Nearest(g *audit.GasArrays, pos [3]float64) int {
	best, bd := 0, math.Inf(1)
	for i := range g.Mass {
		d := 0.0
		for k := 0; k < 3; k++ {
			d += (g.Pos[k][i] - pos[k]) * (g.Pos[k][i] - pos[k])
		}
		if d < bd {
			best, bd = i, d
		}
	}
	return best
}
