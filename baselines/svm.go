package baselines

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"
)

// ErrNotConverged is returned by SVM.Fit when the solver reaches its
// iteration limit before the stopping rule holds.
var ErrNotConverged = errors.New("solver did not converge")

// tau replaces a non-positive curvature K_ii + K_jj - 2K_ij in working-set
// selection and in the two-variable update, so that a kernel that is not
// positive semidefinite (or two identical points) still gives a finite step
// (the safeguard of Fan, Chen & Lin 2005 for such kernels; LIBSVM uses the
// same value).
const tau = 1e-12

// SVM is a C-support vector classifier (C-SVC) trained by sequential minimal
// optimisation with our own solver.
//
// The dual problem of one two-class task, with labels y_i = ±1 and Gram
// matrix K, is
//
//	min_a  ½ Σ_ij a_i a_j y_i y_j K_ij − Σ_i a_i
//	s.t.   0 ≤ a_i ≤ C,  Σ_i y_i a_i = 0.
//
// The solver picks two variables per iteration with the second-order
// working-set selection of Fan, Chen & Lin, "Working set selection using
// second order information for training support vector machines", JMLR 6
// (2005) 1889–1918, as in LIBSVM, with the paper's curvature floor (1e-12)
// for kernels that are not positive semidefinite. It stops when the maximal
// violation m(a) − M(a) ≤ Tol, where m is the largest −y_t∇_t over
// I_up = {t: y_t=+1, a_t<C or y_t=−1, a_t>0} and M the smallest over
// I_low = {t: y_t=+1, a_t>0 or y_t=−1, a_t<C}.
//
// Shrinking (on unless NoShrinking) follows LIBSVM (Chang & Lin, "LIBSVM:
// a library for support vector machines", ACM TIST 2 (2011) 27, section
// 5.1): every min(n, 1000) iterations, variables at a bound that cannot
// belong to a violating pair are set aside, and the iterations work on
// the others only; before the solver stops, the gradient of the set-aside
// variables is rebuilt and the stopping rule is checked on all variables,
// so the result meets the same criterion with or without shrinking (see
// solveSMO for the rule). The two paths differ by rounding only where
// the problem is flat: decision values agree to about Tol, and a
// multiplier of the order of Tol may be zero on one path and not on the
// other.
// The bias is LIBSVM's: ρ is the mean of y_i∇_i over free support vectors
// (0 < a_i < C), or the midpoint of the feasible interval when there are
// none; the decision value is f(x) = Σ_i a_i y_i k(x_i, x) − ρ.
//
// At the stopping point every training point satisfies the KKT conditions
// within Tol: y_i f(x_i) ≥ 1 − Tol if a_i = 0, |y_i f(x_i) − 1| ≤ Tol if
// 0 < a_i < C, y_i f(x_i) ≤ 1 + Tol if a_i = C.
//
// A kernel row is one matrix-vector product over the task's points (gonum's
// assembly Dgemv) followed, for the RBF kernel, by the expanded distance
// ||x||² + ||x'||² − 2<x, x'> and one pass of exponentials (expNeg, within
// 1 ulp; see expneg.go). Kernel rows are computed on demand, over the
// active variables only when shrinking has set some aside, and kept in a
// least-recently-used cache of at most CacheMiB (default 200 MiB, as
// LIBSVM's cache_size) per two-class task: a task whose whole Gram matrix
// fits holds it (n² values, computed only where the solver asks), a
// larger one never allocates n × n and recomputes evicted rows when
// needed; the diagonal is kept apart. Memory of one two-class task of m
// rows in d features: the cache bound (at most 8m² bytes), plus m·(8d +
// 186) bytes of points, diagonal, multipliers, gradients and bookkeeping
// (see MemoryBytes for the whole fit). Tasks run one after the other, so
// one cache is alive at a time. Row memory of small tasks is recycled from
// one fit to the next.
//
// More than two classes are handled one-vs-one: one two-class task for every
// pair (a, b), a < b, of classes present in the training data, on the rows of
// those two classes (class a first, each in training order, labelled +1;
// class b labelled −1). Each task votes for a if f_ab(x) ≥ 0 and for b
// otherwise; the class with the most votes wins and a tie goes to the lowest
// class index (LIBSVM takes the first class with the maximal count too; it
// gives an exactly zero f_ab to b, we give it to a, the lower index, as
// Model requires). Classes in [0, nClass) that are absent from the training
// data take part in no task and are never predicted. The two-class case is
// the same rule with one task.
//
// Fit returns an error wrapping ErrParam for invalid options (C < 0,
// Gamma < 0, Degree < 0, Tol < 0, MaxIter < 0, CacheMiB < 0, non-finite
// values, an unknown kernel), ErrData for unusable data (fewer than two classes present,
// labels outside [0, nClass), non-finite entries, len(y) ≠ rows of X) and
// ErrNotConverged when a task does not meet the stopping rule within
// MaxIter iterations. After a failed Fit the model is unfitted.
//
// A fitted SVM may serve Predict, DecisionFunction, SupportIndices and
// GammaUsed from several goroutines at once; Fit must not run concurrently
// with any method.
type SVM struct {
	Kernel  KernelKind // zero value: RBF
	C       float64    // box constraint; 0 means 1
	Gamma   float64    // RBF and poly; > 0 explicit, 0 means "inverse-variance" = 1/(d·Var(X)), population variance over all entries (1 if that is 0)
	Degree  int        // poly; 0 means 3
	Coef0   float64    // poly: the offset c of (gamma <x, x'> + c)^degree (spec key offset)
	Tol     float64    // stopping tolerance on m(a) − M(a); 0 means 1e-3
	MaxIter int        // iteration limit per two-class task; 0 means max(10^7, 100·n)

	// CacheMiB bounds the kernel-row cache of one two-class task, in MiB;
	// 0 means DefaultCacheMiB (200, LIBSVM's and scikit-learn's
	// cache_size default). At least two rows of the task are always held.
	CacheMiB float64
	// NoShrinking turns shrinking off. The zero value (false) shrinks, as
	// LIBSVM's default shrinking = 1.
	NoShrinking bool

	fit *svmFit
}

