package datasets

import (
	"encoding/json"
	"errors"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"
)

// pcaFixture is datasets/testdata/pca_select_sklearn.json, written by
// scripts/ref_pca_select.py (scikit-learn 1.2.1, numpy 1.24.2, Debian).
type pcaFixture struct {
	Versions map[string]string `json:"versions"`
	Cases    []struct {
		Name    string `json:"name"`
		Train   []int  `json:"train"`
		Test    []int  `json:"test"`
		PCAFull struct {
			Call       string      `json:"call"`
			Mean       []float64   `json:"mean_"`
			Components [][]float64 `json:"components_"`
			EV         []float64   `json:"explained_variance_"`
			Ratio      []float64   `json:"explained_variance_ratio_"`
			SV         []float64   `json:"singular_values_"`
			TestOut    [][]float64 `json:"test_out"`
		} `json:"pca_full"`
		Frac     map[string]int `json:"pca_frac_n_components_"`
		StdPCA95 struct {
			Call       string      `json:"call"`
			N          int         `json:"n_components_"`
			Ratio      []float64   `json:"explained_variance_ratio_"`
			Components [][]float64 `json:"components_"`
			TestOut    [][]float64 `json:"test_out"`
		} `json:"std_pca95"`
		StdPCA4L2 struct {
			Call       string      `json:"call"`
			Components [][]float64 `json:"components_"`
			TestOut    [][]float64 `json:"test_out"`
		} `json:"std_pca4_l2"`
		Select map[string]struct {
			Call    string    `json:"call"`
			Scores  []float64 `json:"scores_"`
			Support []int     `json:"support"`
		} `json:"select"`
	} `json:"cases"`
}

func readPCAFixture(t *testing.T) pcaFixture {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join("testdata", "pca_select_sklearn.json"))
	if err != nil {
		t.Fatal(err)
	}
	var fx pcaFixture
	if err := json.Unmarshal(raw, &fx); err != nil {
		t.Fatal(err)
	}
	if fx.Versions["sklearn"] != "1.2.1" || len(fx.Cases) != 3 {
		t.Fatalf("fixture: scikit-learn %q, %d cases; want 1.2.1 and 3", fx.Versions["sklearn"], len(fx.Cases))
	}
	return fx
}

// svdSlack is the multiple of eps * s_1 allowed as the error of a singular
// value, and (divided by the gap to the nearest other singular value) of
// the angle of a singular vector: a backward stable SVD computes the exact
// factors of A + E with ||E|| a modest multiple of eps * ||A||_2 = eps *
// s_1, which moves singular values by at most ||E|| (Weyl) and vectors by
// about ||E|| / gap (Wedin's theorem; Golub & Van Loan, Matrix
// Computations, 4th ed., sec. 8.6, recalled). LAPACK's gesdd (numpy) and
// gonum's Dgesvd differ in algorithm, so each side has its own E; 100
// covers both for the dimensions here (n <= 426, d <= 30): the worst
// observed difference is 0.06 of the tolerance (logged).
const svdSlack = 100

// pcaTolerances returns, for singular values s (decreasing), the
// tolerance of each singular value and of each axis (angle).
func pcaTolerances(s []float64) (sv, axis []float64) {
	const eps = 0x1p-52
	e := svdSlack * eps * s[0]
	sv = make([]float64, len(s))
	axis = make([]float64, len(s))
	for i := range s {
		gap := math.Inf(1)
		if i > 0 {
			gap = s[i-1] - s[i]
		}
		if i+1 < len(s) {
			gap = min(gap, s[i]-s[i+1])
		}
		sv[i] = e
		axis[i] = min(e/gap, 1)
	}
	return sv, axis
}

// alignSigns returns, per sklearn component (rows of want), +1 or -1 so
// that sign*want follows fringe's convention (largest loading positive),
// and checks that got does. Where the two largest loadings of want are
// within the axis tolerance of each other the convention cannot be read
// off reliably, so the sign that best matches got is taken (and counted).
func alignSigns(t *testing.T, label string, got *mat.Dense, want [][]float64, axisTol []float64) []float64 {
	t.Helper()
	signs := make([]float64, len(want))
	for i, w := range want {
		g := got.RawRowView(i)
		mags := make([]float64, len(w))
		for j := range w {
			mags[j] = math.Abs(w[j])
		}
		big := floats.MaxIdx(mags)
		top := mags[big]
		mags[big] = -1
		second := floats.Max(mags)
		signs[i] = 1
		if w[big] < 0 {
			signs[i] = -1
		}
		if top-second <= 4*axisTol[i] {
			signs[i] = 1
			if floats.Dot(g, w) < 0 {
				signs[i] = -1
			}
			t.Logf("%s component %d: two loadings within rounding (%.3g, %.3g); sign aligned by dot product", label, i, top, second)
			continue
		}
		// fringe's own component must satisfy the convention exactly.
		gm := make([]float64, len(g))
		for j := range g {
			gm[j] = math.Abs(g[j])
		}
		if gb := floats.MaxIdx(gm); g[gb] < 0 {
			t.Errorf("%s component %d: largest loading %g is negative", label, i, g[gb])
		}
	}
	return signs
}

