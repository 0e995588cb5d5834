package feedbacktest

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/feedback/audit"
	"github.com/ejecta-dev/ejecta/neighbor"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Options tune the checks. DefaultOptions is the standard strict set;
// every value means what it says.
type Options struct {
	// Seeds are the random seeds to build scenarios with.
	Seeds []uint64
	// Tolerance is the relative round-off allowed in every balance.
	Tolerance float64
	// IsotropyBound is the largest radial net momentum allowed, as a
	// fraction of the radial momentum handed out, in scenarios whose gas
	// surrounds the star; +Inf skips the isotropy check (for schemes that
	// make no isotropy claim).
	IsotropyBound float64
	// ShortfallBound is the largest energy shortfall (feedback.ApplyReport)
	// allowed where several stars overlap, as a fraction of the energy
	// released. Single stars must have none.
	ShortfallBound float64
	// Release, when set, replaces each scenario star's supernova release
	// (to check schemes for winds, radiation or photoionization).
	Release func(star feedback.Star) feedback.Source
	// Weighting and SkipIsotropyCorrection configure the coupler.
	Weighting              feedback.Weighting
	SkipIsotropyCorrection bool
}

// DefaultOptions is the standard strict set: seeds 1, 2 and 3, balances to
// 1e-12, a radial net momentum below 1e-8 of what is handed out, and an
// energy shortfall of overlapping stars below a tenth of their release,
// with kernel-volume weights and the isotropy correction.
func DefaultOptions() Options {
	return Options{Seeds: []uint64{1, 2, 3}, Tolerance: 1e-12, IsotropyBound: 1e-8, ShortfallBound: 0.1}
}

// validate refuses options no check can use.
func (o Options) validate() error {
	if len(o.Seeds) == 0 {
		return fmt.Errorf("feedbacktest: no seeds (start from DefaultOptions)")
	}
	for _, v := range []float64{o.Tolerance, o.IsotropyBound, o.ShortfallBound} {
		if !(v >= 0) {
			return fmt.Errorf("feedbacktest: tolerance or bound %g must be non-negative (start from DefaultOptions)", v)
		}
	}
	return nil
}

// Check runs every scenario for every seed as a subtest of t and reports
// each violated property as a test error.
func Check(t *testing.T, scheme feedback.Scheme, opts Options) {
	t.Helper()
	if err := opts.validate(); err != nil {
		t.Fatal(err)
	}
	for _, seed := range opts.Seeds {
		for _, sc := range Scenarios(seed) {
			t.Run(fmt.Sprintf("%s/seed=%d", sc.Name, seed), func(t *testing.T) {
				for _, err := range CheckScenario(scheme, sc, opts) {
					t.Error(err)
				}
			})
		}
	}
}

// Run checks every scenario and seed without a testing.T and returns the
// violations found, each naming its scenario.
func Run(scheme feedback.Scheme, opts Options) []error {
	if err := opts.validate(); err != nil {
		return []error{err}
	}
	var errs []error
	for _, seed := range opts.Seeds {
		for _, sc := range Scenarios(seed) {
			for _, err := range CheckScenario(scheme, sc, opts) {
				errs = append(errs, fmt.Errorf("%s/seed=%d: %w", sc.Name, seed, err))
			}
		}
	}
	return errs
}

// result is one coupled-and-applied run.
type result struct {
	gas    *audit.GasArrays
	out    feedback.Output
	report feedback.ApplyReport
}

func couple(scheme feedback.Scheme, sc Scenario, opts Options, workers int, sources []feedback.Source) (*result, error) {
	g := sc.Gas.Clone()
	k := sc.Neighbors
	if k > g.Len() {
		k = g.Len()
	}
	c, err := feedback.NewCoupler(feedback.Config{Units: units.ParsecSolarMassKms(), Scheme: scheme, Weighting: opts.Weighting,
		SkipIsotropyCorrection: opts.SkipIsotropyCorrection, Neighbors: k, Workers: workers, Box: sc.Box})
	if err != nil {
		return nil, err
	}
	f, err := neighbor.NewTree(g.Packed(), g.ID, sc.Box)
	if err != nil {
		return nil, err
	}
	r := &result{gas: g}
	view := g.View()
	if err := c.Couple(view, f, sources, &r.out); err != nil {
		return nil, err
	}
	_, r.report, err = new(feedback.Applier).Apply(view, r.out.Records, nil)
	if err != nil {
		return nil, err
	}
	return r, nil
}