var _ Model = (*SVM)(nil)

// svmFit is the state of a fitted SVM.
type svmFit struct {
	d       int
	nClass  int
	kern    kernel
	svIndex []int          // training indices of the support vectors, ascending
	svPts   blas64.General // their feature vectors (a copy), one per row
	svSq    []float64      // their squared norms (RBF only)
	tasks   []svmTask      // one per pair of present classes, in (a, b) order
	iter    int            // iterations over all tasks
	evals   int64          // kernel evaluations in training over all tasks
	shrinks int            // shrinking passes over all tasks
}

// svmTask is one two-class decision function f(x) = Σ coef_s k(sv_s, x) − rho,
// positive toward class a.
type svmTask struct {
	a, b int
	sv   []int     // positions in svmFit.svPts
	coef []float64 // a_s y_s
	rho  float64
}

// resolved returns the options with defaults applied, or an ErrParam error.
func (s *SVM) resolved(n int) (SVM, error) {
	o := *s
	o.fit = nil
	bad := func(format string, args ...any) (SVM, error) {
		return SVM{}, fmt.Errorf("baselines: svm: "+format+": %w", append(args, ErrParam)...)
	}
	switch {
	case !o.Kernel.valid():
		return bad("unknown kernel %d", int(o.Kernel))
	case o.C < 0 || math.IsNaN(o.C) || math.IsInf(o.C, 0):
		return bad("C = %g, want a finite value > 0", o.C)
	case o.Gamma < 0 || math.IsNaN(o.Gamma) || math.IsInf(o.Gamma, 0):
		return bad("gamma = %g, want a finite value > 0 (or 0 for inverse-variance)", o.Gamma)
	case o.Degree < 0:
		return bad("degree = %d, want >= 1", o.Degree)
	case math.IsNaN(o.Coef0) || math.IsInf(o.Coef0, 0):
		return bad("offset = %g, want a finite value", o.Coef0)
	case o.Tol < 0 || math.IsNaN(o.Tol) || math.IsInf(o.Tol, 0):
		return bad("tol = %g, want a finite value > 0", o.Tol)
	case o.MaxIter < 0:
		return bad("max iterations = %d, want >= 1", o.MaxIter)
	case o.CacheMiB < 0 || math.IsNaN(o.CacheMiB) || math.IsInf(o.CacheMiB, 0):
		return bad("cache = %g MiB, want a finite value > 0 (or 0 for %d)", o.CacheMiB, DefaultCacheMiB)
	}
	if o.C == 0 {
		o.C = 1
	}
	if o.Degree == 0 {
		o.Degree = 3
	}
	if o.Tol == 0 {
		o.Tol = 1e-3
	}
	if o.MaxIter == 0 {
		o.MaxIter = max(10_000_000, 100*n)
	}
	return o, nil
}

