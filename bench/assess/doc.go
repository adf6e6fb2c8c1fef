// Package assess writes the suitability report of datasets for amplitude
// encoding (`fringe assess`): per dataset and pipeline, the registers and
// padding waste, CNOT and single-qubit counts and depth of the compiled
// circuit for the full training part and for train_subset sizes, the noise
// budget, post-selection statistics and the shots a confident decision
// needs, what L2 normalisation throws away (k-NN before and after, with
// lift and on the norm alone), centered kernel-target alignment of the
// interference and RBF kernels, exact accuracy against the best classical
// baseline with the paired corrected interval, and a Pareto-front ranking
// (assess.go). Each row's verdict reads the gap's 95% interval against an
// equivalence margin (Options.Margin, default DefaultMargin = 0.01, the
// command's -margin): on par only when the whole interval lies within
// ±margin (practical equivalence by the two one-sided tests of
// Schuirmann, J. Pharmacokinet. Biopharm. 15:657, 1987, each at level
// 0.025); beats or trails when it excludes 0 otherwise; not significantly
// different when it holds 0 but leaves the band, which is no evidence of
// equal accuracy. The closed forms behind the criteria are in math.go;
// Write renders the report files atomically (output.go). With
// Options.Device every circuit is also compiled to the device and the
// classifier simulated under its calibrated noise for the train_subset
// sizes on a sample of test instances (device.go: DefaultDeviceInstances,
// spread over the folds of the first repeat; circuits beyond the density
// matrix's 12 qubits are routed but not simulated); without a device the
// report is unchanged.
//
// Imports: bench/input, bench/spec, bench/modelkit, bench/plan,
// bench/runner (it runs small plans), bench/report, bench/export (the
// class-balanced subsets of the circuits), bench/outdir, bench/stats,
// results and the model packages (qkernel, qkernel/circuit,
// qkernel/device, qkernel/sim for the density matrix's limit). It must never import cluster, and nothing but the command
// imports it.
package assess
