package testbed

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"sort"

	"github.com/ejecta-dev/ejecta/bench/remnant"
	"github.com/ejecta-dev/ejecta/feedback"
)

// ErrReference marks a one-dimensional reference that cannot serve: no
// shell formation found, or a history that does not reach a time asked
// for.
var ErrReference = errors.New("unusable reference remnant")

// Reference is the one-dimensional reference remnant (package remnant) in
// one medium, reduced to what the testbed compares with: the shell-formation
// point and the history, interpolated in log time. Units are cgs (s, cm, g,
// g cm/s, erg).
type Reference struct {
	// DensityCm3 is the ambient hydrogen density and Metallicity the
	// metallicity in solar units.
	DensityCm3, Metallicity float64
	// AmbientTemperature is the ambient temperature in K.
	AmbientTemperature float64
	// ShellFormation is the shell-formation point (time, shock radius,
	// mass and momentum) of the one-dimensional run.
	ShellFormation remnant.Point
	history        []remnant.Sample
	result         *remnant.Result
}

// NewReference runs the one-dimensional remnant of cfg and keeps what the
// testbed needs. The run must find its shell formation.
func NewReference(cfg remnant.Config) (*Reference, error) {
	res, err := remnant.Run(cfg)
	if err != nil {
		return nil, fmt.Errorf("testbed: reference at n = %v cm^-3: %w", cfg.Density, err)
	}
	return ReferenceFromResult(res)
}

// ReferenceFromResult keeps what the testbed needs of a one-dimensional
// run.
func ReferenceFromResult(res *remnant.Result) (*Reference, error) {
	if !res.ShellFormation.Found {
		return nil, fmt.Errorf("testbed: reference at n = %v cm^-3: no shell formation found: %w", res.Config.Density, ErrReference)
	}
	if len(res.History) < 2 {
		return nil, fmt.Errorf("testbed: reference at n = %v cm^-3: %d history samples: %w", res.Config.Density, len(res.History), ErrReference)
	}
	h := append([]remnant.Sample(nil), res.History...)
	sort.SliceStable(h, func(i, j int) bool { return h[i].Time < h[j].Time })
	return &Reference{DensityCm3: res.Config.Density, Metallicity: res.Config.Metallicity,
		AmbientTemperature: res.AmbientTemperature, ShellFormation: res.ShellFormation, history: h, result: res}, nil
}

// ShellTime is the shell-formation time in s.
func (r *Reference) ShellTime() float64 { return r.ShellFormation.Time }

// CoolingMass is the mass inside the shock at shell formation in g.
func (r *Reference) CoolingMass() float64 { return r.ShellFormation.Mass }

// End is the last time the history covers, in s.
func (r *Reference) End() float64 { return r.history[len(r.history)-1].Time }

// History returns the reference's samples, in time order.
func (r *Reference) History() []remnant.Sample { return append([]remnant.Sample(nil), r.history...) }

// At is the reference's state at time t (s), interpolated linearly in log
// time between the history's samples. A time outside the history is an
// error.
func (r *Reference) At(t float64) (remnant.Sample, error) {
	h := r.history
	if !(t >= h[0].Time && t <= h[len(h)-1].Time) || !(t > 0) {
		return remnant.Sample{}, fmt.Errorf("testbed: reference at n = %v cm^-3: time %.4g s outside its history [%.4g, %.4g] s: %w",
			r.DensityCm3, t, h[0].Time, h[len(h)-1].Time, ErrReference)
	}
	k := sort.Search(len(h), func(i int) bool { return h[i].Time >= t })
	if h[k].Time == t || k == 0 {
		return h[k], nil
	}
	a, b := h[k-1], h[k]
	f := math.Log(t/a.Time) / math.Log(b.Time/a.Time)
	mix := func(x, y float64) float64 { return x + f*(y-x) }
	s := remnant.Sample{
		Point: remnant.Point{Time: t, ShockRadius: mix(a.ShockRadius, b.ShockRadius), Mass: mix(a.Mass, b.Mass),
			Momentum: mix(a.Momentum, b.Momentum), HotMass: mix(a.HotMass, b.HotMass), Found: true},
		Kinetic: mix(a.Kinetic, b.Kinetic), Thermal: mix(a.Thermal, b.Thermal), Radiated: mix(a.Radiated, b.Radiated),
	}
	return s, nil
}

// CalibratedTable is a remnant table (package feedback) calibrated from
// references at one metallicity and several densities, as "ejecta remnant
// -calibrate" would write it: each row the shell formation and the end of
// a reference run. It clamps inputs outside its densities to the nearest
// one.
func CalibratedTable(refs []*Reference) (*feedback.RemnantTable, error) {
	byDensity := append([]*Reference(nil), refs...)
	sort.Slice(byDensity, func(i, j int) bool { return byDensity[i].DensityCm3 < byDensity[j].DensityCm3 })
	cases := make([]remnant.Case, len(byDensity))
	for i, r := range byDensity {
		if i > 0 && r.Metallicity != byDensity[0].Metallicity {
			return nil, fmt.Errorf("testbed: calibrated table: metallicities %v and %v: %w", byDensity[0].Metallicity, r.Metallicity, ErrReference)
		}
		cases[i] = remnant.Case{Density: r.DensityCm3, Metallicity: r.Metallicity, Result: r.result}
	}
	var buf bytes.Buffer
	if err := feedback.WriteRemnantTable(&buf, nil, remnant.TableRows(cases)); err != nil {
		return nil, fmt.Errorf("testbed: calibrated table: %w", err)
	}
	tab, err := feedback.ReadRemnantTable(&buf)
	if err != nil {
		return nil, fmt.Errorf("testbed: calibrated table: %w", err)
	}
	return tab.WithOutsideGrid(feedback.ClampToGrid), nil
}