// Fit trains the classifier on the rows of X with class indices y in
// [0, nClass). See SVM for the method and the errors.
func (s *SVM) Fit(X *mat.Dense, y []int, nClass int) error {
	s.fit = nil
	fits, err := s.fitPath(X, y, nClass, nil)
	if err != nil {
		return err
	}
	s.fit = fits[0]
	return nil
}

// FitPath fits the SVM once for every box constraint in cs (each finite and
// > 0; s.C is ignored) on the same data, and returns one fitted model per
// value, in the order of cs, each with the options of s and its own C. It
// leaves s unchanged. Errors as Fit; cs empty or with a value ≤ 0 is an
// ErrParam error.
//
// The fits share work; each returned model equals an independent Fit with
// that C up to the solver's tolerance (both meet m(a) − M(a) ≤ Tol, so
// their decision values on training points agree to about Tol). The one
// exception is a task without a free support vector, where every ρ in an
// interval is optimal (the primal bias is not unique): a multiplier within
// rounding of a bound may count as free on one path (ρ at that point) and
// not on the other (ρ at the midpoint), so decision values may differ by
// up to half the interval's width.
//
//   - Kernel rows: each two-class task keeps one kernel cache (bounded by
//     CacheMiB) for all values of C, since the kernel does not depend on C
//     (nor, with gamma "scale", on anything but the training data); only
//     rows not yet cached are computed.
//   - Warm starts (alpha seeding, DeCoste & Wagstaff, "Alpha seeding for
//     support vector machines", KDD 2000): the values are solved in
//     increasing order, and each solve after the first starts from the
//     previous solution a scaled by one factor s, a_t ← s·a_t, where s
//     minimises the new dual objective along the ray {s·a}: with
//     q = aᵀQa and e = Σ a_t (both known at the end of the previous
//     solve), ½s²q − s·e is least at s = e/q, which is then limited to
//     s_max = C_new / max_t a_t so that the start stays in the box.
//     Feasibility: 0 ≤ a_t ≤ max a gives 0 ≤ s·a_t ≤ s_max·max a = C_new
//     (clipped to C_new against rounding, and set to exactly C_new where
//     s = s_max and a_t = max a), and Σ y_t s·a_t = s·Σ y_t a_t = 0 (up to
//     one rounding per term). s = C_new/C_old (plain scaling, exact where
//     every multiplier sits at the bound) and s = 1 (the old solution
//     unchanged) are the two usual seeds; on all 569 rows of Breast Cancer
//     (z-scored), one path over C = 0.1, 1, 10, 100 for each gamma in
//     0.001, 0.01, 0.1, 1 took 5841 iterations in all with this s, 8322
//     with plain scaling, 6710 with s = 1 and 7770 from a = 0 (measured).
//     The previous solution's v = −y∘∇ gives the new start's without a
//     kernel row: u = Σ_s a_s y_s K_ts scales with a, so v ← (1−s)·y + s·v.
func (s *SVM) FitPath(X *mat.Dense, y []int, nClass int, cs []float64) ([]*SVM, error) {
	if len(cs) == 0 {
		return nil, fmt.Errorf("baselines: svm: no values of C for the path: %w", ErrParam)
	}
	for k, c := range cs {
		if !(c > 0) || math.IsInf(c, 0) {
			return nil, fmt.Errorf("baselines: svm: path value %d: C = %g, want a finite value > 0: %w", k, c, ErrParam)
		}
	}
	fits, err := s.fitPath(X, y, nClass, cs)
	if err != nil {
		return nil, err
	}
	out := make([]*SVM, len(cs))
	for k, f := range fits {
		m := *s
		m.C = cs[k]
		m.fit = f
		out[k] = &m
	}
	return out, nil
}

