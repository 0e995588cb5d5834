package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
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
}

// ratesBin is one age bin; counts and masses are per Msun formed within the
// bin, luminosity and photon rate at the bin's start.
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
}

type ratesReport struct {
	IMF         string      `json:"imf"`
	Metallicity float64     `json:"metallicity"`
	Totals      ratesTotals `json:"totals"`
	Bins        []ratesBin  `json:"bins"`
}

// defaultRatesZ is the present-day solar metal mass fraction of Asplund et
// al. 2009 (yields.SolarMetals).
const defaultRatesZ = yields.SolarMetals

var ratesCommand = subcommand{
	name:     "rates",
	synopsis: "[flags]",
	description: "Prints what one Msun of stars formed in a single burst releases, by age: " +
		"core-collapse and Type Ia supernovae, ejected mass and metals, energy (explosions and " +
		"wind kinetic energy), and the luminosity and ionizing photon rate at each bin's start, " +
		"from the built-in population (-imf) or a rates table in the CSV format of package yields (-table). " +
		"The first bin runs from age 0 to 0.1 Myr; the rest are log-spaced up to 13.8 Gyr.",
}

func runRates(args []string, stdout, stderr io.Writer) int {
	fs := ratesCommand.newFlagSet()
	imfName := fs.String("imf", "kroupa", "initial mass function of the built-in population: salpeter, kroupa or chabrier (not with -table)")
	z := fs.Float64("z", defaultRatesZ, "metal mass fraction (default 0.0134, solar: Asplund et al. 2009)")
	tablePath := fs.String("table", "", "read the population from this CSV rates table instead of the built-in model")
	perDecade := fs.Int("per-decade", 4, "age bins per decade between 0.1 Myr and 13.8 Gyr")
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
	var model yields.Model
	label := ""
	if *tablePath != "" {
		t, err := yields.ReadTableFile(*tablePath)
		if err != nil {
			fmt.Fprintf(stderr, "ejecta rates: %v\n", err)
			return 1
		}
		model, label = t, "table:"+*tablePath
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
		model, label = p, form.String()
	}
	rep, err := buildRatesReport(model, label, *z, *perDecade)
	if err != nil {
		fmt.Fprintf(stderr, "ejecta rates: %v\n", err)
		return 1
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

func buildRatesReport(m yields.Model, label string, z float64, perDecade int) (ratesReport, error) {
	rep := ratesReport{IMF: label, Metallicity: z}
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
		t := r.Total()
		rep.Bins = append(rep.Bins, ratesBin{
			AgeStart: edges[i], AgeEnd: edges[i+1],
			SNCC: r.Channels[yields.CoreCollapse].Events, SNIa: r.Channels[yields.TypeIa].Events,
			Ejecta: t.Mass, Metals: t.Species[yields.Metals], Energy: t.Energy,
			Luminosity: l, IonizingPerSec: q,
		})
	}
	return rep, nil
}

func printRates(w io.Writer, rep ratesReport) {
	fmt.Fprintf(w, "# release of one Msun formed in a burst: %s, Z = %g\n", rep.IMF, rep.Metallicity)
	fmt.Fprintf(w, "# totals to 13.8 Gyr: %.4g core-collapse SNe, %.4g SNe Ia, returned mass fraction %.4g, metals ejected %.4g Msun\n",
		rep.Totals.SNCCPerMsun, rep.Totals.SNIaPerMsun, rep.Totals.ReturnedMassFraction, rep.Totals.MetalYieldPerMsun)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "age0[Myr]\tage1[Myr]\tSN_cc\tSN_Ia\tejecta[Msun]\tmetals[Msun]\tenergy[erg]\tL[Lsun]\tQ[1/s]\t")
	for _, b := range rep.Bins {
		fmt.Fprintf(tw, "%.4g\t%.4g\t%.3e\t%.3e\t%.3e\t%.3e\t%.3e\t%.3e\t%.3e\t\n",
			b.AgeStart, b.AgeEnd, b.SNCC, b.SNIa, b.Ejecta, b.Metals, b.Energy, b.Luminosity, b.IonizingPerSec)
	}
	tw.Flush()
}