// CheckScenario runs one scenario and returns every violated property.
func CheckScenario(scheme feedback.Scheme, sc Scenario, opts Options) []error {
	if err := opts.validate(); err != nil {
		return []error{err}
	}
	if opts.Release != nil {
		srcs := make([]feedback.Source, len(sc.Sources))
		for i, s := range sc.Sources {
			srcs[i] = opts.Release(s.Star)
		}
		sc.Sources = srcs
	}
	tol := opts.Tolerance
	var errs []error
	fail := func(format string, args ...any) { errs = append(errs, fmt.Errorf(format, args...)) }

	r, err := couple(scheme, sc, opts, 1, sc.Sources)
	if err != nil {
		return []error{fmt.Errorf("coupling: %w", err)}
	}
	led := &r.out.Ledger
	for _, p := range r.out.Problems {
		fail("star %d returned undeposited: %v", p.StarID, p.Err)
	}
	if err := led.Balanced(tol); err != nil {
		fail("ledger does not balance: %w", err)
	}

	// The gas itself must have gained what the ledger says was deposited,
	// plus any radiated energy Apply reclaimed for coherent kicks.
	before, after := sc.Gas.Totals(), r.gas.Totals()
	gained := after
	gained.Sub(&before)
	scales := before
	scales.Energy = led.EnergyScale + math.Abs(before.Energy)
	pscale := led.MomentumScale + math.Abs(before.Momentum[0]) + math.Abs(before.Momentum[1]) + math.Abs(before.Momentum[2])
	if err := compare("gas gain vs apply report", gained, r.report.Deposited, scales, tol, pscale); err != nil {
		fail("%w", err)
	}
	dep := led.Deposited
	dep.Energy += r.report.Reclaimed + r.report.Shortfall
	if err := compare("gas gain vs ledger deposit", gained, dep, scales, tol, pscale); err != nil {
		fail("%w", err)
	}
	want := led.In
	want.Energy -= led.Radiated - r.report.Reclaimed - r.report.Shortfall
	want.Sub(&led.Undeposited)
	if err := compare("gas gain vs release less radiated", gained, want, scales, tol, pscale); err != nil {
		fail("%w", err)
	}
	if r.report.Reclaimed > led.Radiated*(1+tol) {
		fail("apply reclaimed %g of only %g radiated", r.report.Reclaimed, led.Radiated)
	}

	// Positivity.
	for i := range r.gas.Mass {
		if !(r.gas.Mass[i] > 0) || !(r.gas.Energy[i] >= 0) || math.IsInf(r.gas.Energy[i], 0) {
			fail("element %d: mass %g, internal energy %g after the deposit", r.gas.ID[i], r.gas.Mass[i], r.gas.Energy[i])
			break
		}
		for c := range r.gas.Fractions {
			if x := r.gas.Fractions[c][i]; !(x >= 0 && x <= 1) {
				fail("element %d: mass fraction %g of %s outside [0, 1]", r.gas.ID[i], x, r.gas.Species[c].Symbol())
			}
		}
	}
	// A single star's deposit must never need a shortfall; overlapping
	// stars may (see feedback.ApplyReport), within the stated bound.
	if len(sc.Sources) == 1 && r.report.ShortfallElements > 0 {
		fail("%d elements needed energy added to stay non-negative (%g)", r.report.ShortfallElements, r.report.Shortfall)
	}
	if bound := opts.ShortfallBound * led.In.Energy; r.report.Shortfall > bound {
		fail("energy shortfall %g of %g released exceeds the bound %g", r.report.Shortfall, led.In.Energy, opts.ShortfallBound)
	}
	for _, rec := range r.out.Records {
		if rec.Heat < -tol*led.EnergyScale {
			fail("record gas %d star %d: negative heat %g", rec.GasID, rec.StarID, rec.Heat)
			break
		}
	}

	// Star-frame momentum: every star's kicks must sum to zero, and in a
	// surrounded star the radial components must balance too.
	for _, iso := range starFrameBalance(sc, r.out.Records) {
		if iso.net > tol*math.Max(iso.total, 1e-300)*10 && iso.total > 0 {
			fail("star %d: net star-frame momentum %g of %g handed out", iso.star, iso.net, iso.total)
		}
		if sc.Balanced && iso.radialTotal > 0 && iso.radialNet > opts.IsotropyBound*iso.radialTotal {
			fail("star %d: radial momentum not isotropic: net %g of %g (bound %g)", iso.star, iso.radialNet, iso.radialTotal, opts.IsotropyBound)
		}
	}

	// Determinism: other worker counts and a shuffled star order must give
	// the same gas, bit for bit.
	shuffled := append([]feedback.Source(nil), sc.Sources...)
	rand.New(rand.NewPCG(uint64(len(shuffled)), 99)).Shuffle(len(shuffled), func(i, j int) { shuffled[i], shuffled[j] = shuffled[j], shuffled[i] })
	for _, w := range []int{2, 5} {
		r2, err := couple(scheme, sc, opts, w, shuffled)
		if err != nil {
			fail("coupling with %d workers: %w", w, err)
			continue
		}
		if err := identical(r.gas, r2.gas); err != nil {
			fail("%d workers, shuffled stars: %w", w, err)
		}
	}
	return errs
}

