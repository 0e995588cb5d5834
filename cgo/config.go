package main

import (
	"math"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields/units"
)

// Sizes and limits of ejecta.h's configuration (checked against the header
// by abiMismatches).
const (
	// abiVersion is EJECTA_ABI_VERSION: bumped when a struct layout, a
	// function signature or the meaning of an argument changes.
	abiVersion int32 = 6
	// nameCapacity is EJECTA_NAME_CAPACITY, the size of a name array.
	nameCapacity = 48
	maxWorkers   = 4096
)

// configABI mirrors ejecta_config field for field.
type configABI struct {
	LengthCm           float64
	MassG              float64
	VelocityCmPerS     float64
	KineticFraction    float64
	CouplingRadius     float64
	BoxSize            [3]float64
	Seed               uint64
	NeighborCount      int32
	WorkerThreads      int32
	IsotropyCorrection int32
	PhotonReach        int32
	Scheme             [nameCapacity]byte
	RemnantFit         [nameCapacity]byte
	Weighting          [nameCapacity]byte
	RemnantTable       *byte
	MaxInfraredBoost   float64
	WindEventEnergyErg float64
}

// cName reads a NUL-terminated name from a fixed array.
func cName(field string, b *[nameCapacity]byte) (string, error) {
	for i, c := range b {
		if c == 0 {
			return string(b[:i]), nil
		}
	}
	return "", fail(codeUnknownName, "config %s: not NUL-terminated within %d bytes", field, nameCapacity)
}

// parseConfig turns the C config into a coupler configuration and the
// options of the built-in schemes (the population's channels take theirs
// from the same options). Every field is used as given: a zero means zero,
// and one that has no meaning at zero is refused.
func parseConfig(c *configABI) (feedback.Config, feedback.SchemeOptions, error) {
	var cfg feedback.Config
	opts := feedback.DefaultSchemeOptions()
	if c == nil {
		return cfg, opts, fail(codeNullPointer, "config is NULL")
	}
	cfg.Units = units.CodeUnits{LengthCm: c.LengthCm, MassG: c.MassG, VelocityCmPS: c.VelocityCmPerS}
	if err := cfg.Units.Validate(); err != nil {
		return cfg, opts, fail(codeInvalidArgument, "config %w", err) // "config units: ..."
	}
	scheme, err := cName("scheme", &c.Scheme)
	if err != nil {
		return cfg, opts, err
	}
	fitName, err := cName("remnant_fit", &c.RemnantFit)
	if err != nil {
		return cfg, opts, err
	}
	weighting, err := cName("weighting", &c.Weighting)
	if err != nil {
		return cfg, opts, err
	}
	if opts.Fit, err = feedback.ParseRemnantFit(fitName); err != nil {
		return cfg, opts, failWith(codeUnknownName, err, "config remnant_fit")
	}
	if !(c.KineticFraction >= 0 && c.KineticFraction <= 1) {
		return cfg, opts, fail(codeInvalidArgument, "config kinetic_fraction %g outside [0, 1]", c.KineticFraction)
	}
	if !(c.MaxInfraredBoost >= 1) {
		return cfg, opts, fail(codeInvalidArgument, "config max_infrared_boost %g must be >= 1 (INFINITY for no bound)", c.MaxInfraredBoost)
	}
	if e := c.WindEventEnergyErg; !(e > 0) || math.IsInf(e, 0) {
		return cfg, opts, fail(codeInvalidArgument, "config wind_event_energy_erg %g must be finite and > 0", e)
	}
	if c.PhotonReach < 0 {
		return cfg, opts, fail(codeInvalidArgument, "config photon_reach %d must be >= 0", c.PhotonReach)
	}
	opts.Seed, opts.KineticFraction = c.Seed, c.KineticFraction
	opts.MaxInfraredBoost, opts.WindEventEnergy, opts.PhotonReach = c.MaxInfraredBoost, c.WindEventEnergyErg, int(c.PhotonReach)
	tablePath, err := cPath("config remnant_table", c.RemnantTable)
	if err != nil {
		return cfg, opts, err
	}
	if tablePath != "" {
		if opts.Table, err = feedback.ReadRemnantTableFile(tablePath); err != nil {
			return cfg, opts, fail(codeRemnantTable, "config remnant_table: %w", err)
		}
	}
	sch, err := feedback.SchemeByName(scheme, opts)
	if err != nil {
		return cfg, opts, failWith(codeUnknownName, err, "config")
	}
	cfg.Scheme = sch
	switch weighting {
	case feedback.KernelVolume.String():
		cfg.Weighting = feedback.KernelVolume
	case feedback.SolidAngle.String():
		cfg.Weighting = feedback.SolidAngle
	default:
		return cfg, opts, fail(codeUnknownName, "config weighting %q: want kernel-volume or solid-angle", weighting)
	}
	switch c.IsotropyCorrection {
	case 0:
		cfg.SkipIsotropyCorrection = true
	case 1:
	default:
		return cfg, opts, fail(codeInvalidArgument, "config isotropy_correction %d: want 0 or 1", c.IsotropyCorrection)
	}
	if c.NeighborCount < 1 {
		return cfg, opts, fail(codeInvalidArgument, "config neighbor_count %d must be >= 1", c.NeighborCount)
	}
	cfg.Neighbors = int(c.NeighborCount)
	if !(c.CouplingRadius >= 0) || math.IsInf(c.CouplingRadius, 0) {
		return cfg, opts, fail(codeInvalidArgument, "config coupling_radius %g must be finite and >= 0", c.CouplingRadius)
	}
	cfg.Radius = c.CouplingRadius
	if c.WorkerThreads < 1 || c.WorkerThreads > maxWorkers {
		return cfg, opts, fail(codeInvalidArgument, "config worker_threads %d outside 1..%d", c.WorkerThreads, maxWorkers)
	}
	cfg.Workers = int(c.WorkerThreads)
	cfg.Box.Size = c.BoxSize
	if err := cfg.Box.Validate(); err != nil {
		return cfg, opts, fail(codeInvalidArgument, "config box_size: %w", err)
	}
	return cfg, opts, nil
}

