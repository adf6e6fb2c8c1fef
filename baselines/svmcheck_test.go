package baselines

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"fringe/datasets"
)

// irisStd returns all of Iris z-scored (datasets.Standardize, the harness's
// "std" step) and its labels.
func irisStd(t *testing.T) (*mat.Dense, []int) {
	t.Helper()
	ds, err := datasets.Load("iris")
	if err != nil {
		t.Fatal(err)
	}
	var s datasets.Standardize
	if err := s.Fit(ds.X); err != nil {
		t.Fatal(err)
	}
	X, err := s.Transform(ds.X, nil)
	if err != nil {
		t.Fatal(err)
	}
	return X, ds.Y
}

func checkParamErr(t *testing.T, err error, param string) {
	t.Helper()
	var pe *ParamError
	if !errors.Is(err, ErrParam) || !errors.As(err, &pe) || pe.Param != param ||
		!strings.HasPrefix(err.Error(), "baselines: svm: ") || !strings.Contains(err.Error(), param) {
		t.Fatalf("error %v, want a *ParamError for %q wrapping ErrParam", err, param)
	}
}

func TestSVMCheckParams(t *testing.T) {
	ok := []SVM{
		{}, // defaults
		{Kernel: KernelLinear, C: SVMMaxC},
		{Kernel: KernelRBF, C: SVMMinC, Gamma: SVMMaxGamma, Tol: SVMMaxTol},
		{Kernel: KernelPoly, Degree: SVMMaxDegree, Coef0: -SVMMaxAbsCoef0, Gamma: SVMMinGamma, Tol: SVMMinTol},
		{Kernel: KernelInterference, Gamma: 1e300, Degree: 1000, Coef0: 1e300}, // parameters it does not use
	}
	for _, s := range ok {
		if err := s.CheckParams(); err != nil {
			t.Errorf("%+v: %v", s, err)
		}
	}
	bad := []struct {
		s     SVM
		param string
	}{
		{SVM{Kernel: KernelPoly, Degree: 1000000}, "degree"}, // the configuration of issue 15
		{SVM{Kernel: KernelPoly, Degree: SVMMaxDegree + 1}, "degree"},
		{SVM{Kernel: KernelPoly, Coef0: 2e6}, "offset"},
		{SVM{Kernel: KernelPoly, Coef0: math.NaN()}, "offset"},
		{SVM{C: 1e9}, "C"},
		{SVM{C: 1e-9}, "C"},
		{SVM{C: math.Inf(1)}, "C"},
		{SVM{Gamma: 1e11}, "gamma"},
		{SVM{Kernel: KernelPoly, Gamma: 1e-11}, "gamma"},
		{SVM{Tol: 2}, "tol"},
		{SVM{Tol: 1e-12}, "tol"},
		{SVM{MaxIter: -1}, "max_iter"},
		{SVM{Kernel: 9}, "kernel"},
	}
	for _, c := range bad {
		checkParamErr(t, c.s.CheckParams(), c.param)
	}
}

