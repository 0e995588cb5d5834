package bench

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"time"

	"github.com/ejecta-dev/ejecta/bench/testbed"
	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Supernova release used throughout the comparison: one canonical 1e51 erg
// explosion (common practice in the trade) ejecting 10 Msun.
const (
	SupernovaEnergyErg = units.FOE
	EjectaMassMsun     = 10.0
)

// TerminalFit is the remnant fit whose terminal momentum the convergence
// rows are compared with.
const TerminalFit = feedback.KimOstriker2015

// Suite is a set of cases (set-ups at several densities and mass
// resolutions) and a speed measurement.
type Suite struct {
	// Name labels the suite in the results.
	Name string
	// Setups to run, each at every density and gas mass.
	Setups []Setup
	// DensitiesCm3 are the reference hydrogen number densities (cm^-3).
	DensitiesCm3 []float64
	// GasMassesMsun are the gas element masses (Msun).
	GasMassesMsun []float64
	// Elements is the approximate gas element count of each case.
	Elements int
	// Neighbors is the number of nearest gas elements each star couples to.
	Neighbors int
	// Seed makes the set-ups reproducible; every case of a set-up uses it,
	// so the geometry is the same at every density and resolution, only
	// scaled.
	Seed uint64
	// Speed says where and how long the speed is measured; Speed.Stars = 0
	// skips the measurement.
	Speed SpeedSpec
	// Outcome sets up the evolved outcome (package testbed); no densities
	// skips it.
	Outcome OutcomeSpec
}

// OutcomeSpec sets up the evolved-outcome experiment: every scheme's
// supernova injected into a 3D grid of uniform gas, evolved with cooling,
// and measured against the 1D reference remnant (package testbed).
type OutcomeSpec struct {
	// DensitiesCm3 are the ambient (mean) hydrogen densities; empty skips
	// the experiment.
	DensitiesCm3 []float64
	// Media are the ambient media at each density; nil means uniform gas
	// only.
	Media []testbed.Medium
	// CellMassRatios are the cell masses in cooling masses (the 1D
	// reference's mass at shell formation at each density).
	CellMassRatios []float64
	// ShellTimes are the measurement times in shell-formation times.
	ShellTimes []float64
	// SliceCellMassRatio is the resolution (one of CellMassRatios) whose
	// density and temperature are sliced through the star at SliceShellTime
	// shell-formation times.
	SliceCellMassRatio, SliceShellTime float64
}

// SpeedSpec sets up the speed measurement: many stars exploding at once in
// one case, every scheme timed against the touch-only floor on the same gas
// in the same run.
type SpeedSpec struct {
	// Setup names the set-up to time on.
	Setup string
	// DensityCm3 and GasMassMsun pick the case.
	DensityCm3, GasMassMsun float64
	// Elements is the gas element count of the case.
	Elements int
	// Stars is the number of stars exploding in one pass.
	Stars int
	// MinDuration is the least time spent timing each scheme (floor and
	// scheme passes together); at least MinRounds pairs of passes are run.
	MinDuration time.Duration
	MinRounds   int
}

// QuickSuite is the standard suite: four set-ups at densities 0.1 to 1e3
// cm^-3 and gas element masses 1 to 1e5 Msun, by decades, about 4000
// elements each, 64 neighbors. It finishes within seconds.
func QuickSuite() Suite {
	return Suite{
		Name: "quick", Setups: StandardSetups(),
		DensitiesCm3:  []float64{0.1, 1, 10, 100, 1000},
		GasMassesMsun: []float64{1, 10, 100, 1e3, 1e4, 1e5},
		Elements:      4096, Neighbors: 64, Seed: 1,
		Speed: SpeedSpec{Setup: "glass", DensityCm3: 1, GasMassMsun: 100, Elements: 4096, Stars: 256,
			MinDuration: 100 * time.Millisecond, MinRounds: 3},
		Outcome: OutcomeSpec{DensitiesCm3: []float64{1, 100}, CellMassRatios: []float64{1e-3, 0.1, 30},
			ShellTimes: []float64{3, 10}, SliceCellMassRatio: 1e-3, SliceShellTime: 3},
	}
}

