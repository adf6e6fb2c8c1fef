package baselines

import (
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"sync"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"
)

// svmFixture is the layout written by scripts/ref_svm.py.
type svmFixture struct {
	Source  string       `json:"source"`
	Library string       `json:"library"`
	Tol     float64      `json:"tol"`
	Cases   []svmRefCase `json:"cases"`
}

type svmRefCase struct {
	Name      string          `json:"name"`
	Call      string          `json:"call"`
	Kernel    string          `json:"kernel"`
	C         float64         `json:"C"`
	Gamma     float64         `json:"gamma"`
	Degree    int             `json:"degree"`
	Coef0     float64         `json:"coef0"`
	NClass    int             `json:"n_class"`
	XTrain    [][]float64     `json:"x_train"`
	YTrain    []int           `json:"y_train"`
	XTest     [][]float64     `json:"x_test"`
	GammaUsed *float64        `json:"gamma_used"`
	Support   []int           `json:"support"`
	Intercept []float64       `json:"intercept"`
	Decision  json.RawMessage `json:"decision"`
	Predict   []int           `json:"predict"`
	DualCoef  []float64       `json:"dual_coef"`
	NIter     []int           `json:"n_iter"`
	// The same fit with shrinking=True.
	SupportShrinking []int `json:"support_shrinking"`
	NIterShrinking   []int `json:"n_iter_shrinking"`
}

func loadSVMFixture(t *testing.T, name string) svmFixture {
	t.Helper()
	path := filepath.Join("testdata", name)
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var f svmFixture
	if err := json.Unmarshal(b, &f); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	if len(f.Cases) == 0 {
		t.Fatalf("%s: no cases", path)
	}
	return f
}

func denseOf(t *testing.T, rows [][]float64) *mat.Dense {
	t.Helper()
	m := mat.NewDense(len(rows), len(rows[0]), nil)
	for i, r := range rows {
		m.SetRow(i, r)
	}
	return m
}

// svmFor returns the SVM configured as the fixture case, with the
// fixture's stopping tolerance.
func svmFor(t *testing.T, c svmRefCase, tol float64) *SVM {
	t.Helper()
	k, err := ParseKernel(c.Kernel)
	if err != nil {
		t.Fatal(err)
	}
	return &SVM{Kernel: k, C: c.C, Gamma: c.Gamma, Degree: c.Degree, Coef0: c.Coef0, Tol: tol}
}

// Agreement with scikit-learn. Both solvers stop when the maximal KKT
// violation m(a) − M(a) is below 1e-8 (fixture field "tol"), so at both
// solutions y_i f(x_i) is pinned to 1 within 1e-8 at free support vectors
// and ρ to within 1e-8. What is left is the rounding of LIBSVM's kernel
// cache, which stores Q in single precision (relative error ~6e-8 per
// entry), and the freedom of multipliers along nearly flat directions of
// the dual. 1e-3 on decision values and coefficients is far above both and
// far below the O(1) scale of the values, so a wrong kernel, gamma, bias rule
// or sign fails it. The measured deviations are logged (go test -v).
const svmAgreeTol = 1e-3

// TestSVMBinaryMatchesSklearn compares two-class fits with
// scikit-learn 1.2.1 SVC; the exact call of each case is in its "call"
// field of testdata/svm_binary.json, written by scripts/ref_svm.py.
//
// Each case runs without shrinking (NoShrinking, compared with the
// fixture's shrinking=False fit: support set exact) and with it (the
// default, compared with the shrinking=True fit: see checkSupport).
func TestSVMBinaryMatchesSklearn(t *testing.T) {
	fx := loadSVMFixture(t, "svm_binary.json")
	for _, c := range fx.Cases {
		for _, shrink := range []bool{false, true} {
			t.Run(fmt.Sprintf("%s/shrink=%v", c.Name, shrink), func(t *testing.T) {
				s := svmFor(t, c, fx.Tol)
				s.NoShrinking = !shrink
				if err := s.Fit(denseOf(t, c.XTrain), c.YTrain, 2); err != nil {
					t.Fatal(err)
				}
				checkGamma(t, s, c)
				checkIterations(t, s, c, shrink)
				checkSupport(t, s, c, shrink)
				checkBinaryValues(t, s, c)
			})
		}
	}
}