// TestPCAMatchesSklearn compares pca with scikit-learn 1.2.1's
// PCA(svd_solver="full") on the fixture's training rows of iris, wine and
// breast cancer: mean, components (after aligning scikit-learn's signs to
// fringe's convention), explained variance and ratio, the transformed test
// rows, and the number of components chosen for shares 0.95 and 0.8.
func TestPCAMatchesSklearn(t *testing.T) {
	fx := readPCAFixture(t)
	var worst float64 // largest |difference| / tolerance seen
	note := func(diff, tol float64) {
		if tol > 0 {
			worst = max(worst, diff/tol)
		}
	}
	for _, c := range fx.Cases {
		d, err := Load(c.Name)
		if err != nil {
			t.Fatal(err)
		}
		train, test := d.Select(c.Train), d.Select(c.Test)
		p := &PCA{}
		if err := p.Fit(train.X); err != nil {
			t.Fatalf("%s: %v", c.Name, err)
		}
		f := c.PCAFull
		k := p.NComponents()
		if k != len(f.Components) {
			t.Fatalf("%s: %d components, scikit-learn has %d", c.Name, k, len(f.Components))
		}
		svTol, axisTol := pcaTolerances(f.SV)
		n := float64(len(c.Train))
		// The mean is a sum of n values / n on both sides: a few ulp.
		pipeCheckSlice(t, c.Name+" mean_ vs "+f.Call, p.Mean, f.Mean, 1e-13)
		var total float64
		for _, s := range f.SV {
			total += s * s
		}
		for i := range k {
			// ev = s^2/(n-1): an error ds in s moves it by 2 s ds/(n-1);
			// the ratio s^2/total by about 2 s ds/total.
			evTol := 2*f.SV[i]*svTol[i]/(n-1) + 1e-15*f.EV[i]
			if diff := math.Abs(p.ExplainedVariance[i] - f.EV[i]); diff > evTol {
				t.Errorf("%s explained_variance_[%d] = %.17g, want %.17g (tolerance %.3g)", c.Name, i, p.ExplainedVariance[i], f.EV[i], evTol)
			} else {
				note(diff, evTol)
			}
			rTol := 2*f.SV[i]*svTol[i]/total + 1e-15
			if diff := math.Abs(p.ExplainedVarianceRatio[i] - f.Ratio[i]); diff > rTol {
				t.Errorf("%s explained_variance_ratio_[%d] = %.17g, want %.17g (tolerance %.3g)", c.Name, i, p.ExplainedVarianceRatio[i], f.Ratio[i], rTol)
			} else {
				note(diff, rTol)
			}
		}
		signs := alignSigns(t, c.Name, p.Components, f.Components, axisTol)
		for i := range k {
			got := p.Components.RawRowView(i)
			for j, w := range f.Components[i] {
				if diff := math.Abs(got[j] - signs[i]*w); diff > axisTol[i] {
					t.Errorf("%s components_[%d][%d] = %.17g, want %.17g (tolerance %.3g)", c.Name, i, j, got[j], signs[i]*w, axisTol[i])
				} else {
					note(diff, axisTol[i])
				}
			}
		}
		out, err := p.Transform(test.X, test.Rows)
		if err != nil {
			t.Fatal(err)
		}
		for r, row := range f.TestOut {
			centred := floats.Norm(floats.SubTo(make([]float64, d.Dim()), test.X.RawRowView(r), p.Mean), 2)
			for i, w := range row {
				// z = (x - mean).v: the axis error times |x - mean|, plus
				// rounding of the dot product.
				tol := centred*axisTol[i] + 1e-12*centred
				if diff := math.Abs(out.At(r, i) - signs[i]*w); diff > tol {
					t.Errorf("%s test row %d pc%d = %.17g, want %.17g (tolerance %.3g)", c.Name, r, i+1, out.At(r, i), signs[i]*w, tol)
				} else {
					note(diff, tol)
				}
			}
		}
		if names := p.FeatureNames(d.Features); len(names) != k || names[0] != "pc1" || names[k-1] != "pc"+strconv.Itoa(k) {
			t.Errorf("%s: feature names %v", c.Name, names)
		}

		for _, share := range []string{"0.95", "0.8"} {
			q, err := ParsePipeline("pca(" + share + ")")
			if err != nil {
				t.Fatal(err)
			}
			if err := q.Fit(train.X, train.Rows); err != nil {
				t.Fatal(err)
			}
			got := q.Steps[0].(*PCA).NComponents()
			if want := c.Frac[share]; got != want {
				t.Errorf("%s pca(%s): %d components, PCA(n_components=%s, svd_solver=\"full\") keeps %d", c.Name, share, got, share, want)
			}
			// The choice is robust only if no cumulative ratio lies within
			// rounding of the share; check that it does not.
			var cum float64
			for _, r := range f.Ratio {
				cum += r
				if math.Abs(cum-parseF(share)) < 1e-9 {
					t.Errorf("%s: cumulative ratio %.17g too close to %s for a robust comparison", c.Name, cum, share)
				}
			}
		}
	}
	t.Logf("largest |fringe - scikit-learn %s| as a fraction of its tolerance: %.3g", fx.Versions["sklearn"], worst)
}

