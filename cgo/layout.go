package main

/*
#define EJECTA_NO_PROTOTYPES
#include "ejecta.h"
*/
import "C"

import (
	"fmt"
	"unsafe"

	"github.com/ejecta-dev/ejecta/feedback"
	"github.com/ejecta-dev/ejecta/yields"
)

// abiMismatches lists every difference between ejecta.h and the Go mirrors
// of its structs: struct sizes, field offsets and constants. Empty when
// they agree. TestABILayoutMatchesHeader runs it.
func abiMismatches() []string {
	var bad []string
	eq := func(what string, c, g uintptr) {
		if c != g {
			bad = append(bad, fmt.Sprintf("%s: C %d, Go %d", what, c, g))
		}
	}
	eqi := func(what string, c, g int64) {
		if c != g {
			bad = append(bad, fmt.Sprintf("%s: C %d, Go %d", what, c, g))
		}
	}
	var cc C.ejecta_config
	var gc configABI
	eq("sizeof config", unsafe.Sizeof(cc), unsafe.Sizeof(gc))
	eq("config.kinetic_fraction", unsafe.Offsetof(cc.kinetic_fraction), unsafe.Offsetof(gc.KineticFraction))
	eq("config.coupling_radius", unsafe.Offsetof(cc.coupling_radius), unsafe.Offsetof(gc.CouplingRadius))
	eq("config.box_size", unsafe.Offsetof(cc.box_size), unsafe.Offsetof(gc.BoxSize))
	eq("config.seed", unsafe.Offsetof(cc.seed), unsafe.Offsetof(gc.Seed))
	eq("config.neighbor_count", unsafe.Offsetof(cc.neighbor_count), unsafe.Offsetof(gc.NeighborCount))
	eq("config.worker_threads", unsafe.Offsetof(cc.worker_threads), unsafe.Offsetof(gc.WorkerThreads))
	eq("config.isotropy_correction", unsafe.Offsetof(cc.isotropy_correction), unsafe.Offsetof(gc.IsotropyCorrection))
	eq("config.photon_reach", unsafe.Offsetof(cc.photon_reach), unsafe.Offsetof(gc.PhotonReach))
	eq("config.scheme", unsafe.Offsetof(cc.scheme), unsafe.Offsetof(gc.Scheme))
	eq("config.remnant_fit", unsafe.Offsetof(cc.remnant_fit), unsafe.Offsetof(gc.RemnantFit))
	eq("config.weighting", unsafe.Offsetof(cc.weighting), unsafe.Offsetof(gc.Weighting))
	eq("config.remnant_table", unsafe.Offsetof(cc.remnant_table), unsafe.Offsetof(gc.RemnantTable))
	eq("config.max_infrared_boost", unsafe.Offsetof(cc.max_infrared_boost), unsafe.Offsetof(gc.MaxInfraredBoost))
	eq("config.wind_event_energy_erg", unsafe.Offsetof(cc.wind_event_energy_erg), unsafe.Offsetof(gc.WindEventEnergyErg))

	var cf C.ejecta_field
	var gf fieldABI
	eq("sizeof field", unsafe.Sizeof(cf), unsafe.Sizeof(gf))
	eq("field.stride", unsafe.Offsetof(cf.stride), unsafe.Offsetof(gf.Stride))
	eq("field.type", unsafe.Offsetof(cf._type), unsafe.Offsetof(gf.Type))

	var cg C.ejecta_gas
	var gg gasABI
	eq("sizeof gas", unsafe.Sizeof(cg), unsafe.Sizeof(gg))
	eq("gas.velocity", unsafe.Offsetof(cg.velocity), unsafe.Offsetof(gg.Velocity))
	eq("gas.mass", unsafe.Offsetof(cg.mass), unsafe.Offsetof(gg.Mass))
	eq("gas.density", unsafe.Offsetof(cg.density), unsafe.Offsetof(gg.Density))
	eq("gas.internal_energy", unsafe.Offsetof(cg.internal_energy), unsafe.Offsetof(gg.InternalEnergy))
	eq("gas.smoothing_length", unsafe.Offsetof(cg.smoothing_length), unsafe.Offsetof(gg.SmoothingLength))
	eq("gas.id", unsafe.Offsetof(cg.id), unsafe.Offsetof(gg.ID))
	eq("gas.n_species", unsafe.Offsetof(cg.n_species), unsafe.Offsetof(gg.NSpecies))
	eq("gas.species", unsafe.Offsetof(cg.species), unsafe.Offsetof(gg.Species))
	eq("gas.species_fraction", unsafe.Offsetof(cg.species_fraction), unsafe.Offsetof(gg.SpeciesFraction))

	var cs C.ejecta_star
	var gs starABI
	eq("sizeof star", unsafe.Sizeof(cs), unsafe.Sizeof(gs))
	eq("star.position", unsafe.Offsetof(cs.position), unsafe.Offsetof(gs.Position))
	eq("star.velocity", unsafe.Offsetof(cs.velocity), unsafe.Offsetof(gs.Velocity))
	eq("star.mass", unsafe.Offsetof(cs.mass), unsafe.Offsetof(gs.Mass))
	eq("star.metallicity", unsafe.Offsetof(cs.metallicity), unsafe.Offsetof(gs.Metallicity))
	eq("star.age", unsafe.Offsetof(cs.age), unsafe.Offsetof(gs.Age))
	eq("star.channel", unsafe.Offsetof(cs.channel), unsafe.Offsetof(gs.Channel))
	eq("star.ejected_mass", unsafe.Offsetof(cs.ejected_mass), unsafe.Offsetof(gs.EjectedMass))
	eq("star.species_mass", unsafe.Offsetof(cs.species_mass), unsafe.Offsetof(gs.SpeciesMass))
	eq("star.energy", unsafe.Offsetof(cs.energy), unsafe.Offsetof(gs.Energy))
	eq("star.events", unsafe.Offsetof(cs.events), unsafe.Offsetof(gs.Events))
	eq("star.photons", unsafe.Offsetof(cs.photons), unsafe.Offsetof(gs.Photons))
	eq("star.duration", unsafe.Offsetof(cs.duration), unsafe.Offsetof(gs.Duration))
	eq("star.new_stellar_mass", unsafe.Offsetof(cs.new_stellar_mass), unsafe.Offsetof(gs.NewStellarMass))
	eq("star.dispersion", unsafe.Offsetof(cs.dispersion), unsafe.Offsetof(gs.Dispersion))

	var cr C.ejecta_record
	var gr recordABI
	eq("sizeof record", unsafe.Sizeof(cr), unsafe.Sizeof(gr))
	eq("record.gas_id", unsafe.Offsetof(cr.gas_id), unsafe.Offsetof(gr.GasID))
	eq("record.star_id", unsafe.Offsetof(cr.star_id), unsafe.Offsetof(gr.StarID))
	eq("record.channel", unsafe.Offsetof(cr.channel), unsafe.Offsetof(gr.Channel))
	eq("record.flags", unsafe.Offsetof(cr.flags), unsafe.Offsetof(gr.Flags))
	eq("record.mass", unsafe.Offsetof(cr.mass), unsafe.Offsetof(gr.Mass))
	eq("record.species_mass", unsafe.Offsetof(cr.species_mass), unsafe.Offsetof(gr.SpeciesMass))
	eq("record.momentum", unsafe.Offsetof(cr.momentum), unsafe.Offsetof(gr.Momentum))
	eq("record.energy", unsafe.Offsetof(cr.energy), unsafe.Offsetof(gr.Energy))
	eq("record.heat", unsafe.Offsetof(cr.heat), unsafe.Offsetof(gr.Heat))
	eq("record.radiated", unsafe.Offsetof(cr.radiated), unsafe.Offsetof(gr.Radiated))
	eq("record.hold_cooling_until", unsafe.Offsetof(cr.hold_cooling_until), unsafe.Offsetof(gr.HoldCoolingUntil))
	eq("record.kick", unsafe.Offsetof(cr.kick), unsafe.Offsetof(gr.Kick))
	eq("record.heating", unsafe.Offsetof(cr.heating), unsafe.Offsetof(gr.Heating))
	eq("record.hydro_decoupled_until", unsafe.Offsetof(cr.hydro_decoupled_until), unsafe.Offsetof(gr.HydroDecoupledUntil))
	eq("record.fuv_field", unsafe.Offsetof(cr.fuv_field), unsafe.Offsetof(gr.FUVField))

	var cq C.ejecta_quantities
	var gq quantitiesABI
	eq("sizeof quantities", unsafe.Sizeof(cq), unsafe.Sizeof(gq))
	eq("quantities.species_mass", unsafe.Offsetof(cq.species_mass), unsafe.Offsetof(gq.SpeciesMass))
	eq("quantities.momentum", unsafe.Offsetof(cq.momentum), unsafe.Offsetof(gq.Momentum))
	eq("quantities.energy", unsafe.Offsetof(cq.energy), unsafe.Offsetof(gq.Energy))

	var cl C.ejecta_ledger
	var gl ledgerABI
	eq("sizeof ledger", unsafe.Sizeof(cl), unsafe.Sizeof(gl))
	eq("ledger.deposited", unsafe.Offsetof(cl.deposited), unsafe.Offsetof(gl.Deposited))
	eq("ledger.undeposited", unsafe.Offsetof(cl.undeposited), unsafe.Offsetof(gl.Undeposited))
	eq("ledger.radiated", unsafe.Offsetof(cl.radiated), unsafe.Offsetof(gl.Radiated))
	eq("ledger.stars", unsafe.Offsetof(cl.stars), unsafe.Offsetof(gl.Stars))
	eq("ledger.limited", unsafe.Offsetof(cl.limited), unsafe.Offsetof(gl.Limited))
	eq("ledger.max_isotropy_residual", unsafe.Offsetof(cl.max_isotropy_residual), unsafe.Offsetof(gl.MaxIsotropyResidual))
	eq("ledger.energy_scale", unsafe.Offsetof(cl.energy_scale), unsafe.Offsetof(gl.EnergyScale))
	eq("ledger.kick_energy", unsafe.Offsetof(cl.kick_energy), unsafe.Offsetof(gl.KickEnergy))
	eq("ledger.heat", unsafe.Offsetof(cl.heat), unsafe.Offsetof(gl.Heat))

	var ca C.ejecta_apply_report
	var ga applyReportABI
	eq("sizeof apply_report", unsafe.Sizeof(ca), unsafe.Sizeof(ga))
	eq("apply_report.deposited", unsafe.Offsetof(ca.deposited), unsafe.Offsetof(ga.Deposited))
	eq("apply_report.reclaimed", unsafe.Offsetof(ca.reclaimed), unsafe.Offsetof(ga.Reclaimed))
	eq("apply_report.shortfall_elements", unsafe.Offsetof(ca.shortfall_elements), unsafe.Offsetof(ga.ShortfallElements))

	var ct C.ejecta_touched
	var gt touchedABI
	eq("sizeof touched", unsafe.Sizeof(ct), unsafe.Sizeof(gt))
	eq("touched.max_kick", unsafe.Offsetof(ct.max_kick), unsafe.Offsetof(gt.MaxKick))
	eq("touched.hold_cooling_until", unsafe.Offsetof(ct.hold_cooling_until), unsafe.Offsetof(gt.HoldCoolingUntil))
	eq("touched.hydro_decoupled_until", unsafe.Offsetof(ct.hydro_decoupled_until), unsafe.Offsetof(gt.HydroDecoupledUntil))
	eq("touched.fuv_field", unsafe.Offsetof(ct.fuv_field), unsafe.Offsetof(gt.FUVField))
	eq("touched.flags", unsafe.Offsetof(ct.flags), unsafe.Offsetof(gt.Flags))

	var cpc C.ejecta_population_config
	var gpc populationConfigABI
	eq("sizeof population_config", unsafe.Sizeof(cpc), unsafe.Sizeof(gpc))
	eq("population_config.lightest_star_mass", unsafe.Offsetof(cpc.lightest_star_mass), unsafe.Offsetof(gpc.LightestStarMass))
	eq("population_config.heaviest_star_mass", unsafe.Offsetof(cpc.heaviest_star_mass), unsafe.Offsetof(gpc.HeaviestStarMass))
	eq("population_config.max_supernovae_per_step", unsafe.Offsetof(cpc.max_supernovae_per_step), unsafe.Offsetof(gpc.MaxSupernovaePerStep))
	eq("population_config.yields_table", unsafe.Offsetof(cpc.yields_table), unsafe.Offsetof(gpc.YieldsTable))
	eq("population_config.winds", unsafe.Offsetof(cpc.winds), unsafe.Offsetof(gpc.Winds))
	eq("population_config.radiation_pressure", unsafe.Offsetof(cpc.radiation_pressure), unsafe.Offsetof(gpc.RadiationPressure))
	eq("population_config.photoionization", unsafe.Offsetof(cpc.photoionization), unsafe.Offsetof(gpc.Photoionization))
	eq("population_config.delayed_cooling", unsafe.Offsetof(cpc.delayed_cooling), unsafe.Offsetof(gpc.DelayedCooling))
	eq("population_config.photoelectric_heating", unsafe.Offsetof(cpc.photoelectric_heating), unsafe.Offsetof(gpc.PhotoelectricHeating))

	var csp C.ejecta_star_particle
	var gsp starParticleABI
	eq("sizeof star_particle", unsafe.Sizeof(csp), unsafe.Sizeof(gsp))
	eq("star_particle.position", unsafe.Offsetof(csp.position), unsafe.Offsetof(gsp.Position))
	eq("star_particle.velocity", unsafe.Offsetof(csp.velocity), unsafe.Offsetof(gsp.Velocity))
	eq("star_particle.mass", unsafe.Offsetof(csp.mass), unsafe.Offsetof(gsp.Mass))
	eq("star_particle.formed_mass", unsafe.Offsetof(csp.formed_mass), unsafe.Offsetof(gsp.FormedMass))
	eq("star_particle.metallicity", unsafe.Offsetof(csp.metallicity), unsafe.Offsetof(gsp.Metallicity))
	eq("star_particle.age", unsafe.Offsetof(csp.age), unsafe.Offsetof(gsp.Age))
	eq("star_particle.carried_energy", unsafe.Offsetof(csp.carried_energy), unsafe.Offsetof(gsp.CarriedEnergy))

	var csr C.ejecta_star_result
	var gsr starResultABI
	eq("sizeof star_result", unsafe.Sizeof(csr), unsafe.Sizeof(gsr))
	eq("star_result.mass_loss", unsafe.Offsetof(csr.mass_loss), unsafe.Offsetof(gsr.MassLoss))
	eq("star_result.carried_energy", unsafe.Offsetof(csr.carried_energy), unsafe.Offsetof(gsr.CarriedEnergy))
	eq("star_result.supernovae_cc", unsafe.Offsetof(csr.supernovae_cc), unsafe.Offsetof(gsr.SupernovaeCC))
	eq("star_result.supernovae_ia", unsafe.Offsetof(csr.supernovae_ia), unsafe.Offsetof(gsr.SupernovaeIa))

	var cdc C.ejecta_star_columns
	var gdc starColumnsABI
	eq("sizeof star_columns", unsafe.Sizeof(cdc), unsafe.Sizeof(gdc))
	eq("star_columns.id", unsafe.Offsetof(cdc.id), unsafe.Offsetof(gdc.ID))
	eq("star_columns.position", unsafe.Offsetof(cdc.position), unsafe.Offsetof(gdc.Position))
	eq("star_columns.velocity", unsafe.Offsetof(cdc.velocity), unsafe.Offsetof(gdc.Velocity))
	eq("star_columns.coupling_radius", unsafe.Offsetof(cdc.coupling_radius), unsafe.Offsetof(gdc.CouplingRadius))
	eq("star_columns.ejecta_mass", unsafe.Offsetof(cdc.ejecta_mass), unsafe.Offsetof(gdc.EjectaMass))
	eq("star_columns.energy", unsafe.Offsetof(cdc.energy), unsafe.Offsetof(gdc.Energy))
	eq("star_columns.radiated", unsafe.Offsetof(cdc.radiated), unsafe.Offsetof(gdc.Radiated))
	eq("star_columns.n_species", unsafe.Offsetof(cdc.n_species), unsafe.Offsetof(gdc.NSpecies))
	eq("star_columns.species", unsafe.Offsetof(cdc.species), unsafe.Offsetof(gdc.Species))
	eq("star_columns.species_mass", unsafe.Offsetof(cdc.species_mass), unsafe.Offsetof(gdc.SpeciesMass))

	consts := []namedCode{
		{"EJECTA_OK", C.EJECTA_OK, int64(codeOK)},
		{"EJECTA_ERR_NULL_POINTER", C.EJECTA_ERR_NULL_POINTER, int64(codeNullPointer)},
		{"EJECTA_ERR_INVALID_ARGUMENT", C.EJECTA_ERR_INVALID_ARGUMENT, int64(codeInvalidArgument)},
		{"EJECTA_ERR_UNKNOWN_NAME", C.EJECTA_ERR_UNKNOWN_NAME, int64(codeUnknownName)},
		{"EJECTA_ERR_INVALID_CONTEXT", C.EJECTA_ERR_INVALID_CONTEXT, int64(codeInvalidContext)},
		{"EJECTA_ERR_NO_GAS", C.EJECTA_ERR_NO_GAS, int64(codeNoGas)},
		{"EJECTA_ERR_BAD_VALUE", C.EJECTA_ERR_BAD_VALUE, int64(codeBadValue)},
		{"EJECTA_ERR_NEIGHBORS", C.EJECTA_ERR_NEIGHBORS, int64(codeNeighbors)},
		{"EJECTA_ERR_BUFFER_TOO_SMALL", C.EJECTA_ERR_BUFFER_TOO_SMALL, int64(codeBufferTooSmall)},
		{"EJECTA_ERR_UNKNOWN_GAS", C.EJECTA_ERR_UNKNOWN_GAS, int64(codeUnknownGas)},
		{"EJECTA_ERR_BUSY", C.EJECTA_ERR_BUSY, int64(codeBusy)},
		{"EJECTA_ERR_UNDEPOSITED", C.EJECTA_ERR_UNDEPOSITED, int64(codeUndeposited)},
		{"EJECTA_ERR_IMBALANCE", C.EJECTA_ERR_IMBALANCE, int64(codeImbalance)},
		{"EJECTA_ERR_ALREADY_APPLIED", C.EJECTA_ERR_ALREADY_APPLIED, int64(codeAlreadyApplied)},
		{"EJECTA_ERR_NO_POPULATION", C.EJECTA_ERR_NO_POPULATION, int64(codeNoPopulation)},
		{"EJECTA_ERR_YIELDS_TABLE", C.EJECTA_ERR_YIELDS_TABLE, int64(codeYieldsTable)},
		{"EJECTA_ERR_REMNANT_TABLE", C.EJECTA_ERR_REMNANT_TABLE, int64(codeRemnantTable)},
		{"EJECTA_ERR_DUMP_FILE", C.EJECTA_ERR_DUMP_FILE, int64(codeDumpFile)},
		{"EJECTA_ERR_INTERNAL", C.EJECTA_ERR_INTERNAL, int64(codeInternal)},
		{"EJECTA_ABI_VERSION", C.EJECTA_ABI_VERSION, int64(abiVersion)},
		{"EJECTA_NAME_CAPACITY", C.EJECTA_NAME_CAPACITY, nameCapacity},
		{"EJECTA_NUM_SPECIES", C.EJECTA_NUM_SPECIES, int64(numSpecies)},
		{"EJECTA_FLOAT64", C.EJECTA_FLOAT64, int64(elemFloat64)},
		{"EJECTA_FLOAT32", C.EJECTA_FLOAT32, int64(elemFloat32)},
		{"EJECTA_INT64", C.EJECTA_INT64, int64(elemInt64)},
		{"EJECTA_INT32", C.EJECTA_INT32, int64(elemInt32)},
		{"EJECTA_NEIGHBORS_OWN_FINDER", C.EJECTA_NEIGHBORS_OWN_FINDER, int64(modeOwnFinder)},
		{"EJECTA_NEIGHBORS_HOST_ROWS", C.EJECTA_NEIGHBORS_HOST_ROWS, int64(modeHostRows)},
		{"EJECTA_LOCATE_BY_INDEX", C.EJECTA_LOCATE_BY_INDEX, int64(locateByIndex)},
		{"EJECTA_LOCATE_BY_ID", C.EJECTA_LOCATE_BY_ID, int64(locateByID)},
	}
	for _, k := range consts {
		eqi(k.name, k.c, k.g)
	}
	for _, k := range speciesAndChannelCodes() {
		eqi(k.name, k.c, k.g)
	}
	flags := []namedCode{
		{"EJECTA_FLAG_CAPPED", C.EJECTA_FLAG_CAPPED, int64(feedback.FlagCapped)},
		{"EJECTA_FLAG_LIMITED", C.EJECTA_FLAG_LIMITED, int64(feedback.FlagLimited)},
		{"EJECTA_FLAG_IONIZED", C.EJECTA_FLAG_IONIZED, int64(feedback.FlagIonized)},
		{"EJECTA_FLAG_HOLD_COOLING", C.EJECTA_FLAG_HOLD_COOLING, int64(feedback.FlagHoldCooling)},
		{"EJECTA_FLAG_STOCHASTIC", C.EJECTA_FLAG_STOCHASTIC, int64(feedback.FlagStochastic)},
		{"EJECTA_FLAG_HYDRO_DECOUPLED", C.EJECTA_FLAG_HYDRO_DECOUPLED, int64(feedback.FlagHydroDecoupled)},
	}
	for _, k := range flags {
		eqi(k.name, k.c, k.g)
	}
	return bad
}