// FullSuite is the quick suite at half-decade steps in density and mass,
// with more elements per case and a longer speed measurement on more gas,
// and the outcome at four densities, eight resolutions and in the clumpy
// demo medium too.
func FullSuite() Suite {
	s := QuickSuite()
	s.Name = "full"
	s.DensitiesCm3 = halfDecades(0.1, 1000)
	s.GasMassesMsun = halfDecades(1, 1e5)
	s.Elements = 8000
	s.Speed = SpeedSpec{Setup: "glass", DensityCm3: 1, GasMassMsun: 100, Elements: 32768, Stars: 4096,
		MinDuration: time.Second, MinRounds: 5}
	s.Outcome.DensitiesCm3 = []float64{0.1, 1, 10, 100}
	s.Outcome.Media = []testbed.Medium{testbed.UniformMedium(), testbed.ClumpyMedium()}
	s.Outcome.CellMassRatios = []float64{3e-4, 1e-3, 1e-2, 0.1, 1, 3, 10, 30}
	return s
}

// SuiteByName returns QuickSuite or FullSuite.
func SuiteByName(name string) (Suite, error) {
	switch name {
	case "quick":
		return QuickSuite(), nil
	case "full":
		return FullSuite(), nil
	}
	return Suite{}, fmt.Errorf("unknown suite %q (known: quick, full)", name)
}

// halfDecades lists lo, lo*sqrt(10), ... up to hi, rounded to 3 digits.
func halfDecades(lo, hi float64) []float64 {
	var out []float64
	for e := math.Log10(lo); e <= math.Log10(hi)+1e-9; e += 0.5 {
		out = append(out, roundSig(math.Pow(10, e), 3))
	}
	return out
}

// roundSig rounds a positive finite v to the given significant digits.
func roundSig(v float64, digits int) float64 {
	p := math.Pow(10, float64(digits-1)-math.Floor(math.Log10(v)))
	return math.Round(v*p) / p
}

// Options tune a run.
type Options struct {
	// Schemes to compare; nil means Schemes().
	Schemes []SchemeSpec
	// Workers is the coupler's goroutine count; 0 means 1. Results other
	// than speed are bitwise the same for any count.
	Workers int
	// Progress, if set, is called after each step with the steps done and
	// the total.
	Progress func(done, total int)
}

// Result is what a run measured. Rows are in a fixed order (set-up,
// density, gas mass, scheme), so two runs of the same suite give the same
// rows apart from the speed figures.
type Result struct {
	Suite              string         `json:"suite"`
	Units              string         `json:"units"`
	Neighbors          int            `json:"neighbors"`
	Seed               uint64         `json:"seed"`
	SupernovaEnergyErg float64        `json:"supernova_energy_erg"`
	EjectaMassMsun     float64        `json:"ejecta_mass_msun"`
	TerminalFit        string         `json:"terminal_fit"`
	Schemes            []SchemeInfo   `json:"schemes"`
	Setups             []SetupInfo    `json:"setups"`
	Convergence        []Convergence  `json:"convergence"`
	Isotropy           []Isotropy     `json:"isotropy"`
	Energy             []EnergyBudget `json:"energy"`
	Speed              []Speed        `json:"speed"`
	// Outcome is what each scheme delivered once its remnant evolved on
	// the 3D grid, beside the 1D reference (package testbed); empty when
	// the suite has no outcome experiment.
	Outcome        []testbed.Outcome       `json:"outcome"`
	OutcomeHistory []testbed.HistoryPoint  `json:"outcome_history"`
	References     []testbed.ReferenceInfo `json:"references"`
	// Slices are the density and temperature through the star, for the
	// slice figures.
	Slices []testbed.Slice `json:"-"`
}