// TestPCAPipelinesMatchSklearn checks std+pca(0.95) and std+pca(4)+l2
// against make_pipeline(StandardScaler(), PCA(...), [Normalizer()]) of
// scikit-learn 1.2.1 (fixture calls recorded beside the values).
func TestPCAPipelinesMatchSklearn(t *testing.T) {
	fx := readPCAFixture(t)
	for _, c := range fx.Cases {
		d, err := Load(c.Name)
		if err != nil {
			t.Fatal(err)
		}
		train, test := d.Select(c.Train), d.Select(c.Test)

		p, err := ParsePipeline("std+pca(0.95)")
		if err != nil {
			t.Fatal(err)
		}
		if _, err := p.FitTransform(train.X, train.Rows); err != nil {
			t.Fatal(err)
		}
		pc := p.Steps[1].(*PCA)
		if got := pc.NComponents(); got != c.StdPCA95.N {
			t.Fatalf("%s std+pca(0.95): %d components, %s keeps %d", c.Name, got, c.StdPCA95.Call, c.StdPCA95.N)
		}
		// Standardised features: singular values from our own fit (they
		// agree with scikit-learn's to the tolerance checked above).
		n := float64(len(c.Train))
		s := make([]float64, len(pc.ExplainedVariance))
		for i, ev := range pc.ExplainedVariance {
			s[i] = math.Sqrt(ev * (n - 1))
		}
		// The kept components' gaps: the last kept one borders the first
		// dropped one, whose value is not stored; its ratio is, so use the
		// full fit.
		full := &PCA{}
		std := &Standardize{}
		if err := std.Fit(train.X); err != nil {
			t.Fatal(err)
		}
		z, _ := std.Transform(train.X, nil)
		if err := full.Fit(z); err != nil {
			t.Fatal(err)
		}
		all := make([]float64, len(full.ExplainedVariance))
		for i, ev := range full.ExplainedVariance {
			all[i] = math.Sqrt(ev * (n - 1))
		}
		_, axisTol := pcaTolerances(all)
		signs := alignSigns(t, c.Name+" std+pca(0.95)", pc.Components, c.StdPCA95.Components, axisTol)
		for i, w := range c.StdPCA95.Components {
			got := pc.Components.RawRowView(i)
			for j := range w {
				if diff := math.Abs(got[j] - signs[i]*w[j]); diff > axisTol[i]+1e-13 {
					t.Errorf("%s std+pca(0.95) component %d[%d] = %.17g, want %.17g", c.Name, i, j, got[j], signs[i]*w[j])
				}
			}
		}
		pipeCheckSlice(t, c.Name+" std+pca(0.95) ratio", pc.ExplainedVarianceRatio, c.StdPCA95.Ratio, 1e-10)
		out, err := p.Transform(test.X, test.Rows)
		if err != nil {
			t.Fatal(err)
		}
		checkAligned(t, c.Name+" std+pca(0.95) test rows", out, c.StdPCA95.TestOut, signs, axisTol)

		q, err := ParsePipeline("std+pca(4)+l2")
		if err != nil {
			t.Fatal(err)
		}
		if _, err := q.FitTransform(train.X, train.Rows); err != nil {
			t.Fatal(err)
		}
		signs4 := alignSigns(t, c.Name+" std+pca(4)+l2", q.Steps[1].(*PCA).Components, c.StdPCA4L2.Components, axisTol)
		out4, err := q.Transform(test.X, test.Rows)
		if err != nil {
			t.Fatal(err)
		}
		// l2 scales rows by positive factors, so column signs carry over.
		checkAligned(t, c.Name+" std+pca(4)+l2 test rows", out4, c.StdPCA4L2.TestOut, signs4, axisTol)
		if names := q.FeatureNames(d.Features); !slices.Equal(names, []string{"pc1", "pc2", "pc3", "pc4"}) {
			t.Errorf("std+pca(4)+l2 names %v", names)
		}
	}
}

