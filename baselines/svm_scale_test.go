package baselines

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"
)

// blobs returns n seeded rows in d dimensions from k classes (labels dealt
// round robin), each class a Gaussian blob of unit spread around its own
// centre; the centres are drawn N(0, sep²) per coordinate from a generator
// seeded by k alone, so that every n and seed samples the same
// distribution, and sep sets the overlap (and with it the share of
// support vectors).
func blobs(seed uint64, n, d, k int, sep float64) (*mat.Dense, []int) {
	crng := rand.New(rand.NewPCG(uint64(k), 0xce47e5)) // the centres depend on k and d only
	centre := make([][]float64, k)
	for c := range centre {
		centre[c] = make([]float64, d)
		for j := range centre[c] {
			centre[c][j] = sep * crng.NormFloat64()
		}
	}
	rng := rand.New(rand.NewPCG(seed, 0xb10b))
	X := mat.NewDense(n, d, nil)
	y := make([]int, n)
	for i := range n {
		y[i] = i % k
		row := X.RawRowView(i)
		for j := range row {
			row[j] = centre[y[i]][j] + rng.NormFloat64()
		}
	}
	return X, y
}

// scaleSep is the centre spread of the scale benchmarks' blobs: with
// d = 16 it leaves the classes overlapping (about a quarter of the rows
// end as support vectors at C = 1, measured), so the solver has real work.
const scaleSep = 0.75

// BenchmarkSVMFit fits an RBF SVM (C = 1, gamma "scale", default cache and
// shrinking) on seeded Gaussian blobs (see blobs) of n rows, d = 16, in 2
// or 10 classes. Metrics: support vectors, solver iterations and kernel
// evaluations per fit.
func BenchmarkSVMFit(b *testing.B) {
	for _, k := range []int{2, 10} {
		for _, n := range []int{2000, 8000, 32000, 50000} {
			b.Run(fmt.Sprintf("n=%d/d=16/classes=%d", n, k), func(b *testing.B) {
				X, y := blobs(uint64(n), n, 16, k, scaleSep)
				s := &SVM{}
				b.ReportAllocs()
				for b.Loop() {
					if err := s.Fit(X, y, k); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(len(s.SupportIndices())), "SVs")
				b.ReportMetric(float64(s.fit.iter), "iters/op")
				b.ReportMetric(float64(s.fit.evals), "kevals/op")
			})
		}
	}
}

// TestSVMShrinkingSameSolution fits generated blobs (d = 16; 2000 rows in
// 2 classes, 3000 in 3) with and without shrinking, and with a kernel cache far
// below the Gram matrix (0.5 MiB, about 20 rows of a task) and the
// default. Shrinking changes the path, not the stopping rule (m − M ≤ Tol
// = 1e-6 on all variables): training decision values are pinned to ~1e-6
// either way and test values move by a small multiple; 1e-4 is well above
// that and far below the O(1) values. Predictions must agree wherever the
// value is farther than 1e-4 from 0. The cache bound changes nothing (rows
// are recomputed by the same arithmetic): those values agree to 1e-12,
// which only avoids == on floats.
func TestSVMShrinkingSameSolution(t *testing.T) {
	const tol = 1e-4
	classes, perClass := []int{2, 3}, 1000
	if testing.Short() {
		classes, perClass = classes[:1], 500
	}
	for _, k := range classes {
		// Closer centres (0.4) and C = 10 make the tasks long enough
		// (more iterations than rows) for shrinking to start.
		X, y := blobs(uint64(70+k), perClass*k, 16, k, 0.4)
		T, _ := blobs(uint64(80+k), 300, 16, k, 0.4)
		fit := func(s SVM) (*mat.Dense, []int, SVMStats) {
			t.Helper()
			s.Tol, s.C = 1e-6, 10
			if err := s.Fit(X, y, k); err != nil {
				t.Fatal(err)
			}
			d, err := s.DecisionFunction(T)
			if err != nil {
				t.Fatal(err)
			}
			p, err := s.Predict(T)
			if err != nil {
				t.Fatal(err)
			}
			return d, p, s.Stats()
		}
		dOff, pOff, stOff := fit(SVM{NoShrinking: true})
		dOn, pOn, stOn := fit(SVM{})
		dSmall, _, _ := fit(SVM{CacheMiB: 0.5})
		r, c := dOn.Dims()
		worst := 0.0
		for i := range r {
			near := false
			for j := range c {
				a, b := dOn.At(i, j), dOff.At(i, j)
				worst = max(worst, math.Abs(a-b))
				near = near || math.Abs(b) <= tol
				if !scalar.EqualWithinAbs(a, b, tol) {
					t.Errorf("classes=%d: decision[%d][%d] = %.9f with shrinking, %.9f without", k, i, j, a, b)
				}
				if s := dSmall.At(i, j); !scalar.EqualWithinAbsOrRel(s, a, 1e-12, 1e-12) {
					t.Errorf("classes=%d: decision[%d][%d] = %.17g with a 0.5 MiB cache, %.17g with 200 MiB", k, i, j, s, a)
				}
			}
			if !near && pOn[i] != pOff[i] {
				t.Errorf("classes=%d: predict[%d] = %d with shrinking, %d without", k, i, pOn[i], pOff[i])
			}
		}
		if stOn.Shrinks == 0 || stOff.Shrinks != 0 {
			t.Errorf("classes=%d: %d shrinking passes with shrinking, %d without; want some and none", k, stOn.Shrinks, stOff.Shrinks)
		}
		t.Logf("classes=%d: max |with − without| %.2e; %d iterations, %d shrinking passes and %d kernel evaluations with shrinking, %d iterations and %d evaluations without",
			k, worst, stOn.Iterations, stOn.Shrinks, stOn.KernelEvals, stOff.Iterations, stOff.KernelEvals)
	}
}

