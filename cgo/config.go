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
	abiVersion int32 = 4
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
	Reserved           int32
	Scheme             [nameCapacity]byte
	RemnantFit         [nameCapacity]byte
	Weighting          [nameCapacity]byte
	RemnantTable       *byte
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

// parseConfig turns the C config into a coupler configuration.
func parseConfig(c *configABI) (feedback.Config, error) {
	var cfg feedback.Config
	if c == nil {
		return cfg, fail(codeNullPointer, "config is NULL")
	}
	cfg.Units = units.CodeUnits{LengthCm: c.LengthCm, MassG: c.MassG, VelocityCmPS: c.VelocityCmPerS}
	if err := cfg.Units.Validate(); err != nil {
		return cfg, fail(codeInvalidArgument, "config units: %w", err)
	}
	scheme, err := cName("scheme", &c.Scheme)
	if err != nil {
		return cfg, err
	}
	fitName, err := cName("remnant_fit", &c.RemnantFit)
	if err != nil {
		return cfg, err
	}
	weighting, err := cName("weighting", &c.Weighting)
	if err != nil {
		return cfg, err
	}
	fit := feedback.KimOstriker2015
	if fitName != "" {
		if fit, err = feedback.ParseRemnantFit(fitName); err != nil {
			return cfg, failWith(codeUnknownName, err, "config remnant_fit")
		}
	}
	if !(c.KineticFraction >= 0 && c.KineticFraction <= 1) {
		return cfg, fail(codeInvalidArgument, "config kinetic_fraction %g outside [0, 1]", c.KineticFraction)
	}
	opts := feedback.DefaultSchemeOptions()
	opts.Fit, opts.Seed = fit, c.Seed
	tablePath, err := cPath("config remnant_table", c.RemnantTable)
	if err != nil {
		return cfg, err
	}
	if tablePath != "" {
		if opts.Table, err = feedback.ReadRemnantTableFile(tablePath); err != nil {
			return cfg, fail(codeRemnantTable, "config remnant_table: %w", err)
		}
	}
	if c.KineticFraction != 0 { // ejecta.h: 0 means the Sedov-Taylor value
		opts.KineticFraction = c.KineticFraction
	}
	sch, err := feedback.SchemeByName(scheme, opts)
	if err != nil {
		return cfg, failWith(codeUnknownName, err, "config")
	}
	cfg.Scheme = sch
	switch weighting {
	case "", feedback.KernelVolume.String():
		cfg.Weighting = feedback.KernelVolume
	case feedback.SolidAngle.String():
		cfg.Weighting = feedback.SolidAngle
	default:
		return cfg, fail(codeUnknownName, "config weighting %q: want kernel-volume or solid-angle", weighting)
	}
	switch c.IsotropyCorrection {
	case 0:
		cfg.SkipIsotropyCorrection = true
	case 1:
	default:
		return cfg, fail(codeInvalidArgument, "config isotropy_correction %d: want 0 or 1", c.IsotropyCorrection)
	}
	if c.NeighborCount < 0 {
		return cfg, fail(codeInvalidArgument, "config neighbor_count %d must be >= 0", c.NeighborCount)
	}
	cfg.Neighbors = int(c.NeighborCount)
	if !(c.CouplingRadius >= 0) || math.IsInf(c.CouplingRadius, 0) {
		return cfg, fail(codeInvalidArgument, "config coupling_radius %g must be finite and >= 0", c.CouplingRadius)
	}
	cfg.Radius = c.CouplingRadius
	if c.WorkerThreads < 0 || c.WorkerThreads > maxWorkers {
		return cfg, fail(codeInvalidArgument, "config worker_threads %d outside 0..%d", c.WorkerThreads, maxWorkers)
	}
	cfg.Workers = int(c.WorkerThreads)
	cfg.Box.Size = c.BoxSize
	if err := cfg.Box.Validate(); err != nil {
		return cfg, fail(codeInvalidArgument, "config box_size: %w", err)
	}
	return cfg, nil
}

// defaultConfig is what ejecta_config_defaults writes.
func defaultConfig() configABI {
	c := configABI{
		LengthCm: 1, MassG: 1, VelocityCmPerS: 1,
		NeighborCount: feedback.DefaultNeighbors, WorkerThreads: 1, IsotropyCorrection: 1,
	}
	copy(c.Scheme[:], feedback.TerminalMomentum{}.Name())
	copy(c.RemnantFit[:], feedback.KimOstriker2015.String())
	copy(c.Weighting[:], feedback.KernelVolume.String())
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
