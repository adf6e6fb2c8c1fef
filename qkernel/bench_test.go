package qkernel

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// benchSizes: a 10-fold CV fold of a 150-row dataset, and a larger set.
var benchSizes = []struct{ train, test int }{{135, 15}, {4500, 500}}

// BenchmarkExact times one CV fold in exact mode: Fit on the training rows
// and Predict the test rows (balanced weights, 3 classes). ns/pair is the
// time per test-train pair, comparable with BenchmarkReference and with
// scripts/ref_qkernel.py --time.
func BenchmarkExact(b *testing.B) {
	for _, d := range []int{4, 13, 30} {
		for _, sz := range benchSizes {
			b.Run(fmt.Sprintf("d=%d/train=%d/test=%d", d, sz.train, sz.test), func(b *testing.B) {
				rng := rand.New(rand.NewPCG(uint64(d), uint64(sz.train)))
				X, y, T := randomProblem(rng, sz.train, sz.test, d, 3)
				c := &Classifier{Balance: true}
				b.ReportAllocs()
				for b.Loop() {
					if err := c.Fit(X, y, 3); err != nil {
						b.Fatal(err)
					}
					if _, err := c.Predict(T); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(sz.train*sz.test), "ns/pair")
			})
		}
	}
}

// BenchmarkReference times the same folds computed pair by pair, the way the
// closed form is usually written: form=pairwise evaluates ||x + x_m||^2 per
// pair in tight loops (refPairwise); form=gram forms all test-train inner
// products with one gonum mat.Mul and accumulates per class. Ratios against
// BenchmarkExact measure what the per-class centroid form saves.
func BenchmarkReference(b *testing.B) {
	for _, form := range []string{"pairwise", "gram"} {
		for _, d := range []int{4, 13, 30} {
			for _, sz := range benchSizes {
				b.Run(fmt.Sprintf("form=%s/d=%d/train=%d/test=%d", form, d, sz.train, sz.test), func(b *testing.B) {
					rng := rand.New(rand.NewPCG(uint64(d), uint64(sz.train)))
					X, y, T := randomProblem(rng, sz.train, sz.test, d, 3)
					probs := make([]float64, 3)
					b.ReportAllocs()
					for b.Loop() {
						train := unitRows(b, X)
						test := unitRows(b, T)
						w := Weights(y, 3, true)
						switch form {
						case "pairwise":
							for _, x := range test {
								refPairwise(probs, x, train, y, w)
								argmax(probs, []int{0, 1, 2})
							}
						case "gram":
							gramPredict(probs, train, test, y, w)
						}
					}
					b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(sz.train*sz.test), "ns/pair")
				})
			}
		}
	}
}

// gramPredict computes G = test * train^T with one matrix product, then
// P(a=0, c=k) = sum_{m in k} w_m (1 + G_im)/2 per test row.
func gramPredict(probs []float64, train, test [][]float64, y []int, w []float64) {
	d := len(train[0])
	A := mat.NewDense(len(test), d, nil)
	for i, r := range test {
		A.SetRow(i, r)
	}
	B := mat.NewDense(len(train), d, nil)
	for i, r := range train {
		B.SetRow(i, r)
	}
	var G mat.Dense
	G.Mul(A, B.T())
	for i := range test {
		for k := range probs {
			probs[k] = 0
		}
		var pacc float64
		for m, g := range G.RawRowView(i) {
			p := w[m] * (1 + g) / 2
			probs[y[m]] += p
			pacc += p
		}
		for k := range probs {
			probs[k] /= pacc
		}
		argmax(probs, []int{0, 1, 2})
	}
}