// checkAligned compares got with sign-aligned want columns. The outputs
// are O(1..10) standardised projections; the tolerance is the axis
// tolerance times the row's size, at least 1e-11.
func checkAligned(t *testing.T, label string, got *mat.Dense, want [][]float64, signs, axisTol []float64) {
	t.Helper()
	for r, row := range want {
		size := floats.Norm(row, 2)
		for i, w := range row {
			tol := max(axisTol[i]*max(size, 1)*4, 1e-11)
			if diff := math.Abs(got.At(r, i) - signs[i]*w); diff > tol {
				t.Errorf("%s [%d][%d] = %.17g, want %.17g (tolerance %.3g)", label, r, i, got.At(r, i), signs[i]*w, tol)
			}
		}
	}
}

// TestSelectMatchesSklearn compares select(k) with scikit-learn 1.2.1's
// SelectKBest(f_classif, k) on the fixture's training rows: the F scores
// and the chosen features.
func TestSelectMatchesSklearn(t *testing.T) {
	fx := readPCAFixture(t)
	var worst float64
	for _, c := range fx.Cases {
		d, err := Load(c.Name)
		if err != nil {
			t.Fatal(err)
		}
		train := d.Select(c.Train)
		for k, want := range c.Select {
			p, err := ParsePipeline("select(" + k + ")")
			if err != nil {
				t.Fatal(err)
			}
			out, err := p.FitTransformLabeled(train.X, train.Y, train.Rows)
			if err != nil {
				t.Fatalf("%s select(%s): %v", c.Name, k, err)
			}
			s := p.Steps[0].(*SelectK)
			// scikit-learn computes F from raw sums: between SS as
			// sum_c S_c^2/n_c - S^2/n and within SS as sum x^2 - S^2/n -
			// between SS, so each carries an absolute error of a few ulp
			// of sum x^2; fringe uses centred sums. The relative tolerance
			// of F is therefore 16 eps sum x^2 (1/SSB + 1/SSW) (an error
			// analysis of the raw-sum formula, derived by hand), plus
			// 1e-12 for fringe's own rounding; the worst fraction of it is
			// logged.
			for j := range want.Scores {
				col := mat.Col(nil, j, train.X)
				ssb, ssw, sq := anovaSums(col, train.Y)
				tol := 16*0x1p-52*sq*(1/ssb+1/ssw) + 1e-12
				rel := math.Abs(s.Scores[j]-want.Scores[j]) / want.Scores[j]
				worst = max(worst, rel/tol)
				if rel > tol {
					t.Errorf("%s F[%d] = %.17g, %s gives %.17g (relative difference %.3g, tolerance %.3g)", c.Name, j, s.Scores[j], want.Call, want.Scores[j], rel, tol)
				}
			}
			if !slices.Equal(s.Keep, want.Support) {
				t.Errorf("%s select(%s) keeps %v, %s keeps %v", c.Name, k, s.Keep, want.Call, want.Support)
			}
			wantNames := make([]string, len(want.Support))
			for q, j := range want.Support {
				wantNames[q] = d.Features[j]
			}
			if got := p.FeatureNames(d.Features); !slices.Equal(got, wantNames) {
				t.Errorf("%s select(%s) names %q, want %q", c.Name, k, got, wantNames)
			}
			// The output is the kept columns, copied exactly.
			for q, j := range s.Keep {
				for i := range train.Len() {
					if out.At(i, q) != train.X.At(i, j) {
						t.Fatalf("%s select(%s): output column %d is not input column %d", c.Name, k, q, j)
					}
				}
			}
		}
	}
	t.Logf("largest relative difference of F from scikit-learn as a fraction of its tolerance: %.3g", worst)
	// iris has 4 features; SelectKBest(k=5) refuses (ValueError "k should
	// be <= n_features"), and so does select(5).
	d, _ := Load("iris")
	p, _ := ParsePipeline("select(5)")
	if _, err := p.FitTransformLabeled(d.X, d.Y, d.Rows); !errors.Is(err, ErrStepParam) || !strings.Contains(err.Error(), "select(5)") {
		t.Errorf("select(5) on iris: %v, want ErrStepParam naming the step", err)
	}
}

