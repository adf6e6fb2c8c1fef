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
// Every kind also takes `label`, the model's display label in summary.tex
// and summary.md (Spec.Label; a tuned model keeps it); the CSV files, task
// keys and figures keep Spec.Name.
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
// Keys and values say what they do (vocab.go): an SVM's gamma =
// "inverse-variance" is 1/(d·Var(X)) of the training part and offset is
// the constant c of the polynomial kernel (gamma <x, x'> + c)^degree; a
// k-NN's vote is "equal" (one vote per neighbour) or "inverse-distance"
// (1/d); an interference model's simulator is "auto", "density-matrix",
// "trajectories" or "state-vector". The old spellings (gamma "scale",
// coef0, weights "uniform" | "distance", method "statevector" |
// "density") are read for this release: Parse maps them to the new ones
// (Respellings), lists each in Spec.Deprecated, and Respell gives a
// table's current spelling for the spec's canonical form.
//
// Imports: bench/input (errors), bench/cv, and the model packages
// (baselines, qkernel and its sub-packages, qkernel/device included,
// datasets). It must never
// import the other bench packages (spec, plan, runner, report, export,
// assess, cluster) or results: the spec parser, the planner and the runner
// call it, not the other way round.
package modelkit
