package main

import (
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"

	"github.com/ejecta-dev/ejecta/yields"
)

// ratesTotals is what one Msun formed releases from age 0 to the Hubble time.
type ratesTotals struct {
	SNCCPerMsun          float64 `json:"sn_cc_per_msun"`
	SNIaPerMsun          float64 `json:"sn_ia_per_msun"`
	ReturnedMassFraction float64 `json:"returned_mass_fraction"`
	// MetalYieldPerMsun is the total metal mass ejected (new metals plus
	// those the stars were born with), Msun per Msun formed.
	MetalYieldPerMsun float64 `json:"metal_yield_per_msun"`
	// ElementsMsun is the mass of each element asked for with -elements,
	// Msun per Msun formed, by symbol.
	ElementsMsun map[string]float64 `json:"elements_msun,omitempty"`
}

// ratesBin is one age bin; counts and masses are per Msun formed within the
// bin, luminosities and photon rate at the bin's start. FUVLuminosity is
// nil for a rates table without the optional far-ultraviolet columns.
type ratesBin struct {
	AgeStart       float64 `json:"age_myr_start"`
	AgeEnd         float64 `json:"age_myr_end"`
	SNCC           float64 `json:"sn_cc"`
	SNIa           float64 `json:"sn_ia"`
	Ejecta         float64 `json:"ejecta_msun"`
	Metals         float64 `json:"metals_msun"`
	Energy         float64 `json:"energy_erg"`
	Luminosity     float64 `json:"luminosity_lsun"`
	IonizingPerSec float64 `json:"ionizing_photons_per_s"`
	// ElementsMsun is the mass of each element asked for, by symbol.
	ElementsMsun map[string]float64 `json:"elements_msun,omitempty"`
	// FUVLuminosity is the far-ultraviolet (6–13.6 eV) luminosity.
	FUVLuminosity *float64 `json:"fuv_luminosity_lsun,omitempty"`
}

type ratesReport struct {
	IMF         string  `json:"imf"`
	Metallicity float64 `json:"metallicity"`
	// Elements lists the symbols asked for with -elements, in order.
	Elements []string    `json:"elements"`
	Totals   ratesTotals `json:"totals"`
	Bins     []ratesBin  `json:"bins"`
	// Notes say where the model was used outside the range it covers
	// (ages or metallicities beyond a table's grid, metallicities beyond
	// the lifetime fit's) and what it did there.
	Notes []string `json:"notes"`
}

// defaultRatesZ is the present-day solar metal mass fraction of Asplund et
// al. 2009 (yields.SolarMetals).
const defaultRatesZ = yields.SolarMetals

var ratesCommand = subcommand{
	name:     "rates",
	synopsis: "[flags]",
	description: "Prints what one Msun of stars formed in a single burst releases, by age: " +
		"core-collapse and Type Ia supernovae, ejected mass and metals (and, with -elements, the mass of " +
		"each element asked for), energy (explosions and wind kinetic energy), and the luminosity, " +
		"far-ultraviolet (6-13.6 eV) luminosity and ionizing photon rate at each bin's start, from the " +
		"built-in population (-imf) or a rates table in the CSV format of package yields (-table). The " +
		"first bin runs from age 0 to 0.1 Myr; the rest are log-spaced up to 13.8 Gyr. Where the model " +
		"is asked about ages or metallicities it does not cover, the output says so and what was done instead.",
}