func checkBinaryValues(t *testing.T, s *SVM, c svmRefCase) {
	t.Helper()
	{
		{

			var wantDec []float64
			if err := json.Unmarshal(c.Decision, &wantDec); err != nil {
				t.Fatal(err)
			}
			dec, err := s.DecisionFunction(denseOf(t, c.XTest))
			if err != nil {
				t.Fatal(err)
			}
			if r, k := dec.Dims(); r != len(wantDec) || k != 1 {
				t.Fatalf("decision dims %d×%d, want %d×1", r, k, len(wantDec))
			}
			worst := 0.0
			for i, w := range wantDec {
				got := dec.At(i, 0)
				worst = max(worst, math.Abs(got-w))
				if !scalar.EqualWithinAbs(got, w, svmAgreeTol) {
					t.Errorf("decision[%d] = %.9f, want %.9f (%s)", i, got, w, c.Call)
				}
			}

			// scikit-learn's binary intercept_ is ρ and dual_coef_ is
			// −a_i y_i with our (LIBSVM's) labels, +1 for class 0.
			task := s.fit.tasks[0]
			if !scalar.EqualWithinAbs(task.rho, c.Intercept[0], svmAgreeTol) {
				t.Errorf("rho = %.9f, want intercept_ %.9f", task.rho, c.Intercept[0])
			}
			worst = max(worst, math.Abs(task.rho-c.Intercept[0]))
			coef := make(map[int]float64)
			for k, p := range task.sv {
				coef[s.fit.svIndex[p]] = -task.coef[k]
			}
			for k, idx := range c.Support {
				got := coef[idx]
				worst = max(worst, math.Abs(got-c.DualCoef[k]))
				if !scalar.EqualWithinAbs(got, c.DualCoef[k], svmAgreeTol) {
					t.Errorf("dual coef of row %d = %.9f, want %.9f", idx, got, c.DualCoef[k])
				}
			}

			pred, err := s.Predict(denseOf(t, c.XTest))
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(pred, c.Predict) {
				t.Errorf("predict = %v, want %v", pred, c.Predict)
			}
			t.Logf("max |deviation| from scikit-learn %.2e; %d iterations (LIBSVM %v, %v with shrinking)", worst, s.fit.iter, c.NIter, c.NIterShrinking)
		}
	}
}

// checkSupport compares the support set. Without shrinking it must equal
// scikit-learn's shrinking=False support_ exactly. With shrinking it is
// compared with the shrinking=True support_: both solvers stop at m − M ≤
// 1e-8 by different paths, and a point on the margin may end with a
// multiplier of the order of the tolerance on one side and exactly 0 on
// the other (measured: 2.4e-8 on Iris RBF, pair (1, 2)). Such a multiplier
// moves no decision value by more than 1e-6·C·max|k| if it is below
// 1e-6·C, far inside svmAgreeTol; extra support vectors of that size are
// accepted and logged, any other difference fails.
func checkSupport(t *testing.T, s *SVM, c svmRefCase, shrink bool) {
	t.Helper()
	got := s.SupportIndices()
	if !shrink {
		if !slices.Equal(got, c.Support) {
			t.Errorf("support = %v, want %v (%s)", got, c.Support, c.Call)
		}
		return
	}
	want := c.SupportShrinking
	if slices.Equal(got, want) {
		return
	}
	largest := make(map[int]float64) // training row -> largest |a_i| over the tasks
	for _, task := range s.fit.tasks {
		for k, p := range task.sv {
			i := s.fit.svIndex[p]
			largest[i] = max(largest[i], math.Abs(task.coef[k]))
		}
	}
	for _, i := range want {
		if _, ok := largest[i]; !ok {
			t.Errorf("row %d: a support vector of scikit-learn (shrinking=True), not here", i)
		}
	}
	for _, i := range got {
		if !slices.Contains(want, i) {
			if a := largest[i]; a >= 1e-6*s.C {
				t.Errorf("row %d: support vector with |a| = %g, not one of scikit-learn's (shrinking=True)", i, a)
			} else {
				t.Logf("row %d: extra support vector with |a| = %.2g < 1e-6·C", i, a)
			}
		}
	}
}

// checkIterations compares the solver's iteration count over all tasks with
// LIBSVM's (SVC.n_iter_ of scikit-learn 1.2.1, fixture "n_iter", summed over
// the pairs). Both use the second-order working-set selection of Fan, Chen &
// Lin (2005) without shrinking, so the counts differ only where rounding
// (LIBSVM keeps kernel rows in single precision) breaks a near-tie
// differently: measured 0 to 8% apart on the binary cases, 28% on the
// three-class linear one. A first-order (maximal violating pair) selection,
// tried on the same binary cases, took 542 instead of 1411 iterations on
// Iris/linear and 371 instead of 116 on Iris/poly, far outside ±(30% + 10).
func checkIterations(t *testing.T, s *SVM, c svmRefCase, shrink bool) {
	t.Helper()
	var ref int
	iters := c.NIter
	if shrink {
		iters = c.NIterShrinking
	}
	for _, v := range iters {
		ref += v
	}
	if got := s.fit.iter; math.Abs(float64(got-ref)) > 0.3*float64(ref)+10 {
		t.Errorf("%d iterations, LIBSVM %d", got, ref)
	}
}

