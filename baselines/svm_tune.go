package baselines

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// TunedSVM is an SVM whose C and gamma are chosen on the training data by
// grid search with stratified k-fold cross-validation, then refitted on all
// of it with the best pair: what scikit-learn 1.2.1 computes with
//
//	GridSearchCV(SVC(...), {"C": Cs, "gamma": Gammas}, cv=StratifiedKFold(Folds)).fit(X, y)
//
// (accuracy score, refit = True). The folds are those of StratifiedFolds.
// Each grid point's score is the mean over the folds of the accuracy on
// the fold's test rows; the best point is the first with the highest mean
// in the order (C_1, gamma_1), (C_1, gamma_2), …, (C_2, gamma_1), … (C
// outer: GridSearchCV's parameter order, keys sorted, with its first-ranked
// candidate winning ties).
//
// Work shared between the grid's fits (unless NoReuse):
//
//   - for each numeric gamma, one kernel cache over all training rows (the
//     parent, bounded by SVM.CacheMiB) serves every fold: the fold's
//     two-class tasks gather their rows from the parent's rows, and the test
//     rows' decision values are read from the parent's rows as well, so a
//     kernel value is computed at most once per gamma (while the parent
//     holds its row);
//   - within a fold, all values of C are fitted by SVM.FitPath (one cache per
//     task for every C, warm starts);
//   - kernels that do not use gamma (linear, interference) are fitted for
//     the first gamma only and the scores copied to the others.
//
// Gamma 0 ("scale") depends on each fold's training rows, so it gets no
// parent (each fold's tasks compute their own rows; C values still share
// them). NoReuse fits every grid point on every fold by an independent
// SVM.Fit and Predict, as GridSearchCV does; the scores agree with the
// shared fits up to the solver's tolerance (a test row whose decision value
// is within about Tol of 0 may flip).
//
// Memory: with reuse, a parent cache and one task cache are alive at once
// (two bounds of CacheMiB), plus the len(Cs) models of one fold's path; see
// MemoryBytes.
//
// Fit returns an error wrapping ErrParam for an invalid grid (a C that is
// not finite and > 0, a gamma that is negative or not finite, Folds = 1 or
// negative or above the number of rows, every class smaller than Folds) or
// invalid SVM options, and the errors of SVM.Fit otherwise (one class in a
// fold's training rows, ErrNotConverged). A fitted TunedSVM may serve
// Predict and DecisionFunction from several goroutines at once.
type TunedSVM struct {
	SVM     SVM       // kernel and the other options; C and Gamma come from the grid
	Cs      []float64 // values of C; empty means {1}
	Gammas  []float64 // values of gamma (0 = "scale"); empty means {0}
	Folds   int       // inner folds; 0 means 5
	NoReuse bool      // fit every grid point and fold independently
	// FoldTests, if set, are the inner folds' test rows (positions into
	// the rows given to Fit, each row in exactly one fold) instead of
	// StratifiedFolds(y, Folds); Folds is then len(FoldTests).
	FoldTests [][]int

	fit *tunedFit
}

var _ Model = (*TunedSVM)(nil)

type tunedFit struct {
	model    *SVM
	c, gamma float64
	scores   [][]float64 // [C][gamma], mean fold accuracy
}

