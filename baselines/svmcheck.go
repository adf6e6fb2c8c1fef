package baselines

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Plan-time checks of an SVM configuration. SVM.Fit accepts any finite
// positive C, gamma and tol and any degree >= 1, because each is a valid
// optimisation problem; but some values give a model that cannot learn on
// any data (a polynomial of degree 10^6 overflows or underflows every kernel
// value, a tolerance of 2 stops the solver before its first step), and
// others collapse the kernel on the data at hand (an RBF width whose
// kernel matrix is the identity or all ones). Such a run still "works": it
// predicts one class everywhere and exits 0. CheckParams and CheckData let
// the harness reject those configurations before anything runs.
//
// The bounds, and why values beyond them are absurd rather than merely
// unusual. The usual search grids of the trade are C = 2^-5 ... 2^15 and
// gamma = 2^-15 ... 2^3 (Hsu, Chang & Lin, "A Practical Guide to Support
// Vector Classification", National Taiwan University, 2003, section 3.2);
// polynomial degrees 2 to 5 (scikit-learn's default 3).
//
//   - C in [1e-8, 1e8] (SVMMinC, SVMMaxC), eight decades either side of the
//     default 1 and three beyond the grid. The solver compares KKT
//     violations with Tol (1e-3) on gradients G_i = sum_j Q_ij a_j - 1 with
//     multipliers up to C; their rounding error grows like n u C max|K|
//     (u = 2^-53), which reaches 1e-3 at C = 1e8 for n = 1e5 rows and unit
//     kernel values: beyond it the stopping rule is decided by rounding.
//   - gamma, when given as a number, in [1e-10, 1e10] (SVMMinGamma,
//     SVMMaxGamma), five decades beyond the grid's ends on each side. Data
//     scaled to unit spread have squared distances of order d: gamma = 1e10
//     makes every RBF value between distinct rows underflow to 0 and 1e-10
//     makes them equal 1 to ten digits. CheckData tests the data at hand.
//   - degree at most 20 (SVMMaxDegree). (gamma <x, x'> + offset)^degree
//     spreads the kernel values over degree * log10(max|b|/min|b|) decades
//     for bases b; at degree 20 a factor 3 between bases already spans
//     nearly ten decades, so the Gram matrix is dominated by a few entries
//     and, for |b| above 10^15 or below 10^-15, overflows or underflows.
//   - |offset| (Coef0) at most 1e6 (SVMMaxAbsCoef0): with inputs of unit
//     scale the offset then swamps gamma <x, x'> by six decades, and the
//     kernel is a constant to within a relative 1e-6 per unit of degree.
//   - tol in [1e-10, 0.5] (SVMMinTol, SVMMaxTol). At the starting point
//     a = 0 the maximal violation m(a) - M(a) is exactly 2 (all gradients
//     are -1), so tol >= 2 stops before the first step with a = 0 and a
//     constant decision value; tol = 0.5 already leaves KKT violations of
//     half the margin. Below 1e-10 the violation, computed from gradients
//     of order 1 summed over up to 1e5 terms, cannot be resolved (rounding
//     about 1e5 u = 1e-11), and the solver runs to MaxIter.
const (
	SVMMinC        = 1e-8
	SVMMaxC        = 1e8
	SVMMinGamma    = 1e-10
	SVMMaxGamma    = 1e10
	SVMMaxDegree   = 20
	SVMMaxAbsCoef0 = 1e6
	SVMMinTol      = 1e-10
	SVMMaxTol      = 0.5
)

// svmCheckRows is the number of rows CheckData samples (evenly spaced,
// deterministic): 200 rows give 20100 pairs, enough to see a collapsed
// kernel, at a cost below one kernel row of a 20000-row training set.
const svmCheckRows = 200

// svmCollapse is the relative spread below which kernel values count as
// equal whatever the solver: they agree to nine significant digits.
const svmCollapse = 1e-9

// ParamError is an option value a plan-time check rejects. Param is the
// option's name as a spec writes it ("C", "gamma", "degree", "offset",
// "tol"); the error wraps ErrParam.
type ParamError struct {
	Model, Param string
	Msg          string
}

func (e *ParamError) Error() string { return "baselines: " + e.Model + ": " + e.Msg }

// Unwrap returns ErrParam.
func (e *ParamError) Unwrap() error { return ErrParam }

func svmParamErr(param, format string, args ...any) error {
	return &ParamError{Model: "svm", Param: param, Msg: fmt.Sprintf(format, args...)}
}