func checkGamma(t *testing.T, s *SVM, c svmRefCase) {
	t.Helper()
	if c.GammaUsed == nil {
		return // precomputed interference kernel: scikit-learn has no gamma
	}
	// SVC._gamma from scikit-learn 1.2.1 (fixture "gamma_used"); "scale" is
	// 1 / (d * X.var()). Two summation orders of the same variance agree to
	// a few ulps, hence 1e-12.
	if got := s.GammaUsed(); !scalar.EqualWithinAbsOrRel(got, *c.GammaUsed, 1e-12, 1e-12) {
		t.Errorf("gamma used = %.17g, want %.17g", got, *c.GammaUsed)
	}
}

// TestSVMOvOMatchesSklearn compares three-class one-vs-one fits on Iris
// with scikit-learn 1.2.1 SVC(..., decision_function_shape='ovo'); the exact
// calls are in testdata/svm_ovo.json, written by scripts/ref_svm.py.
func TestSVMOvOMatchesSklearn(t *testing.T) {
	fx := loadSVMFixture(t, "svm_ovo.json")
	for _, c := range fx.Cases {
		for _, shrink := range []bool{false, true} {
			t.Run(fmt.Sprintf("%s/shrink=%v", c.Name, shrink), func(t *testing.T) {
				s := svmFor(t, c, fx.Tol)
				s.NoShrinking = !shrink
				if err := s.Fit(denseOf(t, c.XTrain), c.YTrain, c.NClass); err != nil {
					t.Fatal(err)
				}
				checkGamma(t, s, c)
				checkIterations(t, s, c, shrink)
				// scikit-learn's support_ is the union over the pairs too.
				checkSupport(t, s, c, shrink)
				checkOvOValues(t, s, c)
			})
		}
	}
}

func checkOvOValues(t *testing.T, s *SVM, c svmRefCase) {
	t.Helper()
	{
		{
			pred, err := s.Predict(denseOf(t, c.XTest))
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(pred, c.Predict) {
				t.Errorf("predict = %v, want %v", pred, c.Predict)
			}
			var wantDec [][]float64
			if err := json.Unmarshal(c.Decision, &wantDec); err != nil {
				t.Fatal(err)
			}
			dec, err := s.DecisionFunction(denseOf(t, c.XTest))
			if err != nil {
				t.Fatal(err)
			}
			worst := 0.0
			for i, row := range wantDec {
				for j, w := range row {
					got := dec.At(i, j)
					worst = max(worst, math.Abs(got-w))
					if !scalar.EqualWithinAbs(got, w, svmAgreeTol) {
						t.Errorf("decision[%d][%d] = %.9f, want %.9f", i, j, got, w)
					}
				}
			}
			// scikit-learn's multi-class intercept_ is −ρ per pair, in the
			// same pair order as our tasks.
			for k, task := range s.fit.tasks {
				worst = max(worst, math.Abs(-task.rho-c.Intercept[k]))
				if !scalar.EqualWithinAbs(-task.rho, c.Intercept[k], svmAgreeTol) {
					t.Errorf("pair (%d,%d): -rho = %.9f, want intercept_ %.9f", task.a, task.b, -task.rho, c.Intercept[k])
				}
			}
			t.Logf("max |deviation| from scikit-learn %.2e; %d iterations (LIBSVM %v, %v with shrinking)", worst, s.fit.iter, c.NIter, c.NIterShrinking)
		}
	}
}

// TestSVMDefaultTol compares fits with the default stopping tolerance 1e-3
// (LIBSVM's default too) with the 1e-8 references of scikit-learn 1.2.1
// (calls in the fixtures). At tol 1e-3 the decision values on training
// points are pinned only to within 1e-3 and test values move by a small
// multiple of that (measured: at most 5.4e-3, linear kernel on Iris); the
// bound 1e-2 is ten times the tolerance. Predictions must then agree
// wherever the reference value is farther than 1e-2 from 0; closer points
// may flip (one synthetic point at 1.8e-4 does).
func TestSVMDefaultTol(t *testing.T) {
	const band = 1e-2
	for _, name := range []string{"svm_binary.json", "svm_ovo.json"} {
		fx := loadSVMFixture(t, name)
		for _, c := range fx.Cases {
			s := svmFor(t, c, 0)
			Xt := denseOf(t, c.XTest)
			if err := s.Fit(denseOf(t, c.XTrain), c.YTrain, c.NClass); err != nil {
				t.Fatalf("%s: %v", c.Name, err)
			}
			var want [][]float64
			if c.NClass == 2 {
				var v []float64
				if err := json.Unmarshal(c.Decision, &v); err != nil {
					t.Fatal(err)
				}
				for _, x := range v {
					want = append(want, []float64{x})
				}
			} else if err := json.Unmarshal(c.Decision, &want); err != nil {
				t.Fatal(err)
			}
			dec, err := s.DecisionFunction(Xt)
			if err != nil {
				t.Fatal(err)
			}
			pred, err := s.Predict(Xt)
			if err != nil {
				t.Fatal(err)
			}
			for i, row := range want {
				near := false
				for j, w := range row {
					near = near || math.Abs(w) <= band
					if got := dec.At(i, j); !scalar.EqualWithinAbs(got, w, band) {
						t.Errorf("%s, tol 1e-3: decision[%d][%d] = %.6f, want %.6f", c.Name, i, j, got, w)
					}
				}
				if !near && pred[i] != c.Predict[i] {
					t.Errorf("%s, tol 1e-3: predict[%d] = %d, want %d", c.Name, i, pred[i], c.Predict[i])
				}
			}
		}
	}
}

