package bench

import (
	"fmt"
	"sync"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
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
	// Drive is what the variant couples at each star.
	Drive Drive
}

// Drive is what a compared variant couples at each star of a case.
type Drive uint8

const (
	// SupernovaDrive couples the case's supernova (SupernovaEnergyErg,
	// EjectaMassMsun).
	SupernovaDrive Drive = iota
	// YoungLightDrive couples the far-ultraviolet light the built-in
	// population (solar metallicity) emits over its first YoungLightAge
	// Myr, for the stellar mass that makes one core-collapse supernova over
	// its life: the light of the stars behind the case's supernova, before
	// it goes off.
	YoungLightDrive
)

// YoungLightAge is the age (Myr) up to which YoungLightDrive takes a
// population's light: the first core-collapse supernovae go off at about
// 3 Myr (common practice).
const YoungLightAge = 3

// drives builds each drive's releases for a run, the population behind
// YoungLightDrive on first use only.
type drives struct {
	youngLight func() (float64, error) // erg per supernova
}

func newDrives() *drives {
	return &drives{youngLight: sync.OnceValues(func() (float64, error) {
		pop, err := yields.NewPopulation(yields.DefaultConfig())
		if err != nil {
			return 0, err
		}
		young, err := pop.Release(0, YoungLightAge, yields.SolarMetals)
		if err != nil {
			return 0, err
		}
		life, err := pop.Release(0, 1e5, yields.SolarMetals)
		if err != nil {
			return 0, err
		}
		return young.FarUltravioletEnergy / life.Channels[yields.CoreCollapse].Events, nil
	})}
}

// sources is what variant s couples for the case's supernova releases sn
// (in code units u).
func (d *drives) sources(s SchemeSpec, sn []feedback.Source, u units.CodeUnits) ([]feedback.Source, error) {
	switch s.Drive {
	case SupernovaDrive:
		return sn, nil
	case YoungLightDrive:
		e, err := d.youngLight()
		if err != nil {
			return nil, fmt.Errorf("scheme %s: young light: %w", s.Name, err)
		}
		out := make([]feedback.Source, len(sn))
		for i, src := range sn {
			out[i] = feedback.Source{Star: src.Star, Channel: yields.PhotoelectricHeating, Energy: e / u.EnergyErg(),
				Duration: YoungLightAge * units.Megayear / u.TimeS(), Step: src.Step}
		}
		return out, nil
	}
	return nil, fmt.Errorf("scheme %s: unknown drive %d", s.Name, s.Drive)
}

// RemnantTableSchemeName is the name of the variant RemnantTableScheme
// builds.
const RemnantTableSchemeName = "terminal-momentum-table"

// RemnantTableScheme is the terminal-momentum variant that takes its
// remnant from a remnant table (feedback.RemnantTable, e.g. calibrated with
// "ejecta remnant -calibrate" for a host's own cooling), clamped to the
// table's grid so that every set-up density couples; label says where the
// table came from.
func RemnantTableScheme(tab *feedback.RemnantTable, label string) SchemeSpec {
	return SchemeSpec{Name: RemnantTableSchemeName,
		Description: "terminal momentum from the remnant table " + label + " (clamped to its grid)",
		Scheme:      feedback.TerminalMomentum{Table: tab.WithOutsideGrid(feedback.ClampToGrid)}}
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
		{Name: "stochastic-heating", Description: "stochastic heating of drawn neighbors by 10^7.5 K (Dalla Vecchia & Schaye 2012)",
			Scheme: feedback.DefaultStochasticHeating(1)},
		{Name: "delayed-cooling", Description: "thermal dump whose gas holds its cooling for the blast-wave time (Stinson et al. 2006)",
			Scheme: feedback.DelayedCooling{}},
		{Name: "kicked-winds", Description: "decoupled kicked wind (Springel & Hernquist 2003): eta = 2 per supernova mass at 484 km/s, rest as heat",
			Scheme: feedback.DefaultKickedWinds()},
		{Name: "kicked-winds-momentum-driven", Description: "kicked wind with momentum-driven scalings (Oppenheimer & Davé 2006) from the local gas dispersion",
			Scheme: feedback.DefaultMomentumDrivenWinds()},
		{Name: "photoelectric-heating", Description: "far-ultraviolet light of the stars behind one supernova over their first 3 Myr, heating by dust photoelectrons (Bakes & Tielens 1994)",
			Scheme: feedback.DefaultPhotoelectricHeating(), Drive: YoungLightDrive},
	}
}

// SelectSchemes returns the variants with the given names, in the given
// order; nil or empty names select all of them. An unknown name, or one
// given twice, is an error.
func SelectSchemes(names []string) ([]SchemeSpec, error) {
	return selectByName(Schemes(), func(s SchemeSpec) string { return s.Name }, names, "scheme")
}
