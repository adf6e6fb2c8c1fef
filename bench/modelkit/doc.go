// Package modelkit turns the [[model]] tables of a spec into models: it
// knows every model kind a spec may use, their keys, defaults and
// validation, the readable label each configuration gets, and how to build
// a fresh, unfitted model for one task.
//
// Kinds: the classical baselines (knn, svm, logreg, centroid) of package
// baselines; the interference classifier of package qkernel in its modes
// (exact, circuit, shots, noisy) with its noise table; "command", the
// user's own classifier run as a program once per task (command.go); and
// "counts", outcomes measured on a device for exported circuits, decided
// by post-selection as shot mode does (counts.go).
//
// Devices (device.go, calibration.go): an interference model with
// device = "NAME" | "path.toml" runs in mode noisy on the described
// device (compiled, routed and simulated under its calibrated noise;
// package qkernel/device); mitigate = "readout" inverts the readout
// confusion of the measured bits (qkernel.Mitigation), with the model's
// own readout error, the device's qubits' or those of calibration =
// "file.csv", a calibration counts file (CalibrationColumns, by measured
// bit or by physical qubit). A counts model takes mitigate with device
// (the device its circuits were exported for) or calibration. The keys
// are checked against each other when the spec is read; the files are
// read by Spec.Resolve, which the planner calls with the spec's folder
// (a model built before Resolve fails its Fit), and Spec.Hardware
// describes them for manifests and plan-time checks.
//
// Parse validates one table and returns a Spec; errors about one key are a
// *KeyError so that the spec parser can add file and line. Spec.New builds
// the model of one task from the task's seed. Models that need to know
// their task (command, counts) implement TaskAware and receive a
// TaskContext before Fit; the context's Layout describes the whole run, so
// that a counts model can check its file against every test instance.
// Models that report per-prediction details implement Detailer.
//
// Imports: bench/input (errors), bench/cv, and the model packages
// (baselines, qkernel and its sub-packages, qkernel/device included,
// datasets). It must never
// import the other bench packages (spec, plan, runner, report, export,
// assess, cluster) or results: the spec parser, the planner and the runner
// call it, not the other way round.
package modelkit
