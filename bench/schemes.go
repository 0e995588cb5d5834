package bench

import (
	"fmt"
	"strings"

	"github.com/ejecta-dev/ejecta/feedback"
)

// SchemeSpec is one coupling variant the runner compares: a scheme and the
// coupler settings it runs with.
type SchemeSpec struct {
	// Name identifies the variant in results and on the command line.
	Name string
	// Description says what the variant is.
	Description string
	// Scheme splits each release.
	Scheme feedback.Scheme
	// Weighting shares the release among neighbors.
	Weighting feedback.Weighting
	// SkipIsotropyCorrection runs the variant without the isotropy
	// correction, for comparison.
	SkipIsotropyCorrection bool
}

// Schemes returns every variant the runner knows, in a fixed order. A new
// scheme in package feedback is compared by adding one line here.
func Schemes() []SchemeSpec {
	return []SchemeSpec{
		{Name: "thermal-dump", Description: "all energy as heat, no radial kick",
			Scheme: feedback.ThermalDump{}},
		{Name: "kinetic", Description: "Sedov kinetic fraction (28%) as radial kicks, the rest as heat",
			Scheme: feedback.DefaultKinetic()},
		{Name: "terminal-momentum", Description: "energy-conserving momentum capped at the Kim & Ostriker 2015 terminal momentum",
			Scheme: feedback.TerminalMomentum{Fit: feedback.KimOstriker2015}},
		{Name: "terminal-momentum-cmb88", Description: "terminal momentum with the Cioffi, McKee & Bertschinger 1988 fit",
			Scheme: feedback.TerminalMomentum{Fit: feedback.CioffiMcKeeBertschinger1988}},
		{Name: "terminal-momentum-solid-angle", Description: "terminal momentum, solid-angle weights",
			Scheme: feedback.TerminalMomentum{Fit: feedback.KimOstriker2015}, Weighting: feedback.SolidAngle},
		{Name: "terminal-momentum-uncorrected", Description: "terminal momentum, kernel-volume weights without the isotropy correction",
			Scheme: feedback.TerminalMomentum{Fit: feedback.KimOstriker2015}, SkipIsotropyCorrection: true},
		{Name: "kinetic-uncorrected", Description: "kinetic, kernel-volume weights without the isotropy correction",
			Scheme: feedback.DefaultKinetic(), SkipIsotropyCorrection: true},
		{Name: "kicked-winds", Description: "decoupled kicked wind (Springel & Hernquist 2003): eta = 2 per supernova mass at 484 km/s, rest as heat",
			Scheme: feedback.DefaultKickedWinds()},
		{Name: "kicked-winds-momentum-driven", Description: "kicked wind with momentum-driven scalings (Oppenheimer & Davé 2006) from the local gas dispersion",
			Scheme: feedback.DefaultMomentumDrivenWinds()},
	}
}

// SelectSchemes returns the variants with the given names, in the given
// order; nil or empty names select all of them.
func SelectSchemes(names []string) ([]SchemeSpec, error) {
	all := Schemes()
	if len(names) == 0 {
		return all, nil
	}
	var out []SchemeSpec
	seen := map[string]bool{}
	for _, n := range names {
		n = strings.TrimSpace(n)
		if seen[n] {
			return nil, fmt.Errorf("scheme %q named twice", n)
		}
		seen[n] = true
		found := false
		for _, s := range all {
			if s.Name == n {
				out = append(out, s)
				found = true
				break
			}
		}
		if !found {
			known := make([]string, len(all))
			for i, s := range all {
				known[i] = s.Name
			}
			return nil, fmt.Errorf("unknown scheme %q (known: %s)", n, strings.Join(known, ", "))
		}
	}
	return out, nil
}