// CheckParams reports an option of s outside the bounds above (see
// SVMMinC), or invalid as SVM.Fit would report it, as a *ParamError naming
// the option. Zero values stand for the defaults (C = 1, gamma
// "inverse-variance", degree 3, tol 1e-3) and pass. Degree and offset
// (Coef0) are checked for the
// polynomial kernel only, gamma for the RBF and polynomial kernels.
func (s *SVM) CheckParams() error {
	if !s.Kernel.valid() {
		return svmParamErr("kernel", "unknown kernel %d", int(s.Kernel))
	}
	finite := func(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
	if c := s.C; c != 0 && (!finite(c) || c < SVMMinC || c > SVMMaxC) {
		return svmParamErr("C", "C = %g is outside [%g, %g]: beyond it the solver's stopping rule is decided by rounding (C too large) or the model is a constant (C too small)", c, float64(SVMMinC), float64(SVMMaxC))
	}
	if s.Kernel == KernelRBF || s.Kernel == KernelPoly {
		if g := s.Gamma; g != 0 && (!finite(g) || g < SVMMinGamma || g > SVMMaxGamma) {
			return svmParamErr("gamma", "gamma = %g is outside [%g, %g]: the kernel values between distinct rows collapse to one value", g, float64(SVMMinGamma), float64(SVMMaxGamma))
		}
	}
	if s.Kernel == KernelPoly {
		if s.Degree < 0 || s.Degree > SVMMaxDegree {
			return svmParamErr("degree", "degree = %d is outside [1, %d]: the kernel values overflow, underflow or are dominated by a few entries", s.Degree, SVMMaxDegree)
		}
		if !finite(s.Coef0) || math.Abs(s.Coef0) > SVMMaxAbsCoef0 {
			return svmParamErr("offset", "offset = %g is outside [-%g, %g]: the offset swamps the inner products and the kernel is a constant", s.Coef0, float64(SVMMaxAbsCoef0), float64(SVMMaxAbsCoef0))
		}
	}
	if t := s.Tol; t != 0 && (!finite(t) || t < SVMMinTol || t > SVMMaxTol) {
		return svmParamErr("tol", "tol = %g is outside [%g, %g]: the solver stops at its start (tol too large) or cannot resolve the stopping rule (tol too small)", t, float64(SVMMinTol), float64(SVMMaxTol))
	}
	if s.MaxIter < 0 {
		return svmParamErr("max_iter", "max_iter = %d is negative", s.MaxIter)
	}
	return nil
}

// CheckData runs CheckParams and then evaluates the kernel of s on up to
// 200 evenly spaced rows of X (rows i*n/200; all rows when n <= 200), which
// should be the data as the model will see them (after the pipeline; gamma
// "inverse-variance" is computed on all of X, as Fit computes it on a
// training part).
// It returns an error wrapping ErrData when X is empty, has a non-finite
// entry or has all rows equal, and a *ParamError when
//
//   - a kernel value on the sampled rows is not finite (the polynomial
//     kernel overflows: Param "degree"; for the linear and interference
//     kernels an overflowing inner product is a data error), or
//   - the kernel collapses: its values on the pairs of distinct sampled
//     rows lie within a spread s although the quantity it is a function of
//     does not (the squared distance for RBF, Param "gamma"; the inner
//     product for the polynomial kernel, Param "degree" when the values
//     are 0, else "offset" when |offset| dominates, else "gamma"), where s is
//     the larger of 1e-9 times the largest kernel value (nine significant
//     digits) and tol / (C n). The second term is the solver's resolution:
//     a kernel K = c + E with |E_ij| <= s moves every gradient
//     G_i = sum_j Q_ij a_j - 1 by at most n s C from that of the constant
//     kernel c, below the stopping tolerance, so the solver cannot tell K
//     from a constant, and a constant kernel gives a constant decision
//     value (sum_i a_i y_i c - rho = -rho, as sum_i a_i y_i = 0). n is the
//     number of rows of X, at least the training part's.
//     The linear and interference kernels are affine in the inner product
//     and collapse only with the data.
//
// Data whose distinct rows are all equally far apart (one-hot rows, for
// example) make every RBF value equal without any fault of gamma; the
// check recognises them by the equal distances and passes them.
func (s *SVM) CheckData(X *mat.Dense) error {
	if err := s.CheckParams(); err != nil {
		return err
	}
	if X == nil || X.IsEmpty() {
		return fmt.Errorf("baselines: svm: empty data matrix: %w", ErrData)
	}
	if err := checkFiniteMatrix("svm", "data", X); err != nil {
		return err
	}
	n, d := X.Dims()
	rows := sampleRows(X, svmCheckRows)
	if rows == nil {
		return fmt.Errorf("baselines: svm: all %d rows of the data are equal: %w", n, ErrData)
	}
	pts := make([][]float64, n)
	for i := range n {
		p := X.RawRowView(i)
		pts[i] = p[:d:d]
	}
	k := kernel{kind: s.Kernel, gamma: s.Gamma, degree: s.Degree, coef0: s.Coef0}
	if k.degree == 0 {
		k.degree = 3
	}
	if k.gamma == 0 {
		k.gamma = scaleGamma(pts)
	}
	// Kernel values on distinct pairs (off-diagonal) and the quantity each
	// kernel is a function of: squared distance (RBF) or inner product.
	var (
		kMin, kMax = math.Inf(1), math.Inf(-1)
		qMin, qMax = math.Inf(1), math.Inf(-1)
		kScale     float64
		pairs      int
	)
	for a, i := range rows {
		for _, j := range rows[a:] {
			v := k.eval(pts[i], pts[j])
			if math.IsNaN(v) || math.IsInf(v, 0) {
				if s.Kernel == KernelPoly {
					return svmParamErr("degree", "the polynomial kernel (gamma = %g, offset = %g, degree = %d) is %v on rows %d and %d of the data", k.gamma, k.coef0, k.degree, v, i, j)
				}
				return fmt.Errorf("baselines: svm: the %v kernel is %v on rows %d and %d of the data (inner product overflows): %w", s.Kernel, v, i, j, ErrData)
			}
			kScale = max(kScale, math.Abs(v))
			if i == j || equalRows(pts[i], pts[j]) {
				continue
			}
			var q float64
			if s.Kernel == KernelRBF {
				q = sqDist(pts[i], pts[j])
			} else {
				q = rowDot(pts[i], pts[j])
			}
			kMin, kMax = min(kMin, v), max(kMax, v)
			qMin, qMax = min(qMin, q), max(qMax, q)
			pairs++
		}
	}
	if pairs == 0 || s.Kernel == KernelLinear || s.Kernel == KernelInterference {
		return nil
	}
	c, tol := s.C, s.Tol
	if c == 0 {
		c = 1
	}
	if tol == 0 {
		tol = 1e-3
	}
	kFlat := kMax-kMin <= max(svmCollapse*kScale, tol/(c*float64(n)))
	qFlat := qMax-qMin <= svmCollapse*max(math.Abs(qMin), math.Abs(qMax))
	if !kFlat || qFlat {
		return nil
	}
	if s.Kernel == KernelRBF {
		return svmParamErr("gamma", "the RBF kernel with gamma = %g takes values in [%.9g, %.9g] on all %d pairs of distinct sampled rows, whose squared distances range over [%.3g, %.3g]: every row is alike (small gamma) or alike only to itself (large gamma), and the solver (C = %g, tol = %g) cannot tell the kernel from a constant", k.gamma, kMin, kMax, pairs, qMin, qMax, c, tol)
	}
	param := "gamma"
	switch {
	case kScale == 0 || kMax == 0:
		param = "degree"
	case math.Abs(k.coef0) > k.gamma*max(math.Abs(qMin), math.Abs(qMax)):
		param = "offset"
	}
	return svmParamErr(param, "the polynomial kernel (gamma = %g, offset = %g, degree = %d) takes values in [%.9g, %.9g] on all %d pairs of distinct sampled rows, whose inner products range over [%.3g, %.3g]: the solver (C = %g, tol = %g) cannot tell it from a constant", k.gamma, k.coef0, k.degree, kMin, kMax, pairs, qMin, qMax, c, tol)
}

// sampleRows returns up to m row indices of X, evenly spaced (i*n/m), with
// at least two distinct rows among them: when the spaced rows are all
// equal, the first row that differs from them is added. It returns nil
// when all rows of X are equal.
func sampleRows(X *mat.Dense, m int) []int {
	n, _ := X.Dims()
	m = min(m, n)
	rows := make([]int, 0, m+1)
	for p := range m {
		rows = append(rows, p*n/m)
	}
	first := X.RawRowView(rows[0])
	for _, i := range rows[1:] {
		if !equalRows(first, X.RawRowView(i)) {
			return rows
		}
	}
	for i := range n {
		if !equalRows(first, X.RawRowView(i)) {
			return append(rows, i)
		}
	}
	return nil
}

func equalRows(a, b []float64) bool {
	b = b[:len(a)]
	for j, v := range a {
		if v != b[j] {
			return false
		}
	}
	return true
}
