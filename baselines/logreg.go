package baselines

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize"
)

// Defaults of the LogReg options.
const (
	DefaultLogRegC       = 1.0
	DefaultLogRegMaxIter = 10000
	DefaultLogRegTol     = 1e-4 // scikit-learn 1.2.1 LogisticRegression default tol (gradient max-norm of the summed loss)
)

// logregNewtonSteps bounds the Newton steps that finish a fit L-BFGS left
// short of the tolerance.
const logregNewtonSteps = 30

// LogReg is L2-penalised logistic regression in the two forms of
// scikit-learn 1.2.1's LogisticRegression with its defaults
// (multi_class='auto', solver='lbfgs'): the binary model for two classes and
// the multinomial (softmax) model for three or more. The intercepts are never
// penalised, and C means what it means there.
//
// Two classes. With the classes present in the training labels a < b, the
// class b is the positive one (scikit-learn's classes_[1]) and Fit finds one
// weight vector w and intercept c minimising
//
//	f(w, c) = sum_i softplus(t_i) - y_i t_i + ||w||^2 / (2C),  t_i = w x_i + c,
//
// y_i = 1 for class b and 0 for class a (softplus(t) = log(1 + e^t)); this is
// scikit-learn's C sum_i log(1 + exp(-s_i t_i)) + ||w||^2/2, s_i = 2y_i - 1,
// divided by C. Coef holds w in the row of class b and zeros in the row of
// class a, Intercept holds c and 0: the decision values of a row are
// (0, t), so Predict gives b exactly when t > 0 (a for t = 0, the lower index,
// as scikit-learn's predict) and PredictProba gives (1 - sigma(t), sigma(t)).
// scikit-learn's coef_ and intercept_ are the row of class b.
//
// The softmax form with two classes (multi_class='multinomial') is not
// fitted: its minimiser has W_a = -W_b, t = 2(W_b x + b_b) and a penalty of
// ||W_b||^2 / C = ||2 W_b||^2 / (4C), so it is the binary model with C
// doubled (2 W_b = w, 2 b_b = c at C' = 2C).
//
// Three or more classes. For the K classes present it fits a full K x d
// coefficient matrix W and intercepts b (the symmetric over-parameterisation
// of scikit-learn's multinomial model) by minimising
//
//	f(W, b) = sum_i CE(softmax(W x_i + b), y_i) + ||W||_F^2 / (2C)
//
// which has the minimiser of 0.5*||W||_F^2 + C * sum_i CE. f does not change
// when a constant is added to every b_k, and Fit returns the intercepts with
// sum_k b_k = 0 (the solution scikit-learn's L-BFGS reaches from zero).
//
// Classes absent from the training labels get a zero coefficient row and an
// intercept of -Inf: probability 0, never predicted. A training part of a
// three-class problem in which only two classes occur is fitted in the
// binary form on those two (the lower index negative), as scikit-learn fits
// the labels it sees; the third class is never predicted.
//
// The fit is L-BFGS (gonum optimize: LBFGS directions with its default
// history of 15 and Bisection line search) from zero, stopped when the
// infinity norm of the gradient of f falls to Tol (the meaning scikit-learn
// 1.2.1 gives tol for solver='lbfgs', whose loss is also the sum over rows;
// scipy's L-BFGS-B also stops scikit-learn on a relative decrease of f below
// 2.2e-9, often before the gradient reaches tol, so its answer is usually
// the less precise of the two). Near the minimum the decrease of f per step
// falls below the resolution of f (about 1e-16 |f|), the line search fails,
// and L-BFGS stops with a gradient of roughly sqrt(1e-16 |f| ||H||); Fit then
// finishes with Newton steps (Hessian-vector products and conjugate
// gradients), each accepted only if it lowers the gradient norm, which needs
// no function values. Each Newton step counts as one of MaxIter iterations.
// When Tol is not reached, Fit still returns the best point and nil, and
// Converged reports false (scikit-learn warns in that case).
type LogReg struct {
	// C is the inverse penalty strength; 0 means DefaultLogRegC.
	C float64
	// MaxIter bounds the iterations (L-BFGS and Newton); 0 means
	// DefaultLogRegMaxIter.
	MaxIter int
	// Tol is the gradient infinity-norm threshold; 0 means DefaultLogRegTol.
	Tol float64

	nClass, d int
	coef      *mat.Dense // nClass x d
	intercept []float64  // nClass
	converged bool
	iter      int
	gradNorm  float64
	fitted    bool
}

