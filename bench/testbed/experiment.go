package testbed

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"sync"

	"github.com/ejecta-dev/ejecta/bench/cooling"
	"github.com/ejecta-dev/ejecta/bench/remnant"
	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Variant is one coupling variant the experiment evolves: a scheme and the
// coupler settings it runs with, as a host would configure them.
type Variant struct {
	// Name identifies the variant in the results.
	Name string
	// Scheme splits the release.
	Scheme feedback.Scheme
	// Weighting shares the release among neighbors.
	Weighting feedback.Weighting
	// SkipIsotropyCorrection runs the variant without the isotropy
	// correction.
	SkipIsotropyCorrection bool
}

// Config sets up the experiment: every variant in every medium at every
// resolution, evolved to the measurement times and compared with the
// one-dimensional reference.
type Config struct {
	// Variants to evolve.
	Variants []Variant
	// DensitiesCm3 are the ambient (mean) hydrogen densities (cm^-3).
	DensitiesCm3 []float64
	// Media are the ambient media, each at every density.
	Media []Medium
	// CellMassRatios are the cell masses, in units of the reference's
	// cooling mass (its mass at shell formation) at each density.
	CellMassRatios []float64
	// ShellTimes are the measurement times in units of the reference's
	// shell-formation time.
	ShellTimes []float64
	// Metallicity of the gas and the star, in solar units (the gas's metal
	// mass fraction is Metallicity × yields.SolarMetals).
	Metallicity float64
	// EnergyErg and EjectaMassMsun are the supernova's energy and ejecta
	// mass; EjectaMetalFraction the metal share of the ejecta.
	EnergyErg, EjectaMassMsun, EjectaMetalFraction float64
	// Cooling is the cooling curve of the grid and the reference at
	// Metallicity; nil means cooling.Builtin(Metallicity).
	Cooling *cooling.Curve
	// Neighbors is the number of cells each star couples to.
	Neighbors int
	// ReferenceZones is the resolution of the one-dimensional reference,
	// in zones per estimated shell-formation radius.
	ReferenceZones int
	// BoxMargin is the half side of the box over the reference's shock
	// radius at the last measurement time (> 1).
	BoxMargin float64
	// MinCells is the fewest cells along a side.
	MinCells int
	// StepFraction caps every step at this fraction of the time since the
	// explosion (never below StepFraction × FirstStepShellTimes
	// shell-formation times), so the early, self-similar evolution is
	// followed in log time even where the Courant step of large cells
	// would jump over it.
	StepFraction, FirstStepShellTimes float64
	// CoolingCourant is the grid's cooling limit on the step
	// (GridConfig.CoolingCourant).
	CoolingCourant float64
	// HistorySamples is the number of log-spaced times between
	// HistoryStart and the last measurement time (in shell times) at which
	// the grid is measured for the momentum history.
	HistorySamples int
	HistoryStart   float64
	// SliceCellMassRatio picks the resolution (one of CellMassRatios)
	// whose density and temperature are sliced through the star at
	// SliceShellTime; zero takes no slices.
	SliceCellMassRatio, SliceShellTime float64
	// CalibratedVariant, when not empty, names one more variant: the
	// terminal-momentum scheme with a remnant table calibrated from the
	// experiment's own 1D references (CalibratedTable), so its remnant
	// comes from the same cooling as the grid's.
	CalibratedVariant string
	// Workers is the number of cases evolved at once; each case runs on
	// one goroutine, so results do not depend on it.
	Workers int
	// Progress, if set, is called (from one goroutine at a time) as the
	// work advances, with the work done and the total, in arbitrary units.
	Progress func(done, total int)
}

// DefaultConfig is the experiment at densities 1 and 100 cm^-3 and cell
// masses 1e-3, 0.1 and 10 cooling masses, measured at 3 and 10
// shell-formation times, for a 1e51 erg supernova with 10 Msun of ejecta
// in solar-metallicity gas, coupled to 32 cells, with the built-in cooling.
// Variants is left empty: the caller names them.
func DefaultConfig() Config {
	return Config{
		DensitiesCm3: []float64{1, 100}, Media: []Medium{UniformMedium()},
		CellMassRatios: []float64{1e-3, 0.1, 10}, ShellTimes: []float64{3, 10},
		Metallicity: 1, EnergyErg: units.FOE, EjectaMassMsun: 10, EjectaMetalFraction: 0.1,
		Neighbors: feedback.DefaultNeighbors, ReferenceZones: 200, BoxMargin: 1.25, MinCells: 8,
		StepFraction: 0.2, FirstStepShellTimes: 0.01, CoolingCourant: 0,
		HistorySamples: 24, HistoryStart: 0.05, SliceCellMassRatio: 1e-3, SliceShellTime: 3, Workers: 1,
		CalibratedVariant: "terminal-momentum-calibrated",
	}
}