// TestSVMCheckData evaluates the kernels on z-scored Iris (150 rows, all
// sampled) and on made-up matrices.
func TestSVMCheckData(t *testing.T) {
	X, _ := irisStd(t)
	for _, s := range []SVM{{}, {Kernel: KernelLinear}, {Kernel: KernelPoly}, {Kernel: KernelInterference}, {Gamma: 10}} {
		if err := s.CheckData(X); err != nil {
			t.Errorf("%v kernel on Iris: %v", s.Kernel, err)
		}
	}
	// In bounds, collapsed on these data: squared distances between
	// distinct z-scored Iris rows lie in [0.0147, 42.6], so exp(-1e9 d2)
	// underflows to 0 and exp(-1e-10 d2) lies within 4.3e-9 of 1, below
	// the solver's resolution tol/(C n) = 1e-3/150.
	checkParamErr(t, (&SVM{Gamma: 1e9}).CheckData(X), "gamma")
	checkParamErr(t, (&SVM{Gamma: 1e-10}).CheckData(X), "gamma")
	// (1e-6 <x, x'> + 1e6)^20 = 1e120 (1 + 2e-11 <x, x'>): flat to 1e-9.
	// And a small gamma that still resolves: exp(-1e-3 d2) spreads over
	// [0.958, 1].
	if err := (&SVM{Gamma: 1e-3}).CheckData(X); err != nil {
		t.Errorf("gamma = 1e-3: %v", err)
	}
	checkParamErr(t, (&SVM{Kernel: KernelPoly, Gamma: 1e-6, Coef0: 1e6, Degree: 20}).CheckData(X), "offset")
	// (1e-10 <x, x'>)^20 <= 1e-180 (|<x, x'>| < 20): all near 0, tiny
	// against each other but not equal; and gamma 1e-10 with degree 20
	// on rows of size 1e-10 underflows to exactly 0.
	tiny := mat.DenseCopyOf(X)
	tiny.Scale(1e-10, tiny)
	checkParamErr(t, (&SVM{Kernel: KernelPoly, Gamma: 1e-10, Degree: 20}).CheckData(tiny), "degree")
	// Overflow: rows of size 1e6, gamma 1e10: bases of about 1e22, 1e440.
	big := mat.DenseCopyOf(X)
	big.Scale(1e6, big)
	checkParamErr(t, (&SVM{Kernel: KernelPoly, Gamma: 1e10, Degree: 20}).CheckData(big), "degree")
	huge := mat.DenseCopyOf(X)
	huge.Scale(1e160, huge)
	if err := (&SVM{Kernel: KernelLinear}).CheckData(huge); !errors.Is(err, ErrData) {
		t.Errorf("linear kernel with overflowing inner products: error %v, want ErrData", err)
	}

	// One-hot rows: every distinct pair at squared distance 2, so every
	// RBF value is exp(-2 gamma) whatever gamma is: not gamma's fault.
	onehot := mat.NewDense(30, 3, nil)
	for i := range 30 {
		onehot.Set(i, i%3, 1)
	}
	if err := (&SVM{Gamma: 1e9}).CheckData(onehot); err != nil {
		t.Errorf("one-hot rows: %v", err)
	}

	// Data errors.
	constant := mat.NewDense(10, 2, nil)
	for i := range 10 {
		constant.SetRow(i, []float64{1, 2})
	}
	if err := (&SVM{}).CheckData(constant); !errors.Is(err, ErrData) || !strings.Contains(err.Error(), "all 10 rows") {
		t.Errorf("constant rows: error %v", err)
	}
	nan := mat.DenseCopyOf(constant)
	nan.Set(3, 1, math.NaN())
	if err := (&SVM{}).CheckData(nan); !errors.Is(err, ErrData) || !strings.Contains(err.Error(), "row 3 column 1") {
		t.Errorf("NaN entry: error %v", err)
	}
	if err := (&SVM{}).CheckData(nil); !errors.Is(err, ErrData) {
		t.Errorf("nil matrix: error %v", err)
	}
	// Only row 3 differs and the evenly spaced sample misses it: the
	// check adds it rather than calling the data constant.
	one := mat.NewDense(1000, 2, nil)
	one.Set(3, 0, 1)
	if err := (&SVM{Kernel: KernelLinear}).CheckData(one); err != nil {
		t.Errorf("one differing row: %v", err)
	}
	// Parameters are checked first.
	checkParamErr(t, (&SVM{Kernel: KernelPoly, Degree: 1000000}).CheckData(X), "degree")
}