var _ Model = (*LogReg)(nil)

// Fit minimises the penalised loss. It returns an error wrapping ErrParam
// for C, MaxIter or Tol negative or not finite, and one wrapping ErrData for
// inconsistent or non-finite data or fewer than two classes present.
func (m *LogReg) Fit(X *mat.Dense, y []int, nClass int) error {
	m.fitted, m.converged, m.iter, m.gradNorm = false, false, 0, math.NaN()
	C, maxIter, tol := m.C, m.MaxIter, m.Tol
	if C == 0 {
		C = DefaultLogRegC
	}
	if maxIter == 0 {
		maxIter = DefaultLogRegMaxIter
	}
	if tol == 0 {
		tol = DefaultLogRegTol
	}
	switch {
	case !(C > 0) || math.IsInf(C, 1):
		return fmt.Errorf("baselines: logreg: C = %v, want a positive finite number: %w", m.C, ErrParam)
	case maxIter < 0:
		return fmt.Errorf("baselines: logreg: max iterations = %d is negative: %w", m.MaxIter, ErrParam)
	case !(tol > 0) || math.IsInf(tol, 1):
		return fmt.Errorf("baselines: logreg: tol = %v, want a positive finite number: %w", m.Tol, ErrParam)
	}
	n, d, err := validateFitArgs("logreg", X, y, nClass)
	if err != nil {
		return err
	}
	present, kp := classesPresent(y, nClass)
	if kp < 2 {
		return fmt.Errorf("baselines: logreg: %d class present in the training labels, need at least 2: %w", kp, ErrData)
	}
	compact := make([]int, nClass) // class index -> row of theta, or -1
	next := 0
	for k := range nClass {
		compact[k] = -1
		if present[k] {
			compact[k] = next
			next++
		}
	}
	yc := make([]int, n)
	for i, c := range y {
		yc[i] = compact[c]
	}
	// Two classes: the binary model (w, c); more: theta, kp rows (W_k, b_k).
	var (
		prob logregProblem
		dim  = kp * (d + 1)
	)
	if kp == 2 {
		prob, dim = newLogregBinary(X, yc, 1/C), d+1
	} else {
		prob = newLogregMulti(X, yc, kp, 1/C)
	}
	norm := func(g []float64) float64 { return floats.Norm(g, math.Inf(1)) }
	x := make([]float64, dim)
	grad := make([]float64, dim)
	prob.gradient(grad, x)
	gnorm := norm(grad)
	iter := 0
	if gnorm > tol && maxIter > 0 {
		iter = lbfgsMinimize(prob, x, grad, norm, tol, maxIter)
		gnorm = norm(grad)
	}
	if gnorm > tol && iter < maxIter && allFiniteValues(x) {
		var steps int
		gnorm, steps = polish(prob, x, grad, norm, tol, min(logregNewtonSteps, maxIter-iter))
		iter += steps
	}
	if !allFiniteValues(x) {
		return fmt.Errorf("baselines: logreg: optimisation diverged (C = %v): %w", C, ErrParam)
	}

	coef := mat.NewDense(nClass, d, nil)
	intercept := make([]float64, nClass)
	var theta []float64
	var bmean float64
	if kp == 2 {
		// The negative class keeps a zero row and intercept 0.
		theta = append(make([]float64, d+1), x...)
	} else {
		theta = x
		for r := range kp {
			bmean += theta[r*(d+1)+d]
		}
		bmean /= float64(kp)
	}
	for k := range nClass {
		r := compact[k]
		if r < 0 {
			intercept[k] = math.Inf(-1)
			continue
		}
		coef.SetRow(k, theta[r*(d+1):r*(d+1)+d])
		intercept[k] = theta[r*(d+1)+d] - bmean
	}
	m.nClass, m.d = nClass, d
	m.coef, m.intercept = coef, intercept
	m.converged, m.iter, m.gradNorm = gnorm <= tol, iter, gnorm
	m.fitted = true
	return nil
}