// Fit runs the grid search on the rows of X with class indices y in
// [0, nClass) and refits the best grid point on all rows.
func (m *TunedSVM) Fit(X *mat.Dense, y []int, nClass int) error {
	m.fit = nil
	cs, gammas, folds := m.grid()
	for k, c := range cs {
		if !(c > 0) || math.IsInf(c, 0) {
			return fmt.Errorf("baselines: tuned svm: C value %d = %g, want a finite value > 0: %w", k, c, ErrParam)
		}
	}
	for k, g := range gammas {
		if g < 0 || math.IsNaN(g) || math.IsInf(g, 0) {
			return fmt.Errorf("baselines: tuned svm: gamma value %d = %g, want a finite value > 0 (or 0 for scale): %w", k, g, ErrParam)
		}
	}
	if X == nil || X.IsEmpty() {
		return fmt.Errorf("baselines: tuned svm: empty training matrix: %w", ErrData)
	}
	n, _ := X.Dims()
	if len(y) != n {
		return fmt.Errorf("baselines: tuned svm: %d labels for %d rows: %w", len(y), n, ErrData)
	}
	if nClass < 1 {
		return fmt.Errorf("baselines: tuned svm: %d classes: %w", nClass, ErrParam)
	}
	for i, c := range y {
		if c < 0 || c >= nClass {
			return fmt.Errorf("baselines: tuned svm: row %d: label %d outside [0, %d): %w", i, c, nClass, ErrData)
		}
	}
	var tests [][]int
	if m.FoldTests != nil {
		tests, folds = m.FoldTests, len(m.FoldTests)
		seen := make([]bool, n)
		for f, test := range tests {
			if len(test) == 0 {
				return fmt.Errorf("baselines: tuned svm: inner fold %d has no test rows: %w", f, ErrParam)
			}
			for _, i := range test {
				if i < 0 || i >= n || seen[i] {
					return fmt.Errorf("baselines: tuned svm: inner fold %d: row %d out of range or in two folds: %w", f, i, ErrParam)
				}
				seen[i] = true
			}
		}
	} else {
		var err error
		if tests, err = StratifiedFolds(y, folds); err != nil {
			return fmt.Errorf("baselines: tuned svm: %w", err)
		}
	}
	base := m.SVM
	base.C, base.Gamma = 1, 0
	o, err := base.resolved(n)
	if err != nil {
		return err
	}
	pts, err := rowsOf(X, "training")
	if err != nil {
		return err
	}
	scores := make([][]float64, len(cs))
	for k := range scores {
		scores[k] = make([]float64, len(gammas))
	}
	trains := make([][]int, folds)
	for f, test := range tests {
		trains[f] = complement(n, test)
	}
	usesGamma := o.Kernel == KernelRBF || o.Kernel == KernelPoly
	for gi, g := range gammas {
		if gi > 0 && !usesGamma {
			for ci := range cs {
				scores[ci][gi] = scores[ci][0]
			}
			continue
		}
		acc := make([][]float64, len(cs)) // [C][fold]
		for ci := range acc {
			acc[ci] = make([]float64, folds)
		}
		og := o
		og.Gamma = g
		switch {
		case m.NoReuse:
			err = scoreIndependent(&og, X, y, nClass, cs, tests, trains, acc)
		case g == 0:
			err = scoreScale(&og, pts, y, nClass, cs, tests, trains, acc)
		default:
			err = scoreShared(&og, pts, y, nClass, cs, tests, trains, acc)
		}
		if err != nil {
			return fmt.Errorf("baselines: tuned svm: gamma %g: %w", g, err)
		}
		for ci := range cs {
			var sum float64
			for _, a := range acc[ci] {
				sum += a
			}
			scores[ci][gi] = sum / float64(folds)
		}
	}
	bc, bg := 0, 0
	for ci := range cs {
		for gi := range gammas {
			if scores[ci][gi] > scores[bc][bg] {
				bc, bg = ci, gi
			}
		}
	}
	best := m.SVM
	best.C, best.Gamma = cs[bc], gammas[bg]
	if err := best.Fit(X, y, nClass); err != nil {
		return fmt.Errorf("baselines: tuned svm: refit with C = %g, gamma = %g: %w", best.C, best.Gamma, err)
	}
	m.fit = &tunedFit{model: &best, c: cs[bc], gamma: gammas[bg], scores: scores}
	return nil
}

// grid returns the grid with defaults applied.
func (m *TunedSVM) grid() (cs, gammas []float64, folds int) {
	cs, gammas, folds = m.Cs, m.Gammas, m.Folds
	if len(cs) == 0 {
		cs = []float64{1}
	}
	if len(gammas) == 0 {
		gammas = []float64{0}
	}
	if folds == 0 {
		folds = 5
	}
	return cs, gammas, folds
}

// complement returns the rows of [0, n) not in test (ascending, test
// ascending).
func complement(n int, test []int) []int {
	out := make([]int, 0, n-len(test))
	k := 0
	for i := range n {
		if k < len(test) && test[k] == i {
			k++
			continue
		}
		out = append(out, i)
	}
	return out
}

// scoreShared fills acc[ci][f] for a numeric gamma with one parent cache
// over all rows (see TunedSVM).
func scoreShared(o *SVM, pts [][]float64, y []int, nClass int, cs []float64, tests, trains [][]int, acc [][]float64) error {
	kern := o.kernelFor(pts, nil)
	budget := cacheFloats(o.CacheMiB)
	parent := newKernelCache(kern, pts, budget)
	defer parent.release()
	n := len(pts)
	for f, train := range trains {
		fits, err := trainPath(o, kern, pts, y, train, nClass, cs, parent, true, false)
		if err != nil {
			return fmt.Errorf("fold %d: %w", f, err)
		}
		correct := make([]int, len(cs))
		var vals []float64
		votes := make([]int, nClass)
		for _, t := range tests[f] {
			krow := parent.row(t, n) // K(x_t, x_s) for every training row s
			for ci, fit := range fits {
				vals = fit.rowValues(vals[:0], krow)
				if fit.vote(vals, votes) == y[t] {
					correct[ci]++
				}
			}
		}
		for ci := range cs {
			acc[ci][f] = float64(correct[ci]) / float64(len(tests[f]))
		}
	}
	return nil
}

