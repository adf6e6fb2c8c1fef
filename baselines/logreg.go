package baselines

import (
	"fmt"
	"math"

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

// LogReg is multinomial logistic regression with an L2 penalty on the
// coefficients. For the K classes present in the training labels it fits a
// full K x d coefficient matrix W and intercepts b (the symmetric
// over-parameterisation scikit-learn 1.2.1 uses for multi_class='multinomial',
// also when K = 2) by minimising
//
//	f(W, b) = sum_i CE(softmax(W x_i + b), y_i) + ||W||_F^2 / (2C)
//
// which has the minimiser of 0.5*||W||_F^2 + C * sum_i CE. The intercepts are
// not penalised; f does not change when a constant is added to every b_k, and
// Fit returns the intercepts with sum_k b_k = 0 (the solution scikit-learn's
// L-BFGS reaches from zero). At the minimum the rows of W sum to zero, so for
// two classes W_1 = -W_0, and scikit-learn's coef_ is row 1 of Coef.
//
// The fit is L-BFGS (gonum optimize) from zero, stopped when the infinity
// norm of the gradient of f falls to Tol (the meaning scikit-learn 1.2.1
// gives tol for solver='lbfgs', whose loss is also the sum over rows). Near
// the minimum the decrease of f per step falls below the resolution of f
// (about 1e-16 |f|), the line search fails, and L-BFGS stops with a gradient
// of roughly sqrt(1e-16 |f| ||H||); Fit then finishes with Newton steps
// (Hessian-vector products and conjugate gradients), each accepted only if
// it lowers the gradient norm, which needs no function values. Each Newton
// step counts as one of MaxIter iterations. When Tol is not reached, Fit
// still returns the best point and nil, and Converged reports false
// (scikit-learn warns in that case).
//
// Classes absent from the training labels get a zero coefficient row and an
// intercept of -Inf: probability 0, never predicted.
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
	obj := newLogregObjective(X, yc, kp, 1/C)

	theta := make([]float64, kp*(d+1))
	grad := make([]float64, len(theta))
	obj.gradient(grad, theta)
	gnorm := floats.Norm(grad, math.Inf(1))
	iter := 0
	if gnorm > tol && maxIter > 0 {
		settings := &optimize.Settings{
			GradientThreshold: tol,
			MajorIterations:   maxIter,
			// The function-value test is off: the gradient decides.
			Converger: optimize.NeverTerminate{},
		}
		problem := optimize.Problem{Func: obj.value, Grad: obj.gradient}
		res, err := optimize.Minimize(problem, theta, settings, &optimize.LBFGS{GradStopThreshold: tol})
		if res == nil {
			// Only a malformed problem gets here (dimension, settings).
			return fmt.Errorf("baselines: logreg: %w", err)
		}
		// An error here is a line-search failure (ErrLinesearcherFailure,
		// ErrNoProgress ...): the function values no longer resolve the
		// remaining decrease. res holds the best point so far, from which
		// the Newton steps go on.
		iter = res.Stats.MajorIterations
		copy(theta, res.X)
		obj.gradient(grad, theta)
		gnorm = floats.Norm(grad, math.Inf(1))
	}
	if gnorm > tol && iter < maxIter && allFiniteValues(theta) {
		var steps int
		gnorm, steps = obj.polish(theta, grad, tol, min(logregNewtonSteps, maxIter-iter))
		iter += steps
	}
	if !allFiniteValues(theta) {
		return fmt.Errorf("baselines: logreg: optimisation diverged (C = %v): %w", C, ErrParam)
	}

	coef := mat.NewDense(nClass, d, nil)
	intercept := make([]float64, nClass)
	var bmean float64
	for r := range kp {
		bmean += theta[r*(d+1)+d]
	}
	bmean /= float64(kp)
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
// column per class; -Inf for classes absent from the training labels.
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
// row of X; each row sums to 1.
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
// nil before Fit.
func (m *LogReg) Coef() *mat.Dense {
	if !m.fitted {
		return nil
	}
	return mat.DenseCopyOf(m.coef)
}

// Intercept returns a copy of the intercepts b (sum zero over the classes
// present), or nil before Fit.
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

// logregObjective evaluates f and its gradient; theta holds the kp rows
// (W_k, b_k) of length d+1, row-major. The class probabilities of the last
// point evaluated are cached so that Grad after Func at the same point (what
// gonum optimize does) costs one matrix product.
type logregObjective struct {
	x    *mat.Dense
	y    []int
	kp   int
	n, d int
	invC float64

	sums  []float64 // kp x d class sums of the rows of x
	count []float64 // kp class sizes

	at   []float64  // point of the cached probabilities
	prob *mat.Dense // n x kp softmax probabilities at `at`
	f    float64
	ok   bool
}

func newLogregObjective(X *mat.Dense, y []int, kp int, invC float64) *logregObjective {
	n, d := X.Dims()
	sums, count := make([]float64, kp*d), make([]float64, kp)
	for i, c := range y {
		floats.Add(sums[c*d:(c+1)*d], X.RawRowView(i))
		count[c]++
	}
	return &logregObjective{
		x: X, y: y, kp: kp, n: n, d: d, invC: invC,
		sums: sums, count: count,
		at:   make([]float64, kp*(d+1)),
		prob: mat.NewDense(n, kp, nil),
	}
}

func (o *logregObjective) eval(theta []float64) {
	if o.ok && floats.Equal(theta, o.at) {
		return
	}
	d := o.d
	th := mat.NewDense(o.kp, d+1, theta)
	w := th.Slice(0, o.kp, 0, d)
	o.prob.Mul(o.x, w.T())
	var loss float64
	for i := range o.n {
		z := o.prob.RawRowView(i)
		for k := range z {
			z[k] += theta[k*(d+1)+d]
		}
		// One exponential per entry: p_k = exp(z_k - zmax) / sum, and
		// CE = log(sum) + zmax - z_y.
		zmax := z[0]
		for _, v := range z[1:] {
			zmax = max(zmax, v)
		}
		zy := z[o.y[i]]
		var sum float64
		for k, v := range z {
			z[k] = math.Exp(v - zmax)
			sum += z[k]
		}
		loss += math.Log(sum) + zmax - zy
		for k := range z {
			z[k] /= sum
		}
	}
	var pen float64
	for k := range o.kp {
		row := theta[k*(d+1) : k*(d+1)+d]
		pen += rowDot(row, row)
	}
	o.f = loss + 0.5*o.invC*pen
	copy(o.at, theta)
	o.ok = true
}

func (o *logregObjective) value(theta []float64) float64 {
	o.eval(theta)
	return o.f
}

func (o *logregObjective) gradient(grad, theta []float64) {
	o.eval(theta)
	d := o.d
	// grad_W = (P - Y)^T X + W/C = P^T X - (class sums of x) + W/C;
	// grad_b = column sums of P - class counts.
	g := mat.NewDense(o.kp, d+1, grad)
	g.Slice(0, o.kp, 0, d).(*mat.Dense).Mul(o.prob.T(), o.x)
	for k := range o.kp {
		var s float64
		for i := range o.n {
			s += o.prob.At(i, k)
		}
		grad[k*(d+1)+d] = s - o.count[k]
		gw := grad[k*(d+1) : k*(d+1)+d]
		floats.Sub(gw, o.sums[k*d:(k+1)*d])
		floats.AddScaled(gw, o.invC, theta[k*(d+1):k*(d+1)+d])
	}
}

// hessVec sets hv to the Hessian of f at the point of the cached
// probabilities times v; both are laid out like theta. For one row x~ = (x, 1)
// with probabilities p and u = V x~, the curvature of CE is
// (diag(p) - p p^T) u outer x~; the penalty adds V_W / C.
func (o *logregObjective) hessVec(hv, v []float64, u *mat.Dense) {
	d := o.d
	vm := mat.NewDense(o.kp, d+1, v)
	u.Mul(o.x, vm.Slice(0, o.kp, 0, d).T())
	for i := range o.n {
		p, ui := o.prob.RawRowView(i), u.RawRowView(i)
		var pu float64
		for k := range ui {
			ui[k] += v[k*(d+1)+d]
			pu += p[k] * ui[k]
		}
		for k := range ui {
			ui[k] = p[k] * (ui[k] - pu)
		}
	}
	h := mat.NewDense(o.kp, d+1, hv)
	h.Slice(0, o.kp, 0, d).(*mat.Dense).Mul(u.T(), o.x)
	for k := range o.kp {
		var s float64
		for i := range o.n {
			s += u.At(i, k)
		}
		hv[k*(d+1)+d] = s
		floats.AddScaled(hv[k*(d+1):k*(d+1)+d], o.invC, v[k*(d+1):k*(d+1)+d])
	}
}

// polish takes Newton steps from theta, whose gradient is grad, until the
// gradient's infinity norm is at most tol or a step (also halved twice) does
// not lower it; at most maxSteps steps. Each step solves H s = -g by
// conjugate gradients. H is singular along the shift of all intercepts by one
// constant, but g has no component there (its intercept part sums to zero),
// so the Krylov space, and s, stay off that direction. theta and grad are
// updated in place; polish returns the final norm and the steps taken.
func (o *logregObjective) polish(theta, grad []float64, tol float64, maxSteps int) (gnorm float64, steps int) {
	p := len(theta)
	gnorm = floats.Norm(grad, math.Inf(1))
	var (
		s, r, dir, hd = make([]float64, p), make([]float64, p), make([]float64, p), make([]float64, p)
		trial, tgrad  = make([]float64, p), make([]float64, p)
		u             = mat.NewDense(o.n, o.kp, nil)
	)
	for steps < maxSteps && gnorm > tol {
		o.eval(theta) // the Hessian is taken at theta
		clear(s)
		for i, g := range grad {
			r[i] = -g
		}
		copy(dir, r)
		rr := rowDot(r, r)
		stop := 1e-4 * rr // relative residual 1e-2
		for range 2 * p {
			o.hessVec(hd, dir, u)
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
			floats.AddTo(trial, theta, s)
			o.gradient(tgrad, trial)
			if tn := floats.Norm(tgrad, math.Inf(1)); tn < gnorm && allFiniteValues(trial) {
				copy(theta, trial)
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