// TestSVMMemoryBytes checks the estimate against its formula (derived by
// hand from the terms in MemoryBytes' comment) where the Gram matrix fits
// in the cache, and its properties: the cache term is bounded by CacheMiB
// and not by n², the estimate grows with n, a tuned grid needs more, and
// bad sizes or options are errors.
func TestSVMMemoryBytes(t *testing.T) {
	s := &SVM{}
	// n = 100, d = 4, 3 classes: the Gram matrix (80,000 bytes) fits.
	got, err := s.MemoryBytes(100, 4, 3)
	if err != nil {
		t.Fatal(err)
	}
	want := int64(2 * ((8*100*100 + 100*(8*4+taskBytesPerRow)) + (100*(8*4+fitBytesPerRow) + 100*2*coefBytes)))
	if got != want {
		t.Errorf("MemoryBytes(100, 4, 3) = %d, want %d", got, want)
	}
	// n = 50,000: the cache term is the bound, not 8n² = 20 GB.
	big, _ := s.MemoryBytes(50000, 16, 2)
	small, _ := (&SVM{CacheMiB: 20}).MemoryBytes(50000, 16, 2)
	if big > 1<<30 || big-small != 2*180<<20 {
		t.Errorf("MemoryBytes(50000, 16, 2) = %d with 200 MiB, %d with 20 MiB; want under 1 GiB and 360 MiB apart", big, small)
	}
	if prev, _ := s.MemoryBytes(40000, 16, 2); prev >= big {
		t.Errorf("estimate does not grow with n: %d for 40,000 rows, %d for 50,000", prev, big)
	}
	tuned, err := (&TunedSVM{Cs: []float64{1, 10}}).MemoryBytes(50000, 16, 2)
	if err != nil || tuned <= big {
		t.Errorf("TunedSVM.MemoryBytes = %d, %v; want more than one fit's %d", tuned, err, big)
	}
	for _, bad := range [][3]int{{-1, 4, 2}, {10, -1, 2}, {10, 4, -1}} {
		if _, err := s.MemoryBytes(bad[0], bad[1], bad[2]); !errors.Is(err, ErrParam) {
			t.Errorf("MemoryBytes%v: %v, want %v", bad, err, ErrParam)
		}
	}
	if _, err := (&SVM{CacheMiB: -1}).MemoryBytes(10, 4, 2); !errors.Is(err, ErrParam) {
		t.Errorf("CacheMiB -1: %v, want %v", err, ErrParam)
	}
	// The plan-time check: within and above a limit.
	if err := s.CheckMemory(50000, 16, 2, big); err != nil {
		t.Errorf("CheckMemory at the estimate: %v", err)
	}
	err = s.CheckMemory(50000, 16, 2, big-1)
	if !errors.Is(err, ErrMemory) {
		t.Fatalf("CheckMemory below the estimate: %v, want %v", err, ErrMemory)
	}
	t.Logf("refusal: %v", err)
	if err := (&TunedSVM{}).CheckMemory(50000, 16, 2, 1<<20); !errors.Is(err, ErrMemory) {
		t.Errorf("TunedSVM.CheckMemory with 1 MiB: %v, want %v", err, ErrMemory)
	}
}