// namedCode is a constant of ejecta.h and its Go counterpart.
type namedCode struct {
	name string
	c, g int64
}

// speciesAndChannelCodes pairs the species and channel codes of ejecta.h
// with package yields.
func speciesAndChannelCodes() []namedCode {
	return []namedCode{
		{"EJECTA_SPECIES_METALS", C.EJECTA_SPECIES_METALS, int64(yields.Metals)},
		{"EJECTA_SPECIES_HYDROGEN", C.EJECTA_SPECIES_HYDROGEN, int64(yields.Hydrogen)},
		{"EJECTA_SPECIES_HELIUM", C.EJECTA_SPECIES_HELIUM, int64(yields.Helium)},
		{"EJECTA_SPECIES_CARBON", C.EJECTA_SPECIES_CARBON, int64(yields.Carbon)},
		{"EJECTA_SPECIES_NITROGEN", C.EJECTA_SPECIES_NITROGEN, int64(yields.Nitrogen)},
		{"EJECTA_SPECIES_OXYGEN", C.EJECTA_SPECIES_OXYGEN, int64(yields.Oxygen)},
		{"EJECTA_SPECIES_NEON", C.EJECTA_SPECIES_NEON, int64(yields.Neon)},
		{"EJECTA_SPECIES_MAGNESIUM", C.EJECTA_SPECIES_MAGNESIUM, int64(yields.Magnesium)},
		{"EJECTA_SPECIES_SILICON", C.EJECTA_SPECIES_SILICON, int64(yields.Silicon)},
		{"EJECTA_SPECIES_SULFUR", C.EJECTA_SPECIES_SULFUR, int64(yields.Sulfur)},
		{"EJECTA_SPECIES_CALCIUM", C.EJECTA_SPECIES_CALCIUM, int64(yields.Calcium)},
		{"EJECTA_SPECIES_IRON", C.EJECTA_SPECIES_IRON, int64(yields.Iron)},
		{"EJECTA_CHANNEL_CORE_COLLAPSE", C.EJECTA_CHANNEL_CORE_COLLAPSE, int64(yields.CoreCollapse)},
		{"EJECTA_CHANNEL_TYPE_IA", C.EJECTA_CHANNEL_TYPE_IA, int64(yields.TypeIa)},
		{"EJECTA_CHANNEL_MASSIVE_WINDS", C.EJECTA_CHANNEL_MASSIVE_WINDS, int64(yields.MassiveWinds)},
		{"EJECTA_CHANNEL_AGB_WINDS", C.EJECTA_CHANNEL_AGB_WINDS, int64(yields.AGBWinds)},
		{"EJECTA_CHANNEL_RADIATION_PRESSURE", C.EJECTA_CHANNEL_RADIATION_PRESSURE, int64(yields.RadiationPressure)},
		{"EJECTA_CHANNEL_PHOTOIONIZATION", C.EJECTA_CHANNEL_PHOTOIONIZATION, int64(yields.Photoionization)},
		{"EJECTA_CHANNEL_PHOTOELECTRIC_HEATING", C.EJECTA_CHANNEL_PHOTOELECTRIC_HEATING, int64(yields.PhotoelectricHeating)},
		{"EJECTA_NUM_STEP_CHANNELS", C.EJECTA_NUM_STEP_CHANNELS, int64(numStepChannels)},
	}
}