// SchemeInfo names and describes a compared variant; IsotropyCorrected
// says whether its weights went through the isotropy correction.
type SchemeInfo struct {
	Name              string `json:"name"`
	Description       string `json:"description"`
	IsotropyCorrected bool   `json:"isotropy_corrected"`
}

// SetupInfo names and describes a set-up.
type SetupInfo struct {
	Name        string `json:"name"`
	Description string `json:"description"`
}

// Convergence is the radial momentum one scheme hands out in one case,
// per supernova, beside the analytic references.
//
// EnergyConserving is the momentum of energy-conserving sweep-up of the
// coupled gas, p_EC = sqrt(2 E (M_ej + 0.28 M_sw)), with M_sw the mass of
// the star's coupled neighbors: the shell's kinetic energy p^2 / 2 (M_ej +
// M_sw) is the Sedov–Taylor kinetic share 0.28 E of the swept gas plus the
// whole energy share of the ejecta, so p_EC runs from the free-ejecta
// momentum sqrt(2 M_ej E) (definition) to sqrt(2 x 0.28 E M_sw) (Sedov
// kinetic fraction, Chevalier 1974; from memory).
//
// Terminal is the terminal momentum of TerminalFit shared as the scheme
// shared the release: sum_j w_j p_t(E, n_j, Z_j) over the coupled
// neighbors, with w_j their share of the ejecta; in uniform gas it is
// p_t(E, n).
type Convergence struct {
	Scheme                 string  `json:"scheme"`
	Setup                  string  `json:"setup"`
	DensityCm3             float64 `json:"density_cm3"`
	GasMassMsun            float64 `json:"gas_mass_msun"`
	Supernovae             int     `json:"supernovae"`
	CoupledMassMsun        float64 `json:"coupled_mass_msun"`
	RadialMomentumMsunKms  float64 `json:"radial_momentum_msun_kms"`
	EnergyConservingMsunKm float64 `json:"energy_conserving_msun_kms"`
	TerminalMsunKms        float64 `json:"terminal_msun_kms"`
	CappedFraction         float64 `json:"capped_fraction"`
}

// Isotropy is the isotropy residual of one scheme on one set-up: the
// largest, over its cases and stars, of |sum p_j| / sum |p_j| for the
// radial momenta before the net vector was removed (the coupler always
// removes it to conserve momentum). Zero for schemes that hand out no
// radial momentum.
//
// OneSidedStars counts, over the set-up's cases, the stars whose coupled
// gas lies entirely in one closed half-space through them (see OneSided):
// no positive weights balance those, so a corrected scheme's residual
// there is what the correction could not remove, not a corrected figure.
type Isotropy struct {
	Scheme        string  `json:"scheme"`
	Setup         string  `json:"setup"`
	Residual      float64 `json:"residual"`
	MeanResidual  float64 `json:"mean_residual"`
	Stars         int     `json:"stars"`
	OneSidedStars int     `json:"one_sided_stars"`
}

// EnergyBudget is where one scheme put the energy in one case, as
// fractions of the energy in: kinetic (record energy minus heat), thermal
// (heat), radiated, and undeposited (returned to the caller).
type EnergyBudget struct {
	Scheme      string  `json:"scheme"`
	Setup       string  `json:"setup"`
	DensityCm3  float64 `json:"density_cm3"`
	GasMassMsun float64 `json:"gas_mass_msun"`
	Kinetic     float64 `json:"kinetic"`
	Thermal     float64 `json:"thermal"`
	Radiated    float64 `json:"radiated"`
	Undeposited float64 `json:"undeposited"`
}

