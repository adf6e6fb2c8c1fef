// Package qkernel implements the interference (distance-based) quantum
// classifier of Schuld, Fingerhuth & Petruccione, "Implementing a
// distance-based classifier with a quantum interference circuit", EPL 119,
// 60002 (2017), arXiv:1703.10793.
//
// # Encoding
//
// Features are amplitude-encoded, and amplitude encoding normalises: Fit and
// Predict divide every row by its Euclidean norm (into copies; the caller's
// matrices are never modified). Rescaling a row by a positive factor
// therefore changes nothing, and the pipelines "raw" and "l2" give the same
// predictions (up to rounding in the last bit). A zero row, or one holding a
// NaN or an infinity, has no encoding: Fit and Predict return a *VectorError
// that names the row's position in the matrix passed in and unwraps to
// ErrZeroVector.
//
// # Exact mode
//
// For a unit test vector x and unit training vectors x_m with classes y_m and
// index-register weights w_m (sum 1; see Weights), the circuit's
// post-selected outcome probabilities are
//
//	P(a=0, c=k) = sum_{m: y_m = k} w_m ||x + x_m||^2 / 4
//	p_acc       = P(a=0) = 1/2 + 1/2 sum_m w_m <x, x_m>
//	P(k | acc)  = P(a=0, c=k) / p_acc
//
// With the published uniform weights w_m = 1/M the first line is the paper's
// 1/(4M) sum ||x + x_m||^2. Each term is w_m times the kernel
// kappa(x, x_m) = 1 - ||x - x_m||^2/4 = (1 + <x, x_m>)/2 (see Kernel).
// ModeExact evaluates these closed forms: infinite shots, no noise; Detail.Shots
// is 0. Because the sum is linear in x, Fit folds each class into
// mass_k = sum_{m in k} w_m and centre_k = sum_{m in k} w_m x_m, and
// P(a=0, c=k) = (mass_k + <x, centre_k>)/2: prediction costs O(C d) per test
// row, whatever the training-set size. (It also shows that the exact
// classifier is linear on the unit sphere: a weighted nearest-centroid rule,
// the classical twin the harness compares against.)
//
// # Weights
//
// Classifier.Balance false gives the published uniform weights 1/M, which
// make a class's total probability grow with its size: with nearly parallel
// vectors every kernel is close to 1 and the largest class wins. Balance true
// gives w_m = 1/(C M_k) (C classes present in training, M_k rows in class k):
// every class carries mass 1/C and the bias is gone. On the circuit the
// weights are the squared amplitudes of the index register.
//
// # Modes
//
// Classifier.Mode selects one of four ways of running the same classifier.
// Every mode computes the closed form above on the row's training set (the
// whole set or its subset, see below) and reports that decision in
// Detail.Exact, so a harness can count the decisions that shots and noise
// changed.
//
//   - ModeExact: the closed form; infinite shots, no noise.
//   - ModeCircuit: for every test row the circuit of package circuit is
//     compiled (Compile, with the same weights) and simulated without noise
//     on a state vector, each uniformly controlled rotation in one pass
//     (sim.Simulate with sim.StateVector). It reproduces ModeExact to
//     rounding (within 1e-12; tested on the first fold of every embedded
//     dataset) and exists to prove that the circuit computes the closed
//     form; it costs O(2^n) per gate on n qubits.
//   - ModeShots: Classifier.Shots > 0 measurement shots drawn from the
//     closed-form distribution P(a, k) (which the circuit reproduces). One
//     multinomial sample (sim.SampleCounts) over the accepted outcomes
//     (a = 0, k) and a single merged "rejected" outcome; merging categories
//     leaves the law of the others unchanged, and the cost does not grow
//     with the number of shots. Only a = 0 shots count:
//     Detail.PAcc = N_acc / Shots, Detail.Probs[k] = count_k / N_acc,
//     Detail.Shots = N_acc.
//   - ModeNoisy: the outcome distribution under noise, then Shots shots as
//     in ModeShots if Shots > 0, else the noisy probabilities exactly
//     (Detail.Shots 0). See Noise.
//
// # Noise
//
// In ModeNoisy the distribution is built in three steps:
//
//  1. Gate level. If Classifier.Noise has gate noise (depolarizing,
//     amplitude or phase damping), or Classifier.Method names a simulator,
//     the compiled circuit is simulated gate by gate (sim.Simulate; every
//     uniformly controlled rotation decomposed into RY and CNOT, each with
//     its noise; see sim.NoiseModel). Otherwise the closed form is used,
//     which is fast and exact.
//  2. Channels, in closed form on the distribution: ancilla dephasing
//     (phase damping of the ancilla just before the final Hadamard), then
//     global depolarizing (the whole register just before measurement).
//     The two commute (each maps the uniform distribution to itself). After
//     gate-level noise they act as extra noise at the end of the circuit.
//  3. Readout assignment error on every measured bit, from Noise.Readout or
//     Channels.Readout (they are the same model; Validate rejects setting
//     both).
//
// With Classifier.Device set (package qkernel/device), step 1 instead
// compiles each row's circuit to the described device (placement, SABRE
// routing, native gates) and simulates it under the device's calibrated
// noise: depolarizing per gate from its error rate, thermal relaxation
// from T1 and T2 during gates and idling, readout errors per qubit; the
// density matrix up to sim.MaxDensityQubits qubits, trajectories above.
// Noise and Channels must then be zero (Validate), and the circuit must fit
// the device's largest connected part (Fit: ErrTooLarge). Readout
// mitigation on a device takes, row by row, the confusion matrices of the
// physical qubits that routing left the ancilla and class register on
// (Mitigation.Physical, or the device's own readout errors). Without a
// device nothing changes.
//
// This order is checked against a density-matrix run of the same physics
// (dephasing before the final H, depolarizing after it, readout channels on
// the measured qubits). Noise can give probability to classes absent from
// training and to class-register values k >= C (unused when C is not a
// power of two). Such values are accepted outcomes (they count in p_acc and
// N_acc) that belong to no class, so under noise Detail.Probs may sum to
// less than 1; absent classes are reported but never predicted.
//
// # Unused class codes
//
// With C classes the class register has 2^q >= C values; under noise the
// values k >= C receive probability too. They are accepted outcomes (they
// count in p_acc and N_acc) that name no class. Detail.Probs are NOT
// renormalised over the valid codes (P(k | acc) = P(a=0, k) / P(a=0) as
// defined above); Detail.Unused reports the rest, P(a=0, k >= C) / P(a=0),
// so sum(Probs) + Unused = 1 whenever something is accepted.
//
// # Readout mitigation
//
// Classifier.Mitigate with Readout set inverts the readout confusion of the
// measured bits (ancilla and class register) before the decision (see
// MitigateReadout: the tensor product of the per-qubit inverses applied
// bit by bit, then the Euclidean projection onto the probability simplex,
// Wang & Carreira-Perpiñán 2013). In ModeNoisy the confusion matrices
// default to the model's own readout error; with shots the decision needs
// every joint count, so the merged rejected shots are split over the
// a = 1 outcomes by a second multinomial draw after the main one (the
// unmitigated draws are unchanged). Predict then returns the mitigated
// decisions; Detail's PAcc, Probs and Unused are the mitigated ones and
// Detail.Raw holds the unmitigated decision, so a harness can report both.
// PredictCounts mitigates imported counts with the confusion matrices the
// caller gives (ConfusionFromCounts turns calibration counts into them),
// per measured bit, or per physical qubit of the device the circuits were
// compiled for (Mitigation.Device: each row's circuit is compiled again
// to find the qubits that measured it).
//
// # Qubits and simulators
//
// The circuit of M training vectors of d features and C classes has
// 1 + ceil(log2 M) + max(1, ceil(log2 d)) + ceil(log2 C) qubits (M is the
// subset size with TrainSubset). ModeCircuit needs at most
// sim.MaxStateQubits (26). A gate-level ModeNoisy run uses
// Classifier.Method (spec key simulator): sim.Auto picks the density
// matrix (exact) up to sim.MaxDensityQubits (12) qubits and Monte Carlo
// trajectories (Classifier.Trajectories, default
// sim.DefaultTrajectories) up to 26; sim.DensityMatrix, sim.Trajectories and
// sim.StateVector (noiseless only) force a simulator. Fit rejects a circuit
// beyond the chosen simulator's limit with an error wrapping ErrTooLarge
// that names the qubit count, the limit and the way out, e.g.
//
//	circuit needs 16 qubits; the density-matrix simulator holds at most 12;
//	set train_subset or simulator = "trajectories"
//
// The density matrix costs O(4^n) per gate, so TrainSubset is the practical
// way to run gate-level noise on real data. MemoryBytes estimates a fit
// and prediction's peak memory before they run (for a planner): linear in
// the rows in ModeExact and ModeShots, 4^a bytes for the density matrix on
// the a = 1 + index + data qubits active while the data register is loaded
// and 2^n for state vectors.
//
// # Training subsets
//
// Classifier.TrainSubset K > 0 gives every test row its own random subset of
// K training rows, drawn without replacement, class by class: the K rows
// are allotted one per present class in class order, round after round,
// skipping exhausted classes (as equal as possible, the remainder to the
// earlier classes, a small class's shortfall spread over the others). K
// must lie between the number of classes present and the training-set
// size, else Fit returns an error wrapping ErrSubset. The weights (Balance)
// are those of the subset. K equal to the training-set size is the whole
// set.
//
// # Randomness
//
// Every random draw of a test row comes from its own generator, a PCG
// seeded from (Classifier.Seed, i) by a hash, where i is the row's 0-based
// position in the matrix passed to Predict or PredictDetail. It draws, in
// this order, the training subset, the trajectory jumps and the shots. So
// results are identical when Predict is called again, and a row's draws do
// not depend on the other rows or on scheduling; but splitting the same
// rows into other batches changes their positions and hence their draws
// (the harness passes a whole test fold at once). Because the subset comes
// first, every mode with the same Seed and TrainSubset uses the same subset
// for the same row: exact, shots and noisy runs are paired.
//
// # Decision rule and ties
//
// The prediction is the present class with the largest P(k | acc) (exact
// or noisy probabilities) or the most accepted shots (finite shots).
// Classes absent from training are never predicted. Present classes are
// scanned in class order (the dataset's class order). With probabilities, a
// later class replaces the best so far only if its probability s exceeds
// the best b by more than a relative 1e-12, s > b + 1e-12 |b|, so an exact
// or near tie goes to the class that comes first. With counts, ties are
// exact integer ties, and they too go to the class that comes first.
//
// # Zero acceptance
//
// With finite shots, N_acc = 0 (no shot with a = 0) predicts the first
// class present in training; Detail.PAcc and Detail.Shots are 0 and
// Detail.Probs is NaN for every present class (0 for absent ones).
//
// With probabilities, p_acc is zero only when every training vector is
// antipodal to the test vector. A computed p_acc at or below its
// rounding-error bound carries no correct digit and is treated as zero,
// with the same rule (Detail.PAcc keeps the computed value). The bound is
// (M + d + 2) * 2^-52 for the closed form (M training vectors, d features);
// a simulated distribution adds (operations + 2^n) * 2^-52. These are the
// only cases in which the package returns NaN, apart from Kernel on a zero
// or non-finite vector.
//
// # Errors and panics
//
// Bad input never panics. Validate checks the options alone and returns an
// *OptionError naming the option's key (wrapping ErrOption, or ErrMode for
// an unknown mode): probabilities outside [0, 1], Shots < 0 or missing in
// ModeShots, TrainSubset < 0, and options set in a mode that ignores them
// (Shots in ModeExact and ModeCircuit; Noise, Channels, Method and
// Trajectories outside ModeNoisy). Fit calls it, then returns errors
// prefixed "qkernel: " that wrap one of ErrZeroVector, ErrOneClass (fewer
// than two classes present in training: the circuit would run, but its
// answer would be fixed, and the harness treats such a fold as bad input),
// ErrDim, ErrLabel, ErrSubset or ErrTooLarge. Predict checks the options
// again (they may have changed since Fit) and returns ErrNotFitted before a
// successful Fit. A failed Fit leaves the classifier unfitted. Kernel
// panics on vectors of different lengths and Weights on labels outside
// [0, nClass): both are preconditions a caller checks, as for gonum's
// floats functions.
//
// # Shared state preparation
//
// The circuits of test rows with the same training set differ only where
// the data register is loaded. A gate-level ModeNoisy run on the density
// matrix therefore simulates every row through sim.Shared: the common
// first operations (ancilla Hadamard, index register) forwards once per
// training set, the common last operations (class register, final
// Hadamard) backwards once per training set as observables on the
// ancilla, index and class qubits, and per row only the data register. A
// Predict call keeps the prepared parts of the training sets it meets
// (with TrainSubset, subsets with the same labels in the same order share
// them: the common case when the training rows are sorted by class). Every
// such row takes this path, shared or not, so its result does not depend
// on the other rows; it agrees with a forward simulation of the whole
// circuit within 1e-12 (tested), not to the last bit (BenchmarkShared:
// about 3x faster).
//
// # Cancellation
//
// PredictContext and PredictDetailContext stop when their context is
// cancelled: between rows, and inside every simulation about every 10^5
// amplitudes of work (between gates; the shared parts too). They return
// ctx.Err() unwrapped and no predictions. Predict and PredictDetail run
// with context.Background().
//
// # Cost
//
// Per test row: ModeExact O(C d) on the whole set (Fit folds each class into
// a centroid) or O(K d) with a subset; ModeShots adds O(2^q) for the sample,
// independent of the number of shots; ModeCircuit and gate-level ModeNoisy
// cost what the simulator costs (compile O(M d), state vector O(2^n) per
// operation, density matrix O(4^n) per elementary gate, trajectories
// O(T 2^n) per elementary gate; n counts the qubits touched so far, and
// the density matrix skips the class register's gates, see above).
//
// EstimateCost gives the same costs before any data is loaded: for a
// configuration and the sizes of a task (training rows, features, classes,
// test rows) it returns the qubits, the gate counts, the simulator and the
// estimated time under a sim.CostModel calibrated on the machine
// (sim.Calibrate, about 10 ms), within a small factor of a measured run
// (tested at two sizes).
//
// # Concurrency
//
// A fitted Classifier is not modified by Predict or PredictDetail; several
// goroutines may predict with one classifier at once (each call has its own
// scratch space and generators). Fit must not run concurrently with anything
// else on the same value.
package qkernel
