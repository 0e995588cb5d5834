// Command cgo is the C ABI of ejecta: built with -buildmode=c-shared or
// -buildmode=c-archive it becomes libejecta, whose interface is declared and
// documented in ejecta.h (see README.md in this directory for build, link
// and usage). The exported functions are thin conversions of C arguments;
// the work is done by the entry functions of abi.go, which take Go mirrors
// of the C structs so that tests and fuzzing can call them directly.
//
// All state lives in sessions reached through runtime/cgo handles (the
// opaque ejecta_context); nothing is shared between contexts, no Go pointer
// is handed to C, and every entry recovers from panics, returning an error
// code instead.
package main

// main is required by -buildmode=c-shared and c-archive and never runs.
func main() {}
