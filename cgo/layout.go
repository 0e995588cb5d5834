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
// of its structs in size, and between the header's constants and the Go
// code's. Empty when they agree. TestABILayoutMatchesHeader runs it; every
// field's offset, in C, Go and Fortran, is compared by
// TestStructLayoutsFieldByField (structlayout_test.go).
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

	var cf C.ejecta_field
	var gf fieldABI
	eq("sizeof field", unsafe.Sizeof(cf), unsafe.Sizeof(gf))

	var cg C.ejecta_gas
	var gg gasABI
	eq("sizeof gas", unsafe.Sizeof(cg), unsafe.Sizeof(gg))

	var cs C.ejecta_star
	var gs starABI
	eq("sizeof star", unsafe.Sizeof(cs), unsafe.Sizeof(gs))

	var cr C.ejecta_record
	var gr recordABI
	eq("sizeof record", unsafe.Sizeof(cr), unsafe.Sizeof(gr))

	var cq C.ejecta_quantities
	var gq quantitiesABI
	eq("sizeof quantities", unsafe.Sizeof(cq), unsafe.Sizeof(gq))

	var cl C.ejecta_ledger
	var gl ledgerABI
	eq("sizeof ledger", unsafe.Sizeof(cl), unsafe.Sizeof(gl))

	var ca C.ejecta_apply_report
	var ga applyReportABI
	eq("sizeof apply_report", unsafe.Sizeof(ca), unsafe.Sizeof(ga))

	var ct C.ejecta_touched
	var gt touchedABI
	eq("sizeof touched", unsafe.Sizeof(ct), unsafe.Sizeof(gt))

	var cpc C.ejecta_population_config
	var gpc populationConfigABI
	eq("sizeof population_config", unsafe.Sizeof(cpc), unsafe.Sizeof(gpc))

	var csp C.ejecta_star_particle
	var gsp starParticleABI
	eq("sizeof star_particle", unsafe.Sizeof(csp), unsafe.Sizeof(gsp))

	var csr C.ejecta_star_result
	var gsr starResultABI
	eq("sizeof star_result", unsafe.Sizeof(csr), unsafe.Sizeof(gsr))

	var cdc C.ejecta_star_columns
	var gdc starColumnsABI
	eq("sizeof star_columns", unsafe.Sizeof(cdc), unsafe.Sizeof(gdc))

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