// TestPCAByHand fits pca on a matrix whose principal axes are the
// coordinate axes (derived by hand): training rows (13,20), (7,20),
// (10,21), (10,19) have mean (10,20); centred they are (+-3,0) and
// (0,+-1), so s = (sqrt 18, sqrt 2), explained variance 18/3 = 6 and
// 2/3, ratios 0.9 and 0.1, axes e1 and e2 (signed positive); the test row
// (11,18) maps to (1,-2).
func TestPCAByHand(t *testing.T) {
	X := mat.NewDense(4, 2, []float64{13, 20, 7, 20, 10, 21, 10, 19})
	p, err := ParsePipeline("pca")
	if err != nil {
		t.Fatal(err)
	}
	if _, err := p.FitTransform(X, nil); err != nil {
		t.Fatal(err)
	}
	s := p.Steps[0].(*PCA)
	// Tolerance: an SVD of a 4x2 matrix of small integers, a few ulp.
	const tol = 1e-14
	pipeCheckSlice(t, "mean", s.Mean, []float64{10, 20}, tol)
	pipeCheckSlice(t, "explained variance", s.ExplainedVariance, []float64{6, 2.0 / 3}, tol)
	pipeCheckSlice(t, "ratio", s.ExplainedVarianceRatio, []float64{0.9, 0.1}, tol)
	pipeCheckMatrix(t, "components", s.Components, [][]float64{{1, 0}, {0, 1}}, tol)
	out, err := p.Transform(mat.NewDense(1, 2, []float64{11, 18}), nil)
	if err != nil {
		t.Fatal(err)
	}
	pipeCheckMatrix(t, "test row", out, [][]float64{{1, -2}}, tol)

	// pca(0.85): 0.9 > 0.85 after one component; pca(0.95): two.
	for share, want := range map[string]int{"0.85": 1, "0.95": 2} {
		q, _ := ParsePipeline("pca(" + share + ")")
		if err := q.Fit(X, nil); err != nil {
			t.Fatal(err)
		}
		if got := q.Steps[0].(*PCA).NComponents(); got != want {
			t.Errorf("pca(%s): %d components, want %d", share, got, want)
		}
	}

	// Values near the float64 limit: the same data times 2^1000 has the
	// same axes and ratios; explained variances overflow to +Inf
	// (documented) and the output is the hand result times 2^1000.
	big := mat.NewDense(4, 2, nil)
	big.Scale(0x1p1000, X)
	b := &PCA{}
	if err := b.Fit(big); err != nil {
		t.Fatal(err)
	}
	pipeCheckSlice(t, "ratio near the limit", b.ExplainedVarianceRatio, []float64{0.9, 0.1}, tol)
	pipeCheckMatrix(t, "components near the limit", b.Components, [][]float64{{1, 0}, {0, 1}}, tol)
	if !math.IsInf(b.ExplainedVariance[0], 1) {
		t.Errorf("explained variance near the limit %g, want +Inf", b.ExplainedVariance[0])
	}
	o, err := b.Transform(mat.NewDense(1, 2, []float64{11 * 0x1p1000, 18 * 0x1p1000}), nil)
	if err != nil {
		t.Fatal(err)
	}
	pipeCheckMatrix(t, "test row near the limit", o, [][]float64{{0x1p1000, -2 * 0x1p1000}}, tol)
}

// TestPCACountRule checks the pca(f) rule on exact ratios (derived by
// hand from the rule: 1 + the number of cumulative sums <= f).
func TestPCACountRule(t *testing.T) {
	ratios := []float64{0.5, 0.25, 0.125, 0.125} // sums 0.5, 0.75, 0.875, 1 exactly
	tests := []struct {
		f    float64
		want int
	}{
		{0.25, 1},
		{0.5, 2}, // the first sum equals f: not "exceeds", so one more
		{0.6, 2},
		{0.75, 3},
		{0.9, 4},
		{0.999, 4},
	}
	for _, tt := range tests {
		if got := pcaCount(ratios, tt.f); got != tt.want {
			t.Errorf("pcaCount(%v, %v) = %d, want %d", ratios, tt.f, got, tt.want)
		}
	}
	// All ratios 0 (identical training rows): every sum <= f, capped.
	if got := pcaCount([]float64{0, 0, 0}, 0.5); got != 3 {
		t.Errorf("pcaCount of zero ratios = %d, want 3", got)
	}
}

func TestOrientAxis(t *testing.T) {
	tests := []struct{ in, want []float64 }{
		{[]float64{0.6, -0.8}, []float64{-0.6, 0.8}},            // largest |.| is -0.8: flipped
		{[]float64{-0.6, 0.8}, []float64{-0.6, 0.8}},            // already positive
		{[]float64{-0.6, 0.6, 0.5}, []float64{0.6, -0.6, -0.5}}, // tie: the lower index decides
		{[]float64{0.6, -0.6, 0.5}, []float64{0.6, -0.6, 0.5}},
	}
	for _, tt := range tests {
		v := slices.Clone(tt.in)
		orientAxis(v)
		if !slices.Equal(v, tt.want) { // negation is exact
			t.Errorf("orientAxis(%v) = %v, want %v", tt.in, v, tt.want)
		}
	}
}

