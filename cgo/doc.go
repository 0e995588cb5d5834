// Command cgo is the C ABI of ejecta: built with -buildmode=c-shared or
// -buildmode=c-archive it becomes libejecta, whose interface is declared and
// documented in ejecta.h (see README.md in this directory for build, link
// and usage). The exported functions are thin conversions of C arguments;
// the work is done by entry functions (entryStep for ejecta_step, ...) that
// take Go mirrors of the C structs, so that tests and fuzzing call them
// directly.
//
// All state lives in sessions reached through runtime/cgo handles (the
// opaque ejecta_context); nothing is shared between contexts, no Go pointer
// is handed to C, and every entry recovers from panics, returning an error
// code instead.
//
// # Files by concern
//
//	exports.go     the //export wrappers, one per function of ejecta.h
//	errors.go      error codes, the mapping of failure kinds to codes (codeForFailure), panic guard
//	handle.go      handleTable: the handle rules of contexts and dump sessions (0, deleted, busy, last error)
//	session.go     the context: session, its phases (one state machine), create/destroy/last_error
//	config.go      ejecta_config: its Go mirror, parsing, defaults, ejecta_version
//	gas.go         ejecta_field/ejecta_gas: element types, columns, binding and what derives from it
//	species.go     the tracked species of a context: ejecta_choose_species, their codes and symbols
//	step.go        ejecta_step and the batch path both kinds of step share (checks, finder, results)
//	results.go     what a step leaves to read: records, undeposited releases, ledger; the copy rule
//	apply.go       ejecta_apply_step_records, ejecta_apply_records, ejecta_copy_touched
//	population.go  population steps: config, star particles, per-star results, channel ledgers
//	dump.go        audit dumps: the ejecta_dump session (ejecta_dump_*), ejecta_star_columns
//	layout.go      abiMismatches: struct sizes and constants checked against ejecta.h
//
// A new function goes into the file of its concern with its entry, gets
// its wrapper in exports.go, its prototype and documentation in ejecta.h,
// its interface in fortran/ejecta_mod.f90, and its constants in layout.go;
// TestStructLayoutsFieldByField compares every field of every struct in C,
// Go and Fortran.
package main

// main is required by -buildmode=c-shared and c-archive and never runs.
func main() {}