// rowValues appends the task values f_ab(x) of a point x given its kernel
// values krow[s] = k(x, x_s) for every row s of the training points (the
// indices of f.svIndex).
func (f *svmFit) rowValues(dst, krow []float64) []float64 {
	for _, t := range f.tasks {
		var sum float64
		for k, p := range t.sv {
			sum += t.coef[k] * krow[f.svIndex[p]]
		}
		dst = append(dst, sum-t.rho)
	}
	return dst
}

// scoreScale fills acc for gamma "scale": each fold's kernel has its own
// gamma, so the fold's tasks compute their own rows (shared across C).
func scoreScale(o *SVM, pts [][]float64, y []int, nClass int, cs []float64, tests, trains [][]int, acc [][]float64) error {
	for f, train := range trains {
		kern := o.kernelFor(pts, train)
		fits, err := trainPath(o, kern, pts, y, train, nClass, cs, nil, true, true)
		if err != nil {
			return fmt.Errorf("fold %d: %w", f, err)
		}
		test := tests[f]
		T := make([][]float64, len(test))
		for k, t := range test {
			T[k] = pts[t]
		}
		for ci, fit := range fits {
			pred := fit.predictRows(T)
			var correct int
			for k, t := range test {
				if pred[k] == y[t] {
					correct++
				}
			}
			acc[ci][f] = float64(correct) / float64(len(test))
		}
	}
	return nil
}

// predictRows predicts the rows pts (finite, of the fitted width).
func (f *svmFit) predictRows(pts [][]float64) []int {
	kv := make([]float64, f.svPts.Rows)
	vals := make([]float64, len(f.tasks))
	votes := make([]int, f.nClass)
	out := make([]int, len(pts))
	for i, x := range pts {
		f.kern.row(kv, x, sqNorm(x), f.svPts, f.svSq)
		for j, t := range f.tasks {
			var sum float64
			for k, p := range t.sv {
				sum += t.coef[k] * kv[p]
			}
			vals[j] = sum - t.rho
		}
		out[i] = f.vote(vals, votes)
	}
	return out
}

// scoreIndependent fills acc by one SVM.Fit and Predict per grid point and
// fold.
func scoreIndependent(o *SVM, X *mat.Dense, y []int, nClass int, cs []float64, tests, trains [][]int, acc [][]float64) error {
	for f, train := range trains {
		Xtr, ytr := subRows(X, y, train)
		Xte, yte := subRows(X, y, tests[f])
		for ci, c := range cs {
			s := *o
			s.C = c
			if err := s.Fit(Xtr, ytr, nClass); err != nil {
				return fmt.Errorf("fold %d, C = %g: %w", f, c, err)
			}
			pred, err := s.Predict(Xte)
			if err != nil {
				return err
			}
			var correct int
			for k, p := range pred {
				if p == yte[k] {
					correct++
				}
			}
			acc[ci][f] = float64(correct) / float64(len(yte))
		}
	}
	return nil
}

// subRows copies the rows of X and y listed in rows.
func subRows(X *mat.Dense, y []int, rows []int) (*mat.Dense, []int) {
	_, d := X.Dims()
	out := mat.NewDense(len(rows), d, nil)
	yy := make([]int, len(rows))
	for k, i := range rows {
		out.SetRow(k, X.RawRowView(i))
		yy[k] = y[i]
	}
	return out, yy
}

// Predict returns the refitted model's predictions (see SVM.Predict). It
// returns ErrNotFitted before a successful Fit.
func (m *TunedSVM) Predict(X *mat.Dense) ([]int, error) {
	if m.fit == nil {
		return nil, fmt.Errorf("baselines: tuned svm: %w", ErrNotFitted)
	}
	return m.fit.model.Predict(X)
}

// DecisionFunction returns the refitted model's decision values (see
// SVM.DecisionFunction).
func (m *TunedSVM) DecisionFunction(X *mat.Dense) (*mat.Dense, error) {
	if m.fit == nil {
		return nil, fmt.Errorf("baselines: tuned svm: %w", ErrNotFitted)
	}
	return m.fit.model.DecisionFunction(X)
}

