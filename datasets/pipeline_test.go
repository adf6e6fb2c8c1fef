package datasets

import (
	"encoding/json"
	"errors"
	"maps"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"
)

// sklearnFixture is the output of scripts/ref_pipeline.py.
type sklearnFixture struct {
	Versions map[string]string `json:"versions"`
	Cases    map[string]struct {
		Pipeline  string      `json:"pipeline"`
		Call      string      `json:"call"`
		Train     [][]float64 `json:"train"`
		Test      [][]float64 `json:"test"`
		TrainOut  [][]float64 `json:"train_out"`
		TestOut   [][]float64 `json:"test_out"`
		Mean      []float64   `json:"mean_"`
		Scale     []float64   `json:"scale_"`
		DataMin   []float64   `json:"data_min_"`
		DataRange []float64   `json:"data_range_"`
	} `json:"cases"`
}

func pipeDense(rows [][]float64) *mat.Dense {
	m := mat.NewDense(len(rows), len(rows[0]), nil)
	for i, r := range rows {
		m.SetRow(i, r)
	}
	return m
}

// pipeCheckMatrix compares got with want element by element.
func pipeCheckMatrix(t *testing.T, label string, got *mat.Dense, want [][]float64, tol float64) {
	t.Helper()
	r, c := got.Dims()
	if r != len(want) || c != len(want[0]) {
		t.Fatalf("%s: got %dx%d, want %dx%d", label, r, c, len(want), len(want[0]))
	}
	for i := range r {
		for j := range c {
			if g, w := got.At(i, j), want[i][j]; !scalar.EqualWithinAbsOrRel(g, w, tol, tol) {
				t.Errorf("%s[%d][%d] = %.17g, want %.17g", label, i, j, g, w)
			}
		}
	}
}

func pipeCheckSlice(t *testing.T, label string, got, want []float64, tol float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: got %d values, want %d", label, len(got), len(want))
	}
	for j := range got {
		if !scalar.EqualWithinAbsOrRel(got[j], want[j], tol, tol) {
			t.Errorf("%s[%d] = %.17g, want %.17g", label, j, got[j], want[j])
		}
	}
}

// TestPipelineMatchesSklearn checks std, minmax, l2 and two compositions
// against scikit-learn 1.2.1 (numpy 1.24.2, Debian python3-sklearn): the
// fixture datasets/testdata/pipeline_sklearn.json is the output of
// scripts/ref_pipeline.py, which calls StandardScaler(), MinMaxScaler(),
// Normalizer(norm='l2') and make_pipeline of them, each fitted on the
// training matrix and applied to training and test rows.
func TestPipelineMatchesSklearn(t *testing.T) {
	raw, err := os.ReadFile(filepath.Join("testdata", "pipeline_sklearn.json"))
	if err != nil {
		t.Fatal(err)
	}
	var fx sklearnFixture
	if err := json.Unmarshal(raw, &fx); err != nil {
		t.Fatal(err)
	}
	if fx.Versions["sklearn"] != "1.2.1" {
		t.Errorf("fixture made with scikit-learn %q, want 1.2.1", fx.Versions["sklearn"])
	}
	// Tolerance: outputs are O(1) and both sides follow the same formulas,
	// so they differ only in rounding. The worst case is the feature offset
	// by 1e6 under minmax: MinMaxScaler evaluates x*scale_ + min_ with
	// min_ = -data_min_*scale_, two terms near 5.7e5 that cancel and leave a
	// few ulp(5.7e5) ~ 1.2e-10 of error (fringe computes (x-min)/range, where
	// x-min is exact). The measured worst difference is logged (2.7e-10);
	// 1e-9 bounds it. In the near-constant case the expected outputs are 0
	// and 1.49e-8 (not +-1), which 1e-9 still tells apart.
	const tol = 1e-9
	names := slices.Sorted(maps.Keys(fx.Cases))
	if len(names) < 6 {
		t.Fatalf("fixture has %d cases, want at least 6", len(names))
	}
	var worst float64
	for _, name := range names {
		c := fx.Cases[name]
		p, err := ParsePipeline(c.Pipeline)
		if err != nil {
			t.Fatal(err)
		}
		train, test := pipeDense(c.Train), pipeDense(c.Test)
		gotTrain, err := p.FitTransform(train, nil)
		if err != nil {
			t.Fatalf("%s: fit: %v", name, err)
		}
		gotTest, err := p.Transform(test, nil)
		if err != nil {
			t.Fatalf("%s: transform: %v", name, err)
		}
		pipeCheckMatrix(t, name+" train vs "+c.Call, gotTrain, c.TrainOut, tol)
		pipeCheckMatrix(t, name+" test vs "+c.Call, gotTest, c.TestOut, tol)
		worst = max(worst, pipeMaxAbsDiff(gotTrain, c.TrainOut), pipeMaxAbsDiff(gotTest, c.TestOut))
		if len(p.Steps) != 1 {
			continue
		}
		switch s := p.Steps[0].(type) {
		case *Standardize:
			pipeCheckSlice(t, name+" mean_", s.Mean, c.Mean, tol)
			// scale_ is 1.0 exactly for the constant and near-constant
			// columns (StandardScaler's near-constant rule).
			pipeCheckSlice(t, name+" scale_", s.Scale, c.Scale, tol)
		case *MinMax:
			pipeCheckSlice(t, name+" data_min_", s.Min, c.DataMin, tol)
			// data_range_ is the raw range (0 for constant columns); the
			// divisor replaces 0 by 1.
			want := slices.Clone(c.DataRange)
			for j := range want {
				if want[j] == 0 {
					want[j] = 1
				}
			}
			pipeCheckSlice(t, name+" range", s.Range, want, tol)
		}
	}
	t.Logf("largest |fringe - scikit-learn %s| over all outputs: %.3g", fx.Versions["sklearn"], worst)
}

