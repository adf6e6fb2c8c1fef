package baselines

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"
)

func TestParseKernel(t *testing.T) {
	for _, tc := range []struct {
		s    string
		want KernelKind
	}{
		{"rbf", KernelRBF},
		{"linear", KernelLinear},
		{"poly", KernelPoly},
		{"interference", KernelInterference},
	} {
		got, err := ParseKernel(tc.s)
		if err != nil || got != tc.want {
			t.Errorf("ParseKernel(%q) = %v, %v; want %v", tc.s, got, err, tc.want)
		}
		if got.String() != tc.s {
			t.Errorf("%v.String() = %q, want %q", got, got.String(), tc.s)
		}
	}
	for _, s := range []string{"", "RBF", "sigmoid", "precomputed", " linear"} {
		if _, err := ParseKernel(s); !errors.Is(err, ErrParam) {
			t.Errorf("ParseKernel(%q) error %v, want %v", s, err, ErrParam)
		}
	}
	if KernelKind(0) != KernelRBF {
		t.Error("zero KernelKind is not RBF")
	}
	if got := KernelKind(7).String(); got != "KernelKind(7)" {
		t.Errorf("KernelKind(7).String() = %q", got)
	}
}

// TestKernelValues: x = (1, 2), x' = (3, −1) give <x, x'> = 1 and
// ||x − x'||² = 13. Values derived by hand from the kernel definitions in
// kernel.go.
func TestKernelValues(t *testing.T) {
	x, xp := []float64{1, 2}, []float64{3, -1}
	for _, tc := range []struct {
		k    kernel
		want float64
	}{
		{kernel{kind: KernelLinear}, 1},
		{kernel{kind: KernelRBF, gamma: 0.1}, math.Exp(-1.3)},
		{kernel{kind: KernelPoly, gamma: 0.5, degree: 3, coef0: 1}, 3.375},     // 1.5³
		{kernel{kind: KernelPoly, gamma: 2, degree: 4, coef0: -3}, 1},          // (−1)⁴
		{kernel{kind: KernelPoly, gamma: 1, degree: 1, coef0: 0.5}, 1.5},       // 1 + 0.5
		{kernel{kind: KernelInterference, gamma: 9, degree: 7, coef0: 5}, 1.0}, // (1 + 1)/2; parameters ignored
	} {
		// A few operations on small integers: exact up to one rounding.
		if got := tc.k.eval(x, xp); !scalar.EqualWithinAbsOrRel(got, tc.want, 1e-15, 1e-15) {
			t.Errorf("%v %+v: k(x, x') = %.17g, want %.17g", tc.k.kind, tc.k, got, tc.want)
		}
		// The row form (RBF through the expanded distance) agrees with eval.
		pts := [][]float64{x, xp}
		sq := []float64{floats.Dot(x, x), floats.Dot(xp, xp)}
		row := make([]float64, 2)
		tc.k.row(row, x, sq[0], denseRows(pts, 2), sq)
		if !scalar.EqualWithinAbsOrRel(row[1], tc.want, 1e-15, 1e-15) {
			t.Errorf("%v: row form k(x, x') = %.17g, want %.17g", tc.k.kind, row[1], tc.want)
		}
	}
	for n, want := range []float64{1, -1.5, 2.25, -3.375, 5.0625} {
		if got := powi(-1.5, n); !scalar.EqualWithinAbsOrRel(got, want, 1e-15, 1e-15) {
			t.Errorf("powi(-1.5, %d) = %g, want %g", n, got, want)
		}
	}
}

// TestInterferenceKernelUnitVectors: on unit vectors (1 + <x, x'>)/2 equals
// 1 − ||x − x'||²/4, since ||x − x'||² = 2 − 2<x, x'> (derived by hand;
// kernel of Schuld, Fingerhuth & Petruccione, EPL 119, 60002, 2017).
func TestInterferenceKernelUnitVectors(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	k := kernel{kind: KernelInterference}
	for range 200 {
		a, b := randUnit(rng, 5), randUnit(rng, 5)
		want := 1 - sqDist(a, b)/4
		// Two rounding paths of O(1) quantities: 1e-14.
		if got := k.eval(a, b); !scalar.EqualWithinAbs(got, want, 1e-14) {
			t.Fatalf("k(a, b) = %.17g, 1 - |a-b|²/4 = %.17g", got, want)
		}
	}
}