// TestSVMCollapsedDegenerate ties the data check to the behaviour it
// guards against: an RBF SVM with gamma = 1e9 (in bounds, rejected by
// CheckData on Iris) fitted on five folds (rows i with i % 5 == f held out)
// gives every test row of a fold the same decision value, its bias alone,
// and CheckDegenerate reports it; gamma "scale" on the same folds does not.
// Iris's duplicate rows are dropped first (a test row equal to a training
// row has kernel value 1 with it and escapes the collapse).
func TestSVMCollapsedDegenerate(t *testing.T) {
	X0, y0 := irisStd(t)
	var rows [][]float64
	var y []int
	for i := range len(y0) {
		dup := false
		for _, r := range rows {
			dup = dup || equalRows(r, X0.RawRowView(i))
		}
		if !dup {
			rows, y = append(rows, X0.RawRowView(i)), append(y, y0[i])
		}
	}
	X := rowsDense(rows)
	n, _ := X.Dims()
	run := func(s SVM) Degeneracy {
		var preds [][]int
		var decs []*mat.Dense
		for f := range 5 {
			var tr, te [][]float64
			var ytr []int
			for i := range n {
				if i%5 == f {
					te = append(te, X.RawRowView(i))
				} else {
					tr = append(tr, X.RawRowView(i))
					ytr = append(ytr, y[i])
				}
			}
			m := s
			if err := m.Fit(rowsDense(tr), ytr, 3); err != nil {
				t.Fatal(err)
			}
			T := rowsDense(te)
			p, err := m.Predict(T)
			if err != nil {
				t.Fatal(err)
			}
			z, err := Decisions(&m, T)
			if err != nil {
				t.Fatal(err)
			}
			if _, c := z.Dims(); c != 3 || len(p) != len(te) {
				t.Fatalf("decision values with %d columns for %d rows", c, len(p))
			}
			preds, decs = append(preds, p), append(decs, z)
		}
		return CheckDegenerate(preds, decs)
	}
	if g := run(SVM{Gamma: 1e9}); !g.ConstantDecision {
		t.Errorf("gamma = 1e9: %+v, want constant decision values", g)
	}
	if g := run(SVM{}); g.Any() {
		t.Errorf("gamma scale: %+v, want no degeneracy", g)
	}
}

func TestCheckDegenerate(t *testing.T) {
	dense := func(r, c int, v ...float64) *mat.Dense { return mat.NewDense(r, c, v) }
	inf := math.Inf(-1)
	nan := math.NaN()
	cases := []struct {
		name   string
		preds  [][]int
		decs   []*mat.Dense
		single bool
		class  int
		flat   bool
	}{
		{"informative", [][]int{{0, 1}, {1, 1}}, []*mat.Dense{dense(2, 1, -1, 2), dense(2, 1, 3, 4)}, false, 0, false},
		{"single class", [][]int{{2, 2}, {2}}, nil, true, 2, false},
		{"no predictions", [][]int{{}, {}}, nil, false, 0, false},
		{"flat per fold", [][]int{{1, 1}, {0, 0}}, []*mat.Dense{dense(2, 2, 0.5, inf, 0.5, inf), dense(2, 2, -3, nan, -3*(1+1e-14), nan)}, false, 0, true},
		{"flat in one fold only", [][]int{{1, 1}, {0, 1}}, []*mat.Dense{dense(2, 1, 1, 1), dense(2, 1, -1, 1)}, false, 0, false},
		{"leave-one-out pooled, different", [][]int{{0}, {0}}, []*mat.Dense{dense(1, 1, 1), dense(1, 1, 2)}, true, 0, false},
		{"leave-one-out pooled, equal", [][]int{{0}, {0}}, []*mat.Dense{dense(1, 1, 1), dense(1, 1, 1)}, true, 0, true},
		{"NaN in some rows", [][]int{{0, 1}}, []*mat.Dense{dense(2, 1, nan, 1)}, false, 0, false},
		{"a fold without values", [][]int{{0, 0}, {0, 0}}, []*mat.Dense{dense(2, 1, 1, 1), nil}, true, 0, false},
		{"column counts differ", [][]int{{0}, {0}}, []*mat.Dense{dense(1, 1, 1), dense(1, 2, 1, 1)}, true, 0, false},
	}
	for _, c := range cases {
		g := CheckDegenerate(c.preds, c.decs)
		if g.SingleClass != c.single || g.Class != c.class || g.ConstantDecision != c.flat || g.Any() != (c.single || c.flat) {
			t.Errorf("%s: %+v, want single %v (class %d), constant %v", c.name, g, c.single, c.class, c.flat)
		}
	}
	if z, err := Decisions(&Centroid{}, nil); z != nil || err != nil {
		t.Errorf("Decisions of a centroid model: %v, %v", z, err)
	}
}
