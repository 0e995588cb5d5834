package main

/*
#define EJECTA_NO_PROTOTYPES
#include "ejecta.h"
*/
import "C"

import "unsafe"

// Each export converts its C arguments to the Go mirrors of the structs
// and calls the entry function of the same name (entryVersion for
// ejecta_version, ...), which recovers every panic, so none crosses into
// C. The entries live in the file of their concern (see doc.go).

//export ejecta_version
func ejecta_version(buffer *C.char, capacity C.int64_t, abi *C.int32_t) C.int {
	return C.int(entryVersion((*byte)(unsafe.Pointer(buffer)), int64(capacity), (*int32)(unsafe.Pointer(abi))))
}

//export ejecta_config_defaults
func ejecta_config_defaults(config *C.ejecta_config) C.int {
	return C.int(entryConfigDefaults((*configABI)(unsafe.Pointer(config))))
}

//export ejecta_create
func ejecta_create(config *C.ejecta_config, context *C.ejecta_context, errorText *C.char, capacity C.int64_t) C.int {
	return C.int(entryCreate((*configABI)(unsafe.Pointer(config)), (*uint64)(unsafe.Pointer(context)),
		(*byte)(unsafe.Pointer(errorText)), int64(capacity)))
}

//export ejecta_destroy
func ejecta_destroy(context *C.ejecta_context) C.int {
	return C.int(entryDestroy((*uint64)(unsafe.Pointer(context))))
}

//export ejecta_last_error
func ejecta_last_error(context C.ejecta_context, buffer *C.char, capacity C.int64_t, length *C.int64_t) C.int {
	return C.int(entryLastError(uint64(context), (*byte)(unsafe.Pointer(buffer)), int64(capacity), (*int64)(unsafe.Pointer(length))))
}

//export ejecta_bind_gas
func ejecta_bind_gas(context C.ejecta_context, gas *C.ejecta_gas) C.int {
	return C.int(entryBindGas(uint64(context), (*gasABI)(unsafe.Pointer(gas))))
}

//export ejecta_step
func ejecta_step(context C.ejecta_context, stars *C.ejecta_star, nStars, stepIndex C.int64_t, neighborMode C.int32_t, rowOffsets, rowIndices *C.int64_t) C.int {
	return C.int(entryStep(uint64(context), (*starABI)(unsafe.Pointer(stars)), int64(nStars), int64(stepIndex), int32(neighborMode),
		(*int64)(unsafe.Pointer(rowOffsets)), (*int64)(unsafe.Pointer(rowIndices))))
}

//export ejecta_copy_undeposited
func ejecta_copy_undeposited(context C.ejecta_context, starIDs *C.int64_t, channels *C.int32_t, capacity C.int64_t, written *C.int64_t) C.int {
	return C.int(entryCopyUndeposited(uint64(context), (*int64)(unsafe.Pointer(starIDs)), (*int32)(unsafe.Pointer(channels)), int64(capacity), (*int64)(unsafe.Pointer(written))))
}

//export ejecta_record_count
func ejecta_record_count(context C.ejecta_context, count *C.int64_t) C.int {
	return C.int(entryRecordCount(uint64(context), (*int64)(unsafe.Pointer(count))))
}

//export ejecta_copy_records
func ejecta_copy_records(context C.ejecta_context, records *C.ejecta_record, capacity C.int64_t, written *C.int64_t) C.int {
	return C.int(entryCopyRecords(uint64(context), (*recordABI)(unsafe.Pointer(records)), int64(capacity), (*int64)(unsafe.Pointer(written))))
}

//export ejecta_get_ledger
func ejecta_get_ledger(context C.ejecta_context, ledger *C.ejecta_ledger) C.int {
	return C.int(entryGetLedger(uint64(context), (*ledgerABI)(unsafe.Pointer(ledger))))
}

//export ejecta_apply_step_records
func ejecta_apply_step_records(context C.ejecta_context, report *C.ejecta_apply_report) C.int {
	return C.int(entryApplyStepRecords(uint64(context), (*applyReportABI)(unsafe.Pointer(report))))
}

//export ejecta_apply_records
func ejecta_apply_records(context C.ejecta_context, records *C.ejecta_record, nRecords C.int64_t, locate C.int32_t, report *C.ejecta_apply_report) C.int {
	return C.int(entryApplyRecords(uint64(context), (*recordABI)(unsafe.Pointer(records)), int64(nRecords), int32(locate),
		(*applyReportABI)(unsafe.Pointer(report))))
}

//export ejecta_copy_touched
func ejecta_copy_touched(context C.ejecta_context, touched *C.ejecta_touched, capacity C.int64_t, written *C.int64_t) C.int {
	return C.int(entryCopyTouched(uint64(context), (*touchedABI)(unsafe.Pointer(touched)), int64(capacity), (*int64)(unsafe.Pointer(written))))
}