func (c *Config) validate() error {
	pos := func(v float64) bool { return v > 0 && !math.IsInf(v, 0) }
	if len(c.Variants) == 0 || len(c.DensitiesCm3) == 0 || len(c.CellMassRatios) == 0 || len(c.ShellTimes) == 0 {
		return fmt.Errorf("testbed: experiment needs variants, densities, cell masses and times: %w", ErrConfig)
	}
	seen := map[string]bool{}
	for _, v := range c.Variants {
		if v.Name == "" || v.Scheme == nil || seen[v.Name] {
			return fmt.Errorf("testbed: variant %q: needs a unique name and a scheme: %w", v.Name, ErrConfig)
		}
		seen[v.Name] = true
	}
	if len(c.Media) == 0 {
		return fmt.Errorf("testbed: experiment needs a medium: %w", ErrConfig)
	}
	media := map[string]bool{}
	for _, m := range c.Media {
		if err := m.validate(); err != nil {
			return err
		}
		if media[m.Name] {
			return fmt.Errorf("testbed: medium %q named twice: %w", m.Name, ErrConfig)
		}
		media[m.Name] = true
	}
	for _, lists := range [][]float64{c.DensitiesCm3, c.CellMassRatios, c.ShellTimes} {
		for _, v := range lists {
			if !pos(v) {
				return fmt.Errorf("testbed: density, cell mass or time %v: want finite > 0: %w", v, ErrConfig)
			}
		}
	}
	switch {
	case !(c.Metallicity >= 0) || math.IsInf(c.Metallicity, 0):
		return fmt.Errorf("testbed: metallicity %v: %w", c.Metallicity, ErrConfig)
	case !pos(c.EnergyErg) || !pos(c.EjectaMassMsun) || !(c.EjectaMetalFraction >= 0 && c.EjectaMetalFraction <= 1):
		return fmt.Errorf("testbed: supernova of %v erg, %v Msun, metal fraction %v: %w", c.EnergyErg, c.EjectaMassMsun, c.EjectaMetalFraction, ErrConfig)
	case c.Neighbors < 1 || c.ReferenceZones < 8 || !(c.BoxMargin > 1) || c.MinCells < 4:
		return fmt.Errorf("testbed: neighbors %d, reference zones %d, box margin %v, min cells %d: %w", c.Neighbors, c.ReferenceZones, c.BoxMargin, c.MinCells, ErrConfig)
	case c.HistorySamples < 0 || c.HistorySamples > 10000 || (c.HistorySamples > 0 && !pos(c.HistoryStart)):
		return fmt.Errorf("testbed: %d history samples from %v: %w", c.HistorySamples, c.HistoryStart, ErrConfig)
	case !pos(c.StepFraction) || !pos(c.FirstStepShellTimes) || !(c.CoolingCourant >= 0):
		return fmt.Errorf("testbed: step fraction %v of at least %v shell times, cooling Courant %v: %w", c.StepFraction, c.FirstStepShellTimes, c.CoolingCourant, ErrConfig)
	case c.Workers < 1:
		return fmt.Errorf("testbed: %d workers: %w", c.Workers, ErrConfig)
	}
	return nil
}

