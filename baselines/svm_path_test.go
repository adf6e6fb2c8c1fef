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

// pathCase is one data set for the path tests.
type pathCase struct {
	name   string
	X, T   *mat.Dense // training and test points
	y      []int
	nClass int
	svm    SVM
}

func pathCases(t *testing.T) []pathCase {
	t.Helper()
	var cases []pathCase
	ovo := loadSVMFixture(t, "svm_ovo.json").Cases[0] // Iris, RBF, gamma scale
	cases = append(cases, pathCase{"iris/rbf", denseOf(t, ovo.XTrain), denseOf(t, ovo.XTest), ovo.YTrain, 3, SVM{}})
	bin := loadSVMFixture(t, "svm_binary.json").Cases[5] // synthetic, linear
	cases = append(cases, pathCase{"synthetic/linear", denseOf(t, bin.XTrain), denseOf(t, bin.XTest), bin.YTrain, 2, SVM{Kernel: KernelLinear}})
	for _, k := range []int{2, 4} {
		if testing.Short() {
			break // the fixture cases only
		}
		X, y := blobs(uint64(40+k), 1500, 16, k, scaleSep)
		T, _ := blobs(uint64(50+k), 200, 16, k, scaleSep)
		cases = append(cases, pathCase{fmt.Sprintf("blobs/n=1500/classes=%d", k), X, T, y, k, SVM{}})
	}
	return cases
}

// TestFitPathMatchesIndependentFits: every model of a path (shared kernel
// rows, warm starts) equals an independent Fit with its C. Both stop at
// m − M ≤ Tol = 1e-8, so training-point decision values are pinned to
// within about 1e-8 at both solutions; test decision values agree far
// better than svmAgreeTol (1e-3, the tolerance against scikit-learn), used
// here. Predictions must be identical wherever the decision value is
// farther than svmAgreeTol from 0. The C values are given out of order to
// check that each model keeps its own.
func TestFitPathMatchesIndependentFits(t *testing.T) {
	cs := []float64{10, 0.1, 100, 1}
	for _, pc := range pathCases(t) {
		for _, shrink := range []bool{false, true} {
			t.Run(fmt.Sprintf("%s/shrink=%v", pc.name, shrink), func(t *testing.T) {
				base := pc.svm
				base.Tol = 1e-8
				base.NoShrinking = !shrink
				path, err := base.FitPath(pc.X, pc.y, pc.nClass, cs)
				if err != nil {
					t.Fatal(err)
				}
				var itPath, itAlone int
				var evPath, evAlone int64
				worst := 0.0
				for k, c := range cs {
					m := path[k]
					if m.C != c {
						t.Fatalf("model %d has C = %g, want %g", k, m.C, c)
					}
					alone := base
					alone.C = c
					if err := alone.Fit(pc.X, pc.y, pc.nClass); err != nil {
						t.Fatal(err)
					}
					itPath += m.Stats().Iterations
					evPath += m.Stats().KernelEvals
					itAlone += alone.Stats().Iterations
					evAlone += alone.Stats().KernelEvals
					dp, err := m.DecisionFunction(pc.T)
					if err != nil {
						t.Fatal(err)
					}
					da, err := alone.DecisionFunction(pc.T)
					if err != nil {
						t.Fatal(err)
					}
					pp, _ := m.Predict(pc.T)
					pa, _ := alone.Predict(pc.T)
					r, nc := da.Dims()
					for i := range r {
						near := false
						for j := range nc {
							a, b := dp.At(i, j), da.At(i, j)
							near = near || math.Abs(b) <= svmAgreeTol
							worst = max(worst, math.Abs(a-b))
							if !scalar.EqualWithinAbs(a, b, svmAgreeTol) {
								t.Errorf("C=%g: decision[%d][%d] = %.9f on the path, %.9f alone", c, i, j, a, b)
							}
						}
						if !near && pp[i] != pa[i] {
							t.Errorf("C=%g: predict[%d] = %d on the path, %d alone", c, i, pp[i], pa[i])
						}
					}
				}
				t.Logf("max |path − alone| %.2e; iterations %d on the path, %d alone; kernel evaluations %d on the path, %d alone",
					worst, itPath, itAlone, evPath, evAlone)
				if evPath > evAlone {
					t.Errorf("the path evaluated %d kernel values, more than %d for independent fits", evPath, evAlone)
				}
			})
		}
	}
}