func randUnit(rng *rand.Rand, d int) []float64 {
	v := make([]float64, d)
	for i := range v {
		v[i] = rng.NormFloat64()
	}
	floats.Scale(1/floats.Norm(v, 2), v)
	return v
}

// TestKernelsPSD: the Gram matrices of the RBF, linear, interference and
// polynomial (coef0 ≥ 0) kernels on arbitrary, non-normalised points are
// positive semidefinite (common practice: Schur products and sums of PSD
// kernels are PSD; the interference kernel is 1/2 plus half the linear
// one). The smallest eigenvalue may dip below zero by rounding only,
// ~n·eps·max|K|; the bound −1e-9·max|K| allows for that.
func TestKernelsPSD(t *testing.T) {
	rng := rand.New(rand.NewPCG(2, 2))
	const n = 40
	pts := make([][]float64, n)
	for i := range pts {
		pts[i] = make([]float64, 3)
		for j := range pts[i] {
			pts[i][j] = 3 * rng.NormFloat64()
		}
	}
	for _, k := range []kernel{
		{kind: KernelRBF, gamma: 0.2},
		{kind: KernelLinear},
		{kind: KernelInterference},
		{kind: KernelPoly, gamma: 0.3, degree: 2, coef0: 1},
	} {
		K := mat.NewSymDense(n, nil)
		var kmax float64
		for i := range n {
			for j := i; j < n; j++ {
				v := k.eval(pts[i], pts[j])
				K.SetSym(i, j, v)
				kmax = max(kmax, math.Abs(v))
			}
		}
		var eig mat.EigenSym
		if !eig.Factorize(K, false) {
			t.Fatalf("%v: eigendecomposition failed", k.kind)
		}
		if lmin := eig.Values(nil)[0]; lmin < -1e-9*kmax {
			t.Errorf("%v: smallest eigenvalue %g < 0", k.kind, lmin)
		}
	}
}

// TestScaleGamma: X = [[0, 0], [2, 2]] has entries {0, 0, 2, 2}, population
// variance 1, so "scale" = 1/(2·1) = 0.5; a constant X has variance 0 and
// gets 1 (scikit-learn's rule for gamma="scale"; derived by hand). The
// fixture cases check the rule against SVC._gamma of scikit-learn 1.2.1.
func TestScaleGamma(t *testing.T) {
	if got := scaleGamma([][]float64{{0, 0}, {2, 2}}); !scalar.EqualWithinAbsOrRel(got, 0.5, 1e-15, 1e-15) {
		t.Errorf("scaleGamma = %g, want 0.5", got)
	}
	if got := scaleGamma([][]float64{{3, 3, 3}, {3, 3, 3}}); !scalar.EqualWithinAbsOrRel(got, 1, 1e-15, 1e-15) {
		t.Errorf("scaleGamma of constant X = %g, want 1", got)
	}
}

// TestKernelCache checks served rows against direct evaluation, the bound
// on held rows and the evaluation count, for budgets from the minimum (two
// rows) to the whole matrix, with rows requested at varying lengths (as
// the solver does after shrinking) and positions swapped in between.
func TestKernelCache(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 9))
	pts, _ := randomTwoClass(rng, 30, 4, 0.5)
	n := len(pts)
	k := kernel{kind: KernelRBF, gamma: 0.4}
	type req struct{ i, L int }
	order := []req{{0, 30}, {5, 30}, {0, 30}, {29, 12}, {3, 30}, {5, 7}, {7, 30}, {8, 30}, {9, 30}, {10, 30},
		{11, 30}, {0, 30}, {12, 3}, {13, 30}, {29, 30}, {29, 30}, {1, 30}, {12, 30}, {4, 20}}
	swaps := map[int][2]int{6: {2, 20}, 13: {0, 29}, 15: {4, 4}, 17: {12, 3}}
	for _, budget := range []int{0, 2 * n, 7 * n, n * n} {
		t.Run(fmt.Sprintf("budget=%d", budget), func(t *testing.T) {
			c := newKernelCache(k, pts, budget)
			if want := budget == 0 || budget == n*n; c.full != want {
				t.Fatalf("full = %v, want %v", c.full, want)
			}
			perm := make([]int, n) // position -> original point
			for i := range perm {
				perm[i] = i
			}
			for step, rq := range order {
				if sw, ok := swaps[step]; ok {
					c.swap(sw[0], sw[1])
					perm[sw[0]], perm[sw[1]] = perm[sw[1]], perm[sw[0]]
				}
				r := c.row(rq.i, rq.L)
				if len(r) != rq.L {
					t.Fatalf("step %d: row length %d, want %d", step, len(r), rq.L)
				}
				for q, v := range r {
					// Expanded distance vs direct difference: rounding of
					// O(10) squared norms, ~1e-14 in the exponent.
					if want := k.eval(pts[perm[rq.i]], pts[perm[q]]); !scalar.EqualWithinAbsOrRel(v, want, 1e-12, 1e-12) {
						t.Fatalf("step %d: K[%d][%d] = %.17g, want %.17g", step, rq.i, q, v, want)
					}
				}
				if c.held > c.budget {
					t.Fatalf("step %d: %d values held, bound %d", step, c.held, c.budget)
				}
				if !slices.Equal(c.perm, perm) {
					t.Fatalf("step %d: perm %v, want %v", step, c.perm, perm)
				}
			}
			if c.full {
				// Every row fits: each row is computed at most once over
				// each position (at most n evaluations per row).
				if c.evals > int64(c.rowsHeld()*n) {
					t.Errorf("%d evaluations for %d rows of %d", c.evals, c.rowsHeld(), n)
				}
			}
			for i, v := range c.diag {
				if !scalar.EqualWithinAbs(v, 1, 1e-15) {
					t.Errorf("diag[%d] = %g, want 1 for RBF", i, v)
				}
			}
			c.release()
		})
	}
}