// Outcome is what one variant delivered in one medium at one resolution
// and time, beside the one-dimensional reference at the same time.
// Energies are shares of the supernova energy; the thermal energy is that
// above the ambient gas's; the radiated share is net of heating and of
// FloorShare, the energy the solver added where it held cells at its
// temperature floor.
type Outcome struct {
	Scheme                     string  `json:"scheme"`
	Medium                     string  `json:"medium"`
	DensityCm3                 float64 `json:"density_cm3"`
	CellMassMsun               float64 `json:"cell_mass_msun"`
	CellMassOverCoolingMass    float64 `json:"cell_mass_over_cooling_mass"`
	TimeOverShellFormation     float64 `json:"time_over_shell_formation"`
	RadialMomentumMsunKms      float64 `json:"radial_momentum_msun_kms"`
	ReferenceMomentumMsunKms   float64 `json:"reference_momentum_msun_kms"`
	KineticShare               float64 `json:"kinetic_share"`
	ReferenceKineticShare      float64 `json:"reference_kinetic_share"`
	ThermalShare               float64 `json:"thermal_share"`
	ReferenceThermalShare      float64 `json:"reference_thermal_share"`
	RadiatedShare              float64 `json:"radiated_share"`
	ReferenceRadiatedShare     float64 `json:"reference_radiated_share"`
	UndepositedShare           float64 `json:"undeposited_share"`
	FloorShare                 float64 `json:"floor_share"`
	HotMassMsun                float64 `json:"hot_mass_msun"`
	ReferenceHotMassMsun       float64 `json:"reference_hot_mass_msun"`
	CellSizePc                 float64 `json:"cell_size_pc"`
	CellSizeOverShellRadius    float64 `json:"cell_size_over_shell_radius"`
	BoxPc                      float64 `json:"box_pc"`
	Cells                      int     `json:"cells_per_side"`
	Steps                      int     `json:"steps"`
	ReferenceShockRadiusPc     float64 `json:"reference_shock_radius_pc"`
	ReferenceShellFormationKyr float64 `json:"reference_shell_formation_kyr"`
}

// MomentumRatio is the delivered radial momentum over the reference's.
func (o Outcome) MomentumRatio() float64 { return o.RadialMomentumMsunKms / o.ReferenceMomentumMsunKms }

// HistoryPoint is one variant's radial momentum at one time, for the
// momentum-against-time picture.
type HistoryPoint struct {
	Scheme                  string  `json:"scheme"`
	Medium                  string  `json:"medium"`
	DensityCm3              float64 `json:"density_cm3"`
	CellMassOverCoolingMass float64 `json:"cell_mass_over_cooling_mass"`
	TimeKyr                 float64 `json:"time_kyr"`
	RadialMomentumMsunKms   float64 `json:"radial_momentum_msun_kms"`
}

// ReferenceInfo is the one-dimensional reference in one medium.
type ReferenceInfo struct {
	DensityCm3             float64        `json:"density_cm3"`
	AmbientTemperatureK    float64        `json:"ambient_temperature_k"`
	ShellFormationKyr      float64        `json:"shell_formation_kyr"`
	ShellRadiusPc          float64        `json:"shell_radius_pc"`
	CoolingMassMsun        float64        `json:"cooling_mass_msun"`
	ShellMomentumMsunKms   float64        `json:"shell_momentum_msun_kms"`
	History                []HistoryPoint `json:"history"`
	MomentumAtTimesMsunKms []float64      `json:"momentum_at_times_msun_kms"`
}

// Slice is the density and temperature of one plane through the star: the
// plane of cell centres just above it, Cells × Cells values, x fastest.
type Slice struct {
	Scheme                  string
	Medium                  string
	DensityCm3              float64
	CellMassOverCoolingMass float64
	TimeOverShellFormation  float64
	Cells                   int
	BoxPc                   float64
	HydrogenDensityCm3      []float64
	TemperatureK            []float64
}

// Result is what the experiment measured: one outcome row per variant,
// density, resolution and time, in that order; the momentum histories; the
// references; and the slices.
type Result struct {
	Outcome    []Outcome       `json:"outcome"`
	History    []HistoryPoint  `json:"outcome_history"`
	References []ReferenceInfo `json:"references"`
	Slices     []Slice         `json:"-"`
}