// Speed is how fast one scheme couples and applies many stars' releases,
// and the ratio of its time to the touch-only floor's on the same gas in
// the same run (TouchRatio >= 1 in practice; smaller is closer to the
// memory floor).
type Speed struct {
	Scheme         string  `json:"scheme"`
	Setup          string  `json:"setup"`
	Stars          int     `json:"stars"`
	Neighbors      int     `json:"neighbors"`
	StarsPerS      float64 `json:"stars_per_s"`
	TouchedPerS    float64 `json:"touched_per_s"`
	FloorStarsPerS float64 `json:"floor_stars_per_s"`
	TouchRatio     float64 `json:"touch_ratio"`
}

// Run runs every scheme on every case of the suite, then the speed
// measurement.
func Run(suite Suite, opts Options) (*Result, error) {
	if len(suite.Setups) == 0 || len(suite.DensitiesCm3) == 0 || len(suite.GasMassesMsun) == 0 {
		return nil, errors.New("run: suite needs at least one set-up, density and gas mass")
	}
	var speedCase *Case
	if suite.Speed.Stars > 0 {
		c, err := speedCaseFor(suite)
		if err != nil {
			return nil, fmt.Errorf("run: %w", err)
		}
		speedCase = c
	}
	var cases []caseSource
	for _, s := range suite.Setups {
		for _, n := range suite.DensitiesCm3 {
			for _, m := range suite.GasMassesMsun {
				spec := CaseSpec{DensityCm3: n, GasMassMsun: m, Elements: suite.Elements, Seed: suite.Seed}
				cases = append(cases, caseSource{build: s.Build, spec: spec, name: s.Name})
			}
		}
	}
	outcome := len(suite.Outcome.DensitiesCm3) > 0
	progress := opts.Progress
	injected := 0 // progress units of the injection comparison
	if outcome && progress != nil {
		opts.Progress = func(done, total int) {
			injected = total
			progress(done, total+outcomeProgress)
		}
	}
	res, err := run(cases, speedCase, suite.Neighbors, suite.Speed, opts)
	if err != nil {
		return nil, err
	}
	if outcome {
		cfg := outcomeConfig(suite, opts)
		if progress != nil {
			cfg.Progress = func(done, total int) {
				progress(injected+done*outcomeProgress/max(total, 1), injected+outcomeProgress)
			}
		}
		out, err := testbed.Run(cfg)
		if err != nil {
			return nil, fmt.Errorf("run: outcome: %w", err)
		}
		res.Outcome, res.OutcomeHistory, res.References, res.Slices = out.Outcome, out.History, out.References, out.Slices
	}
	res.Suite = suite.Name
	res.Seed = suite.Seed
	for _, s := range suite.Setups {
		res.Setups = append(res.Setups, SetupInfo{Name: s.Name, Description: s.Description})
	}
	return res, nil
}

// outcomeProgress is the share of the progress bar the outcome experiment
// takes: it is most of a suite's time.
const outcomeProgress = 1000

// outcomeConfig sets up the testbed experiment of a suite: the bench's
// supernova (SupernovaEnergyErg, EjectaMassMsun, EjectaMetalFraction) in
// solar-metallicity gas, every scheme compared that couples a supernova,
// plus the terminal-momentum scheme with a remnant table calibrated from
// the experiment's own 1D references, Options.Workers cases at a time.
func outcomeConfig(suite Suite, opts Options) testbed.Config {
	cfg := testbed.DefaultConfig()
	o := suite.Outcome
	cfg.DensitiesCm3 = o.DensitiesCm3
	if o.Media != nil {
		cfg.Media = o.Media
	}
	cfg.CellMassRatios = o.CellMassRatios
	cfg.ShellTimes = o.ShellTimes
	cfg.SliceCellMassRatio, cfg.SliceShellTime = o.SliceCellMassRatio, o.SliceShellTime
	cfg.EnergyErg, cfg.EjectaMassMsun, cfg.EjectaMetalFraction = SupernovaEnergyErg, EjectaMassMsun, EjectaMetalFraction
	cfg.Workers = max(opts.Workers, 1)
	schemes := opts.Schemes
	if schemes == nil {
		schemes = Schemes()
	}
	for _, s := range schemes {
		if s.Drive != SupernovaDrive {
			continue // the outcome is that of a supernova remnant
		}
		cfg.Variants = append(cfg.Variants, testbed.Variant{Name: s.Name, Scheme: s.Scheme, Weighting: s.Weighting,
			SkipIsotropyCorrection: s.SkipIsotropyCorrection})
	}
	return cfg
}