// fitPath checks the input and trains one model per value of cs (nil: the
// resolved C of s).
func (s *SVM) fitPath(X *mat.Dense, y []int, nClass int, cs []float64) ([]*svmFit, error) {
	if X == nil || X.IsEmpty() {
		return nil, fmt.Errorf("baselines: svm: empty training matrix: %w", ErrData)
	}
	n, _ := X.Dims()
	o, err := s.resolved(n)
	if err != nil {
		return nil, err
	}
	if nClass < 1 {
		return nil, fmt.Errorf("baselines: svm: %d classes: %w", nClass, ErrParam)
	}
	if len(y) != n {
		return nil, fmt.Errorf("baselines: svm: %d labels for %d rows: %w", len(y), n, ErrData)
	}
	pts, err := rowsOf(X, "training")
	if err != nil {
		return nil, err
	}
	for i, c := range y {
		if c < 0 || c >= nClass {
			return nil, fmt.Errorf("baselines: svm: row %d: label %d outside [0, %d): %w", i, c, nClass, ErrData)
		}
	}
	if cs == nil {
		cs = []float64{o.C}
	}
	kern := o.kernelFor(pts, nil)
	return trainPath(&o, kern, pts, y, nil, nClass, cs, nil, true, true)
}

// kernelFor returns the kernel of the resolved options o for the training
// rows rows of pts (nil: all), resolving gamma "scale" on those rows.
func (o *SVM) kernelFor(pts [][]float64, rows []int) kernel {
	kern := kernel{kind: o.Kernel, gamma: o.Gamma, degree: o.Degree, coef0: o.Coef0}
	if kern.gamma == 0 {
		if rows == nil {
			kern.gamma = scaleGamma(pts)
		} else {
			sub := make([][]float64, len(rows))
			for k, i := range rows {
				sub[k] = pts[i]
			}
			kern.gamma = scaleGamma(sub)
		}
	}
	return kern
}

// trainPath trains one model per value of cs on the training rows rows of
// pts (nil: all rows), labels y indexed like pts, with the resolved options
// o and kernel kern. With parent (a cache over all of pts for kern) the
// tasks' kernel rows are gathered from it. warm seeds each C from the
// previous one (see FitPath). Support-vector indices of the models index
// pts. Without keepPts the models hold no copy of their support vectors
// (they can only be evaluated through kernel rows over pts, rowValues).
// Inputs are valid (checked by the callers).
func trainPath(o *SVM, kern kernel, pts [][]float64, y []int, rows []int, nClass int, cs []float64, parent *kernelCache, warm, keepPts bool) ([]*svmFit, error) {
	members := make([][]int, nClass)
	if rows == nil {
		for i, c := range y {
			members[c] = append(members[c], i)
		}
	} else {
		for _, i := range rows {
			members[y[i]] = append(members[y[i]], i)
		}
	}
	var present []int
	for c, m := range members {
		if len(m) > 0 {
			present = append(present, c)
		}
	}
	if len(present) < 2 {
		return nil, fmt.Errorf("baselines: svm: %d class(es) in the training data, need 2: %w", len(present), ErrData)
	}
	order := make([]int, len(cs)) // solve in increasing C
	for k := range order {
		order[k] = k
	}
	slices.SortStableFunc(order, func(a, b int) int { return cmp.Compare(cs[a], cs[b]) })
	budget := cacheFloats(o.CacheMiB)
	fits := make([]*svmFit, len(cs))
	for k := range fits {
		fits[k] = &svmFit{d: len(pts[0]), nClass: nClass, kern: kern}
	}
	raws := make([][]rawTask, len(cs))
	for ai, a := range present {
		for _, b := range present[ai+1:] {
			idx := slices.Concat(members[a], members[b])
			lab := make([]float64, len(idx))
			for t, i := range idx {
				lab[t] = -1
				if y[i] == a {
					lab[t] = 1
				}
			}
			var cache *kernelCache
			if parent != nil {
				cache = newKernelCacheFrom(parent, idx, budget)
			} else {
				sub := make([][]float64, len(idx))
				for t, i := range idx {
					sub[t] = pts[i]
				}
				cache = newKernelCache(kern, sub, budget)
			}
			var prev *smoResult
			for _, k := range order {
				so := smoOpts{c: cs[k], eps: o.Tol, maxIter: o.MaxIter, shrink: !o.NoShrinking}
				var alpha0 []float64
				if warm && prev != nil {
					var s float64
					alpha0, s = seedAlpha(*prev, cs[k])
					// u = Σ_s a_s y_s K_ts scales with a, and v = y − u.
					so.v0 = make([]float64, len(lab))
					for t, yt := range lab {
						so.v0[t] = (1-s)*yt + s*prev.v[t]
					}
				}
				evals := cache.evals
				res, err := solveSMO(cache, lab, alpha0, so)
				fits[k].iter += res.iter
				fits[k].shrinks += res.shrinks
				fits[k].evals += cache.evals - evals
				if err != nil {
					cache.release()
					return nil, fmt.Errorf("baselines: svm: classes %d and %d, C = %g: %w", a, b, cs[k], err)
				}
				rt := rawTask{a: a, b: b, rho: res.rho}
				for t, al := range res.alpha {
					if al > 0 {
						rt.idx = append(rt.idx, idx[t])
						rt.coef = append(rt.coef, al*lab[t])
					}
				}
				raws[k] = append(raws[k], rt)
				prev = &res
			}
			cache.release()
		}
	}
	for k, f := range fits {
		f.assemble(pts, raws[k], keepPts)
	}
	return fits, nil
}

