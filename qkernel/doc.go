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
// # Decision rule and ties
//
// The prediction is the class with the largest P(k | acc). Classes absent
// from training have probability 0 and are never predicted. Present classes
// are scanned in class order (the dataset's class order); a later class
// replaces the best so far only if its probability s exceeds the best b by
// more than a relative 1e-12, s > b + 1e-12 |b|, so an exact or near tie goes
// to the class that comes first.
//
// # Zero acceptance
//
// p_acc is zero only when every training vector is antipodal to the test
// vector. A computed p_acc at or below its rounding-error bound
// (n + d + 2) * 2^-52 (n training rows, d features) carries no correct digit
// and is treated as zero: the prediction is the first class present in
// training, Detail.PAcc holds the computed value, and Detail.Probs is NaN for
// every present class (0 for absent ones), since P(k | acc) is undefined.
// This is the only case in which the package returns NaN, apart from Kernel
// on a zero or non-finite vector.
//
// # Errors and panics
//
// Bad input never panics. Fit and Predict return errors prefixed "qkernel: "
// that wrap one of ErrZeroVector, ErrOneClass (fewer than two classes present
// in training: the circuit would run, but its answer would be fixed, and the
// harness treats such a fold as bad input), ErrDim, ErrLabel, ErrMode or
// ErrNotFitted. A failed Fit leaves the classifier unfitted. Kernel panics on
// vectors of different lengths and Weights on labels outside [0, nClass):
// both are preconditions a caller checks, as for gonum's floats functions.
//
// # Concurrency
//
// A fitted Classifier is not modified by Predict or PredictDetail; several
// goroutines may predict with one classifier at once.
package qkernel