// TestKernelCacheFromParent: rows gathered from a parent cache over a
// superset of the points equal rows computed directly (the same numbers,
// copied), before and after swaps, and the child evaluates no kernel.
func TestKernelCacheFromParent(t *testing.T) {
	rng := rand.New(rand.NewPCG(10, 10))
	pts, _ := randomTwoClass(rng, 40, 3, 0.5)
	k := kernel{kind: KernelPoly, gamma: 0.5, degree: 2, coef0: 1}
	parent := newKernelCache(k, pts, 0)
	idx := []int{3, 1, 4, 15, 9, 26, 5, 35, 8, 39}
	sub := make([][]float64, len(idx))
	for q, p := range idx {
		sub[q] = pts[p]
	}
	own := newKernelCache(k, sub, 2*len(idx))
	child := newKernelCacheFrom(parent, idx, 2*len(idx))
	for step, p := range []int{0, 9, 4, 4, 2, 7, 0} {
		if step == 3 {
			own.swap(1, 8)
			child.swap(1, 8)
		}
		a, b := own.row(p, len(idx)), child.row(p, len(idx))
		for q := range a {
			// Parent rows over the superset use the same arithmetic per
			// entry (one Dgemv dot product, then the kernel transform),
			// so 1e-14 only avoids == on floats.
			if !scalar.EqualWithinAbsOrRel(b[q], a[q], 1e-14, 1e-14) {
				t.Fatalf("step %d: child K[%d][%d] = %.17g, own %.17g", step, p, q, b[q], a[q])
			}
		}
		if !scalar.EqualWithinAbsOrRel(child.diag[p], own.diag[p], 1e-15, 1e-15) {
			t.Fatalf("diag[%d]: child %g, own %g", p, child.diag[p], own.diag[p])
		}
	}
	if child.evals != 0 {
		t.Errorf("child evaluated %d kernel values, want 0", child.evals)
	}
}

// BenchmarkKernelRow measures one Gram-matrix row of n = 512 points in
// d = 30, reported per kernel evaluation.
func BenchmarkKernelRow(b *testing.B) {
	rng := rand.New(rand.NewPCG(7, 8))
	pts, _ := randomTwoClass(rng, 512, 30, 0.25)
	sq := make([]float64, len(pts))
	for i, p := range pts {
		sq[i] = floats.Dot(p, p)
	}
	for _, k := range []kernel{
		{kind: KernelRBF, gamma: 1.0 / 30},
		{kind: KernelLinear},
		{kind: KernelPoly, gamma: 1.0 / 30, degree: 3, coef0: 1},
		{kind: KernelInterference},
	} {
		m := denseRows(pts, 30)
		b.Run(fmt.Sprintf("kernel=%v/n=512/d=30", k.kind), func(b *testing.B) {
			dst := make([]float64, len(pts))
			b.ReportAllocs()
			i := 0
			for b.Loop() {
				k.row(dst, pts[i], sq[i], m, sq)
				i = (i + 1) % len(pts)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(len(pts)), "ns/keval")
		})
	}
}