// TestSelectByHand checks the F statistic and the ranking rules on small
// data (derived by hand from the formula in the SelectK comment).
func TestSelectByHand(t *testing.T) {
	// Classes 0,0,0,1,1,1. Column 0: 1,2,3,4,5,6: class means 2 and 5,
	// overall 3.5; between SS 3*1.5^2*2 = 13.5 on 1 df, within SS 4 on 4
	// df: F = 13.5. Column 1: constant 7: F undefined. Column 2: 1,1,1,
	// 2,2,2: no within-class spread: F = +Inf. Column 3: 1,3,2,2,1,3:
	// class means 2 and 2: F = 0. Column 4: a copy of column 0: F = 13.5,
	// a tie with column 0.
	X := mat.NewDense(6, 5, []float64{
		1, 7, 1, 1, 1,
		2, 7, 1, 3, 2,
		3, 7, 1, 2, 3,
		4, 7, 2, 2, 4,
		5, 7, 2, 1, 5,
		6, 7, 2, 3, 6,
	})
	y := []int{0, 0, 0, 1, 1, 1}
	s := &SelectK{K: 5}
	if err := s.FitLabeled(X, y); err != nil {
		t.Fatal(err)
	}
	if !scalar.EqualWithinAbsOrRel(s.Scores[0], 13.5, 1e-14, 1e-14) || !math.IsNaN(s.Scores[1]) ||
		!math.IsInf(s.Scores[2], 1) || s.Scores[3] != 0 || s.Scores[0] != s.Scores[4] {
		t.Errorf("scores %v, want [13.5 NaN +Inf 0 13.5]", s.Scores)
	}
	// Ranking: +Inf (2), then the tie 13.5 (0 before 4), then 0 (3), then
	// the constant (1). Kept features are listed in input order.
	for k, want := range map[int][]int{1: {2}, 2: {0, 2}, 3: {0, 2, 4}, 4: {0, 2, 3, 4}, 5: {0, 1, 2, 3, 4}} {
		s := &SelectK{K: k}
		if err := s.FitLabeled(X, y); err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(s.Keep, want) {
			t.Errorf("select(%d) keeps %v, want %v", k, s.Keep, want)
		}
	}
	// Scaled near the float64 limit, F is unchanged (it is scale free).
	big := mat.NewDense(6, 5, nil)
	big.Scale(0x1p1020, X)
	b := &SelectK{K: 2}
	if err := b.FitLabeled(big, y); err != nil {
		t.Fatal(err)
	}
	if !scalar.EqualWithinAbsOrRel(b.Scores[0], 13.5, 1e-14, 1e-14) || !slices.Equal(b.Keep, []int{0, 2}) {
		t.Errorf("near the limit: scores %v keep %v", b.Scores, b.Keep)
	}
	// Labels need not be 0..C-1.
	c := &SelectK{K: 1}
	if err := c.FitLabeled(X, []int{7, 7, 7, 3, 3, 3}); err != nil || c.Scores[0] != s.Scores[0] {
		t.Errorf("labels 7 and 3: %v, score %v", err, c.Scores)
	}
}

