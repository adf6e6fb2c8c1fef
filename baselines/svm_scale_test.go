package baselines

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// blobs returns n seeded rows in d dimensions from k classes (labels dealt
// round robin), each class a Gaussian blob of unit spread around its own
// centre; the centres are drawn N(0, sep²) per coordinate, so sep sets the
// overlap (and with it the share of support vectors).
func blobs(seed uint64, n, d, k int, sep float64) (*mat.Dense, []int) {
	rng := rand.New(rand.NewPCG(seed, 0xb10b))
	centre := make([][]float64, k)
	for c := range centre {
		centre[c] = make([]float64, d)
		for j := range centre[c] {
			centre[c][j] = sep * rng.NormFloat64()
		}
	}
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
