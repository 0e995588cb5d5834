package remnant

import (
	"errors"
	"fmt"
	"math"

	"github.com/ejecta-dev/ejecta/bench/cooling"
	"github.com/ejecta-dev/ejecta/bench/hydro"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// ErrUnphysical marks a run that produced a non-positive or non-finite
// density or energy.
var ErrUnphysical = errors.New("remnant run became unphysical")

// HotTemperature is the temperature above which gas counts as hot, 2e4 K
// (the hot phase of Kim & Ostriker 2015, sect. 2; from memory).
const HotTemperature = 2e4

// floorTemperature is the lowest temperature the solver lets gas reach
// after a hydrodynamic update, 1 K (our own choice, far below any
// equilibrium of the built-in curve); energy added to hold it is booked.
const floorTemperature = 1.0

// ejectaScalar is the passive scalar that marks ejecta.
const ejectaScalar = 0

// internalScalar is the scalar slot that carries the separately evolved
// internal energy: the conserved state holds ρe in it, the primitive state
// the specific internal energy e (advected with the mass like any scalar).
const internalScalar = 1

// Solver evolves one remnant: spherical shells of equal width, from the
// center (reflecting) to the outer radius (outflow). Quantities are per
// steradian inside; diagnostics multiply by 4π. A Solver is not safe for
// concurrent use; separate Solvers are independent.
type Solver struct {
	cfg    Config
	gas    cooling.Gas
	eos    hydro.IdealGas
	curve  *cooling.Curve  // nil without cooling
	cooler *cooling.Cooler // the curve applied to the gas; nil without cooling

	n             int
	dr            float64
	area          []float64 // face r^2, n+1 faces
	vol           []float64 // (r_R^3 − r_L^3)/3
	center        []float64 // zone center radius
	u, u1, du     []hydro.Cons
	w             []hydro.Prim // n+4 with ghosts
	flux          []hydro.Cons // n+1
	contact       []float64    // face velocities, n+1
	eeq           []float64    // equilibrium specific energy cache per zone
	eeqRho        []float64    // density the cache is for
	ambient       hydro.Prim
	ambientEnergy float64 // initial total energy per unit volume of the ambient gas
	eFloor        float64 // specific internal energy at the floor temperature
	eHot          float64 // specific internal energy at HotTemperature

	time, dt      float64
	steps         int
	initialEnergy float64 // total (4π Σ V E) at t = 0
	initialTherm  float64 // thermal energy of an all-ambient grid
	radiated      float64 // net energy lost to cooling (4π, erg)
	floorAdded    float64 // energy added by the temperature floor
	switchAdded   float64 // energy added (or removed) where the separate internal energy was used
	outflowEnergy float64 // energy through the outer face
	outflowMass   float64
	tEnd          float64
	tEstimate     float64
	rEstimate     float64

	hotMax  float64
	shell   Point
	history []Sample
	nextRec int
	recTime []float64

	// cancel, when set, is asked every hundred steps whether to stop.
	cancel func() error
}

// Point is the remnant's state at one instant.
type Point struct {
	// Time since the explosion in s.
	Time float64
	// ShockRadius in cm: the outer face of the outermost zone denser than
	// 1.1 times the ambient gas.
	ShockRadius float64
	// Mass inside the shock radius in g (ejecta and swept gas).
	Mass float64
	// Momentum is the total radial momentum in g cm/s.
	Momentum float64
	// HotMass is the mass hotter than HotTemperature in g.
	HotMass float64
	// Found is false when the point was never reached.
	Found bool
}

// Sample is one history record; energies in erg.
type Sample struct {
	Point
	// Kinetic energy.
	Kinetic float64
	// Thermal energy above that of undisturbed ambient gas filling the
	// grid.
	Thermal float64
	// Radiated is the energy the gas has lost so far: what cooling removed,
	// less what heating and the temperature floor put in.
	Radiated float64
}

// New sets up a run: the grid, the ambient medium, and the ejecta.
func New(cfg Config) (*Solver, error) {
	if err := cfg.validate(); err != nil {
		return nil, err
	}
	s := &Solver{cfg: cfg, gas: cfg.Gas, eos: hydro.IdealGas{Gamma: cfg.Gas.Gamma}}
	if !cfg.NoCooling {
		s.curve = cfg.Cooling
		if s.curve == nil {
			c, err := cooling.Builtin(cfg.Metallicity)
			if err != nil {
				return nil, fmt.Errorf("remnant: %w", err)
			}
			s.curve = c
		}
		k, err := cooling.NewCooler(s.curve, cfg.Gas)
		if err != nil {
			return nil, fmt.Errorf("remnant: %w", err)
		}
		s.cooler = k
	}
	s.tEstimate, s.rEstimate = shellEstimate(cfg.Energy, cfg.Density)
	s.tEnd = cfg.EndShellTimes * s.tEstimate
	s.n = int(math.Ceil(cfg.DomainShellRadii * float64(cfg.ZonesPerShellRadius)))
	s.dr = s.rEstimate / float64(cfg.ZonesPerShellRadius)
	n := s.n
	s.area = make([]float64, n+1)
	s.vol = make([]float64, n)
	s.center = make([]float64, n)
	for i := 0; i <= n; i++ {
		r := float64(i) * s.dr
		s.area[i] = r * r
	}
	for i := range n {
		rl, rr := float64(i)*s.dr, float64(i+1)*s.dr
		s.vol[i] = (rr*rr*rr - rl*rl*rl) / 3
		s.center[i] = 0.5 * (rl + rr)
	}
	s.u = make([]hydro.Cons, n)
	s.u1 = make([]hydro.Cons, n)
	s.du = make([]hydro.Cons, n)
	s.w = make([]hydro.Prim, n+4)
	s.flux = make([]hydro.Cons, n+1)
	s.contact = make([]float64, n+1)
	s.eeq = make([]float64, n)
	s.eeqRho = make([]float64, n)

	// Ambient medium.
	s.eFloor = s.gas.SpecificEnergy(floorTemperature)
	s.eHot = s.gas.SpecificEnergy(HotTemperature)
	rho0 := s.gas.MassDensity(cfg.Density)
	t0 := cfg.AmbientTemperature
	if cfg.AmbientAtEquilibrium {
		t0 = 1e4 // without cooling there is no equilibrium: the default warm gas
		if s.curve != nil {
			t0 = s.curve.EquilibriumTemperature(cfg.Density)
			if math.IsInf(t0, 0) {
				return nil, fmt.Errorf("remnant: the cooling curve has no thermal equilibrium at n_H = %v cm^-3; set the ambient temperature: %w", cfg.Density, ErrConfig)
			}
		}
	}
	e0 := s.gas.SpecificEnergy(t0)
	s.ambient = hydro.Prim{Rho: rho0, P: rho0 * e0 * (s.gas.Gamma - 1)}
	s.ambient.Scalar[internalScalar] = e0
	s.ambientEnergy = s.eos.Cons(s.ambient).Energy

	// Ejecta: a uniform ball of InitialZones zones expanding homologously,
	// v = v_max r / r_ej, carrying (1 − f) of the energy as kinetic energy
	// and f as heat; the ambient gas it overlaps is added to it.
	rEj := float64(cfg.InitialZones) * s.dr
	vEj := rEj * rEj * rEj / 3
	mEj := cfg.EjectaMass * units.SolarMass / (4 * math.Pi) // per steradian
	eEj := cfg.Energy / (4 * math.Pi)
	rhoEj := mEj/vEj + rho0
	// Kinetic energy of the homologous ball: (3/10) M v_max^2 for uniform density.
	var kin float64
	for i := 0; i < cfg.InitialZones; i++ {
		kin += 0.5 * rhoEj * s.vol[i] * sq(s.center[i]/rEj)
	}
	vMax := math.Sqrt((1 - cfg.ThermalFraction) * eEj / kin)
	heat := cfg.ThermalFraction * eEj / vEj // per unit volume
	for i := range n {
		if i < cfg.InitialZones {
			w := hydro.Prim{Rho: rhoEj, Vx: vMax * s.center[i] / rEj, P: s.ambient.P + (s.gas.Gamma-1)*heat}
			w.Scalar[ejectaScalar] = (mEj / vEj) / rhoEj
			w.Scalar[internalScalar] = s.eos.InternalEnergy(w)
			s.u[i] = s.eos.Cons(w)
		} else {
			s.u[i] = s.eos.Cons(s.ambient)
		}
	}
	s.initialEnergy = s.totalEnergy()
	s.initialTherm = 4 * math.Pi * s.ambient.P / (s.gas.Gamma - 1) * s.area[n] * float64(n) * s.dr / 3
	// Log-spaced record times from the end of free expansion to the end.
	s.recTime = make([]float64, cfg.HistorySamples)
	t1 := 1e-3 * s.tEstimate
	for k := range s.recTime {
		s.recTime[k] = t1 * math.Pow(s.tEnd/t1, float64(k)/float64(cfg.HistorySamples-1))
	}
	s.history = make([]Sample, 0, cfg.HistorySamples)
	return s, nil
}

func sq(x float64) float64 { return x * x }

// Time is the time since the explosion in s.
func (s *Solver) Time() float64 { return s.time }

// EndTime is the time the run stops in s.
func (s *Solver) EndTime() float64 { return s.tEnd }

// Zones is the number of zones.
func (s *Solver) Zones() int { return s.n }

// Steps is the number of steps taken.
func (s *Solver) Steps() int { return s.steps }

// OuterRadius is the grid's outer radius in cm.
func (s *Solver) OuterRadius() float64 { return float64(s.n) * s.dr }

func (s *Solver) totalEnergy() float64 {
	var e float64
	for i, c := range s.u {
		e += c.Energy * s.vol[i]
	}
	return 4 * math.Pi * e
}

// fill converts u to primitives with ghost zones: mirrored at the center,
// copied at the outer edge. Each zone's two internal energies are first
// reconciled (see reconcile) with the given weight (the share of this
// state in the step's result).
func (s *Solver) fill(u []hydro.Cons, weight float64) error {
	n := s.n
	for i := range u {
		c := &u[i]
		if !(c.Mass > 0) || math.IsInf(c.Mass, 0) || math.IsNaN(c.Energy+c.MomX+c.Scalar[internalScalar]) {
			return fmt.Errorf("remnant: zone %d at r = %.4g pc, t = %.4g kyr: density %g, energy %g: %w",
				i, s.center[i]/units.Parsec, s.time/(1e3*units.JulianYear), c.Mass, c.Energy, ErrUnphysical)
		}
		s.reconcile(i, c, weight)
		s.w[i+2] = s.eos.Prim(*c)
	}
	m0, m1 := s.w[2], s.w[3]
	m0.Vx, m1.Vx = -m0.Vx, -m1.Vx
	s.w[1], s.w[0] = m0, m1
	s.w[n+2], s.w[n+3] = s.w[n+1], s.w[n+1]
	return nil
}

// reconcile makes zone i's total energy and separately evolved internal
// energy agree (the dual-energy formalism of Bryan et al. 1995, Comput.
// Phys. Commun. 89, 149). Where the thermal energy the total energy implies,
// E − ½ρv², is at least InternalEnergySwitch of E, it is trusted and copied
// into the internal energy; below that, where truncation error in E is
// comparable to the thermal energy (cold, fast gas), the separate internal
// energy is used and E is reset to ½ρv² + ρe, the difference booked as
// SwitchAdded with the given weight. Then a zone colder than 1 K is raised
// to it, booked as FloorAdded.
func (s *Solver) reconcile(i int, c *hydro.Cons, weight float64) {
	kin := 0.5 * c.MomX * c.MomX / c.Mass
	th := c.Energy - kin
	if th >= s.cfg.InternalEnergySwitch*c.Energy {
		c.Scalar[internalScalar] = th
	} else {
		th = c.Scalar[internalScalar]
		e := kin + th
		s.switchAdded += weight * 4 * math.Pi * (e - c.Energy) * s.vol[i]
		c.Energy = e
	}
	if floor := c.Mass * s.eFloor; !(th >= floor) {
		s.floorAdded += weight * 4 * math.Pi * (floor - th) * s.vol[i]
		c.Energy = kin + floor
		c.Scalar[internalScalar] = floor
	}
}

// rates fills du with the time derivative of u (whose primitives are in
// s.w) and returns the energy and mass leaving through the outer face per
// unit time (per steradian).
func (s *Solver) rates() (eOut, mOut float64) {
	s.pencil()
	s.flux[0] = hydro.Cons{} // no flux through the center (zero area)
	for i := range s.n {
		aL, aR := s.area[i], s.area[i+1]
		fL, fR := s.flux[i], s.flux[i+1]
		p := s.w[i+2].P
		inv := -1 / s.vol[i]
		d := hydro.Cons{
			Mass:   inv * (aR*fR.Mass - aL*fL.Mass),
			MomX:   inv * (aR*(fR.MomX-p) - aL*(fL.MomX-p)), // geometric source p (A_R − A_L) folded in
			Energy: inv * (aR*fR.Energy - aL*fL.Energy),
		}
		for k := range d.Scalar {
			d.Scalar[k] = inv * (aR*fR.Scalar[k] - aL*fL.Scalar[k])
		}
		// The internal energy's p dV work, −p ∇·v, with the face velocities
		// of the same Riemann solutions (zero through the center).
		d.Scalar[internalScalar] += inv * p * (aR*s.contact[i+1] - aL*s.contact[i])
		s.du[i] = d
	}
	f := s.flux[s.n]
	return s.area[s.n] * f.Energy, s.area[s.n] * f.Mass
}

// timeStep is the Courant step, limited by cooling where it matters.
func (s *Solver) timeStep() float64 {
	cfl := math.Inf(1)
	cool := math.Inf(1)
	for i := range s.n {
		w := s.w[i+2]
		c := s.eos.SoundSpeed(w)
		cfl = math.Min(cfl, s.dr/(math.Abs(w.Vx)+c))
		if s.cooler != nil {
			if e := s.eos.InternalEnergy(w); e > s.eHot {
				cool = math.Min(cool, s.cooler.CoolingTime(w.Rho, e))
			}
		}
	}
	dt := s.cfg.CFL * cfl
	if lim := s.cfg.CoolingStep * cool; lim < dt {
		dt = math.Max(lim, 0.1*dt)
	}
	return dt
}

// Step advances the run by one step: a second-order Runge–Kutta hydro
// update (Shu & Osher 1988) with limited linear reconstruction and HLLC
// fluxes, then the exact cooling of every zone over the step.
func (s *Solver) Step() error {
	if err := s.fill(s.u, 1); err != nil {
		return err
	}
	dt := s.timeStep()
	if s.time+dt > s.tEnd {
		dt = s.tEnd - s.time
	}
	s.dt = dt
	e1, m1 := s.rates()
	for i := range s.u {
		s.u1[i] = s.u[i].Add(dt, s.du[i])
	}
	if err := s.fill(s.u1, 0.5); err != nil {
		return err
	}
	e2, m2 := s.rates()
	for i := range s.u {
		s.u[i] = s.u[i].Add(1, s.u1[i].Add(dt, s.du[i])).Scale(0.5)
	}
	s.outflowEnergy += 4 * math.Pi * 0.5 * dt * (e1 + e2)
	s.outflowMass += 4 * math.Pi * 0.5 * dt * (m1 + m2)
	s.time += dt
	s.steps++
	return s.thermal(dt)
}

// thermal applies the temperature floor and the cooling over dt, and keeps
// the hot-gas maximum (the shell-formation point).
func (s *Solver) thermal(dt float64) error {
	var hot, radiated float64
	for i := range s.u {
		c := &s.u[i]
		s.reconcile(i, c, 1)
		rho := c.Mass
		kin := 0.5 * c.MomX * c.MomX / rho
		e := c.Scalar[internalScalar] / rho
		if s.cooler != nil {
			if s.eeqRho[i] != rho {
				s.eeqRho[i] = rho
				s.eeq[i] = s.cooler.EquilibriumEnergy(rho)
			}
			e1 := s.cooler.Evolve(rho, e, dt, s.eeq[i])
			if e1 != e {
				radiated += (e - e1) * rho * s.vol[i]
				e = e1
				c.Energy = kin + rho*e
				c.Scalar[internalScalar] = rho * e
			}
		}
		if e > s.eHot {
			hot += rho * s.vol[i]
		}
	}
	s.radiated += 4 * math.Pi * radiated
	hot *= 4 * math.Pi
	if hot > s.hotMax {
		s.hotMax = hot
		s.shell = s.point(hot)
	}
	for s.nextRec < len(s.recTime) && s.time >= s.recTime[s.nextRec]*(1-1e-12) {
		s.history = append(s.history, s.sample(hot))
		s.nextRec++
	}
	return nil
}

// shockZone is the index of the outermost zone denser than 1.1 ambient, or
// −1.
func (s *Solver) shockZone() int {
	for i := s.n - 1; i >= 0; i-- {
		if s.u[i].Mass > 1.1*s.ambient.Rho {
			return i
		}
	}
	return -1
}

func (s *Solver) point(hot float64) Point {
	p := Point{Time: s.time, HotMass: hot, Found: true}
	k := s.shockZone()
	p.ShockRadius = float64(k+1) * s.dr
	for i := range s.u {
		p.Momentum += s.u[i].MomX * s.vol[i]
		if i <= k {
			p.Mass += s.u[i].Mass * s.vol[i]
		}
	}
	p.Momentum *= 4 * math.Pi
	p.Mass *= 4 * math.Pi
	return p
}

func (s *Solver) sample(hot float64) Sample {
	sm := Sample{Point: s.point(hot), Radiated: s.radiated - s.floorAdded - s.switchAdded}
	var kin, th float64
	for i, c := range s.u {
		k := 0.5 * c.MomX * c.MomX / c.Mass
		kin += k * s.vol[i]
		th += (c.Energy - k) * s.vol[i]
	}
	sm.Kinetic = 4 * math.Pi * kin
	sm.Thermal = 4*math.Pi*th - s.initialTherm
	return sm
}

// Ledger is where the energy of a run went, in erg: Initial = Total +
// Radiated + Outflow − FloorAdded − SwitchAdded to round-off.
type Ledger struct {
	// Initial is the total energy on the grid at t = 0 (explosion plus
	// ambient thermal energy).
	Initial float64
	// Total is the total energy on the grid now.
	Total float64
	// Radiated is the net energy lost to cooling minus heating.
	Radiated float64
	// Outflow is the energy that left through the outer face.
	Outflow float64
	// FloorAdded is the energy added to hold the temperature floor.
	FloorAdded float64
	// SwitchAdded is the energy added (negative: removed) where a zone's
	// total energy was reset from its separately evolved internal energy
	// (Config.InternalEnergySwitch).
	SwitchAdded float64
}

// Residual is (Total + Radiated + Outflow − FloorAdded − SwitchAdded −
// Initial) / Initial.
func (l Ledger) Residual() float64 {
	return (l.Total + l.Radiated + l.Outflow - l.FloorAdded - l.SwitchAdded - l.Initial) / l.Initial
}

// Ledger is the run's energy ledger so far.
func (s *Solver) Ledger() Ledger {
	return Ledger{Initial: s.initialEnergy, Total: s.totalEnergy(), Radiated: s.radiated,
		Outflow: s.outflowEnergy, FloorAdded: s.floorAdded, SwitchAdded: s.switchAdded}
}

// Result is what a run reports.
type Result struct {
	// Config is the configuration run, defaults filled in.
	Config Config
	// AmbientTemperature is the ambient temperature used, in K.
	AmbientTemperature float64
	// ShellFormation is the point of largest hot-gas mass (the shell
	// formation of Kim & Ostriker 2015: see the package documentation);
	// Found is false without cooling or when the hot mass still grows at
	// the end.
	ShellFormation Point
	// Late is the state at the end of the run.
	Late Sample
	// History is the log-spaced record, the last at the end.
	History []Sample
	// Ledger is the final energy ledger.
	Ledger Ledger
	// Steps and Zones give the work done: Steps × Zones zone updates.
	Steps, Zones int
	// ShockLeftGrid is true when the shock reached the outer edge before
	// the end (the run stops there).
	ShockLeftGrid bool
}

// Run steps to the end time (or until the shock reaches the last zones)
// and reports.
func (s *Solver) Run() (*Result, error) {
	leftGrid := false
	for s.time < s.tEnd {
		if s.cancel != nil && s.steps%100 == 0 {
			if err := s.cancel(); err != nil {
				return nil, fmt.Errorf("remnant: run stopped at %.4g kyr: %w", s.time/(1e3*units.JulianYear), err)
			}
		}
		if err := s.Step(); err != nil {
			return nil, err
		}
		if s.shockZone() >= s.n-3 {
			leftGrid = true
			break
		}
	}
	if err := s.fill(s.u, 1); err != nil {
		return nil, err
	}
	hot := s.hotMass()
	late := s.sample(hot)
	if len(s.history) == 0 || s.history[len(s.history)-1].Time != s.time {
		s.history = append(s.history, late)
	}
	res := &Result{
		Config:             s.cfg,
		AmbientTemperature: s.gas.Temperature(s.eos.InternalEnergy(s.ambient)),
		Late:               late,
		History:            append([]Sample(nil), s.history...),
		Ledger:             s.Ledger(),
		Steps:              s.steps,
		Zones:              s.n,
		ShockLeftGrid:      leftGrid,
	}
	// A maximum at the very end means the hot mass was still growing.
	if s.curve != nil && s.shell.Found && s.shell.Time < s.time && hot < s.hotMax {
		res.ShellFormation = s.shell
	}
	return res, nil
}

func (s *Solver) hotMass() float64 {
	var hot float64
	for i, c := range s.u {
		e := (c.Energy - 0.5*c.MomX*c.MomX/c.Mass) / c.Mass
		if e > s.eHot {
			hot += c.Mass * s.vol[i]
		}
	}
	return 4 * math.Pi * hot
}

// Run sets up and runs one remnant.
func Run(cfg Config) (*Result, error) {
	s, err := New(cfg)
	if err != nil {
		return nil, err
	}
	return s.Run()
}

// pencil computes the HLLC flux and the face velocity through every face
// from the limited linear reconstruction of s.w, with each zone's velocity
// slope capped by its internal energy (hydro.CapVelocitySlope).
func (s *Solver) pencil() {
	w, lim, share := s.w, s.cfg.Limiter, s.cfg.VelocitySlopeCap
	slope := func(c int) hydro.Prim {
		return s.eos.CapVelocitySlope(w[c], lim.PrimSlope(w[c-1], w[c], w[c+1]), share)
	}
	_, prevRight := hydro.Faces(w[1], slope(1))
	for i := 0; i <= s.n; i++ {
		left, right := hydro.Faces(w[i+2], slope(i+2))
		s.flux[i], _, s.contact[i] = s.eos.HLLCContact(prevRight, left)
		prevRight = right
	}
}