// RunCase runs every scheme on one case of the caller's own (a snapshot
// read with ReadGasDir, say), timing them on the same case when
// speed.Stars > 0 (the case's own stars are used; speed.Stars only
// switches the measurement on).
func RunCase(c *Case, neighbors int, speed SpeedSpec, opts Options) (*Result, error) {
	if c == nil {
		return nil, errors.New("run case: nil case")
	}
	var sc *Case
	if speed.Stars > 0 {
		sc = c
	}
	res, err := run([]caseSource{{ready: c, name: c.Setup}}, sc, neighbors, speed, opts)
	if err != nil {
		return nil, err
	}
	res.Suite = "user"
	res.Setups = []SetupInfo{{Name: c.Setup, Description: "gas read from the user's arrays"}}
	return res, nil
}

// caseSource is a case built on demand, or one ready-made.
type caseSource struct {
	build func(CaseSpec) (*Case, error)
	spec  CaseSpec
	ready *Case
	name  string
}

func (cs caseSource) get() (*Case, error) {
	if cs.ready != nil {
		return cs.ready, nil
	}
	c, err := cs.build(cs.spec)
	if err != nil {
		return nil, err
	}
	return c, nil
}

func run(cases []caseSource, speedCase *Case, neighbors int, speed SpeedSpec, opts Options) (*Result, error) {
	schemes := opts.Schemes
	if schemes == nil {
		schemes = Schemes()
	}
	if len(schemes) == 0 {
		return nil, errors.New("run: no schemes to compare")
	}
	drv := newDrives()
	if neighbors <= 0 {
		return nil, fmt.Errorf("run: neighbor count %d must be positive", neighbors)
	}
	res := &Result{Units: "pc, Msun, km/s (momenta in Msun km/s)", Neighbors: neighbors,
		SupernovaEnergyErg: SupernovaEnergyErg, EjectaMassMsun: EjectaMassMsun, TerminalFit: TerminalFit.String()}
	for _, s := range schemes {
		res.Schemes = append(res.Schemes, SchemeInfo{Name: s.Name, Description: s.Description,
			IsotropyCorrected: !s.SkipIsotropyCorrection})
	}
	total := len(cases) * len(schemes)
	if speedCase != nil {
		total += len(schemes)
	}
	done := 0
	step := func() {
		done++
		if opts.Progress != nil {
			opts.Progress(done, total)
		}
	}
	type isoKey struct{ scheme, setup string }
	iso := map[isoKey]*Isotropy{}
	var isoOrder []isoKey
	var out feedback.Output
	for _, cs := range cases {
		c, err := cs.get()
		if err != nil {
			return nil, fmt.Errorf("run: set-up %s: %w", cs.name, err)
		}
		tree, err := neighbor.NewTree(c.Gas.Packed(), c.Gas.ID, c.Box)
		if err != nil {
			return nil, fmt.Errorf("run: set-up %s: neighbor tree: %w", c.Setup, err)
		}
		sources := supernovae(c)
		gas := c.Gas.View()
		k := min(neighbors, c.Gas.Len())
		oneSided, err := countOneSided(c, tree, k)
		if err != nil {
			return nil, fmt.Errorf("run: set-up %s: %w", c.Setup, err)
		}
		for _, s := range schemes {
			cp, err := newCoupler(s, c, k, opts.Workers)
			if err != nil {
				return nil, fmt.Errorf("run: %w", err)
			}
			sources, err := drv.sources(s, sources, c.Units)
			if err != nil {
				return nil, fmt.Errorf("run: set-up %s: %w", c.Setup, err)
			}
			if err := cp.Couple(gas, tree, sources, &out); err != nil {
				return nil, fmt.Errorf("run: scheme %s on %s: %w", s.Name, c.Setup, err)
			}
			conv, budget := measure(s.Name, c, sources, &out)
			res.Convergence = append(res.Convergence, conv)
			res.Energy = append(res.Energy, budget)
			key := isoKey{s.Name, c.Setup}
			r := iso[key]
			if r == nil {
				r = &Isotropy{Scheme: s.Name, Setup: c.Setup}
				iso[key] = r
				isoOrder = append(isoOrder, key)
			}
			coupled := out.Ledger.Stars - out.Ledger.Skipped
			r.Residual = math.Max(r.Residual, out.Ledger.MaxIsotropyResidual)
			r.MeanResidual += out.Ledger.SumIsotropyResidual
			r.Stars += coupled
			r.OneSidedStars += oneSided
			step()
		}
	}
	for _, key := range isoOrder {
		r := iso[key]
		if r.Stars > 0 {
			r.MeanResidual /= float64(r.Stars)
		}
		res.Isotropy = append(res.Isotropy, *r)
	}
	if speedCase != nil {
		rows, err := measureSpeed(speedCase, schemes, drv, neighbors, speed, opts.Workers, step)
		if err != nil {
			return nil, fmt.Errorf("run: %w", err)
		}
		res.Speed = rows
	}
	return res, nil
}