// Best returns the chosen C and gamma (0 for "scale"; the refitted model's
// GammaUsed gives the value); zeros before a successful Fit.
func (m *TunedSVM) Best() (c, gamma float64) {
	if m.fit == nil {
		return 0, 0
	}
	return m.fit.c, m.fit.gamma
}

// Scores returns the mean cross-validated accuracy of every grid point,
// indexed [C][gamma] in the order of Cs and Gammas (with defaults
// applied); nil before a successful Fit.
func (m *TunedSVM) Scores() [][]float64 {
	if m.fit == nil {
		return nil
	}
	out := make([][]float64, len(m.fit.scores))
	for k, r := range m.fit.scores {
		out[k] = slices.Clone(r)
	}
	return out
}

// Model returns the refitted SVM (nil before a successful Fit). It is
// shared with m: do not Fit it.
func (m *TunedSVM) Model() *SVM {
	if m.fit == nil {
		return nil
	}
	return m.fit.model
}

// MemoryBytes returns an estimate of the peak memory of Fit for nTrain rows
// of d features in nClass classes (see SVM.MemoryBytes): with reuse, the
// parent cache over all rows and a task cache are alive together, and the
// path holds one model per C; the refit is an SVM.Fit.
func (m *TunedSVM) MemoryBytes(nTrain, d, nClass int) (int64, error) {
	one, err := m.SVM.MemoryBytes(nTrain, d, nClass)
	if err != nil {
		return 0, err
	}
	if m.NoReuse {
		return one, nil
	}
	cs, _, _ := m.grid()
	o, err := m.SVM.resolved(nTrain)
	if err != nil {
		return 0, err
	}
	n := int64(nTrain)
	parent := min(8*n*n, 8*int64(max(cacheFloats(o.CacheMiB), 2*nTrain)))
	models := int64(len(cs)-1) * (n*(8*int64(d)+fitBytesPerRow) + n*int64(max(nClass-1, 1))*coefBytes)
	return one + 2*(parent+models), nil
}

// StratifiedFolds returns the test rows (ascending) of each of k folds of
// the labels y, as scikit-learn 1.2.1's StratifiedKFold(n_splits=k)
// without shuffling assigns them: the classes are numbered in order of
// first appearance, the rows sorted by that number are dealt round robin
// to the folds to fix how many rows of each class every fold gets, and
// each class then fills the folds in row order (its first rows go to fold
// 0, and so on). TunedSVM uses these folds.
//
// It returns an error wrapping ErrParam when k < 2, k exceeds len(y), or
// every class has fewer than k rows (scikit-learn refuses these too; a
// class smaller than k only leaves some folds without it).
func StratifiedFolds(y []int, k int) ([][]int, error) {
	n := len(y)
	if k < 2 || k > n {
		return nil, fmt.Errorf("baselines: %d folds for %d rows, want 2 to %d: %w", k, n, n, ErrParam)
	}
	code := map[int]int{} // label -> order of first appearance
	var counts []int
	enc := make([]int, n)
	for i, c := range y {
		e, ok := code[c]
		if !ok {
			e = len(counts)
			code[c] = e
			counts = append(counts, 0)
		}
		enc[i] = e
		counts[e]++
	}
	if slices.Max(counts) < k {
		return nil, fmt.Errorf("baselines: %d folds, but no class has that many rows: %w", k, ErrParam)
	}
	// alloc[f][e]: rows of class e in fold f, from dealing the rows sorted
	// by class round robin.
	alloc := make([][]int, k)
	for f := range alloc {
		alloc[f] = make([]int, len(counts))
	}
	pos := 0
	for e, cnt := range counts {
		for range cnt {
			alloc[pos%k][e]++
			pos++
		}
	}
	tests := make([][]int, k)
	fill := make([]int, len(counts)) // next fold of each class
	left := make([]int, len(counts)) // rows of the class still due to that fold
	for e := range counts {
		for fill[e] < k && alloc[fill[e]][e] == 0 {
			fill[e]++
		}
		if fill[e] < k {
			left[e] = alloc[fill[e]][e]
		}
	}
	for i, e := range enc {
		f := fill[e]
		tests[f] = append(tests[f], i)
		left[e]--
		for left[e] == 0 && fill[e] < k {
			fill[e]++
			if fill[e] < k {
				left[e] = alloc[fill[e]][e]
			}
		}
	}
	return tests, nil
}
