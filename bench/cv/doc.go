// Package cv splits a labelled dataset into training and test parts for
// cross-validation.
//
// Every splitter returns positions 0..n-1 into the dataset's rows (not the
// dataset row ids): a Split holds Train and Test, each sorted ascending and
// disjoint, whose union is every position the splitter covers.
//
// Splitters:
//
//   - Stratified: k-fold cross-validation that keeps class proportions.
//     Every position is in exactly one test fold and Train is its
//     complement. The members of each class are shuffled and dealt round
//     robin into the folds, with one fold pointer that runs on from class
//     to class; so each fold holds floor or ceil of n_c/k members of every
//     class c, and fold sizes differ by at most one. A class with members
//     but fewer than k of them is an error (ErrTooFewPerClass, as a
//     *ClassError naming the class index); classes without members are
//     ignored.
//   - LeaveOneOut: n folds, fold i tests position i alone. No randomness.
//   - Holdout: one stratified split; each class c with n_c members puts
//     round(testFrac * n_c) of them (halves round away from zero), clamped
//     to [1, n_c - 1], into Test. A class with a single member is an error
//     (ErrTooFewPerClass).
//
// Learning curves: a Subsampler (NewSubsampler, Take; Subsample in one
// call) draws class-stratified subsamples of a training part of a given
// Size (a fraction in (0, 1] or a count). Class counts start with one row
// per class present (largest class first) and then follow the quota
// method of Balinski & Young (at most the ceiling of each quota m n_k / n,
// and never decreasing as m grows); each class's positions are shuffled
// once, so the subsamples of all sizes are nested (prefixes of one order
// per class). Bad sizes wrap ErrSize.
//
// Determinism: the splits are a function of the labels, the parameters and
// the state of the *rand.Rand passed in; the same generator state gives the
// same splits. Stratified and Holdout draw from it exactly once per non-empty
// class, in class order (one rand.Rand.Shuffle of that class's members). The
// caller derives one generator per (seed, dataset, repeat), never per
// pipeline or model, so that every pipeline and model is scored on the same
// folds and paired comparisons are valid. The splitters set Repeat to 0; the
// caller sets it.
//
// Errors wrap ErrFolds (k < 2 or k > n), ErrFraction (testFrac outside
// (0, 1)), ErrTooFewPerClass, ErrSize (a subsample size outside its range)
// or ErrLabel (a label outside [0, nClass));
// none of the functions panics on bad arguments.
package cv