// randomTwoClass returns n seeded points in d dimensions, half of each
// class, Gaussian around −shift and +shift on every axis.
func randomTwoClass(rng *rand.Rand, n, d int, shift float64) ([][]float64, []float64) {
	pts := make([][]float64, n)
	y := make([]float64, n)
	for i := range pts {
		y[i] = 1
		m := -shift
		if i%2 == 1 {
			y[i], m = -1, shift
		}
		p := make([]float64, d)
		for j := range p {
			p[j] = m + rng.NormFloat64()
		}
		pts[i] = p
	}
	return pts, y
}

// checkKKT recomputes the gradient from the kernel (not the solver's
// running gradient) and checks the box and equality constraints, the
// stopping rule and the KKT conditions of the C-SVC dual.
func checkKKT(t *testing.T, k kernel, pts [][]float64, y []float64, c, tol float64, res smoResult) {
	t.Helper()
	n := len(y)
	// Rounding slack: the solver's gradient is updated incrementally over
	// at most a few thousand iterations with O(1) terms, so it drifts from
	// the recomputed one by ~1e-13; 1e-9 leaves ample room.
	const slack = 1e-9
	var ya float64
	for i, a := range res.alpha {
		if a < 0 || a > c {
			t.Fatalf("alpha[%d] = %g outside [0, %g]", i, a, c)
		}
		ya += a * y[i]
	}
	// Each update preserves y_i a_i + y_j a_j up to one rounding of size
	// ≤ C·2^-52; fewer than 10^5 updates give < 2e-11·C.
	if !scalar.EqualWithinAbs(ya, 0, 1e-9*c) {
		t.Errorf("sum alpha_i y_i = %g, want 0", ya)
	}
	sum := make([]float64, n) // Σ_j a_j y_j K_ij, so f(x_i) = sum_i − ρ
	g := make([]float64, n)   // gradient Qa − e: g_i = y_i·sum_i − 1
	for i := range n {
		for j, a := range res.alpha {
			if a != 0 {
				sum[i] += a * y[j] * k.eval(pts[i], pts[j])
			}
		}
		g[i] = y[i]*sum[i] - 1
	}
	mUp, mLow := math.Inf(-1), math.Inf(1)
	for i, a := range res.alpha {
		v := -y[i] * g[i]
		if (y[i] > 0 && a < c) || (y[i] < 0 && a > 0) {
			mUp = max(mUp, v)
		}
		if (y[i] > 0 && a > 0) || (y[i] < 0 && a < c) {
			mLow = min(mLow, v)
		}
		m := y[i]*(sum[i]-res.rho) - 1 // y_i f(x_i) − 1
		switch {
		case a <= 0 && m < -tol-slack:
			t.Errorf("alpha[%d] = 0 but y f - 1 = %g < -tol", i, m)
		case a >= c && m > tol+slack:
			t.Errorf("alpha[%d] = C but y f - 1 = %g > tol", i, m)
		case a > 0 && a < c && math.Abs(m) > tol+slack:
			t.Errorf("alpha[%d] free but y f - 1 = %g, |.| > tol", i, m)
		}
	}
	if mUp-mLow > tol+slack {
		t.Errorf("m - M = %g > tol %g", mUp-mLow, tol)
	}
}