func runRates(args []string, stdout, stderr io.Writer) int {
	fs := ratesCommand.newFlagSet()
	imfName := fs.String("imf", "kroupa", "initial mass function of the built-in population: salpeter, kroupa or chabrier (not with -table)")
	z := fs.Float64("z", defaultRatesZ, "metal mass fraction (default 0.0134, solar: Asplund et al. 2009)")
	tablePath := fs.String("table", "", "read the population from this CSV rates table instead of the built-in model")
	perDecade := fs.Int("per-decade", 4, "age bins per decade between 0.1 Myr and 13.8 Gyr")
	elements := fs.String("elements", "", "comma-separated element symbols whose ejected mass to print as well (e.g. O,Fe), or \"all\" for every element the model carries")
	asJSON := fs.Bool("json", false, "print one JSON object instead of a text table")
	if code, ok := ratesCommand.parseFlags(fs, args, stdout, stderr); !ok {
		return code
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "ejecta rates: unexpected argument %q\n", fs.Arg(0))
		return 2
	}
	if *perDecade < 1 || *perDecade > 100 {
		fmt.Fprintf(stderr, "ejecta rates: -per-decade %d: want 1..100\n", *perDecade)
		return 2
	}
	imfSet := false
	fs.Visit(func(f *flag.Flag) { imfSet = imfSet || f.Name == "imf" })
	if imfSet && *tablePath != "" {
		fmt.Fprintln(stderr, "ejecta rates: -imf and -table exclude each other: a table carries its own population")
		return 2
	}
	var model yields.Model
	label := ""
	var carried yields.SpeciesSet
	if *tablePath != "" {
		t, err := yields.ReadTableFile(*tablePath)
		if err != nil {
			fmt.Fprintf(stderr, "ejecta rates: %v\n", err)
			return 1
		}
		model, label, carried = t, "table:"+*tablePath, t.Carried()
	} else {
		form, err := yields.ParseIMFForm(*imfName)
		if err != nil {
			fmt.Fprintf(stderr, "ejecta rates: %v\n", err)
			return 2
		}
		cfg := yields.DefaultConfig()
		cfg.IMF = form
		p, err := yields.NewPopulation(cfg)
		if err != nil {
			fmt.Fprintf(stderr, "ejecta rates: %v\n", err)
			return 1
		}
		model, label, carried = p, form.String(), p.Species()
	}
	species, err := parseElements(*elements, carried)
	if err != nil {
		fmt.Fprintf(stderr, "ejecta rates: -elements: %v\n", err)
		return 2
	}
	rep, err := buildRatesReport(model, label, *z, *perDecade, species)
	if err != nil {
		fmt.Fprintf(stderr, "ejecta rates: %v\n", err)
		return 1
	}
	rep.Notes = coverageNotes(model, *z)
	for _, n := range rep.Notes {
		fmt.Fprintf(stderr, "ejecta rates: note: %s\n", n)
	}
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		if err := enc.Encode(rep); err != nil {
			fmt.Fprintf(stderr, "ejecta rates: %v\n", err)
			return 1
		}
		return 0
	}
	printRates(stdout, rep)
	return 0
}

// parseElements reads the -elements list: chemical symbols (case
// ignored; not "Z", the total metals, which are always printed), each once,
// each one the model carries; "all" is every element it carries.
func parseElements(list string, carried yields.SpeciesSet) ([]yields.Element, error) {
	switch strings.TrimSpace(list) {
	case "":
		return nil, nil
	case "all":
		return carried.Elements(), nil
	}
	set, err := yields.ParseSpeciesSet(list)
	if err != nil {
		return nil, err
	}
	for _, e := range set.Elements() {
		if !carried.Has(e) {
			return nil, fmt.Errorf("the model has no yields for %s (it carries %s)", e.Symbol(), carried)
		}
	}
	return set.Elements(), nil
}