// TestSeedAlphaFeasible: the warm start of FitPath is feasible for the new
// C (derived by hand in FitPath's comment): multipliers in [0, C_new],
// zeros kept, every multiplier scaled by one common factor, and Σ y a
// scaled by it too, so ≈ 0 up to rounding (one rounding per term of size
// ≤ C_new·2^-53, summed over 300 terms: below 1e-12·C_new). The factor
// minimises the new dual objective along the ray, so that objective is no
// larger at the seed than at s = 1 or s = C_new/C_old where those are
// feasible; the solve from the seed must meet the KKT conditions.
func TestSeedAlphaFeasible(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	pts, y := randomTwoClass(rng, 300, 3, 0.3)
	k := kernel{kind: KernelRBF, gamma: 0.5}
	for _, tc := range []struct{ from, to float64 }{{0.1, 1}, {1, 10}, {10, 100}, {100, 1}, {1, 0.3}} {
		res, err := solveSMO(newKernelCache(k, pts, 0), y, nil, smoOpts{c: tc.from, eps: 1e-6, maxIter: 1_000_000, shrink: true})
		if err != nil {
			t.Fatal(err)
		}
		seed, _ := seedAlpha(res, tc.to)
		var sum, sumOld float64
		ratio := math.NaN()
		for i, a := range seed {
			old := res.alpha[i]
			switch {
			case a < 0 || a > tc.to:
				t.Fatalf("%g→%g: a[%d] = %g outside [0, %g]", tc.from, tc.to, i, a, tc.to)
			case old == 0 && a != 0:
				t.Errorf("%g→%g: a[%d] = %g from 0", tc.from, tc.to, i, a)
			case old > 0:
				// One factor for all (within one rounding of the
				// product, and the snap to the bound).
				if math.IsNaN(ratio) {
					ratio = a / old
				} else if !scalar.EqualWithinRel(a/old, ratio, 1e-15) {
					t.Errorf("%g→%g: a[%d] scaled by %g, others by %g", tc.from, tc.to, i, a/old, ratio)
				}
			}
			sum += a * y[i]
			sumOld += old * y[i]
		}
		if !scalar.EqualWithinAbs(sum, ratio*sumOld, 1e-12*tc.to) {
			t.Errorf("%g→%g: Σ y a = %g, want %g·%g", tc.from, tc.to, sum, ratio, sumOld)
		}
		// The dual objective along the ray, ½s²·aᵀQa − s·Σa, is least at the
		// chosen factor among the feasible s (derived by hand: a parabola).
		var amax float64
		for _, a := range res.alpha {
			amax = max(amax, a)
		}
		D := func(s float64) float64 { return 0.5*s*s*res.quad - s*res.sum }
		for _, cand := range []float64{1, tc.to / tc.from} {
			if cand*amax <= tc.to && D(ratio) > D(cand)+1e-12*math.Abs(D(cand)) {
				t.Errorf("%g→%g: objective %g at the seed's factor %g, %g at %g", tc.from, tc.to, D(ratio), ratio, D(cand), cand)
			}
		}
		// The solve from the seed meets the KKT conditions for the new C.
		warm, err := solveSMO(newKernelCache(k, pts, 0), y, seed, smoOpts{c: tc.to, eps: 1e-6, maxIter: 1_000_000, shrink: true})
		if err != nil {
			t.Fatal(err)
		}
		checkKKT(t, k, pts, y, tc.to, 1e-6, warm)
	}
}

func TestFitPathErrors(t *testing.T) {
	X := mat.NewDense(4, 2, []float64{0, 0, 1, 0, 0, 1, 1, 1})
	y := []int{0, 0, 1, 1}
	for _, cs := range [][]float64{nil, {}, {1, 0}, {-1}, {math.NaN()}, {math.Inf(1)}} {
		var s SVM
		if _, err := s.FitPath(X, y, 2, cs); !errors.Is(err, ErrParam) {
			t.Errorf("FitPath(%v): %v, want %v", cs, err, ErrParam)
		}
	}
	var s SVM
	if _, err := s.FitPath(X, []int{0, 0, 0, 0}, 2, []float64{1}); !errors.Is(err, ErrData) {
		t.Errorf("FitPath with one class: %v, want %v", err, ErrData)
	}
	if s.fit != nil {
		t.Error("FitPath changed the receiver")
	}
}