// TestSMOKKTProperties checks the solution's optimality conditions on
// seeded problems for every kernel, several C and two tolerances, with and
// without shrinking, including an indefinite polynomial kernel (coef0 < 0),
// where the curvature floor tau keeps the steps finite and the stopping
// rule still holds at a stationary point. 300 points make the solver
// shrink (every min(n, 1000) iterations) on most of them.
func TestSMOKKTProperties(t *testing.T) {
	kernels := []kernel{
		{kind: KernelRBF, gamma: 0.3},
		{kind: KernelLinear},
		{kind: KernelPoly, gamma: 0.5, degree: 3, coef0: 1},
		{kind: KernelPoly, gamma: 0.5, degree: 3, coef0: -1}, // not PSD
		{kind: KernelInterference},
	}
	rng := rand.New(rand.NewPCG(11, 12))
	pts, y := randomTwoClass(rng, 80, 4, 0.4)
	big, ybig := randomTwoClass(rng, 300, 4, 0.3)
	for _, k := range kernels {
		for _, c := range []float64{0.1, 1, 10} {
			for _, tol := range []float64{1e-3, 1e-6} {
				for _, shrink := range []bool{false, true} {
					for _, set := range []struct {
						pts [][]float64
						y   []float64
					}{{pts, y}, {big, ybig}} {
						if testing.Short() && len(set.y) > 100 && k.kind != KernelRBF {
							continue // the larger set with the RBF kernel only
						}
						name := fmt.Sprintf("kernel=%v/gamma=%g/coef0=%g/C=%g/tol=%g/shrink=%v/n=%d", k.kind, k.gamma, k.coef0, c, tol, shrink, len(set.y))
						t.Run(name, func(t *testing.T) {
							res, err := solveSMO(newKernelCache(k, set.pts, 0), set.y, nil, smoOpts{c: c, eps: tol, maxIter: 1_000_000, shrink: shrink})
							if err != nil {
								t.Fatal(err)
							}
							checkKKT(t, k, set.pts, set.y, c, tol, res)
						})
					}
				}
			}
		}
	}
}

// TestSMOLimitedCacheSameSolution runs the solver with a cache that holds
// only 3 rows (so rows are evicted and recomputed) and with a full cache,
// with and without shrinking. Recomputed rows are produced by the same
// arithmetic for every entry, so the two runs take identical steps: the
// tolerance 1e-15 only avoids == on floats.
func TestSMOLimitedCacheSameSolution(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	pts, y := randomTwoClass(rng, 260, 5, 0.3)
	k := kernel{kind: KernelRBF, gamma: 0.2}
	for _, shrink := range []bool{false, true} {
		o := smoOpts{c: 1, eps: 1e-6, maxIter: 1_000_000, shrink: shrink}
		full, err := solveSMO(newKernelCache(k, pts, 0), y, nil, o)
		if err != nil {
			t.Fatal(err)
		}
		small := newKernelCache(k, pts, 3*len(pts))
		lim, err := solveSMO(small, y, nil, o)
		if err != nil {
			t.Fatal(err)
		}
		if small.held > 3*len(pts) || small.full {
			t.Errorf("shrink=%v: limited cache holds %d values, bound %d", shrink, small.held, 3*len(pts))
		}
		if lim.iter != full.iter {
			t.Errorf("shrink=%v: iterations %d with 3 cached rows, %d with all", shrink, lim.iter, full.iter)
		}
		for i := range full.alpha {
			if !scalar.EqualWithinAbs(lim.alpha[i], full.alpha[i], 1e-15) {
				t.Errorf("shrink=%v: alpha[%d] = %g with 3 cached rows, %g with all", shrink, i, lim.alpha[i], full.alpha[i])
			}
		}
		if !scalar.EqualWithinAbs(lim.rho, full.rho, 1e-15) {
			t.Errorf("shrink=%v: rho = %g with 3 cached rows, %g with all", shrink, lim.rho, full.rho)
		}
		if shrink != (full.minActive < len(y)) {
			t.Errorf("shrink=%v: smallest active set %d of %d", shrink, full.minActive, len(y))
		}
		t.Logf("shrink=%v: %d iterations, %d shrinking passes, smallest active set %d of %d", shrink, full.iter, full.shrinks, full.minActive, len(y))
	}
}