// Run evolves every variant in every medium at every resolution, Workers
// cases at a time, and compares each with the one-dimensional reference.
func Run(cfg Config) (*Result, error) {
	if err := cfg.validate(); err != nil {
		return nil, err
	}
	curve := cfg.Cooling
	if curve == nil {
		c, err := cooling.Builtin(cfg.Metallicity)
		if err != nil {
			return nil, fmt.Errorf("testbed: %w", err)
		}
		curve = c
	}
	lastTime := 0.0
	for _, t := range cfg.ShellTimes {
		lastTime = math.Max(lastTime, t)
	}
	// References, one per density, in parallel.
	refs := make([]*Reference, len(cfg.DensitiesCm3))
	errs := make([]error, len(refs))
	var wg sync.WaitGroup
	sem := make(chan struct{}, cfg.Workers)
	for i, n := range cfg.DensitiesCm3 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			sem <- struct{}{}
			defer func() { <-sem }()
			rc := remnant.DefaultConfig()
			rc.Density, rc.Metallicity = n, cfg.Metallicity
			rc.Energy, rc.EjectaMass = cfg.EnergyErg, cfg.EjectaMassMsun
			rc.Cooling = curve
			rc.ZonesPerShellRadius = cfg.ReferenceZones
			// Room for the remnant to the last measurement time, with
			// the fits' estimate of shell formation only a guide.
			rc.EndShellTimes = 1.5 * lastTime
			rc.DomainShellRadii = 1.5 * math.Pow(1.5*lastTime, 0.4)
			refs[i], errs[i] = NewReference(rc)
			if errs[i] == nil && refs[i].End() < lastTime*refs[i].ShellTime() {
				errs[i] = fmt.Errorf("testbed: reference at n = %v cm^-3 ends at %.3g shell times, before %v: %w",
					n, refs[i].End()/refs[i].ShellTime(), lastTime, ErrReference)
			}
		}()
	}
	wg.Wait()
	if err := errors.Join(errs...); err != nil {
		return nil, err
	}
	variants := cfg.Variants
	if cfg.CalibratedVariant != "" {
		tab, err := CalibratedTable(refs)
		if err != nil {
			return nil, err
		}
		variants = append(variants[:len(variants):len(variants)], Variant{Name: cfg.CalibratedVariant,
			Scheme: feedback.TerminalMomentum{Table: tab}})
		for _, v := range cfg.Variants {
			if v.Name == cfg.CalibratedVariant {
				return nil, fmt.Errorf("testbed: variant %q named twice: %w", v.Name, ErrConfig)
			}
		}
	}

	// Cases, the most expensive first so the workers finish together.
	var jobs []*caseJob
	for vi := range variants {
		for mi := range cfg.Media {
			for di := range cfg.DensitiesCm3 {
				for ri, ratio := range cfg.CellMassRatios {
					j := &caseJob{variant: vi, medium: mi, density: di, ratio: ri, order: len(jobs)}
					j.plan = planCase(&cfg, refs[di], ratio, lastTime)
					j.slice = ratio == cfg.SliceCellMassRatio
					jobs = append(jobs, j)
				}
			}
		}
	}
	byCost := append([]*caseJob(nil), jobs...)
	sort.SliceStable(byCost, func(a, b int) bool { return byCost[a].plan.cost > byCost[b].plan.cost })
	prog := newProgressMeter(cfg.Progress, jobs)
	queue := make(chan *caseJob)
	for w := 0; w < cfg.Workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range queue {
				j.result, j.err = runCase(&cfg, curve, variants[j.variant], cfg.Media[j.medium], refs[j.density], j, prog)
				prog.finish(j)
			}
		}()
	}
	for _, j := range byCost {
		queue <- j
	}
	close(queue)
	wg.Wait()
	prog.complete()

	res := &Result{}
	for _, j := range jobs {
		if j.err != nil {
			return nil, j.err
		}
		res.Outcome = append(res.Outcome, j.result.outcome...)
		res.History = append(res.History, j.result.history...)
		if j.result.slice != nil {
			res.Slices = append(res.Slices, *j.result.slice)
		}
	}
	for di, r := range refs {
		res.References = append(res.References, referenceInfo(r, cfg.DensitiesCm3[di], cfg.ShellTimes, lastTime))
	}
	return res, nil
}

