// Package baselines holds the classical classifiers fringe compares the
// interference classifier with. Every model implements Model: Fit learns
// from the rows of a matrix with class indices in [0, nClass), Predict
// returns one class index per row.
//
// Models:
//
//   - KNN: k nearest neighbours, exact (brute force or a k-d tree, chosen
//     by a documented rule, with identical answers), with Euclidean,
//     Manhattan or cosine distance and uniform or 1/d vote weights.
//     MemoryBytes estimates its peak memory (linear in the rows: no
//     distance matrix is ever held).
//   - Centroid: nearest class mean (Euclidean); a sanity baseline.
//   - LogReg: logistic regression with an L2 penalty on the coefficients
//     in scikit-learn's default forms: binary (one weight vector, C as in
//     LogisticRegression(C=...)) for two classes, multinomial for three or
//     more; fitted by L-BFGS (finished by Newton steps) to a gradient
//     tolerance. MemoryBytes estimates its peak memory (linear in the
//     rows).
//   - SVM: the support-vector machine with its kernels (its own files),
//     with a bounded kernel-row cache (CacheMiB) and shrinking; FitPath
//     fits several C on the same data sharing kernel rows and warm starts;
//     MemoryBytes estimates a fit's peak memory before it runs.
//   - TunedSVM: an SVM whose C and gamma are chosen by grid search with
//     stratified k-fold cross-validation on the training data (the folds of
//     StratifiedFolds, as scikit-learn's StratifiedKFold), then refitted.
//
// Options are plain struct fields whose zero values are sensible defaults
// (KNN: k = 5, Euclidean, uniform; LogReg: C = 1, 10000 iterations, gradient
// tolerance 1e-4, scikit-learn's default; SVM: C = 1, RBF with gamma
// "inverse-variance" 1/(d·Var(X)), tolerance 1e-3, a 200 MiB kernel cache per two-class task and
// shrinking on; TunedSVM: 5 inner folds). They are validated at Fit.
//
// Conventions shared by all models:
//
//   - Ties go to the lower index: a class vote, a distance or a decision
//     value that ties is resolved toward the lowest class index (the first
//     class in the dataset's class order), and kNN neighbours at equal
//     distance are taken in training-row order.
//   - Classes absent from the training labels are never predicted. KNN
//     accepts training labels of one class; Centroid and LogReg need two
//     (as scikit-learn), and report ErrData otherwise.
//   - Fit copies what it keeps; a fitted model may be used by several
//     goroutines for prediction, but Fit must not run concurrently with any
//     other method of the same model.
//   - Results are deterministic: no randomness, no map iteration.
//
// Errors. Fit returns an error wrapping ErrParam when an option is invalid or
// does not fit the data (k larger than the training set, C <= 0) and
// ErrData when the data are unusable: an empty matrix, a label count that
// does not match the rows, a label outside [0, nClass), a NaN or infinite
// value, fewer classes than the model needs, a zero row under the cosine
// distance. Predict returns ErrNotFitted before a successful Fit and ErrData
// for a matrix with the wrong number of columns, non-finite values or (cosine
// distance) a zero row. Error messages start with "baselines: " and name the
// model. Nothing panics on user input; the only panics are broken internal
// invariants, documented where they can occur.
//
// Plan-time checks. SVM.CheckParams rejects option values no sensible
// search reaches (bounds with their reasons at SVMMinC) and SVM.CheckData
// also rejects a kernel that is not finite or collapses to a constant on
// the data at hand; both return a *ParamError naming the option (wrapping
// ErrParam) or an ErrData error. CheckDegenerate tells, from a model's
// predictions and decision values (Decisions) over the folds of a run,
// whether it predicted one class everywhere or gave every test row the
// same decision values.
//
// LogReg does not fail when it runs out of iterations: like scikit-learn it
// returns its best point, and Converged reports false. Its probabilities and
// KNN's vote fractions are available from PredictProba (rows sum to 1).
// NaN appears only where documented: the Centroids row of an absent class,
// LogReg.GradNorm without a fitted model. LogReg's Intercept is -Inf for an
// absent class (probability 0).
//
// Speed. Products with the data go through gonum's assembly matrix-vector
// kernels (Dgemv: kernel rows, logistic-regression gradients, kNN distance
// estimates), and the exponentials of the RBF kernel and the softmax through
// expNeg, a table-driven exp for arguments <= 0 accurate to 1 ulp (math.Exp
// is also a 1-ulp routine; results may differ from it in the last bit).
// The kNN estimates only choose which rows get the direct distance; they
// never change a neighbour or a distance.
//
// The tests compare each model with scikit-learn 1.2.1 (scripts/ref_knn.py,
// scripts/ref_logreg.py, scripts/ref_svm.py, scripts/ref_svm_grid.py;
// fixtures in testdata/ record the versions).
package baselines