func pipeMaxAbsDiff(got *mat.Dense, want [][]float64) float64 {
	var m float64
	for i, row := range want {
		for j, w := range row {
			m = max(m, math.Abs(got.At(i, j)-w))
		}
	}
	return m
}

func TestParsePipeline(t *testing.T) {
	good := []struct{ in, canon string }{
		{"raw", "raw"},
		{" raw ", "raw"},
		{"std", "std"},
		{"std+l2", "std+l2"},
		{" minmax + l2 ", "minmax+l2"},
		{"minmax+lift(2)+pad", "minmax+lift(2)+pad"},
		{"lift", "lift"},
		{"lift(1)", "lift"},
		{"lift(1.0)", "lift"},
		{"lift(0.5)", "lift(0.5)"},
		{"lift( 0.25 )", "lift(0.25)"},
		{"lift(1e-3)", "lift(0.001)"},
		{"pad+std+minmax+l2", "pad+std+minmax+l2"},
	}
	for _, g := range good {
		p, err := ParsePipeline(g.in)
		if err != nil {
			t.Errorf("ParsePipeline(%q): %v", g.in, err)
			continue
		}
		if got := p.String(); got != g.canon {
			t.Errorf("ParsePipeline(%q).String() = %q, want %q", g.in, got, g.canon)
		}
		// The canonical name parses back to itself.
		q, err := ParsePipeline(p.String())
		if err != nil || q.String() != p.String() {
			t.Errorf("round trip of %q: %v, %v", p.String(), q, err)
		}
	}

	bad := []struct {
		in      string
		want    error
		mention string // text the message must contain
	}{
		{"", ErrUnknownStep, `""`},
		{"zscore", ErrUnknownStep, `"zscore"`},
		{"std++l2", ErrUnknownStep, "step 2"},
		{"std+", ErrUnknownStep, "step 2"},
		{"+l2", ErrUnknownStep, "step 1"},
		{"std+raw", ErrUnknownStep, `"raw"`},
		{"STD", ErrUnknownStep, `"STD"`},
		{"lift(x)", ErrStepParam, `"lift(x)"`},
		{"lift(-1)", ErrStepParam, `"lift(-1)"`},
		{"lift(0)", ErrStepParam, `"lift(0)"`},
		{"lift(NaN)", ErrStepParam, `"lift(NaN)"`},
		{"lift(Inf)", ErrStepParam, `"lift(Inf)"`},
		{"lift()", ErrStepParam, `"lift()"`},
		{"lift(1", ErrStepParam, `"lift(1"`},
		{"lift1)", ErrStepParam, `"lift1)"`},
		{"std(1)", ErrStepParam, `"std(1)"`},
		{"minmax+l2()", ErrStepParam, `"l2()"`},
		{"pad(8)", ErrStepParam, `"pad(8)"`},
	}
	for _, b := range bad {
		_, err := ParsePipeline(b.in)
		if !errors.Is(err, b.want) {
			t.Errorf("ParsePipeline(%q) error %v, want %v", b.in, err, b.want)
			continue
		}
		msg := err.Error()
		if !strings.HasPrefix(msg, "datasets: ") || !strings.Contains(msg, b.mention) {
			t.Errorf("ParsePipeline(%q) error %q: want prefix \"datasets: \" and mention of %s", b.in, msg, b.mention)
		}
	}
}