// TestSVMHandDerived checks two one-dimensional problems solved by hand.
// Points x = −1 (class 0) and x = +1 (class 1), linear kernel. The dual
// with a_0 = a_1 = a (equality constraint) is min 2a² − 2a, so a = 1/2 if
// C ≥ 1/2 (both free; w = −1 with LIBSVM's labels, ρ = 0) and a = C
// otherwise (both at the bound; ρ = midpoint = 0). scikit-learn's sign
// convention then gives decision(x) = 2a·x. Derived by hand from the dual
// in the SVM doc comment.
func TestSVMHandDerived(t *testing.T) {
	X := mat.NewDense(2, 1, []float64{-1, 1})
	test := mat.NewDense(3, 1, []float64{-2, 0.5, 1})
	for _, tc := range []struct {
		c, a float64
	}{
		{c: 10, a: 0.5},
		{c: 0.25, a: 0.25},
	} {
		s := &SVM{Kernel: KernelLinear, C: tc.c, Tol: 1e-9}
		if err := s.Fit(X, []int{0, 1}, 2); err != nil {
			t.Fatal(err)
		}
		dec, err := s.DecisionFunction(test)
		if err != nil {
			t.Fatal(err)
		}
		for i, x := range []float64{-2, 0.5, 1} {
			// One SMO step reaches the optimum exactly up to rounding.
			if got, want := dec.At(i, 0), 2*tc.a*x; !scalar.EqualWithinAbsOrRel(got, want, 1e-12, 1e-12) {
				t.Errorf("C=%g: decision(%g) = %g, want %g", tc.c, x, got, want)
			}
		}
		for k, coef := range s.fit.tasks[0].coef {
			if !scalar.EqualWithinAbsOrRel(math.Abs(coef), tc.a, 1e-12, 1e-12) {
				t.Errorf("C=%g: |a_%d y_%d| = %g, want %g", tc.c, k, k, coef, tc.a)
			}
		}
		if got := s.SupportIndices(); !slices.Equal(got, []int{0, 1}) {
			t.Errorf("C=%g: support = %v, want [0 1]", tc.c, got)
		}
		pred, err := s.Predict(test)
		if err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(pred, []int{0, 1, 1}) {
			t.Errorf("C=%g: predict = %v, want [0 1 1]", tc.c, pred)
		}
	}
}

// TestSVMIdenticalPointsTau: two identical points with different labels
// make K_00 + K_11 − 2K_01 = 0, so the step uses the floor tau and is clipped
// to the box: a_0 = a_1 = C. The gradient is −1 for both, ρ is the midpoint
// of [−1, 1] = 0 and the decision value is 0 everywhere, a tie that goes to
// the lower class index. Derived by hand from the dual.
func TestSVMIdenticalPointsTau(t *testing.T) {
	X := mat.NewDense(2, 2, []float64{1, 2, 1, 2})
	s := &SVM{Kernel: KernelRBF, Gamma: 0.5, C: 2}
	if err := s.Fit(X, []int{0, 1}, 2); err != nil {
		t.Fatal(err)
	}
	for k, coef := range s.fit.tasks[0].coef {
		if !scalar.EqualWithinAbsOrRel(math.Abs(coef), 2, 1e-12, 1e-12) {
			t.Errorf("|coef[%d]| = %g, want C = 2", k, coef)
		}
	}
	test := mat.NewDense(2, 2, []float64{1, 2, -3, 0.5})
	dec, err := s.DecisionFunction(test)
	if err != nil {
		t.Fatal(err)
	}
	for i := range 2 {
		if got := dec.At(i, 0); !scalar.EqualWithinAbs(got, 0, 1e-12) {
			t.Errorf("decision[%d] = %g, want 0", i, got)
		}
	}
	pred, err := s.Predict(test)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(pred, []int{0, 0}) {
		t.Errorf("predict = %v, want the lower class [0 0]", pred)
	}
}

// TestSVMAbsentClass trains on the Iris fixture with class 2 renamed 3 and
// nClass = 4, so class 2 is absent. The tasks are those of the three-class
// fit with renamed classes, hence identical values; class 2 is never
// predicted and its pairs are NaN.
func TestSVMAbsentClass(t *testing.T) {
	fx := loadSVMFixture(t, "svm_ovo.json")
	c := fx.Cases[0]
	y4 := make([]int, len(c.YTrain))
	for i, v := range c.YTrain {
		y4[i] = v
		if v == 2 {
			y4[i] = 3
		}
	}
	s3 := svmFor(t, c, 1e-6)
	if err := s3.Fit(denseOf(t, c.XTrain), c.YTrain, 3); err != nil {
		t.Fatal(err)
	}
	s4 := svmFor(t, c, 1e-6)
	if err := s4.Fit(denseOf(t, c.XTrain), y4, 4); err != nil {
		t.Fatal(err)
	}
	Xt := denseOf(t, c.XTest)
	p3, err := s3.Predict(Xt)
	if err != nil {
		t.Fatal(err)
	}
	p4, err := s4.Predict(Xt)
	if err != nil {
		t.Fatal(err)
	}
	for i := range p3 {
		want := p3[i]
		if want == 2 {
			want = 3
		}
		if p4[i] != want {
			t.Errorf("row %d: predicted %d with class 2 absent, want %d", i, p4[i], want)
		}
	}
	d3, err := s3.DecisionFunction(Xt)
	if err != nil {
		t.Fatal(err)
	}
	d4, err := s4.DecisionFunction(Xt)
	if err != nil {
		t.Fatal(err)
	}
	if _, k := d4.Dims(); k != 6 {
		t.Fatalf("%d decision columns for 4 classes, want 6", k)
	}
	// Columns for 4 classes: (0,1) (0,2) (0,3) (1,2) (1,3) (2,3).
	from3 := map[int]int{0: 0, 2: 1, 4: 2} // (0,1)←(0,1), (0,3)←(0,2), (1,3)←(1,2)
	r, _ := d4.Dims()
	for i := range r {
		for j := range 6 {
			got := d4.At(i, j)
			src, ok := from3[j]
			if !ok {
				if !math.IsNaN(got) {
					t.Errorf("row %d column %d = %g, want NaN (class 2 absent)", i, j, got)
				}
				continue
			}
			// Same tasks on the same rows: identical arithmetic.
			if want := d3.At(i, src); !scalar.EqualWithinAbs(got, want, 1e-15) {
				t.Errorf("row %d column %d = %g, want %g", i, j, got, want)
			}
		}
	}
}