// coverageNotes says where the bins and metallicity fall outside what the
// model covers, and what it does there.
func coverageNotes(m yields.Model, z float64) []string {
	notes := []string{}
	if t, ok := m.(*yields.Table); ok {
		ages, zs := t.Ages(), t.Metallicities()
		first, last := ages[0], ages[len(ages)-1]
		if first > 0 {
			notes = append(notes, fmt.Sprintf("ages below the table's first age %g Myr: the cumulative release grows "+
				"linearly from zero at age 0 and the luminosity and photon rate are held at their first values", first))
		}
		if last < yields.HubbleTime {
			notes = append(notes, fmt.Sprintf("ages past the table's last age %g Myr (bins run to %g Myr): nothing "+
				"more is released and the luminosity and photon rate are held at their last values", last, yields.HubbleTime))
		}
		lo, hi := zs[0], zs[len(zs)-1]
		switch {
		case z < lo:
			notes = append(notes, fmt.Sprintf("metallicity %g is below the table's lowest %g: the values printed are those at %g (clamped)", z, lo, lo))
		case z > hi:
			notes = append(notes, fmt.Sprintf("metallicity %g is above the table's highest %g: the values printed are those at %g (clamped)", z, hi, hi))
		}
		return notes
	}
	if z < yields.LifetimeMinZ || z > yields.LifetimeMaxZ {
		c := math.Min(math.Max(z, yields.LifetimeMinZ), yields.LifetimeMaxZ)
		notes = append(notes, fmt.Sprintf("metallicity %g is outside the range of the stellar lifetime fit "+
			"(Raiteri, Villata & Navarro 1996: %g to %g): lifetimes are those at %g (clamped)",
			z, yields.LifetimeMinZ, yields.LifetimeMaxZ, c))
	}
	return notes
}

// rateEdges are the bin edges: 0, then log-spaced from 0.1 Myr to the Hubble time.
func rateEdges(perDecade int) []float64 {
	const first = 0.1
	n := int(math.Ceil(math.Log10(yields.HubbleTime/first) * float64(perDecade)))
	edges := []float64{0}
	for i := 0; i < n; i++ {
		edges = append(edges, first*math.Pow(10, float64(i)/float64(perDecade)))
	}
	return append(edges, yields.HubbleTime)
}

func buildRatesReport(m yields.Model, label string, z float64, perDecade int, elements []yields.Element) (ratesReport, error) {
	rep := ratesReport{IMF: label, Metallicity: z, Elements: []string{}, Notes: []string{}}
	layout := yields.ModelSpecies(m)
	var slots []yields.Species
	for _, e := range elements {
		sp, ok := layout.Slot(e)
		if !ok {
			return rep, fmt.Errorf("the model's releases do not carry %s (they hold %s)", e.Symbol(), layout)
		}
		rep.Elements = append(rep.Elements, e.Symbol())
		slots = append(slots, sp)
	}
	masses := func(t yields.Ejecta) map[string]float64 {
		if len(elements) == 0 {
			return nil
		}
		out := make(map[string]float64, len(elements))
		for i, e := range elements {
			out[e.Symbol()] = t.Species[slots[i]]
		}
		return out
	}
	all, err := m.Release(0, yields.HubbleTime, z)
	if err != nil {
		return rep, err
	}
	tot := all.Total()
	rep.Totals = ratesTotals{
		SNCCPerMsun:          all.Channels[yields.CoreCollapse].Events,
		SNIaPerMsun:          all.Channels[yields.TypeIa].Events,
		ReturnedMassFraction: tot.Mass,
		MetalYieldPerMsun:    tot.Species[yields.Metals],
		ElementsMsun:         masses(tot),
	}
	// A rates table may lack the optional far-ultraviolet columns.
	hasFUV := true
	if t, ok := m.(*yields.Table); ok {
		hasFUV = t.HasFarUltraviolet()
	}
	edges := rateEdges(perDecade)
	for i := 0; i+1 < len(edges); i++ {
		r, err := m.Release(edges[i], edges[i+1], z)
		if err != nil {
			return rep, err
		}
		l, err := m.Luminosity(edges[i], z)
		if err != nil {
			return rep, err
		}
		q, err := m.IonizingRate(edges[i], z)
		if err != nil {
			return rep, err
		}
		var fuv *float64
		if hasFUV {
			f, err := m.FarUltravioletLuminosity(edges[i], z)
			if err != nil {
				return rep, err
			}
			fuv = &f
		}
		t := r.Total()
		rep.Bins = append(rep.Bins, ratesBin{
			AgeStart: edges[i], AgeEnd: edges[i+1],
			SNCC: r.Channels[yields.CoreCollapse].Events, SNIa: r.Channels[yields.TypeIa].Events,
			Ejecta: t.Mass, Metals: t.Species[yields.Metals], Energy: t.Energy,
			Luminosity: l, IonizingPerSec: q, FUVLuminosity: fuv, ElementsMsun: masses(t),
		})
	}
	return rep, nil
}

