// Package export builds the interference circuits of a plan's test
// instances as programs for other tools and devices.
//
// Circuits writes the OpenQASM 3 program of every test instance of a plan
// (every dataset, pipeline, repeat and fold) into a folder, with index.csv
// mapping each file to its instance, written atomically: the circuits a
// run's interference models would simulate, with the same training subsets
// and weights, so that counts measured on a device and read back by a
// counts model decide exactly as shot mode would. With Options.Device the
// programs are the native routed programs on a device (package
// qkernel/device) and index.csv gains DeviceIndexColumns (the physical
// qubits that measure ancilla_out and class_out, the initial and final
// layouts, the routed costs); the measured bits keep their names, so the
// counts file is the same. BuildCircuit compiles the circuit of one test
// instance of a dataset for `fringe circuit`.
//
// Imports: bench/input, bench/spec, bench/modelkit, bench/plan,
// bench/outdir, results (the CSV cell rule) and the model packages
// (qkernel, qkernel/circuit, qkernel/device, datasets). It must never
// import runner, report, assess or cluster.
package export