func TestSVMErrors(t *testing.T) {
	X := mat.NewDense(4, 2, []float64{0, 0, 1, 0, 0, 1, 1, 1})
	y := []int{0, 0, 1, 1}
	for _, tc := range []struct {
		name string
		s    SVM
		X    *mat.Dense
		y    []int
		k    int
		want error
	}{
		{"negative C", SVM{C: -1}, X, y, 2, ErrParam},
		{"NaN C", SVM{C: math.NaN()}, X, y, 2, ErrParam},
		{"infinite C", SVM{C: math.Inf(1)}, X, y, 2, ErrParam},
		{"negative gamma", SVM{Gamma: -0.1}, X, y, 2, ErrParam},
		{"negative degree", SVM{Kernel: KernelPoly, Degree: -1}, X, y, 2, ErrParam},
		{"NaN coef0", SVM{Kernel: KernelPoly, Coef0: math.NaN()}, X, y, 2, ErrParam},
		{"negative tol", SVM{Tol: -1e-3}, X, y, 2, ErrParam},
		{"negative max iter", SVM{MaxIter: -1}, X, y, 2, ErrParam},
		{"unknown kernel", SVM{Kernel: KernelKind(9)}, X, y, 2, ErrParam},
		{"no classes", SVM{}, X, y, 0, ErrParam},
		{"one class", SVM{}, X, []int{1, 1, 1, 1}, 2, ErrData},
		{"label out of range", SVM{}, X, []int{0, 1, 2, 1}, 2, ErrData},
		{"negative label", SVM{}, X, []int{0, -1, 1, 1}, 2, ErrData},
		{"short y", SVM{}, X, []int{0, 1}, 2, ErrData},
		{"nil X", SVM{}, nil, y, 2, ErrData},
		{"empty X", SVM{}, &mat.Dense{}, nil, 2, ErrData},
		{"NaN in X", SVM{}, mat.NewDense(4, 2, []float64{0, 0, 1, math.NaN(), 0, 1, 1, 1}), y, 2, ErrData},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s := tc.s
			err := s.Fit(tc.X, tc.y, tc.k)
			if !errors.Is(err, tc.want) {
				t.Fatalf("Fit error %v, want %v", err, tc.want)
			}
			if _, err := s.Predict(X); !errors.Is(err, ErrNotFitted) {
				t.Errorf("Predict after failed Fit: %v, want %v", err, ErrNotFitted)
			}
		})
	}

	var s SVM
	if _, err := s.Predict(X); !errors.Is(err, ErrNotFitted) {
		t.Errorf("Predict before Fit: %v, want %v", err, ErrNotFitted)
	}
	if _, err := s.DecisionFunction(X); !errors.Is(err, ErrNotFitted) {
		t.Errorf("DecisionFunction before Fit: %v, want %v", err, ErrNotFitted)
	}
	if s.SupportIndices() != nil || s.GammaUsed() != 0 {
		t.Error("unfitted SVM reports support vectors or gamma")
	}
	if err := s.Fit(X, y, 2); err != nil {
		t.Fatal(err)
	}
	if _, err := s.Predict(mat.NewDense(1, 3, nil)); !errors.Is(err, ErrData) {
		t.Errorf("Predict with 3 columns after fitting 2: %v, want %v", err, ErrData)
	}
	if _, err := s.Predict(mat.NewDense(1, 2, []float64{math.Inf(1), 0})); !errors.Is(err, ErrData) {
		t.Errorf("Predict with Inf: %v, want %v", err, ErrData)
	}
}