func newCoupler(s SchemeSpec, c *Case, k, workers int) (*feedback.Coupler, error) {
	cp, err := feedback.NewCoupler(feedback.Config{Units: c.Units, Scheme: s.Scheme, Weighting: s.Weighting,
		SkipIsotropyCorrection: s.SkipIsotropyCorrection, Neighbors: k, Workers: workers, Box: c.Box})
	if err != nil {
		return nil, fmt.Errorf("scheme %s: %w", s.Name, err)
	}
	return cp, nil
}

// EjectaMetalFraction is the metal mass fraction of the comparison's
// supernova ejecta (1 Msun of metals in 10 Msun, an illustrative round
// value: the comparison's momenta and energies do not depend on it; only
// the total metals are tracked).
const EjectaMetalFraction = 0.1

// supernovae makes one supernova release per star of the case, in its
// code units: SupernovaEnergyErg and EjectaMassMsun, EjectaMetalFraction of
// it metals.
func supernovae(c *Case) []feedback.Source {
	out := make([]feedback.Source, len(c.Stars))
	mass := EjectaMassMsun * units.SolarMass / c.Units.MassG
	for i, st := range c.Stars {
		src := feedback.Source{Star: st, Channel: yields.CoreCollapse, Mass: mass, Events: 1,
			Energy: SupernovaEnergyErg / c.Units.EnergyErg()}
		src.Species[yields.Metals] = EjectaMetalFraction * mass
		out[i] = src
	}
	return out
}