func TestStepInfosParse(t *testing.T) {
	infos := StepInfos()
	if len(infos) == 0 {
		t.Fatal("no steps listed")
	}
	for _, in := range infos {
		p, err := ParsePipeline(in.Name)
		if err != nil {
			t.Errorf("listed step %q does not parse: %v", in.Name, err)
			continue
		}
		if got := p.String(); got != in.Name {
			t.Errorf("listed step %q has canonical name %q", in.Name, got)
		}
		if in.Syntax == "" || in.Description == "" {
			t.Errorf("step %q lacks syntax or description", in.Name)
		}
	}
}

// TestLiftByHand checks lift against values derived by hand from its
// definition x -> (x, c) / sqrt(|x|^2 + c^2).
func TestLiftByHand(t *testing.T) {
	X := mat.NewDense(3, 2, []float64{
		3, 4,
		0, 0,
		-6, 8,
	})
	cases := []struct {
		pipe string
		want [][]float64
	}{
		// c = 1: |(3,4,1)| = sqrt(26); |(0,0,1)| = 1; |(-6,8,1)| = sqrt(101).
		{"lift", [][]float64{
			{3 / math.Sqrt(26), 4 / math.Sqrt(26), 1 / math.Sqrt(26)},
			{0, 0, 1},
			{-6 / math.Sqrt(101), 8 / math.Sqrt(101), 1 / math.Sqrt(101)},
		}},
		// c = 0.5: |(3,4,0.5)| = sqrt(25.25); |(-6,8,0.5)| = sqrt(100.25).
		{"lift(0.5)", [][]float64{
			{3 / math.Sqrt(25.25), 4 / math.Sqrt(25.25), 0.5 / math.Sqrt(25.25)},
			{0, 0, 1},
			{-6 / math.Sqrt(100.25), 8 / math.Sqrt(100.25), 0.5 / math.Sqrt(100.25)},
		}},
	}
	// Tolerance: a handful of roundings on O(1) values.
	const tol = 1e-15
	for _, c := range cases {
		p, err := ParsePipeline(c.pipe)
		if err != nil {
			t.Fatal(err)
		}
		got, err := p.FitTransform(X, nil)
		if err != nil {
			t.Fatalf("%s: %v", c.pipe, err)
		}
		pipeCheckMatrix(t, c.pipe, got, c.want, tol)
	}
}

// TestLiftKeepsNorm checks the property that motivates lift: the original
// norm is recoverable as c * |x'_{1..d}| / x'_{d+1}, and every output row
// has unit norm (derived by hand from the definition).
func TestLiftKeepsNorm(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	const n, d = 50, 5
	X := mat.NewDense(n, d, nil)
	for i := range n {
		scale := math.Pow(10, rng.Float64()*6-3) // norms from 1e-3 to 1e3
		for j := range d {
			X.Set(i, j, scale*rng.NormFloat64())
		}
	}
	for _, c := range []float64{1, 0.5, 2, 1e-2} {
		st := &Lift{C: c}
		if err := st.Fit(X); err != nil {
			t.Fatal(err)
		}
		out, err := st.Transform(X, nil)
		if err != nil {
			t.Fatal(err)
		}
		if _, oc := out.Dims(); oc != d+1 {
			t.Fatalf("lift(%g): %d columns, want %d", c, oc, d+1)
		}
		for i := range n {
			row := out.RawRowView(i)
			// Tolerance: relative rounding of a few operations on the
			// ratio; the ratio amplifies it by at most a small factor
			// for |x|/c up to 1e5.
			if nrm := floats.Norm(row, 2); !scalar.EqualWithinAbsOrRel(nrm, 1, 1e-14, 1e-14) {
				t.Errorf("lift(%g) row %d norm %g, want 1", c, i, nrm)
			}
			orig := floats.Norm(X.RawRowView(i), 2)
			rec := c * floats.Norm(row[:d], 2) / row[d]
			if !scalar.EqualWithinAbsOrRel(rec, orig, 1e-12, 1e-12) {
				t.Errorf("lift(%g) row %d: recovered norm %.17g, want %.17g", c, i, rec, orig)
			}
		}
	}
}