// TestSVMMaxIter: one iteration cannot solve the Iris problem; Fit must
// return ErrNotConverged (not panic) and leave the model unfitted.
func TestSVMMaxIter(t *testing.T) {
	c := loadSVMFixture(t, "svm_binary.json").Cases[0]
	s := svmFor(t, c, 1e-8)
	s.MaxIter = 1
	err := s.Fit(denseOf(t, c.XTrain), c.YTrain, 2)
	if !errors.Is(err, ErrNotConverged) {
		t.Fatalf("Fit with MaxIter 1: %v, want %v", err, ErrNotConverged)
	}
	if _, err := s.Predict(denseOf(t, c.XTest)); !errors.Is(err, ErrNotFitted) {
		t.Errorf("Predict after non-convergence: %v, want %v", err, ErrNotFitted)
	}
}

// BenchmarkSVMFitSmall fits seeded two-class Gaussian data of breast-cancer size
// (n×30). Metrics: solver iterations, kernel evaluations and support
// vectors per fit, and fit-ns/keval, the whole fit time divided by the
// kernel evaluations (an upper bound on the cost of one evaluation; for the
// RBF kernel rows are about half the fit, see BenchmarkKernelRow for the
// evaluation alone).
func BenchmarkSVMFitSmall(b *testing.B) {
	for _, n := range []int{128, 512} {
		for _, kind := range []KernelKind{KernelRBF, KernelLinear} {
			b.Run(fmt.Sprintf("n=%d/d=30/kernel=%v", n, kind), func(b *testing.B) {
				rng := rand.New(rand.NewPCG(5, 6))
				pts, yf := randomTwoClass(rng, n, 30, 0.25)
				X := mat.NewDense(n, 30, nil)
				y := make([]int, n)
				for i, p := range pts {
					X.SetRow(i, p)
					if yf[i] < 0 {
						y[i] = 1
					}
				}
				s := &SVM{Kernel: kind, C: 1}
				b.ReportAllocs()
				var iter int
				var evals int64
				for b.Loop() {
					if err := s.Fit(X, y, 2); err != nil {
						b.Fatal(err)
					}
					iter, evals = s.fit.iter, s.fit.evals
				}
				b.ReportMetric(float64(iter), "iters/op")
				b.ReportMetric(float64(evals), "kevals/op")
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(evals), "fit-ns/keval")
				b.ReportMetric(float64(len(s.SupportIndices())), "SVs")
			})
		}
	}
}

// TestSVMRecycledMemory checks the recycling of kernel-row memory
// (cacheBlocks): blocks handed back hold old values, which must never be
// read. It fills the pool with blocks of NaN, refits the fixture cases and
// requires the decision values of a fit made before, and fits run from
// several goroutines at once (sharing the pool; run with -race). Same data,
// same arithmetic: the values must be identical, so they are compared bit
// for bit.
func TestSVMRecycledMemory(t *testing.T) {
	var cases []svmRefCase
	for _, name := range []string{"svm_binary.json", "svm_ovo.json"} {
		cases = append(cases, loadSVMFixture(t, name).Cases...)
	}
	decide := func(c svmRefCase) ([]float64, error) {
		k, err := ParseKernel(c.Kernel)
		if err != nil {
			return nil, err
		}
		s := &SVM{Kernel: k, C: c.C, Gamma: c.Gamma, Degree: c.Degree, Coef0: c.Coef0}
		X := mat.NewDense(len(c.XTrain), len(c.XTrain[0]), nil)
		for i, r := range c.XTrain {
			X.SetRow(i, r)
		}
		if err := s.Fit(X, c.YTrain, c.NClass); err != nil {
			return nil, err
		}
		T := mat.NewDense(len(c.XTest), len(c.XTest[0]), nil)
		for i, r := range c.XTest {
			T.SetRow(i, r)
		}
		dec, err := s.DecisionFunction(T)
		if err != nil {
			return nil, err
		}
		return dec.RawMatrix().Data, nil
	}
	want := make([][]float64, len(cases))
	for i, c := range cases {
		var err error
		if want[i], err = decide(c); err != nil {
			t.Fatal(err)
		}
	}
	for range 8 {
		b := make([]float64, cacheBlock)
		for i := range b {
			b[i] = math.NaN()
		}
		cacheBlocks.Put(&b)
	}
	same := func(a, b []float64) bool {
		if len(a) != len(b) {
			return false
		}
		for i := range a {
			if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
				return false
			}
		}
		return true
	}
	errs := make(chan error, 4*len(cases))
	var wg sync.WaitGroup
	for range 4 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i, c := range cases {
				got, err := decide(c)
				if err != nil {
					errs <- err
					return
				}
				if !same(got, want[i]) {
					errs <- fmt.Errorf("%s: decision values %v after recycling, %v before", c.Name, got, want[i])
				}
			}
		}()
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
}