// defaultConfig is what ejecta_config_defaults writes: the library's
// defaults, read from package feedback (DefaultSchemeOptions, the zero
// Config's scheme, weighting and isotropy correction, DefaultNeighbors),
// one worker, code units of 1 cm, 1 g and 1 cm/s.
func defaultConfig() configABI {
	o := feedback.DefaultSchemeOptions()
	var zero feedback.Config
	c := configABI{
		LengthCm: 1, MassG: 1, VelocityCmPerS: 1,
		KineticFraction: o.KineticFraction, Seed: o.Seed,
		NeighborCount: feedback.DefaultNeighbors, WorkerThreads: 1,
		PhotonReach: int32(o.PhotonReach), MaxInfraredBoost: o.MaxInfraredBoost, WindEventEnergyErg: o.WindEventEnergy,
	}
	if !zero.SkipIsotropyCorrection {
		c.IsotropyCorrection = 1
	}
	copy(c.Scheme[:], feedback.TerminalMomentum{}.Name()) // what StepConfig couples supernovae with by default
	copy(c.RemnantFit[:], o.Fit.String())
	copy(c.Weighting[:], zero.Weighting.String())
	return c
}

// entryConfigDefaults is behind ejecta_config_defaults.
func entryConfigDefaults(c *configABI) int32 {
	return run(func() error {
		if c == nil {
			return fail(codeNullPointer, "config is NULL")
		}
		*c = defaultConfig()
		return nil
	})
}

// entryVersion is behind ejecta_version.
func entryVersion(buf *byte, capacity int64, abi *int32) int32 {
	return run(func() error {
		if buf == nil {
			return fail(codeNullPointer, "version buffer is NULL")
		}
		if abi != nil {
			*abi = abiVersion
		}
		if !putText(buf, capacity, feedback.Version) {
			return fail(codeBufferTooSmall, "version needs %d bytes", len(feedback.Version)+1)
		}
		return nil
	})
}
