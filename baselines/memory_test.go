package baselines

import (
	"errors"
	"fmt"
	"runtime"
	"testing"
)

// allocated returns the bytes f allocates (runtime.MemStats.TotalAlloc,
// which counts every allocation, also those already garbage).
func allocated(f func()) uint64 {
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	f()
	runtime.ReadMemStats(&after)
	return after.TotalAlloc - before.TotalAlloc
}

// TestMemoryEstimates checks the estimates of k-NN and logistic regression
// against what a fit and a prediction allocate. The estimate is of the
// peak memory with the garbage collector's headroom (twice the memory in
// use), so it must cover everything the model allocates once (the copies,
// the tree, the scratch): allocated <= estimate. It must not be vacuous
// either: estimate <= 4 * allocated (the factor 2 of the headroom and a
// factor 2 of slack for what the estimate rounds up). The sizes are those
// of the scaling measurement's data shape (16 features, 2 and 10 classes).
func TestMemoryEstimates(t *testing.T) {
	for _, nClass := range []int{2, 10} {
		for _, n := range []int{2000, 8000} {
			X, y, Xt := knnBenchData(n, n/2, 16, nClass, 5) // n/2 >= 512 test rows: the tree is tried
			for _, c := range []struct {
				name string
				est  func() (int64, error)
				run  func() error
			}{
				{"knn", func() (int64, error) { return (&KNN{K: 5}).MemoryBytes(n, 16) }, func() error {
					m := &KNN{K: 5}
					if err := m.Fit(X, y, nClass); err != nil {
						return err
					}
					_, err := m.Predict(Xt)
					return err
				}},
				{"logreg", func() (int64, error) { return (&LogReg{}).MemoryBytes(n, 16, nClass) }, func() error {
					return (&LogReg{}).Fit(X, y, nClass)
				}},
			} {
				t.Run(fmt.Sprintf("model=%s/classes=%d/n=%d", c.name, nClass, n), func(t *testing.T) {
					est, err := c.est()
					if err != nil {
						t.Fatal(err)
					}
					var runErr error
					got := allocated(func() { runErr = c.run() })
					if runErr != nil {
						t.Fatal(runErr)
					}
					// Predict's output (8 bytes per test row) is the caller's.
					got -= uint64(8 * (n / 2))
					t.Logf("allocated %d, estimate %d (%.2fx)", got, est, float64(est)/float64(got))
					if int64(got) > est || est > 4*int64(got) {
						t.Errorf("allocated %d bytes, estimate %d: want allocated <= estimate <= 4 allocated", got, est)
					}
				})
			}
		}
	}
	if _, err := (&KNN{}).MemoryBytes(-1, 3); !errors.Is(err, ErrParam) {
		t.Errorf("knn estimate of -1 rows: error %v, want ErrParam", err)
	}
	if _, err := (&LogReg{}).MemoryBytes(3, -1, 2); !errors.Is(err, ErrParam) {
		t.Errorf("logreg estimate of -1 features: error %v, want ErrParam", err)
	}
}

// TestMemoryLinear checks that the k-NN and logistic-regression estimates
// grow linearly with the rows: ten times the rows, at most ten times the
// bytes (and more than five times: the per-row terms dominate).
func TestMemoryLinear(t *testing.T) {
	for _, nClass := range []int{2, 10} {
		k1, _ := (&KNN{}).MemoryBytes(5000, 16)
		k10, _ := (&KNN{}).MemoryBytes(50000, 16)
		l1, _ := (&LogReg{}).MemoryBytes(5000, 16, nClass)
		l10, _ := (&LogReg{}).MemoryBytes(50000, 16, nClass)
		for _, r := range []struct {
			name   string
			a, b10 int64
		}{{"knn", k1, k10}, {"logreg", l1, l10}} {
			if r.b10 > 10*r.a || r.b10 < 5*r.a {
				t.Errorf("%s, %d classes: %d bytes at 5000 rows, %d at 50000: not linear", r.name, nClass, r.a, r.b10)
			}
		}
	}
}
