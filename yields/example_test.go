package yields_test

import (
	"fmt"
	"math"
	"strings"

	"github.com/ejecta-dev/ejecta/yields"
)

// A Kroupa population at solar metallicity: what it releases between 5 and
// 6 Myr, and in total over a Hubble time.
func ExampleNewPopulation() {
	cfg := yields.DefaultConfig()
	cfg.IMF = yields.Kroupa
	pop, err := yields.NewPopulation(cfg)
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := pop.Release(5, 6, 0.0134)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("SNe between 5 and 6 Myr: %.2e per Msun\n", r.Channels[yields.CoreCollapse].Events)
	all, _ := pop.Release(0, yields.HubbleTime, 0.0134)
	fmt.Printf("SNe to 13.8 Gyr: %.4f per Msun, returned mass %.2f\n", all.Channels[yields.CoreCollapse].Events, all.Total().Mass)
	// Output:
	// SNe between 5 and 6 Myr: 4.91e-04 per Msun
	// SNe to 13.8 Gyr: 0.0111 per Msun, returned mass 0.44
}

// A user table with two ages at one metallicity, read and queried between
// its grid points.
func ExampleReadTable() {
	csv := `# my population model
age[Myr],metallicity[mass_fraction],luminosity[Lsun/Msun],ionizing_rate[photons/s/Msun],radiant_energy[erg/Msun],ionizing_photons[photons/Msun],ccsn_events[1/Msun],ccsn_mass[Msun/Msun],ccsn_energy[erg/Msun],ccsn_z[Msun/Msun],ccsn_h[Msun/Msun],ccsn_he[Msun/Msun],snia_events[1/Msun],snia_mass[Msun/Msun],snia_energy[erg/Msun],snia_z[Msun/Msun],snia_h[Msun/Msun],snia_he[Msun/Msun],massive_wind_mass[Msun/Msun],massive_wind_energy[erg/Msun],massive_wind_z[Msun/Msun],massive_wind_h[Msun/Msun],massive_wind_he[Msun/Msun],agb_wind_mass[Msun/Msun],agb_wind_energy[erg/Msun],agb_wind_z[Msun/Msun],agb_wind_h[Msun/Msun],agb_wind_he[Msun/Msun]
3,0.02,1000,3e46,1e50,1e59,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0
30,0.02,300,1e45,5e50,2e60,0.01,0.1,1e49,0.02,0.056,0.024,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0,0
`
	tab, err := yields.ReadTable(strings.NewReader(csv))
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := tab.Release(3, 30, 0.02)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("SNe from 3 to 30 Myr: %.3f, metals %.3f Msun\n", r.Channels[yields.CoreCollapse].Events, r.Channels[yields.CoreCollapse].Species[yields.Metals])
	// Output:
	// SNe from 3 to 30 Myr: 0.010, metals 0.020 Msun
}

// The number of supernovae a star particle of 1e4 Msun releases in one step
// is a Poisson draw keyed by the star and the step: the same on any thread.
func ExamplePoisson() {
	const seed, starID, step, stream = 12345, 987, 40, 0
	expected := 1e4 * 1.2e-3 // star mass × SNe per Msun in this step
	r := yields.NewCounterRNG(seed, starID, step, stream)
	n := yields.Poisson(&r, expected)
	again := yields.NewCounterRNG(seed, starID, step, stream)
	fmt.Println(n == yields.Poisson(&again, expected))
	// Output:
	// true
}

// The light of a young Kroupa population at solar metallicity: bolometric,
// hydrogen-ionizing photons and far ultraviolet (6–13.6 eV), per Msun
// formed, and the far-ultraviolet energy of its first Myr.
func ExamplePopulation_FarUltravioletLuminosity() {
	pop, err := yields.NewPopulation(yields.DefaultConfig())
	if err != nil {
		fmt.Println(err)
		return
	}
	l, _ := pop.Luminosity(1, 0.0134)
	q, _ := pop.IonizingRate(1, 0.0134)
	fuv, _ := pop.FarUltravioletLuminosity(1, 0.0134)
	fmt.Printf("L = %.0f Lsun, Q = %.2e /s, L_FUV = %.0f Lsun per Msun\n", l, q, fuv)
	r, _ := pop.Release(0, 1, 0.0134)
	fmt.Printf("far-ultraviolet energy in the first Myr: %.2e erg per Msun\n", r.FarUltravioletEnergy)
	// Output:
	// L = 829 Lsun, Q = 4.56e+46 /s, L_FUV = 350 Lsun per Msun
	// far-ultraviolet energy in the first Myr: 4.23e+49 erg per Msun
}

// A 40 Msun star on the zero-age main sequence at Z = 0.02 (Tout et al.
// 1996 fits) and the photons of a blackbody at its effective temperature.
func ExampleZAMS() {
	ms, err := yields.NewZAMS(0.02)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("log L = %.2f, R = %.1f Rsun, Teff = %.0f K, log Q = %.2f\n",
		math.Log10(ms.Luminosity(40)), ms.Radius(40), ms.EffectiveTemperature(40), math.Log10(ms.IonizingRate(40)))
	// Output:
	// log L = 5.35, R = 9.3 Rsun, Teff = 41246 K, log Q = 49.10
}

// A simulation that tracks only iron and oxygen (and, always, the total
// metals) chooses them by symbol; releases are then laid out in that
// order: slot 1 iron, slot 2 oxygen.
func ExampleParseSpeciesSet() {
	set, err := yields.ParseSpeciesSet("Fe, O")
	if err != nil {
		fmt.Println(err)
		return
	}
	cfg := yields.DefaultConfig()
	cfg.Species = set
	pop, err := yields.NewPopulation(cfg)
	if err != nil {
		fmt.Println(err)
		return
	}
	r, _ := pop.Release(0, yields.HubbleTime, 0.0134)
	t := r.Total()
	fmt.Println("slots:", strings.Join(set.Symbols(), " "))
	fmt.Printf("%s/%s ejected: %.2f\n", set.Symbol(1), set.Symbol(2), t.Species[1]/t.Species[2])
	_, err = yields.ParseSpeciesSet("Fe, Fe")
	fmt.Println(err)
	fmt.Println("default:", yields.DefaultSpeciesSet())
	// Output:
	// slots: Z Fe O
	// Fe/O ejected: 0.16
	// yields: species set: Fe named twice: invalid species set
	// default: H,He,C,N,O,Ne,Mg,Si,S,Ca,Fe
}