// referenceInfo summarizes a reference, with its momentum history on a
// log grid out to the last measurement time.
func referenceInfo(r *Reference, n float64, times []float64, last float64) ReferenceInfo {
	sf := r.ShellFormation
	info := ReferenceInfo{DensityCm3: n, AmbientTemperatureK: r.AmbientTemperature,
		ShellFormationKyr: sf.Time / units.JulianYear / 1e3, ShellRadiusPc: sf.ShockRadius / units.Parsec,
		CoolingMassMsun: sf.Mass / units.SolarMass, ShellMomentumMsunKms: sf.Momentum / units.MsunKms}
	for _, s := range r.history {
		if s.Time > last*sf.Time*1.0001 {
			break
		}
		info.History = append(info.History, HistoryPoint{Scheme: "reference", DensityCm3: n,
			TimeKyr: s.Time / units.JulianYear / 1e3, RadialMomentumMsunKms: s.Momentum / units.MsunKms})
	}
	for _, t := range times {
		s, err := r.At(t * sf.Time)
		p := math.NaN()
		if err == nil {
			p = s.Momentum / units.MsunKms
		}
		info.MomentumAtTimesMsunKms = append(info.MomentumAtTimesMsunKms, p)
	}
	return info
}

// casePlan is the grid of one case.
type casePlan struct {
	cells    int
	size     float64 // code length
	cellMass float64 // code mass
	rho      float64 // code density
	eAmbient float64 // code specific energy
	// remnantRadius is the reference's shock radius at the last time.
	remnantRadius float64
	tShell        float64 // code time
	lastTime      float64 // code time
	cost          float64 // relative work
	cellRatio     float64
}

// planCase sizes the grid: cells of the asked mass at the ambient
// density, in a box BoxMargin times wider than the reference's remnant at
// the last measurement time and at least MinCells cells across, with an
// even number of cells so that the box centre, where the star sits, is a
// cell corner.
func planCase(cfg *Config, ref *Reference, ratio, last float64) casePlan {
	u := units.ParsecSolarMassKms()
	th := cooling.DefaultGas()
	rhoCGS := th.MassDensity(ref.DensityCm3)
	p := casePlan{cellRatio: ratio}
	p.rho = rhoCGS / u.DensityGCm3()
	p.cellMass = ratio * ref.CoolingMass() / u.MassG
	dx := math.Cbrt(p.cellMass / p.rho)
	end, err := ref.At(last * ref.ShellTime())
	radius := ref.ShellFormation.ShockRadius
	if err == nil {
		radius = end.ShockRadius
	}
	p.remnantRadius = radius / u.LengthCm
	side := math.Max(2*cfg.BoxMargin*radius/u.LengthCm, float64(cfg.MinCells)*dx)
	n := int(math.Ceil(side / dx))
	n += n % 2
	p.cells = n
	p.size = float64(n) * dx
	p.eAmbient = th.SpecificEnergy(ref.AmbientTemperature) / u.SpecificEnergy()
	p.tShell = ref.ShellTime() / u.TimeS()
	p.lastTime = last * p.tShell
	p.cost = math.Pow(float64(n), 4)
	return p
}

// caseJob is one variant in one medium at one resolution.
type caseJob struct {
	variant, medium, density, ratio, order int
	plan                                   casePlan
	slice                                  bool
	result                                 *caseResult
	err                                    error
	done                                   float64 // fraction of the run done, for progress
}

type caseResult struct {
	outcome []Outcome
	history []HistoryPoint
	slice   *Slice
}