// rawTask is a solved two-class task with support vectors named by their
// row in the training points.
type rawTask struct {
	a, b int
	idx  []int
	coef []float64
	rho  float64
}

// seedAlpha returns the warm start for C = to from the solution res for
// C = from: the solution scaled by the s that minimises the dual objective
// along the ray {s·a} inside the new box (see FitPath), and s.
func seedAlpha(res smoResult, to float64) ([]float64, float64) {
	var amax float64
	for _, a := range res.alpha {
		amax = max(amax, a)
	}
	out := make([]float64, len(res.alpha))
	if amax == 0 || res.quad <= 0 {
		return out, 0
	}
	smax := to / amax
	s := min(res.sum/res.quad, smax)
	for t, a := range res.alpha {
		switch {
		case a <= 0:
		case s == smax && a == amax:
			out[t] = to
		default:
			out[t] = min(a*s, to)
		}
	}
	return out, s
}

// assemble fills f's support vectors (with a copy of their points if
// keepPts) and tasks from the solved tasks.
func (f *svmFit) assemble(pts [][]float64, raw []rawTask, keepPts bool) {
	n := len(pts)
	isSV := make([]bool, n)
	for _, rt := range raw {
		for _, i := range rt.idx {
			isSV[i] = true
		}
	}
	pos := make([]int, n)
	var svRows [][]float64
	for i, sv := range isSV {
		if sv {
			pos[i] = len(f.svIndex)
			f.svIndex = append(f.svIndex, i)
			if keepPts {
				svRows = append(svRows, pts[i])
			}
		}
	}
	f.svPts = denseRows(svRows, f.d) // no rows if every multiplier is 0 (Tol >= 2)
	if keepPts && f.kern.kind == KernelRBF {
		f.svSq = make([]float64, len(svRows))
		for i, p := range svRows {
			f.svSq[i] = sqNorm(p)
		}
	}
	for _, rt := range raw {
		t := svmTask{a: rt.a, b: rt.b, coef: rt.coef, rho: rt.rho, sv: make([]int, len(rt.idx))}
		for k, i := range rt.idx {
			t.sv[k] = pos[i]
		}
		f.tasks = append(f.tasks, t)
	}
}

// rowsOf returns the rows of X as slices of X's own storage (the caller
// must not modify them), or an ErrData error naming the first non-finite
// entry.
func rowsOf(X *mat.Dense, what string) ([][]float64, error) {
	n, _ := X.Dims()
	if err := checkFiniteMatrix("svm", what, X); err != nil {
		return nil, err
	}
	pts := make([][]float64, n)
	for i := range n {
		p := X.RawRowView(i)
		pts[i] = p[:len(p):len(p)]
	}
	return pts, nil
}