//export ejecta_ledger_balanced
func ejecta_ledger_balanced(ledger *C.ejecta_ledger, relativeTolerance C.double, message *C.char, capacity C.int64_t) C.int {
	return C.int(entryLedgerBalanced((*ledgerABI)(unsafe.Pointer(ledger)), float64(relativeTolerance),
		(*byte)(unsafe.Pointer(message)), int64(capacity)))
}

//export ejecta_population_defaults
func ejecta_population_defaults(config *C.ejecta_population_config) C.int {
	return C.int(entryPopulationDefaults((*populationConfigABI)(unsafe.Pointer(config))))
}

//export ejecta_enable_population
func ejecta_enable_population(context C.ejecta_context, config *C.ejecta_population_config) C.int {
	return C.int(entryEnablePopulation(uint64(context), (*populationConfigABI)(unsafe.Pointer(config))))
}

//export ejecta_step_population
func ejecta_step_population(context C.ejecta_context, stars *C.ejecta_star_particle, nStars C.int64_t, dt C.double,
	stepIndex C.int64_t, neighborMode C.int32_t, rowOffsets, rowIndices *C.int64_t) C.int {
	return C.int(entryStepPopulation(uint64(context), (*starParticleABI)(unsafe.Pointer(stars)), int64(nStars), float64(dt),
		int64(stepIndex), int32(neighborMode), (*int64)(unsafe.Pointer(rowOffsets)), (*int64)(unsafe.Pointer(rowIndices))))
}

//export ejecta_copy_star_results
func ejecta_copy_star_results(context C.ejecta_context, results *C.ejecta_star_result, capacity C.int64_t, written *C.int64_t) C.int {
	return C.int(entryCopyStarResults(uint64(context), (*starResultABI)(unsafe.Pointer(results)), int64(capacity),
		(*int64)(unsafe.Pointer(written))))
}

//export ejecta_suggested_step
func ejecta_suggested_step(context C.ejecta_context, dt *C.double) C.int {
	return C.int(entrySuggestedStep(uint64(context), (*float64)(unsafe.Pointer(dt))))
}

//export ejecta_get_channel_ledger
func ejecta_get_channel_ledger(context C.ejecta_context, channel C.int32_t, ledger *C.ejecta_ledger) C.int {
	return C.int(entryGetChannelLedger(uint64(context), int32(channel), (*ledgerABI)(unsafe.Pointer(ledger))))
}

//export ejecta_choose_species
func ejecta_choose_species(context C.ejecta_context, elements *C.char) C.int {
	return C.int(entryChooseSpecies(uint64(context), (*byte)(unsafe.Pointer(elements))))
}

//export ejecta_species_count
func ejecta_species_count(context C.ejecta_context, count *C.int32_t) C.int {
	return C.int(entrySpeciesCount(uint64(context), (*int32)(unsafe.Pointer(count))))
}

//export ejecta_species_symbol
func ejecta_species_symbol(context C.ejecta_context, code C.int32_t, buffer *C.char, capacity C.int64_t) C.int {
	return C.int(entrySpeciesSymbol(uint64(context), int32(code), (*byte)(unsafe.Pointer(buffer)), int64(capacity)))
}

//export ejecta_dump_open
func ejecta_dump_open(directory, species *C.char, boxSize *C.double, dump *C.ejecta_dump, errorText *C.char, capacity C.int64_t) C.int {
	return C.int(entryDumpOpen((*byte)(unsafe.Pointer(directory)), (*byte)(unsafe.Pointer(species)), (*[3]float64)(unsafe.Pointer(boxSize)),
		(*uint64)(unsafe.Pointer(dump)), (*byte)(unsafe.Pointer(errorText)), int64(capacity)))
}

//export ejecta_dump_gas_before
func ejecta_dump_gas_before(dump C.ejecta_dump, gas *C.ejecta_gas) C.int {
	return C.int(entryDumpGasBefore(uint64(dump), (*gasABI)(unsafe.Pointer(gas))))
}

//export ejecta_dump_gas_after
func ejecta_dump_gas_after(dump C.ejecta_dump, gas *C.ejecta_gas) C.int {
	return C.int(entryDumpGasAfter(uint64(dump), (*gasABI)(unsafe.Pointer(gas))))
}

//export ejecta_dump_stars
func ejecta_dump_stars(dump C.ejecta_dump, stars *C.ejecta_star_columns) C.int {
	return C.int(entryDumpStars(uint64(dump), (*starColumnsABI)(unsafe.Pointer(stars))))
}

//export ejecta_dump_finish
func ejecta_dump_finish(dump C.ejecta_dump) C.int {
	return C.int(entryDumpFinish(uint64(dump)))
}

//export ejecta_dump_close
func ejecta_dump_close(dump *C.ejecta_dump) C.int {
	return C.int(entryDumpClose((*uint64)(unsafe.Pointer(dump))))
}

//export ejecta_dump_last_error
func ejecta_dump_last_error(dump C.ejecta_dump, buffer *C.char, capacity C.int64_t, length *C.int64_t) C.int {
	return C.int(entryDumpLastError(uint64(dump), (*byte)(unsafe.Pointer(buffer)), int64(capacity), (*int64)(unsafe.Pointer(length))))
}