func printRates(w io.Writer, rep ratesReport) {
	fmt.Fprintf(w, "# release of one Msun formed in a burst: %s, Z = %g\n", rep.IMF, rep.Metallicity)
	fmt.Fprintf(w, "# totals to 13.8 Gyr: %.4g core-collapse SNe, %.4g SNe Ia, returned mass fraction %.4g, metals ejected %.4g Msun",
		rep.Totals.SNCCPerMsun, rep.Totals.SNIaPerMsun, rep.Totals.ReturnedMassFraction, rep.Totals.MetalYieldPerMsun)
	for _, e := range rep.Elements {
		fmt.Fprintf(w, ", %s %.4g Msun", e, rep.Totals.ElementsMsun[e])
	}
	fmt.Fprintln(w)
	for _, n := range rep.Notes {
		fmt.Fprintf(w, "# note: %s\n", n)
	}
	legend := []string{
		"age0, age1: the bin's ages since the burst [Myr]; counts and masses are released within the bin, per Msun formed",
		"SN_cc, SN_Ia: expected core-collapse and Type Ia supernovae",
		"ejecta: mass returned to the gas by every channel [Msun]; metals: the metal mass in it, new and inherited [Msun]",
	}
	if len(rep.Elements) > 0 {
		legend = append(legend, "element columns: the mass of that element in the ejecta [Msun]")
	}
	legend = append(legend,
		"energy: supernova explosion energy plus wind kinetic energy released [erg]",
		"L: bolometric luminosity at the bin's start [Lsun]; L_FUV: its far-ultraviolet (6-13.6 eV) part, "+
			"\"-\" for a rates table without it [Lsun]; Q: hydrogen-ionizing photons emitted per second at the bin's start [1/s]")
	for _, l := range legend {
		fmt.Fprintln(w, indentText(wrapText(l, 76), "# "))
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	header := "age0[Myr]\tage1[Myr]\tSN_cc\tSN_Ia\tejecta[Msun]\tmetals[Msun]\t"
	for _, e := range rep.Elements {
		header += e + "[Msun]\t"
	}
	fmt.Fprintln(tw, header+"energy[erg]\tL[Lsun]\tL_FUV[Lsun]\tQ[1/s]\t")
	for _, b := range rep.Bins {
		line := fmt.Sprintf("%s\t%s\t%s\t%s\t%s\t%s\t", age(b.AgeStart), age(b.AgeEnd),
			sci(b.SNCC), sci(b.SNIa), sci(b.Ejecta), sci(b.Metals))
		for _, e := range rep.Elements {
			line += sci(b.ElementsMsun[e]) + "\t"
		}
		fuv := "-" // a rates table without the far-ultraviolet columns
		if b.FUVLuminosity != nil {
			fuv = sci(*b.FUVLuminosity)
		}
		fmt.Fprintln(tw, line+sci(b.Energy)+"\t"+sci(b.Luminosity)+"\t"+fuv+"\t"+sci(b.IonizingPerSec)+"\t")
	}
	tw.Flush()
}

// age prints a bin edge to four significant digits, without an exponent.
func age(v float64) string {
	if v >= 1000 {
		return fmt.Sprintf("%.0f", v)
	}
	return fmt.Sprintf("%.4g", v)
}

// sci prints a table value to four significant digits, and zero as 0.
func sci(v float64) string {
	if v == 0 {
		return "0"
	}
	return fmt.Sprintf("%.3e", v)
}