// TestLeakage shows that test rows never influence the fitted statistics:
// the training output is the same whatever the test rows are, and test rows
// are transformed with statistics computed by hand from training rows only.
func TestLeakage(t *testing.T) {
	train := mat.NewDense(4, 2, []float64{
		1, 10,
		2, 10,
		3, 20,
		4, 40,
	})
	tests := []*mat.Dense{
		mat.NewDense(2, 2, []float64{0, 0, 5, 5}),
		mat.NewDense(2, 2, []float64{1e12, -1e12, -3e9, 7e15}),
		mat.NewDense(2, 2, []float64{10, 100, 2.5, 30}),
	}
	for _, pipe := range []string{"std", "minmax", "std+l2", "minmax+lift(2)+pad"} {
		var first *mat.Dense
		for k, test := range tests {
			// A fresh pipeline per split, as in the runner.
			p, err := ParsePipeline(pipe)
			if err != nil {
				t.Fatal(err)
			}
			trainOut, err := p.FitTransform(train, nil)
			if err != nil {
				t.Fatalf("%s: %v", pipe, err)
			}
			if _, err := p.Transform(test, nil); err != nil {
				t.Fatalf("%s: %v", pipe, err)
			}
			// Transforming wild test rows must not have changed the
			// fitted state either.
			again, err := p.Transform(train, nil)
			if err != nil {
				t.Fatal(err)
			}
			// Identical inputs through identical deterministic arithmetic
			// give bit-identical outputs; any difference would be leakage,
			// so these comparisons are exact on purpose.
			if !mat.Equal(again, trainOut) {
				t.Errorf("%s: transforming test set %d changed the fitted state", pipe, k)
			}
			if first == nil {
				first = trainOut
			} else if !mat.Equal(trainOut, first) {
				t.Errorf("%s: training output depends on the test rows (test set %d)", pipe, k)
			}
		}
	}

	// Test rows use the training statistics only. Derived by hand from
	// the training column 1 = {1,2,3,4}: mean 2.5, population variance
	// 1.25; column 2 = {10,10,20,40}: mean 20, population variance
	// (100+100+0+400)/4 = 150; min/max 1/4 and 10/40.
	test := tests[2] // rows (10, 100) and (2.5, 30)
	std := &Standardize{}
	if err := std.Fit(train); err != nil {
		t.Fatal(err)
	}
	got, err := std.Transform(test, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Tolerance: one subtraction and one division on O(1)..O(10) values.
	pipeCheckMatrix(t, "std test", got, [][]float64{
		{7.5 / math.Sqrt(1.25), 80 / math.Sqrt(150)},
		{0, 10 / math.Sqrt(150)},
	}, 1e-14)
	mm := &MinMax{}
	if err := mm.Fit(train); err != nil {
		t.Fatal(err)
	}
	got, err = mm.Transform(test, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Outside the training range maps outside [0,1]: no clipping.
	pipeCheckMatrix(t, "minmax test", got, [][]float64{
		{9.0 / 3, 90.0 / 30},
		{1.5 / 3, 20.0 / 30},
	}, 1e-14)
}

func TestConstantFeature(t *testing.T) {
	// Column 1 is constant (0.1 has no exact binary form, so its mean
	// carries a rounding residue); column 2 is constant 7.
	X := mat.NewDense(3, 2, []float64{0.1, 7, 0.1, 7, 0.1, 7})
	std := &Standardize{}
	if err := std.Fit(X); err != nil {
		t.Fatal(err)
	}
	// Scale 1 for constant features, as StandardScaler (see the fixture
	// case "std", columns 2 and 3, scale_ = 1.0; exact: it is assigned).
	if std.Scale[0] != 1 || std.Scale[1] != 1 {
		t.Errorf("std scale of constant columns = %v, want [1 1]", std.Scale)
	}
	out, err := std.Transform(X, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i := range 3 {
		for j := range 2 {
			// Centred values are the rounding residue of the mean, at
			// most a few ulp of 0.1 (~1.4e-17 each).
			if v := out.At(i, j); math.Abs(v) > 1e-15 {
				t.Errorf("std constant column [%d][%d] = %g, want ~0", i, j, v)
			}
		}
	}
	mm := &MinMax{}
	if err := mm.Fit(X); err != nil {
		t.Fatal(err)
	}
	if mm.Range[0] != 1 || mm.Range[1] != 1 {
		t.Errorf("minmax range of constant columns = %v, want [1 1]", mm.Range)
	}
	out, err = mm.Transform(mat.NewDense(1, 2, []float64{0.6, 9}), nil)
	if err != nil {
		t.Fatal(err)
	}
	// Shifted by the training minimum only: 0.6-0.1 and 9-7.
	pipeCheckMatrix(t, "minmax constant", out, [][]float64{{0.5, 2}}, 1e-15)
}

func TestUnitNormZeroRow(t *testing.T) {
	X := mat.NewDense(3, 2, []float64{1, 1, 0, 0, 2, 0})
	rows := []int{10, 20, 30}
	_, err := (&UnitNorm{}).Transform(X, rows)
	var re *RowError
	if !errors.As(err, &re) || re.Row != 20 || !errors.Is(err, ErrZeroVector) {
		t.Fatalf("l2 on a zero row: error %v, want a RowError for row 20 wrapping ErrZeroVector", err)
	}
	if !strings.Contains(err.Error(), "row 20") {
		t.Errorf("message %q does not name row 20", err)
	}

	// Through a pipeline: the third training row equals the training mean,
	// so it is zero after std and l2 must name its dataset row.
	train := mat.NewDense(3, 2, []float64{1, 2, 3, 4, 2, 3})
	p, err := ParsePipeline("std+l2")
	if err != nil {
		t.Fatal(err)
	}
	_, err = p.FitTransform(train, []int{5, 6, 7})
	if !errors.As(err, &re) || re.Row != 7 || !errors.Is(err, ErrZeroVector) {
		t.Fatalf("std+l2: error %v, want a RowError for row 7 wrapping ErrZeroVector", err)
	}
	if !strings.HasPrefix(err.Error(), "datasets: pipeline std+l2") {
		t.Errorf("message %q lacks the pipeline context", err)
	}
}

func TestUnitNormExtremeValues(t *testing.T) {
	X := mat.NewDense(3, 2, []float64{
		1e-310, 0, // subnormal: 1/x overflows, x*x underflows
		1e300, 1e300, // x*x overflows
		-3, 4,
	})
	got, err := (&UnitNorm{}).Transform(X, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Derived by hand: unit vectors along the same directions.
	pipeCheckMatrix(t, "l2 extreme", got, [][]float64{
		{1, 0},
		{1 / math.Sqrt2, 1 / math.Sqrt2},
		{-0.6, 0.8},
	}, 1e-15)
}

func TestNonFiniteInput(t *testing.T) {
	X := mat.NewDense(2, 2, []float64{1, 2, math.NaN(), 3})
	for _, pipe := range []string{"raw", "std", "l2", "lift"} {
		p, err := ParsePipeline(pipe)
		if err != nil {
			t.Fatal(err)
		}
		_, err = p.FitTransform(X, []int{40, 41})
		var re *RowError
		if !errors.As(err, &re) || re.Row != 41 || !errors.Is(err, ErrNotFiniteValue) {
			t.Errorf("%s on NaN: error %v, want a RowError for row 41 wrapping ErrNotFiniteValue", pipe, err)
		}
	}
	good := mat.NewDense(2, 2, []float64{1, 2, 3, 5})
	p, _ := ParsePipeline("std")
	if err := p.Fit(good, nil); err != nil {
		t.Fatal(err)
	}
	_, err := p.Transform(mat.NewDense(1, 2, []float64{math.Inf(1), 0}), []int{99})
	var re *RowError
	if !errors.As(err, &re) || re.Row != 99 || !errors.Is(err, ErrNotFiniteValue) {
		t.Errorf("transform on Inf: error %v, want a RowError for row 99", err)
	}
}

func TestPadAndFeatureNames(t *testing.T) {
	X := mat.NewDense(2, 3, []float64{1, 2, 3, 4, 5, 6})
	p, err := ParsePipeline("pad")
	if err != nil {
		t.Fatal(err)
	}
	got, err := p.FitTransform(X, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Copied values plus one zero column (3 -> 4 features); exact copies.
	pipeCheckMatrix(t, "pad", got, [][]float64{{1, 2, 3, 0}, {4, 5, 6, 0}}, 0)
	if _, err := p.Transform(mat.NewDense(1, 2, []float64{1, 2}), nil); err == nil {
		t.Error("pad fitted on 3 features accepted 2")
	}

	names := []string{"a", "b", "c", "d", "e"}
	cases := []struct {
		pipe string
		want []string
	}{
		{"raw", names},
		{"std+l2", names},
		{"pad", []string{"a", "b", "c", "d", "e", "pad1", "pad2", "pad3"}},
		{"minmax+lift(2)+pad", []string{"a", "b", "c", "d", "e", "lift", "pad1", "pad2"}},
		{"lift+pad", []string{"a", "b", "c", "d", "e", "lift", "pad1", "pad2"}},
	}
	for _, c := range cases {
		p, err := ParsePipeline(c.pipe)
		if err != nil {
			t.Fatal(err)
		}
		if got := p.FeatureNames(names); !slices.Equal(got, c.want) {
			t.Errorf("%s names = %v, want %v", c.pipe, got, c.want)
		}
	}
	if got := (&Pad{}).FeatureNames([]string{"a", "b", "c", "d"}); len(got) != 4 {
		t.Errorf("pad of 4 names = %v, want unchanged", got)
	}

	// Width of the data agrees with the names.
	X5 := mat.NewDense(2, 5, []float64{1, 2, 3, 4, 5, 5, 4, 3, 2, 1})
	p, _ = ParsePipeline("minmax+lift(2)+pad")
	out, err := p.FitTransform(X5, nil)
	if err != nil {
		t.Fatal(err)
	}
	if _, c := out.Dims(); c != len(p.FeatureNames(names)) {
		t.Errorf("minmax+lift(2)+pad: %d columns, %d names", c, len(p.FeatureNames(names)))
	}
}

func TestNotFittedAndInputUntouched(t *testing.T) {
	X := mat.NewDense(2, 2, []float64{1, 2, 3, 5})
	for _, s := range []Step{&Standardize{}, &MinMax{}, &Pad{}} {
		if _, err := s.Transform(X, nil); !errors.Is(err, ErrNotFitted) {
			t.Errorf("%s: Transform before Fit: error %v, want ErrNotFitted", s.Name(), err)
		}
	}
	// l2 and lift have nothing to learn.
	for _, s := range []Step{&UnitNorm{}, &Lift{C: 1}} {
		if _, err := s.Transform(X, nil); err != nil {
			t.Errorf("%s: Transform without Fit: %v", s.Name(), err)
		}
	}
	if _, err := (&Lift{C: -1}).Transform(X, nil); !errors.Is(err, ErrStepParam) {
		t.Errorf("lift with C = -1: error %v, want ErrStepParam", err)
	}

	before := mat.DenseCopyOf(X)
	for _, pipe := range []string{"raw", "std+l2", "minmax+lift+pad"} {
		p, _ := ParsePipeline(pipe)
		out, err := p.FitTransform(X, nil)
		if err != nil {
			t.Fatal(err)
		}
		out.Set(0, 0, 1234) // the output never aliases the input
		if _, err := p.Transform(X, nil); err != nil {
			t.Fatal(err)
		}
		// Exact: the input must be bit-for-bit what it was.
		if !mat.Equal(X, before) {
			t.Fatalf("%s modified its input", pipe)
		}
	}
	if _, err := (&Standardize{}).Transform(X, []int{1}); err == nil {
		t.Error("a row id list of the wrong length was accepted")
	}
	if err := (&Standardize{}).Fit(&mat.Dense{}); err == nil {
		t.Error("an empty matrix was accepted")
	}
}
