package baselines

import (
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
// I_low = {t: y_t=+1, a_t>0 or y_t=−1, a_t<C}. There is no shrinking:
// LIBSVM (svm.cpp, Solver::Solve) first shrinks after min(n, 1000)
// iterations, later than these solves usually end on data of a few hundred
// rows (e.g. 186 iterations on 512 rows of Breast Cancer), so it would
// not change their work.
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
// 1 ulp; see expneg.go). Kernel rows are computed on demand and kept: a
// task of at most 4096 training rows may hold its whole Gram matrix (at
// most 128 MiB, usually far less because only rows the solver touches are
// computed); beyond that the most recently used rows that fit in 128 MiB
// are kept and the others recomputed when needed. Row memory is recycled
// from one fit to the next.
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
// Gamma < 0, Degree < 0, Tol < 0, MaxIter < 0, non-finite values, an
// unknown kernel), ErrData for unusable data (fewer than two classes present,
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
	Gamma   float64    // RBF and poly; > 0 explicit, 0 means "scale" = 1/(d·Var(X)), population variance over all entries (1 if that is 0)
	Degree  int        // poly; 0 means 3
	Coef0   float64    // poly
	Tol     float64    // stopping tolerance on m(a) − M(a); 0 means 1e-3
	MaxIter int        // iteration limit per two-class task; 0 means max(10^7, 100·n)

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
		return bad("gamma = %g, want a finite value > 0 (or 0 for scale)", o.Gamma)
	case o.Degree < 0:
		return bad("degree = %d, want >= 1", o.Degree)
	case math.IsNaN(o.Coef0) || math.IsInf(o.Coef0, 0):
		return bad("coef0 = %g, want a finite value", o.Coef0)
	case o.Tol < 0 || math.IsNaN(o.Tol) || math.IsInf(o.Tol, 0):
		return bad("tol = %g, want a finite value > 0", o.Tol)
	case o.MaxIter < 0:
		return bad("max iterations = %d, want >= 1", o.MaxIter)
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
	if X == nil || X.IsEmpty() {
		return fmt.Errorf("baselines: svm: empty training matrix: %w", ErrData)
	}
	n, d := X.Dims()
	o, err := s.resolved(n)
	if err != nil {
		return err
	}
	if nClass < 1 {
		return fmt.Errorf("baselines: svm: %d classes: %w", nClass, ErrParam)
	}
	if len(y) != n {
		return fmt.Errorf("baselines: svm: %d labels for %d rows: %w", len(y), n, ErrData)
	}
	pts, err := rowsOf(X, "training")
	if err != nil {
		return err
	}
	members := make([][]int, nClass)
	for i, c := range y {
		if c < 0 || c >= nClass {
			return fmt.Errorf("baselines: svm: row %d: label %d outside [0, %d): %w", i, c, nClass, ErrData)
		}
		members[c] = append(members[c], i)
	}
	var present []int
	for c, m := range members {
		if len(m) > 0 {
			present = append(present, c)
		}
	}
	if len(present) < 2 {
		return fmt.Errorf("baselines: svm: %d class(es) in the training data, need 2: %w", len(present), ErrData)
	}

	kern := kernel{kind: o.Kernel, gamma: o.Gamma, degree: o.Degree, coef0: o.Coef0}
	if kern.gamma == 0 {
		kern.gamma = scaleGamma(pts)
	}
	f := &svmFit{d: d, nClass: nClass, kern: kern}
	isSV := make([]bool, n)
	type rawTask struct {
		a, b int
		idx  []int // training indices of the support vectors
		coef []float64
		rho  float64
	}
	var raw []rawTask
	for ai, a := range present {
		for _, b := range present[ai+1:] {
			idx := slices.Concat(members[a], members[b])
			sub := make([][]float64, len(idx))
			lab := make([]float64, len(idx))
			for t, i := range idx {
				sub[t] = pts[i]
				lab[t] = -1
				if y[i] == a {
					lab[t] = 1
				}
			}
			cache := newKernelCache(kern, sub, 0)
			res, err := solveSMO(cache, lab, o.C, o.Tol, o.MaxIter)
			cache.release()
			f.iter += res.iter
			f.evals += cache.evals
			if err != nil {
				return fmt.Errorf("baselines: svm: classes %d and %d: %w", a, b, err)
			}
			rt := rawTask{a: a, b: b, rho: res.rho}
			for t, al := range res.alpha {
				if al > 0 {
					rt.idx = append(rt.idx, idx[t])
					rt.coef = append(rt.coef, al*lab[t])
					isSV[idx[t]] = true
				}
			}
			raw = append(raw, rt)
		}
	}
	pos := make([]int, n)
	var svRows [][]float64
	for i, sv := range isSV {
		if sv {
			pos[i] = len(f.svIndex)
			f.svIndex = append(f.svIndex, i)
			svRows = append(svRows, pts[i])
		}
	}
	f.svPts = denseRows(svRows, d) // no rows if every multiplier is 0 (Tol >= 2)
	if kern.kind == KernelRBF {
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
	s.fit = f
	return nil
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
		clear(votes)
		for j, t := range f.tasks {
			if vals[i*nt+j] >= 0 {
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
		pred[i] = best
	}
	return pred, nil
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
// it is set, otherwise the "scale" value 1/(d·Var(X_train)). The linear and
// interference kernels do not use it; it is still reported. It returns 0
// before a successful Fit.
func (s *SVM) GammaUsed() float64 {
	if s.fit == nil {
		return 0
	}
	return s.fit.kern.gamma
}

// smoResult is the solution of one two-class dual problem.
type smoResult struct {
	alpha []float64
	rho   float64
	iter  int     // two-variable updates made
	gap   float64 // m(a) − M(a) at the end
}

// solveSMO solves the C-SVC dual for labels y (±1) over the Gram matrix of
// cache by SMO with the second-order working-set selection of Fan, Chen &
// Lin (2005), and returns the multipliers and the bias ρ. It returns an error wrapping ErrNotConverged
// after maxIter updates without meeting m(a) − M(a) ≤ eps.
//
// It keeps v_t = −y_t ∇_t (the quantity both selections compare) rather than
// the gradient ∇ = Qa − e itself: since y_t = ±1, v_t − s and −y_t(∇_t + y_t s)
// are the same floating-point number, so the steps are exactly those of the
// textbook form. Membership of I_up and I_low is kept in two flag slices,
// changed only for the two updated variables, and the search for the next
// i runs in the same pass as the gradient update.
func solveSMO(cache *kernelCache, y []float64, c, eps float64, maxIter int) (smoResult, error) {
	n := len(y)
	alpha := make([]float64, n)
	v := make([]float64, n) // −y_t ∇_t; ∇ = −e at a = 0
	up := make([]bool, n)   // t in I_up: y_t = +1, a_t < C or y_t = −1, a_t > 0
	low := make([]bool, n)  // t in I_low: y_t = +1, a_t > 0 or y_t = −1, a_t < C
	setFlags := func(t int) {
		if y[t] > 0 {
			up[t], low[t] = alpha[t] < c, alpha[t] > 0
		} else {
			up[t], low[t] = alpha[t] > 0, alpha[t] < c
		}
	}
	for t, yt := range y {
		v[t] = yt
		setFlags(t)
	}
	diag := cache.diag[:n]
	res := smoResult{alpha: alpha}
	// i = argmax over I_up of v_t, i.e. m(a); the last index among equals.
	gmax, i := math.Inf(-1), -1
	up, low = up[:len(v)], low[:len(v)] // len(v) bounds the loops below
	for t, vt := range v {
		if up[t] && vt >= gmax {
			gmax, i = vt, t
		}
	}
	for {
		if i < 0 {
			res.gap = math.Inf(-1)
			break
		}
		// j minimises −b_it²/a_it over t in I_low with v_t < m(a), where
		// b_it = m(a) − v_t and a_it = K_ii + K_tt − 2K_it (Fan, Chen & Lin
		// 2005, second-order selection); vmin = M(a).
		ki := cache.row(i)[:len(v)]
		vmin, j, objMin := math.Inf(1), -1, math.Inf(1)
		di := diag[i]
		diag := diag[:len(v)]
		for t, vt := range v {
			if !low[t] {
				continue
			}
			if vt < vmin {
				vmin = vt
			}
			if b := gmax - vt; b > 0 {
				a := di + diag[t] - 2*ki[t]
				if a <= 0 {
					a = tau
				}
				if obj := -b * b / a; obj <= objMin {
					objMin, j = obj, t
				}
			}
		}
		res.gap = gmax - vmin // M(a) = vmin
		if res.gap <= eps || j < 0 {
			break
		}
		if res.iter >= maxIter {
			return res, fmt.Errorf("%d iterations, violation m-M = %.3g > tol %.3g: %w", res.iter, res.gap, eps, ErrNotConverged)
		}
		kj := cache.row(j)[:len(v)] // ki stays valid: the cache keeps the two most recent rows
		res.iter++
		oldI, oldJ := alpha[i], alpha[j]
		updatePair(alpha, -y[i]*v[i], -y[j]*v[j], y, i, j, diag[i]+diag[j]-2*ki[j], c)
		setFlags(i)
		setFlags(j)
		// ∇_t += Q_ti Δa_i + Q_tj Δa_j with Q_ts = y_t y_s K_ts, so
		// v_t −= y_i Δa_i K_ti + y_j Δa_j K_tj; then the next i.
		ci := y[i] * (alpha[i] - oldI)
		cj := y[j] * (alpha[j] - oldJ)
		gmax, i = math.Inf(-1), -1
		for t, vt := range v {
			vt -= ci*ki[t] + cj*kj[t]
			v[t] = vt
			if up[t] && vt >= gmax {
				gmax, i = vt, t
			}
		}
	}
	g := make([]float64, n)
	for t, yt := range y {
		g[t] = -yt * v[t]
	}
	res.rho = bias(alpha, g, y, c)
	return res, nil
}

// updatePair minimises the dual objective over a_i and a_j with the others
// fixed, keeping y_i a_i + y_j a_j constant and both in [0, c]; gi and gj are
// the gradient entries ∇_i and ∇_j, quad is K_ii + K_jj − 2K_ij (replaced by
// tau if not positive). The clipping follows LIBSVM's Solver::Solve for
// equal upper bounds.
func updatePair(alpha []float64, gi, gj float64, y []float64, i, j int, quad, c float64) {
	if quad <= 0 {
		quad = tau
	}
	if y[i] != y[j] {
		delta := (-gi - gj) / quad
		diff := alpha[i] - alpha[j]
		alpha[i] += delta
		alpha[j] += delta
		if diff > 0 {
			if alpha[j] < 0 {
				alpha[j], alpha[i] = 0, diff
			}
		} else if alpha[i] < 0 {
			alpha[i], alpha[j] = 0, -diff
		}
		if diff > 0 {
			if alpha[i] > c {
				alpha[i], alpha[j] = c, c-diff
			}
		} else if alpha[j] > c {
			alpha[j], alpha[i] = c, c+diff
		}
		return
	}
	delta := (gi - gj) / quad
	sum := alpha[i] + alpha[j]
	alpha[i] -= delta
	alpha[j] += delta
	if sum > c {
		if alpha[i] > c {
			alpha[i], alpha[j] = c, sum-c
		}
	} else if alpha[j] < 0 {
		alpha[j], alpha[i] = 0, sum
	}
	if sum > c {
		if alpha[j] > c {
			alpha[j], alpha[i] = c, sum-c
		}
	} else if alpha[i] < 0 {
		alpha[i], alpha[j] = 0, sum
	}
}

// bias returns ρ as LIBSVM computes it: the mean of y_t g_t over free
// multipliers (0 < a_t < c), or, with none free, the midpoint of
// [max over the lower-bound set, min over the upper-bound set].
func bias(alpha, g, y []float64, c float64) float64 {
	ub, lb := math.Inf(1), math.Inf(-1)
	var sum float64
	var free int
	for t, yt := range y {
		yg := yt * g[t]
		switch {
		case alpha[t] >= c:
			if yt < 0 {
				ub = min(ub, yg)
			} else {
				lb = max(lb, yg)
			}
		case alpha[t] <= 0:
			if yt > 0 {
				ub = min(ub, yg)
			} else {
				lb = max(lb, yg)
			}
		default:
			free++
			sum += yg
		}
	}
	if free > 0 {
		return sum / float64(free)
	}
	return (ub + lb) / 2
}