// measure turns one Couple call into a convergence row and an energy
// budget.
func measure(scheme string, c *Case, sources []feedback.Source, out *feedback.Output) (Convergence, EnergyBudget) {
	u := c.Units
	pUnit := u.MomentumGCmPS() / units.MsunKms
	l := &out.Ledger
	gas := c.Gas
	metals := -1
	for i, s := range gas.Species {
		if s == yields.Metals {
			metals = i
		}
	}
	// Records are grouped by source in input order.
	var swept, ec, term float64
	coupledStars := 0
	var kinetic, thermal float64
	capped := 0
	r := 0
	for si := range sources {
		src := &sources[si]
		mSw, pt := 0.0, 0.0
		nrec := 0
		equal := 1 / float64(max(countRecords(out.Records[r:], src.Star.ID), 1))
		for ; r < len(out.Records) && out.Records[r].StarID == src.Star.ID; r++ {
			rec := &out.Records[r]
			nrec++
			i := rec.GasIndex
			mSw += gas.Mass[i]
			// The neighbor's share of the supernova's reference momentum:
			// its share of the ejecta, or an equal share for a release
			// without mass (light).
			w := equal
			if src.Mass > 0 {
				w = rec.Mass / src.Mass
			}
			rho := gas.Density[i] * u.DensityGCm3()
			n := rho / (feedback.MassPerHydrogen * units.ProtonMass)
			z := src.Star.Metallicity
			if metals >= 0 {
				z = gas.Fractions[metals][i]
			}
			pt += w * TerminalFit.Remnant(SupernovaEnergyErg, n, z).TerminalMomentum
			kinetic += rec.Energy - rec.Heat
			thermal += rec.Heat
			if rec.Flags&feedback.FlagCapped != 0 {
				capped++
			}
		}
		if nrec == 0 {
			continue
		}
		coupledStars++
		mSwMsun := mSw * u.MassG / units.SolarMass
		ec += EnergyConservingMomentum(SupernovaEnergyErg, EjectaMassMsun, mSwMsun)
		term += pt / units.MsunKms
		swept += mSwMsun
	}
	conv := Convergence{Scheme: scheme, Setup: c.Setup, DensityCm3: c.DensityCm3, GasMassMsun: c.GasMassMsun,
		Supernovae: len(sources)}
	if len(sources) > 0 {
		conv.RadialMomentumMsunKms = l.RadialMomentum * pUnit / float64(len(sources))
	}
	if coupledStars > 0 {
		f := 1 / float64(coupledStars)
		conv.CoupledMassMsun = swept * f
		conv.EnergyConservingMsunKm = ec * f
		conv.TerminalMsunKms = term * f
	}
	if len(out.Records) > 0 {
		conv.CappedFraction = float64(capped) / float64(len(out.Records))
	}
	budget := EnergyBudget{Scheme: scheme, Setup: c.Setup, DensityCm3: c.DensityCm3, GasMassMsun: c.GasMassMsun}
	if in := l.In.Energy; in > 0 {
		budget.Kinetic = kinetic / in
		budget.Thermal = thermal / in
		budget.Radiated = l.Radiated / in
		budget.Undeposited = l.Undeposited.Energy / in
	}
	return conv, budget
}

// countRecords counts the leading records of star id.
func countRecords(recs []feedback.Record, id int64) int {
	n := 0
	for n < len(recs) && recs[n].StarID == id {
		n++
	}
	return n
}

// EnergyConservingMomentum is the momentum, in Msun km/s, of a remnant of
// energy e (erg) and ejecta mass ejecta (Msun) that has swept up swept
// (Msun) without radiating: p_EC = sqrt(2 e (M_ej + 0.28 M_sw)). See
// Convergence for where the formula comes from.
func EnergyConservingMomentum(e, ejecta, swept float64) float64 {
	m := (ejecta + feedback.SedovKineticFraction*swept) * units.SolarMass
	return math.Sqrt(2*e*m) / units.MsunKms
}

// speedCaseFor builds the speed case of a suite: its set-up at the chosen
// density and resolution, with the stars replaced by Speed.Stars stars
// placed near randomly chosen gas elements.
func speedCaseFor(suite Suite) (*Case, error) {
	sp := suite.Speed
	setups, err := SelectSetups([]string{sp.Setup})
	if err != nil {
		return nil, fmt.Errorf("speed: %w", err)
	}
	c, err := setups[0].Build(CaseSpec{DensityCm3: sp.DensityCm3, GasMassMsun: sp.GasMassMsun, Elements: sp.Elements, Seed: suite.Seed})
	if err != nil {
		return nil, fmt.Errorf("speed: %w", err)
	}
	rng := rand.New(rand.NewPCG(suite.Seed, 0x5eed))
	g := c.Gas
	c.Stars = make([]feedback.Star, sp.Stars)
	for s := range c.Stars {
		i := rng.IntN(g.Len())
		d := math.Cbrt(g.Mass[i] / g.Density[i])
		p := [3]float64{g.Pos[0][i] + 0.31*d, g.Pos[1][i] + 0.17*d, g.Pos[2][i] + 0.23*d}
		c.Stars[s] = star(int64(s+1), c.Box.Wrap(p))
	}
	return c, nil
}

