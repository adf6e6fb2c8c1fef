// Package benchtest holds helpers shared by the tests of the bench
// packages: planning a spec given as text, guarding fuzz inputs against
// hangs, and checking that an error is a one-line input error. It is
// imported by tests only.
//
// Imports: bench/input, bench/spec, bench/plan. The internal tests of
// packages below plan (modelkit, spec) cannot import it (Go refuses the
// cycle); their external tests can.
package benchtest