// Predict returns, for each row x of X, the class with the largest decision
// value W_k x + b_k, the lowest index among equals.
func (m *LogReg) Predict(X *mat.Dense) ([]int, error) {
	z, err := m.Decision(X)
	if err != nil {
		return nil, err
	}
	r, _ := z.Dims()
	pred := make([]int, r)
	for i := range r {
		pred[i] = firstArgmax(z.RawRowView(i))
	}
	return pred, nil
}

// Decision returns the decision values W x + b, one row per row of X and one
// column per class; -Inf for classes absent from the training labels. With
// two classes present the negative class's column is 0 and the positive
// class's column is the binary decision value t = w x + c (scikit-learn's
// decision_function).
func (m *LogReg) Decision(X *mat.Dense) (*mat.Dense, error) {
	if !m.fitted {
		return nil, fmt.Errorf("baselines: logreg: %w", ErrNotFitted)
	}
	if err := validatePredictArgs("logreg", X, m.d); err != nil {
		return nil, err
	}
	r, _ := X.Dims()
	z := mat.NewDense(r, m.nClass, nil)
	z.Mul(X, m.coef.T())
	for i := range r {
		floats.Add(z.RawRowView(i), m.intercept)
	}
	return z, nil
}

// PredictProba returns the class probabilities softmax(W x + b), one row per
// row of X; each row sums to 1. With two classes present this is
// (1 - sigma(t), sigma(t)) in the columns of the two classes.
func (m *LogReg) PredictProba(X *mat.Dense) (*mat.Dense, error) {
	z, err := m.Decision(X)
	if err != nil {
		return nil, err
	}
	r, _ := z.Dims()
	for i := range r {
		row := z.RawRowView(i)
		lse := floats.LogSumExp(row)
		for j, v := range row {
			row[j] = math.Exp(v - lse)
		}
	}
	return z, nil
}

// Coef returns a copy of the coefficient matrix W (classes x features), or
// nil before Fit. With two classes present the positive class's row is w
// and the negative class's row is zero (see LogReg).
func (m *LogReg) Coef() *mat.Dense {
	if !m.fitted {
		return nil
	}
	return mat.DenseCopyOf(m.coef)
}

// Intercept returns a copy of the intercepts b, or nil before Fit: with
// three or more classes present they sum to zero over those classes; with
// two, the negative class has 0 and the positive class c (see LogReg).
func (m *LogReg) Intercept() []float64 {
	if !m.fitted {
		return nil
	}
	return append([]float64(nil), m.intercept...)
}

// Converged reports whether the last Fit reached the gradient tolerance.
func (m *LogReg) Converged() bool { return m.fitted && m.converged }

// Iterations returns the number of iterations (L-BFGS and Newton) of the
// last Fit.
func (m *LogReg) Iterations() int { return m.iter }

// GradNorm returns the infinity norm of the gradient of f at the solution
// of the last Fit, or NaN when there is no fitted model.
func (m *LogReg) GradNorm() float64 {
	if !m.fitted {
		return math.NaN()
	}
	return m.gradNorm
}

func allFiniteValues(v []float64) bool {
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}

// logregStore is the L-BFGS history length (gonum's default).
const logregStore = 15

// lbfgsMinimize runs gonum's L-BFGS (optimize.LBFGS directions, Store 15,
// with the optimize.Bisection line search of optimize.LinesearchMethod,
// gonum's defaults for LBFGS) on p from x, whose gradient is grad, until
// norm(gradient) <= tol at an iteration, maxIter iterations, or a line-search
// failure (the function values no longer resolve the remaining decrease).
// It drives the method's Init/Iterate steps itself, as optimize.Minimize
// does with the function-value convergence test off, but without
// Minimize's goroutines and channels, whose hand-offs cost more than an
// evaluation of these small objectives. x and grad are overwritten with the
// last iterate and its gradient; it returns the iterations made.
func lbfgsMinimize(p logregProblem, x, grad []float64, norm func([]float64) float64, tol float64, maxIter int) int {
	loc := &optimize.Location{X: append([]float64(nil), x...), Gradient: append([]float64(nil), grad...)}
	loc.F = p.value(loc.X)
	ls := &optimize.LinesearchMethod{
		NextDirectioner: &optimize.LBFGS{Store: logregStore},
		Linesearcher:    &optimize.Bisection{},
	}
	iter := 0
	op, err := ls.Init(loc)
	for err == nil {
		if op == optimize.MajorIteration {
			iter++
			copy(x, loc.X)
			copy(grad, loc.Gradient)
			if norm(grad) <= tol || iter >= maxIter {
				break
			}
		} else {
			if op&optimize.FuncEvaluation != 0 {
				loc.F = p.value(loc.X)
			}
			if op&optimize.GradEvaluation != 0 {
				p.gradient(loc.Gradient, loc.X)
			}
		}
		op, err = ls.Iterate(loc)
	}
	return iter
}