// runCase evolves one case: the supernova goes in at t = 0 through the
// coupler and Apply, then the grid is stepped to every measurement time.
// Energy a scheme returns undeposited (stochastic heating when no cell was
// drawn) is carried by the star and released again at the next step, as a
// host would.
func runCase(cfg *Config, curve *cooling.Curve, v Variant, med Medium, ref *Reference, j *caseJob, prog *progressMeter) (*caseResult, error) {
	p := j.plan
	u := units.ParsecSolarMassKms()
	gc := DefaultGridConfig(p.cells, p.size)
	gc.Cooling = curve
	gc.CoolingCourant = cfg.CoolingCourant
	g, err := NewGrid(gc)
	if err != nil {
		return nil, err
	}
	zGas := cfg.Metallicity * yields.SolarMetals
	centre := [3]float64{p.size / 2, p.size / 2, p.size / 2}
	th := gc.Thermo
	equilibrium := func(rho float64) float64 {
		rc := rho * u.DensityGCm3()
		return th.SpecificEnergy(curve.EquilibriumTemperature(th.HydrogenDensity(rc))) / u.SpecificEnergy()
	}
	if med.Clumps == 0 {
		equilibrium = func(float64) float64 { return p.eAmbient }
	}
	g.fillMedium(med, p.rho, med.ClumpWidth*ref.ShellFormation.ShockRadius/u.LengthCm, p.remnantRadius, centre, equilibrium, zGas)
	// The thermal energy reported is that above the medium's own.
	thermal0 := g.Measure(centre, 0, remnant.HotTemperature).ThermalExcess
	in, err := NewInjector(g, feedback.Config{Scheme: v.Scheme, Weighting: v.Weighting,
		SkipIsotropyCorrection: v.SkipIsotropyCorrection, Neighbors: cfg.Neighbors, Workers: 1})
	if err != nil {
		return nil, fmt.Errorf("testbed: %s: %w", v.Name, err)
	}
	star := feedback.Star{ID: 1, Pos: centre, Metallicity: zGas}
	eCode := cfg.EnergyErg / u.EnergyErg()
	mEj := cfg.EjectaMassMsun * units.SolarMass / u.MassG
	src := feedback.Source{Star: star, Channel: yields.CoreCollapse, Mass: mEj, Energy: eCode, Events: 1}
	src.Species[yields.Metals] = cfg.EjectaMetalFraction * mEj
	led, _, err := in.Inject(g, []feedback.Source{src})
	if err != nil {
		return nil, fmt.Errorf("testbed: %s: %w", v.Name, err)
	}
	carry := led.Undeposited.Energy

	// Times to stop at: the measurement times, the history samples, and
	// the slice time.
	type stop struct {
		t       float64
		measure int // index into ShellTimes, or -1
		history bool
		slice   bool
	}
	var stops []stop
	for i, s := range cfg.ShellTimes {
		stops = append(stops, stop{t: s * p.tShell, measure: i})
	}
	if cfg.HistorySamples > 0 {
		lo, hi := cfg.HistoryStart*p.tShell, p.lastTime
		for k := 0; k < cfg.HistorySamples; k++ {
			f := 0.0
			if cfg.HistorySamples > 1 {
				f = float64(k) / float64(cfg.HistorySamples-1)
			}
			stops = append(stops, stop{t: lo * math.Pow(hi/lo, f), measure: -1, history: true})
		}
	}
	if j.slice {
		stops = append(stops, stop{t: cfg.SliceShellTime * p.tShell, measure: -1, slice: true})
	}
	sort.SliceStable(stops, func(a, b int) bool { return stops[a].t < stops[b].t })

	res := &caseResult{}
	for _, st := range stops {
		for g.Time() < st.t {
			dt := math.Min(g.StableStep(), cfg.StepFraction*math.Max(g.Time(), cfg.FirstStepShellTimes*p.tShell))
			if left := st.t - g.Time(); dt >= left {
				dt = left
			}
			if err := g.Step(dt); err != nil {
				return nil, fmt.Errorf("testbed: %s at n = %v, %v cooling masses: %w", v.Name, ref.DensityCm3, p.cellRatio, err)
			}
			if carry > 0 {
				c := src
				c.Mass, c.Species, c.Events, c.Energy = 0, yields.Abundances{}, 0, carry
				c.Step = g.Steps()
				led, _, err := in.Inject(g, []feedback.Source{c})
				if err != nil {
					return nil, fmt.Errorf("testbed: %s: %w", v.Name, err)
				}
				carry = led.Undeposited.Energy
			}
			prog.advance(j, g.Time()/p.lastTime)
		}
		m := g.Measure(centre, 0, remnant.HotTemperature)
		m.ThermalExcess -= thermal0
		if st.history {
			res.history = append(res.history, HistoryPoint{Scheme: v.Name, Medium: med.Name, DensityCm3: ref.DensityCm3,
				CellMassOverCoolingMass: p.cellRatio, TimeKyr: g.Time() * u.TimeS() / units.JulianYear / 1e3,
				RadialMomentumMsunKms: m.RadialMomentum})
		}
		if st.slice {
			res.slice = g.slice(v.Name, ref.DensityCm3, p.cellRatio, cfg.SliceShellTime)
			res.slice.Medium = med.Name
		}
		if st.measure >= 0 {
			r, err := ref.At(g.Time() * u.TimeS())
			if err != nil {
				return nil, err
			}
			e := cfg.EnergyErg
			eu := u.EnergyErg()
			inj := in.Total()
			l := g.Ledger()
			o := Outcome{Scheme: v.Name, Medium: med.Name, DensityCm3: ref.DensityCm3, CellMassMsun: p.cellMass * u.MassG / units.SolarMass,
				CellMassOverCoolingMass: p.cellRatio, TimeOverShellFormation: cfg.ShellTimes[st.measure],
				RadialMomentumMsunKms:    m.RadialMomentum * u.MomentumGCmPS() / units.MsunKms,
				ReferenceMomentumMsunKms: r.Momentum / units.MsunKms,
				KineticShare:             m.Kinetic * eu / e, ReferenceKineticShare: r.Kinetic / e,
				ThermalShare: m.ThermalExcess * eu / e, ReferenceThermalShare: r.Thermal / e,
				RadiatedShare: (l.Radiated + inj.Radiated - l.Floor) * eu / e, ReferenceRadiatedShare: r.Radiated / e,
				UndepositedShare: carry * eu / e, FloorShare: l.Floor * eu / e,
				HotMassMsun: m.HotMass * u.MassG / units.SolarMass, ReferenceHotMassMsun: r.HotMass / units.SolarMass,
				CellSizePc: g.CellSize() * u.LengthCm / units.Parsec, BoxPc: p.size * u.LengthCm / units.Parsec,
				CellSizeOverShellRadius: g.CellSize() * u.LengthCm / ref.ShellFormation.ShockRadius,
				Cells:                   p.cells, Steps: int(g.Steps()),
				ReferenceShockRadiusPc:     r.ShockRadius / units.Parsec,
				ReferenceShellFormationKyr: ref.ShellTime() / units.JulianYear / 1e3,
			}
			res.outcome = append(res.outcome, o)
		}
	}
	sort.SliceStable(res.outcome, func(a, b int) bool {
		return res.outcome[a].TimeOverShellFormation < res.outcome[b].TimeOverShellFormation
	})
	return res, nil
}