// TestReduceBadInput covers parse errors, fit-time size errors and
// missing labels; every error names the step.
func TestReduceBadInput(t *testing.T) {
	bad := []struct{ in, mention string }{
		{"pca(0)", "pca(0)"},
		{"pca(00)", "pca(00)"},
		{"pca(1.5)", "pca(1.5)"},
		{"pca(-2)", "pca(-2)"},
		{"pca(x)", "pca(x)"},
		{"pca(1.0)", "write pca(1)"},
		{"pca(1e0)", "write pca(1)"},
		{"pca(3.0)", "write pca(3)"},
		{"pca()", "pca()"},
		{"pca(NaN)", "pca(NaN)"},
		{"pca(99999999999999999999)", "too large"},
		{"select(0)", "select(0)"},
		{"select(2.5)", "select(2.5)"},
		{"select(x)", "select(x)"},
		{"select()", "select()"},
		{"std+pca(0.95", "missing closing parenthesis"},
	}
	for _, b := range bad {
		_, err := ParsePipeline(b.in)
		if !errors.Is(err, ErrStepParam) || !strings.Contains(err.Error(), b.mention) {
			t.Errorf("ParsePipeline(%q): %v, want ErrStepParam mentioning %q", b.in, err, b.mention)
		}
	}
	good := map[string]string{
		"pca": "pca", "pca(2)": "pca(2)", "pca(02)": "pca(2)", "pca(0.95)": "pca(0.95)", "pca(.5)": "pca(0.5)",
		"pca(1e-3)": "pca(0.001)", "pca(1)": "pca(1)", "select": "select", "select(10)": "select", "select(3)": "select(3)",
		"std+pca(4)+l2": "std+pca(4)+l2", "std+select(2)+pca(1)": "std+select(2)+pca(1)",
	}
	for in, canon := range good {
		p, err := ParsePipeline(in)
		if err != nil || p.String() != canon {
			t.Errorf("ParsePipeline(%q) = %v, %v; want %q", in, p, err, canon)
			continue
		}
		if q, err := ParsePipeline(canon); err != nil || q.String() != canon {
			t.Errorf("canonical %q does not round trip: %v", canon, err)
		}
	}

	X := mat.NewDense(3, 4, []float64{1, 2, 3, 4, 2, 1, 0, 5, 3, 3, 1, 1})
	y := []int{0, 1, 1}
	fit := []struct {
		pipe    string
		X       *mat.Dense
		y       []int
		want    error
		mention string
	}{
		{"pca(5)", X, nil, ErrStepParam, "5 components asked for, but the training part has 4 features and 3 rows (at most 3"},
		{"pca(4)", X, nil, ErrStepParam, "has 4 features and 3 rows"},
		{"std+pca(4)", X, nil, ErrStepParam, "pca(4)"},
		{"pca", mat.NewDense(1, 4, []float64{1, 2, 3, 4}), nil, ErrStepData, "at least 2 training rows"},
		{"select(2)", X, nil, ErrNeedsLabels, "select(2)"},
		{"select(5)", X, y, ErrStepParam, "5 features asked for, but the training part has 4"},
		{"select(2)", X, []int{1, 1, 1}, ErrStepData, "two classes"},
		{"select(2)", mat.NewDense(2, 4, []float64{1, 2, 3, 4, 2, 1, 0, 5}), []int{0, 1}, ErrStepData, "more training rows than classes"},
	}
	for _, f := range fit {
		p, err := ParsePipeline(f.pipe)
		if err != nil {
			t.Fatal(err)
		}
		if f.y == nil {
			_, err = p.FitTransform(f.X, nil)
		} else {
			_, err = p.FitTransformLabeled(f.X, f.y, nil)
		}
		if !errors.Is(err, f.want) || !strings.Contains(err.Error(), f.mention) || !strings.HasPrefix(err.Error(), "datasets: pipeline "+f.pipe) {
			t.Errorf("%s: %v, want %v mentioning %q", f.pipe, err, f.want, f.mention)
		}
	}
	for _, s := range []Step{&PCA{K: 2}, &SelectK{K: 1}} {
		if _, err := s.Transform(X, nil); !errors.Is(err, ErrNotFitted) {
			t.Errorf("%s: Transform before Fit: %v, want ErrNotFitted", s.Name(), err)
		}
	}
	p, _ := ParsePipeline("pca(2)")
	if err := p.Fit(X, nil); err != nil {
		t.Fatal(err)
	}
	if _, err := p.Transform(mat.NewDense(1, 3, []float64{1, 2, 3}), nil); err == nil {
		t.Error("pca fitted on 4 features accepted 3")
	}
	if q, _ := ParsePipeline("std+select(2)"); !q.NeedsLabels() {
		t.Error("std+select(2) does not report that it needs labels")
	}
	if q, _ := ParsePipeline("std+pca(2)"); q.NeedsLabels() {
		t.Error("std+pca(2) reports that it needs labels")
	}
	// A labeled fit of a pipeline without labeled steps equals a plain fit.
	a, _ := ParsePipeline("std+pca(2)")
	b, _ := ParsePipeline("std+pca(2)")
	za, err1 := a.FitTransform(X, nil)
	zb, err2 := b.FitTransformLabeled(X, y, nil)
	if err1 != nil || err2 != nil || !mat.Equal(za, zb) { // same arithmetic: exact
		t.Errorf("labeled and plain fits differ: %v %v", err1, err2)
	}
}