// floorPassesPerRound is how many touch-only passes each timing round runs.
const floorPassesPerRound = 3

// measureSpeed times every scheme (Couple then Apply) and the touch-only
// floor on the same gas, alternating floor and scheme passes and keeping
// the fastest of each, which is the least disturbed by other work on the
// machine.
func measureSpeed(c *Case, schemes []SchemeSpec, drv *drives, neighbors int, spec SpeedSpec, workers int, step func()) ([]Speed, error) {
	pristine := c.Gas
	work := pristine.Clone()
	gas := work.View()
	tree, err := neighbor.NewTree(pristine.Packed(), pristine.ID, c.Box)
	if err != nil {
		return nil, fmt.Errorf("speed: neighbor tree: %w", err)
	}
	k := min(neighbors, pristine.Len())
	sources := supernovae(c)
	restore := func() {
		for a := 0; a < 3; a++ {
			copy(work.Vel[a], pristine.Vel[a])
		}
		copy(work.Mass, pristine.Mass)
		copy(work.Energy, pristine.Energy)
		for f := range work.Fractions {
			copy(work.Fractions[f], pristine.Fractions[f])
		}
	}
	var floor TouchFloor
	var out feedback.Output
	var touchedBuf []feedback.Touched
	rounds := max(spec.MinRounds, 1)
	var rows []Speed
	for _, s := range schemes {
		cp, err := newCoupler(s, c, k, workers)
		if err != nil {
			return nil, fmt.Errorf("speed: %w", err)
		}
		sources, err := drv.sources(s, sources, c.Units)
		if err != nil {
			return nil, fmt.Errorf("speed: %w", err)
		}
		bestFloor, bestScheme := math.Inf(1), math.Inf(1)
		touched := 0
		var applier feedback.Applier
		start := time.Now()
		for r := 0; r < rounds || time.Since(start) < spec.MinDuration; r++ {
			// The floor pass is short; a few of them per round keep its
			// minimum as steady as the scheme's.
			for f := 0; f < floorPassesPerRound; f++ {
				t0 := time.Now()
				touched, err = floor.Touch(gas, tree, c.Stars, k)
				dt := time.Since(t0).Seconds()
				if err != nil {
					return nil, fmt.Errorf("speed: %w", err)
				}
				bestFloor = math.Min(bestFloor, dt)
			}
			restore()
			t0 := time.Now()
			if err := cp.Couple(gas, tree, sources, &out); err != nil {
				return nil, fmt.Errorf("speed: scheme %s: %w", s.Name, err)
			}
			touchedBuf, _, err = applier.Apply(gas, out.Records, touchedBuf)
			if err != nil {
				return nil, fmt.Errorf("speed: scheme %s: apply: %w", s.Name, err)
			}
			bestScheme = math.Min(bestScheme, time.Since(t0).Seconds())
		}
		// Guard against a clock too coarse to see a pass.
		bestFloor = math.Max(bestFloor, 1e-9)
		bestScheme = math.Max(bestScheme, 1e-9)
		n := float64(len(c.Stars))
		rows = append(rows, Speed{Scheme: s.Name, Setup: c.Setup, Stars: len(c.Stars), Neighbors: k,
			StarsPerS: n / bestScheme, TouchedPerS: float64(touched) / bestScheme,
			FloorStarsPerS: n / bestFloor, TouchRatio: bestScheme / bestFloor})
		step()
	}
	return rows, nil
}