// slice cuts the plane of cell centres just above the box centre.
func (g *Grid) slice(scheme string, n, ratio, shellTime float64) *Slice {
	u := g.cfg.Units
	th := g.cfg.Thermo
	k := g.n / 2
	s := &Slice{Scheme: scheme, DensityCm3: n, CellMassOverCoolingMass: ratio, TimeOverShellFormation: shellTime,
		Cells: g.n, BoxPc: g.cfg.Size * u.LengthCm / units.Parsec,
		HydrogenDensityCm3: make([]float64, g.n*g.n), TemperatureK: make([]float64, g.n*g.n)}
	for j := 0; j < g.n; j++ {
		for i := 0; i < g.n; i++ {
			c := g.Index(i, j, k)
			s.HydrogenDensityCm3[i+g.n*j] = th.HydrogenDensity(g.dens[c] * u.DensityGCm3())
			s.TemperatureK[i+g.n*j] = th.Temperature(g.eint[c] * u.SpecificEnergy())
		}
	}
	return s
}

// progressMeter turns the cases' advance into calls of the caller's
// progress function, weighting each case by its expected cost.
type progressMeter struct {
	mu     sync.Mutex
	fn     func(done, total int)
	total  float64
	done   float64
	last   int
	weight map[*caseJob]float64
}

// progressUnits is the total the progress function is given.
const progressUnits = 1000

func newProgressMeter(fn func(done, total int), jobs []*caseJob) *progressMeter {
	m := &progressMeter{fn: fn, weight: map[*caseJob]float64{}}
	for _, j := range jobs {
		m.total += j.plan.cost
		m.weight[j] = j.plan.cost
	}
	return m
}

// advance records that case j has reached fraction f of its run.
func (m *progressMeter) advance(j *caseJob, f float64) {
	if m.fn == nil {
		return
	}
	f = math.Min(f, 1)
	m.mu.Lock()
	defer m.mu.Unlock()
	m.done += (f - j.done) * m.weight[j]
	j.done = f
	m.report()
}

func (m *progressMeter) finish(j *caseJob) { m.advance(j, 1) }

// done reports the whole work done, whatever round-off the sums carry.
func (m *progressMeter) complete() {
	if m.fn != nil && m.last < progressUnits {
		m.last = progressUnits
		m.fn(progressUnits, progressUnits)
	}
}

func (m *progressMeter) report() {
	n := int(progressUnits * m.done / m.total)
	if n > m.last {
		m.last = n
		m.fn(n, progressUnits)
	}
}