// TestCheckDims: the plan-time check gives the errors Fit would give, and
// the output width.
func TestCheckDims(t *testing.T) {
	tests := []struct {
		pipe           string
		rows, features int
		width          int
		want           error
		mention        string
	}{
		{"std+l2", 100, 4, 4, nil, ""},
		{"pad+lift", 100, 5, 9, nil, ""},
		{"std+pca(4)+l2", 100, 4, 4, nil, ""},
		{"std+pca(5)", 100, 4, 0, ErrStepParam, "pca(5): 5 components asked for, but the training part has 4 features and 100 rows"},
		{"pca(5)", 3, 13, 0, ErrStepParam, "has 13 features and 3 rows (at most 3 components)"},
		{"pca", 1, 13, 0, ErrStepData, "at least 2 training rows"},
		{"pca(0.9)+select(2)", 100, 13, 2, nil, ""},
		{"pca(0.9)", 5, 13, 5, nil, ""}, // an upper bound: min(rows, width)
		{"lift+select(5)", 100, 4, 5, nil, ""},
		{"select(5)", 100, 4, 0, ErrStepParam, "select(5): 5 features asked for, but the training part has 4"},
		{"norm+select(2)", 100, 4, 0, ErrStepParam, "select(2)"},
		{"pca(2)+select(3)", 100, 4, 0, ErrStepParam, "select(3)"},
	}
	for _, tt := range tests {
		p, err := ParsePipeline(tt.pipe)
		if err != nil {
			t.Fatal(err)
		}
		w, err := p.CheckDims(tt.rows, tt.features)
		if tt.want == nil {
			if err != nil || w != tt.width {
				t.Errorf("%s on %dx%d: width %d, %v; want %d", tt.pipe, tt.rows, tt.features, w, err, tt.width)
			}
			continue
		}
		if !errors.Is(err, tt.want) || !strings.Contains(err.Error(), tt.mention) || !strings.HasPrefix(err.Error(), "datasets: pipeline "+tt.pipe+": ") {
			t.Errorf("%s on %dx%d: %v, want %v mentioning %q", tt.pipe, tt.rows, tt.features, err, tt.want, tt.mention)
		}
	}
	// The width agrees with an actual fit where it is exact.
	d, _ := Load("wine")
	for _, pipe := range []string{"std+pca(4)+l2", "minmax+select(5)+lift", "pad+pca(3)"} {
		p, _ := ParsePipeline(pipe)
		w, err := p.CheckDims(d.Len(), d.Dim())
		if err != nil {
			t.Fatal(err)
		}
		out, err := p.FitTransformLabeled(d.X, d.Y, d.Rows)
		if err != nil {
			t.Fatal(err)
		}
		if _, c := out.Dims(); c != w {
			t.Errorf("%s: CheckDims width %d, fitted output has %d columns", pipe, w, c)
		}
	}
}

// TestReduceLeakage: as TestLeakage for the other steps, pca and select
// fitted on training rows give the same training output whatever the test
// rows are, and transforming test rows leaves the fitted state alone.
func TestReduceLeakage(t *testing.T) {
	d, err := Load("wine")
	if err != nil {
		t.Fatal(err)
	}
	var trainIdx []int
	for i := range d.Len() {
		if i%3 != 0 {
			trainIdx = append(trainIdx, i)
		}
	}
	train := d.Select(trainIdx)
	tests := []*mat.Dense{
		mat.NewDense(2, d.Dim(), nil),
		mat.NewDense(2, d.Dim(), nil),
	}
	for j := range d.Dim() {
		tests[0].Set(0, j, 1e12)
		tests[0].Set(1, j, -3e9)
		tests[1].Set(0, j, float64(j))
		tests[1].Set(1, j, 1e-7)
	}
	for _, pipe := range []string{"pca(3)", "std+pca(0.8)", "std+select(4)+pca(2)+l2", "select(5)", "minmax+select+lift"} {
		var first *mat.Dense
		for k, test := range tests {
			p, err := ParsePipeline(pipe)
			if err != nil {
				t.Fatal(err)
			}
			trainOut, err := p.FitTransformLabeled(train.X, train.Y, train.Rows)
			if err != nil {
				t.Fatalf("%s: %v", pipe, err)
			}
			if _, err := p.Transform(test, nil); err != nil {
				t.Fatalf("%s: %v", pipe, err)
			}
			again, err := p.Transform(train.X, train.Rows)
			if err != nil {
				t.Fatal(err)
			}
			// Identical inputs through identical arithmetic: exact.
			if !mat.Equal(again, trainOut) {
				t.Errorf("%s: transforming test set %d changed the fitted state", pipe, k)
			}
			if first == nil {
				first = trainOut
			} else if !mat.Equal(first, trainOut) {
				t.Errorf("%s: training output depends on the test rows", pipe)
			}
		}
	}
	// The fitted mean is the training mean, not that of all rows.
	p := &PCA{K: 2}
	if err := p.Fit(train.X); err != nil {
		t.Fatal(err)
	}
	col := mat.Col(nil, 12, train.X)
	if want := floats.Sum(col) / float64(len(col)); !scalar.EqualWithinAbsOrRel(p.Mean[12], want, 0, 1e-15) {
		t.Errorf("pca mean of proline %g, want the training mean %g", p.Mean[12], want)
	}
}

// anovaSums returns the between- and within-class sums of squares of x
// (centred two-pass sums) and the raw sum of squares.
func anovaSums(x []float64, y []int) (ssb, ssw, sq float64) {
	sum, cnt := map[int]float64{}, map[int]float64{}
	var total float64
	for i, v := range x {
		sum[y[i]] += v
		cnt[y[i]]++
		total += v
		sq += v * v
	}
	m := total / float64(len(x))
	for c := range sum {
		d := sum[c]/cnt[c] - m
		ssb += cnt[c] * d * d
	}
	for i, v := range x {
		d := v - sum[y[i]]/cnt[y[i]]
		ssw += d * d
	}
	return ssb, ssw, sq
}

func parseF(s string) float64 {
	f, err := strconv.ParseFloat(s, 64)
	if err != nil {
		panic(err)
	}
	return f
}