// logregProblem is the penalised loss in the coordinates the optimiser
// works in. value and gradient may be called in any order at any point;
// hessVec uses the point of the last value or gradient call.
type logregProblem interface {
	value(x []float64) float64
	gradient(g, x []float64)
	hessVec(hv, v []float64)
}

// logregData holds the training rows; products with them are gonum's
// assembly matrix-vector kernels (Dgemv) on X as stored, without a copy.
type logregData struct {
	x    blas64.General // n x d, the caller's matrix
	n, d int
}

func newLogregData(X *mat.Dense) logregData {
	n, d := X.Dims()
	return logregData{x: X.RawMatrix(), n: n, d: d}
}

// linear sets z (length n) to X w + c.
func (a *logregData) linear(z, w []float64, c float64) {
	blas64.Gemv(blas.NoTrans, 1, a.x, blas64.Vector{N: a.d, Inc: 1, Data: w}, 0, blas64.Vector{N: a.n, Inc: 1, Data: z})
	if c != 0 {
		for i := range z {
			z[i] += c
		}
	}
}

// backProject sets out[j] = s <r, X_j> + invC v[j] for the d features and
// out[d] = s sum(r).
func (a *logregData) backProject(out, r []float64, s, invC float64, v []float64) {
	d := a.d
	blas64.Gemv(blas.Trans, s, a.x, blas64.Vector{N: a.n, Inc: 1, Data: r}, 0, blas64.Vector{N: d, Inc: 1, Data: out[:d]})
	for j := range d {
		out[j] += invC * v[j]
	}
	out[d] = s * floats.Sum(r)
}

// logSum accumulates the sum of log s_i over terms s_i >= 1 as the
// logarithm of their product, kept as m * 2^e with the mantissa scaled back
// whenever it exceeds 2^500 (so a factor below 2^500 cannot overflow it):
// one logarithm per evaluation instead of one per row. Each product rounds
// by at most 2^-53 relative, so n terms move the result by at most about
// n 2^-53 in absolute value, the same order as the rounding of a sum of n
// logarithms.
type logSum struct {
	m float64
	e int
}

func (l *logSum) add(s float64) {
	l.m *= s
	if l.m > 0x1p500 {
		f, e := math.Frexp(l.m)
		l.m, l.e = f, l.e+e
	}
}

func (l *logSum) value() float64 { return math.Log(l.m) + float64(l.e)*math.Ln2 }

// logregMulti evaluates f and its gradient in theta's coordinates: kp rows
// (W_k, b_k) of length d+1, row-major. Value and gradient are computed in one
// pass and kept for the last point evaluated, so that Grad after Func at the
// same point (what the line search asks for) costs nothing.
type logregMulti struct {
	logregData
	y    []int
	kp   int
	invC float64

	at    []float64 // point of the cached values
	prob  []float64 // kp x n softmax probabilities at `at`, class-major
	resid []float64 // kp x n: prob minus the one-hot labels
	grad  []float64 // gradient at `at`
	f     float64
	ok    bool
	u     []float64 // kp x n scratch of hessVec
}

func newLogregMulti(X *mat.Dense, y []int, kp int, invC float64) *logregMulti {
	a := newLogregData(X)
	p := kp * (a.d + 1)
	return &logregMulti{
		logregData: a, y: y, kp: kp, invC: invC,
		at:    make([]float64, p),
		prob:  make([]float64, kp*a.n),
		resid: make([]float64, kp*a.n),
		grad:  make([]float64, p),
		u:     make([]float64, kp*a.n),
	}
}