// pairValues returns, for each row of X, the raw value f_ab of every task
// (positive toward the task's class a), row-major with len(tasks) columns.
func (s *SVM) pairValues(X *mat.Dense) ([]float64, int, error) {
	f := s.fit
	if f == nil {
		return nil, 0, fmt.Errorf("baselines: svm: %w", ErrNotFitted)
	}
	if X == nil || X.IsEmpty() {
		return nil, 0, fmt.Errorf("baselines: svm: empty matrix to predict: %w", ErrData)
	}
	r, d := X.Dims()
	if d != f.d {
		return nil, 0, fmt.Errorf("baselines: svm: %d columns to predict, trained on %d: %w", d, f.d, ErrData)
	}
	pts, err := rowsOf(X, "test")
	if err != nil {
		return nil, 0, err
	}
	nt := len(f.tasks)
	out := make([]float64, r*nt)
	kv := make([]float64, f.svPts.Rows)
	for i, x := range pts {
		f.kern.row(kv, x, sqNorm(x), f.svPts, f.svSq)
		for j, t := range f.tasks {
			var sum float64
			for k, p := range t.sv {
				sum += t.coef[k] * kv[p]
			}
			out[i*nt+j] = sum - t.rho
		}
	}
	return out, nt, nil
}

func sqNorm(x []float64) float64 {
	var s float64
	for _, v := range x {
		s += v * v
	}
	return s
}

// Predict returns the class index of every row of X by one-vs-one voting
// (see SVM). It returns ErrNotFitted before a successful Fit and an error
// wrapping ErrData if X has the wrong number of columns or a non-finite entry.
func (s *SVM) Predict(X *mat.Dense) ([]int, error) {
	vals, nt, err := s.pairValues(X)
	if err != nil {
		return nil, err
	}
	f := s.fit
	r := len(vals) / nt
	pred := make([]int, r)
	votes := make([]int, f.nClass)
	for i := range r {
		pred[i] = f.vote(vals[i*nt:(i+1)*nt], votes)
	}
	return pred, nil
}

// vote returns the one-vs-one winner for the task values vals (one per
// task, positive toward the task's class a); votes is scratch of length
// nClass.
func (f *svmFit) vote(vals []float64, votes []int) int {
	clear(votes)
	for j, t := range f.tasks {
		if vals[j] >= 0 {
			votes[t.a]++
		} else {
			votes[t.b]++
		}
	}
	best := f.tasks[0].a // a present class; absent classes have no votes
	for c, v := range votes {
		if v > votes[best] {
			best = c
		}
	}
	return best
}

// DecisionFunction returns the decision values of the rows of X, with
// scikit-learn's signs (SVC.decision_function with
// decision_function_shape="ovo"):
//
//   - nClass = 2: one column, f = −f_01, positive toward class 1 (the second
//     class), as scikit-learn's binary decision_function.
//   - nClass > 2: one column per pair (a, b), a < b, in the order (0,1),
//     (0,2), …, (0,nClass−1), (1,2), …; the value is f_ab, positive toward
//     class a (the first of the pair), as scikit-learn's "ovo" shape. A pair
//     with a class absent from the training data gives NaN.
//
// Errors as Predict.
func (s *SVM) DecisionFunction(X *mat.Dense) (*mat.Dense, error) {
	vals, nt, err := s.pairValues(X)
	if err != nil {
		return nil, err
	}
	f := s.fit
	r := len(vals) / nt
	if f.nClass == 2 {
		out := mat.NewDense(r, 1, nil)
		for i := range r {
			out.Set(i, 0, -vals[i])
		}
		return out, nil
	}
	k := f.nClass
	col := func(a, b int) int { return a*(2*k-a-1)/2 + (b - a - 1) }
	ncol := k * (k - 1) / 2
	data := make([]float64, r*ncol)
	for i := range data {
		data[i] = math.NaN()
	}
	for j, t := range f.tasks {
		c := col(t.a, t.b)
		for i := range r {
			data[i*ncol+c] = vals[i*nt+j]
		}
	}
	return mat.NewDense(r, ncol, data), nil
}

// SupportIndices returns the training-row indices of the support vectors
// (a_i > 0), ascending. With more than two classes it is the union over all
// one-vs-one tasks. It returns nil before a successful Fit.
func (s *SVM) SupportIndices() []int {
	if s.fit == nil {
		return nil
	}
	return slices.Clone(s.fit.svIndex)
}

// GammaUsed returns the kernel width of the last successful Fit: Gamma when
// it is set, otherwise the "inverse-variance" value 1/(d·Var(X_train)). The linear and
// interference kernels do not use it; it is still reported. It returns 0
// before a successful Fit.
func (s *SVM) GammaUsed() float64 {
	if s.fit == nil {
		return 0
	}
	return s.fit.kern.gamma
}