// compare checks two amounts component by component: each may differ by
// tol times the scale of its quantity (scales holds the total gas amounts
// the difference was taken from; pscale the momentum scale).
func compare(what string, got, want, scales feedback.Quantities, tol, pscale float64) error {
	close := func(a, b, scale float64) bool {
		return math.Abs(a-b) <= tol*math.Max(math.Abs(scale), math.Max(math.Abs(a), math.Abs(b)))
	}
	if !close(got.Mass, want.Mass, scales.Mass) {
		return fmt.Errorf("%s: mass %g, want %g", what, got.Mass, want.Mass)
	}
	for i := range got.Species {
		if !close(got.Species[i], want.Species[i], scales.Mass) {
			return fmt.Errorf("%s: species %d mass %g, want %g", what, i, got.Species[i], want.Species[i])
		}
	}
	for a := 0; a < 3; a++ {
		if !close(got.Momentum[a], want.Momentum[a], pscale) {
			return fmt.Errorf("%s: momentum[%d] %g, want %g", what, a, got.Momentum[a], want.Momentum[a])
		}
	}
	if !close(got.Energy, want.Energy, scales.Energy) {
		return fmt.Errorf("%s: energy %g, want %g", what, got.Energy, want.Energy)
	}
	return nil
}

type balance struct {
	star                               int64
	net, total, radialNet, radialTotal float64
}

// starFrameBalance sums each star's star-frame kicks dp - dm v_star.
func starFrameBalance(sc Scenario, recs []feedback.Record) []balance {
	var out []balance
	for _, s := range sc.Sources {
		b := balance{star: s.Star.ID}
		var net, rnet [3]float64
		for _, r := range recs {
			if r.StarID != s.Star.ID {
				continue
			}
			var d [3]float64
			i := indexOf(sc.Gas, r.GasID)
			for a := 0; a < 3; a++ {
				d[a] = sc.Gas.Pos[a][i] - s.Star.Pos[a]
			}
			d = sc.Box.MinImage(d)
			dn := math.Sqrt(d[0]*d[0] + d[1]*d[1] + d[2]*d[2])
			var kick [3]float64
			for a := 0; a < 3; a++ {
				kick[a] = r.Momentum[a] - r.Mass*s.Star.Vel[a]
				net[a] += kick[a]
			}
			b.total += math.Sqrt(kick[0]*kick[0] + kick[1]*kick[1] + kick[2]*kick[2])
			if dn > 0 {
				pr := (kick[0]*d[0] + kick[1]*d[1] + kick[2]*d[2]) / dn
				for a := 0; a < 3; a++ {
					rnet[a] += pr * d[a] / dn
				}
				b.radialTotal += math.Abs(pr)
			}
		}
		b.net = math.Sqrt(net[0]*net[0] + net[1]*net[1] + net[2]*net[2])
		b.radialNet = math.Sqrt(rnet[0]*rnet[0] + rnet[1]*rnet[1] + rnet[2]*rnet[2])
		out = append(out, b)
	}
	return out
}

func indexOf(g *audit.GasArrays, id int64) int {
	for i, v := range g.ID {
		if v == id {
			return i
		}
	}
	return -1
}

// identical reports the first element whose state differs in any bit.
func identical(a, b *audit.GasArrays) error {
	eq := func(x, y []float64) int {
		for i := range x {
			if math.Float64bits(x[i]) != math.Float64bits(y[i]) {
				return i
			}
		}
		return -1
	}
	cols := [][2][]float64{{a.Mass, b.Mass}, {a.Energy, b.Energy}, {a.Vel[0], b.Vel[0]}, {a.Vel[1], b.Vel[1]}, {a.Vel[2], b.Vel[2]}}
	for c := range a.Fractions {
		cols = append(cols, [2][]float64{a.Fractions[c], b.Fractions[c]})
	}
	for _, c := range cols {
		if i := eq(c[0], c[1]); i >= 0 {
			return fmt.Errorf("element %d differs: %v vs %v", a.ID[i], c[0][i], c[1][i])
		}
	}
	return nil
}