func (o *logregMulti) eval(theta []float64) {
	if o.ok && floats.Equal(theta, o.at) {
		return
	}
	n, d, kp := o.n, o.d, o.kp
	z := o.prob
	for k := range kp {
		o.linear(z[k*n:(k+1)*n], theta[k*(d+1):k*(d+1)+d], theta[k*(d+1)+d])
	}
	// p_k = exp(z_k - zmax) / sum, CE = log(sum) + zmax - z_y; the
	// exponentials are taken in one pass over all entries (expNegSlice),
	// the largest entry of each row giving exp(0) = 1 exactly.
	var lin float64
	for i := range n {
		zmax := z[i]
		for k := 1; k < kp; k++ {
			zmax = max(zmax, z[k*n+i])
		}
		lin += zmax - z[o.y[i]*n+i]
		for k := range kp {
			z[k*n+i] -= zmax
		}
	}
	expNegSlice(z)
	ls := logSum{m: 1}
	for i := range n {
		var sum float64
		for k := range kp {
			sum += z[k*n+i]
		}
		ls.add(sum)
		inv := 1 / sum
		for k := range kp {
			z[k*n+i] *= inv
		}
	}
	copy(o.resid, z)
	for i, c := range o.y {
		o.resid[c*n+i]--
	}
	// grad_W = (P - Y)^T X + W/C; grad_b = column sums of P - Y.
	var pen float64
	for k := range kp {
		row := theta[k*(d+1) : (k+1)*(d+1)]
		o.backProject(o.grad[k*(d+1):(k+1)*(d+1)], o.resid[k*n:(k+1)*n], 1, o.invC, row)
		pen += rowDot(row[:d], row[:d])
	}
	o.f = lin + ls.value() + 0.5*o.invC*pen
	copy(o.at, theta)
	o.ok = true
}

func (o *logregMulti) value(theta []float64) float64 {
	o.eval(theta)
	return o.f
}

func (o *logregMulti) gradient(grad, theta []float64) {
	o.eval(theta)
	copy(grad, o.grad)
}

// hessVec sets hv to the Hessian of f at the point of the cached
// probabilities times v; both are laid out like theta. For one row x~ = (x, 1)
// with probabilities p and u = V x~, the curvature of CE is
// (diag(p) - p p^T) u outer x~; the penalty adds V_W / C.
func (o *logregMulti) hessVec(hv, v []float64) {
	n, d, kp := o.n, o.d, o.kp
	u, p := o.u, o.prob
	for k := range kp {
		o.linear(u[k*n:(k+1)*n], v[k*(d+1):k*(d+1)+d], v[k*(d+1)+d])
	}
	for i := range n {
		var pu float64
		for k := range kp {
			pu += p[k*n+i] * u[k*n+i]
		}
		for k := range kp {
			u[k*n+i] = p[k*n+i] * (u[k*n+i] - pu)
		}
	}
	for k := range kp {
		o.backProject(hv[k*(d+1):(k+1)*(d+1)], u[k*n:(k+1)*n], 1, o.invC, v[k*(d+1):(k+1)*(d+1)])
	}
}

// logregBinary is the binary objective of LogReg in the coordinates
// v = (w, c), t = w x + c, p = sigma(t):
//
//	f = sum_i softplus(t_i) - y_i t_i + ||w||^2 / (2C)
//	grad_w = sum_i (p_i - y_i) x_i + w/C,  grad_c = sum_i (p_i - y_i)
//	H = sum_i p_i (1 - p_i) x~_i x~_i^T + diag(1/C, ..., 1/C, 0),  x~ = (x, 1)
//
// (d/dt softplus(t) = sigma(t), d/dt sigma(t) = sigma(t)(1 - sigma(t))). H is
// positive definite: the penalty covers w, and the intercept direction has
// curvature sum_i p_i (1 - p_i) > 0.
type logregBinary struct {
	logregData
	y1   []bool // label is the positive (second) class
	invC float64

	at    []float64
	prob  []float64 // p_i = P(positive class | x_i) at `at`
	resid []float64 // p_i - y_i
	grad  []float64
	f     float64
	ok    bool
	u     []float64
}

func newLogregBinary(X *mat.Dense, y []int, invC float64) *logregBinary {
	a := newLogregData(X)
	y1 := make([]bool, a.n)
	for i, c := range y {
		y1[i] = c == 1
	}
	return &logregBinary{
		logregData: a, y1: y1, invC: invC,
		at:    make([]float64, a.d+1),
		prob:  make([]float64, a.n),
		resid: make([]float64, a.n),
		grad:  make([]float64, a.d+1),
		u:     make([]float64, a.n),
	}
}

func (o *logregBinary) eval(v []float64) {
	if o.ok && floats.Equal(v, o.at) {
		return
	}
	d := o.d
	t := o.prob
	o.linear(t, v[:d], v[d])
	// softplus(t) - y t = max(t, 0) - y t + log(1 + exp(-|t|)), and
	// sigma(t) = 1/(1 + e) for t >= 0, e/(1 + e) otherwise, e = exp(-|t|):
	// no overflow for any t.
	e := o.resid // exp(-|t_i|), then p_i - y_i
	for i, ti := range t {
		e[i] = -math.Abs(ti)
	}
	expNegSlice(e)
	var lin float64
	ls := logSum{m: 1}
	for i, ti := range t {
		ei := e[i]
		ls.add(1 + ei)
		var p float64
		if ti >= 0 {
			p = 1 / (1 + ei)
			lin += ti
		} else {
			p = ei / (1 + ei)
		}
		r := p
		if o.y1[i] {
			lin -= ti
			r = p - 1
		}
		t[i] = p
		e[i] = r
	}
	o.backProject(o.grad, o.resid, 1, o.invC, v)
	o.f = lin + ls.value() + 0.5*o.invC*rowDot(v[:d], v[:d])
	copy(o.at, v)
	o.ok = true
}

func (o *logregBinary) value(v []float64) float64 {
	o.eval(v)
	return o.f
}

func (o *logregBinary) gradient(grad, v []float64) {
	o.eval(v)
	copy(grad, o.grad)
}

// hessVec sets hv to the Hessian at the point of the cached probabilities
// times s: sum_i p_i (1 - p_i) (x~_i . s) x~_i plus s_w / C.
func (o *logregBinary) hessVec(hv, s []float64) {
	d := o.d
	u := o.u
	o.linear(u, s[:d], s[d])
	for i, p := range o.prob {
		u[i] *= p * (1 - p)
	}
	o.backProject(hv, u, 1, o.invC, s)
}

// polish takes Newton steps from x, whose gradient is grad, until
// norm(gradient) is at most tol or a step (also halved twice) does not lower
// it; at most maxSteps steps. Each step solves H s = -g by conjugate
// gradients. In theta's coordinates H is singular along the shift of all
// intercepts by one constant, but g has no component there (its intercept
// part sums to zero), so the Krylov space, and s, stay off that direction.
// x and grad are updated in place; polish returns the final norm and the
// steps taken.
func polish(o logregProblem, x, grad []float64, norm func([]float64) float64, tol float64, maxSteps int) (gnorm float64, steps int) {
	p := len(x)
	gnorm = norm(grad)
	var (
		s, r, dir, hd = make([]float64, p), make([]float64, p), make([]float64, p), make([]float64, p)
		trial, tgrad  = make([]float64, p), make([]float64, p)
	)
	for steps < maxSteps && gnorm > tol {
		o.gradient(tgrad, x) // the Hessian is taken at x
		clear(s)
		for i, g := range grad {
			r[i] = -g
		}
		copy(dir, r)
		rr := rowDot(r, r)
		stop := 1e-4 * rr // relative residual 1e-2
		for range 2 * p {
			o.hessVec(hd, dir)
			dhd := rowDot(dir, hd)
			if !(dhd > 0) {
				break
			}
			alpha := rr / dhd
			floats.AddScaled(s, alpha, dir)
			floats.AddScaled(r, -alpha, hd)
			rrNew := rowDot(r, r)
			if rrNew <= stop {
				break
			}
			floats.AddScaledTo(dir, r, rrNew/rr, dir)
			rr = rrNew
		}
		accepted := false
		for range 3 {
			floats.AddTo(trial, x, s)
			o.gradient(tgrad, trial)
			if tn := norm(tgrad); tn < gnorm && allFiniteValues(trial) {
				copy(x, trial)
				copy(grad, tgrad)
				gnorm = tn
				accepted = true
				break
			}
			floats.Scale(0.5, s)
		}
		if !accepted {
			break
		}
		steps++
	}
	return gnorm, steps
}
