package qkernel

import (
	"fmt"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"

	"fringe/qkernel/circuit"
	"fringe/qkernel/sim"
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

// BenchmarkShots times ModeShots on the first stratified fold of Iris (135
// training rows, 15 test rows, std pipeline): one multinomial sample per
// test row from the closed-form distribution, so ns/prediction must not
// grow with the number of shots (compare shots=100 with shots=1000000 in
// one run; mode=exact is the reference without sampling).
func BenchmarkShots(b *testing.B) {
	f := firstFold(b, "iris", 10)
	rows, _ := f.Xte.Dims()
	for _, tc := range []struct {
		name string
		c    Classifier
	}{
		{"mode=exact", Classifier{Balance: true}},
		{"shots=100", Classifier{Mode: ModeShots, Shots: 100, Balance: true, Seed: 1}},
		{"shots=1000000", Classifier{Mode: ModeShots, Shots: 1000000, Balance: true, Seed: 1}},
	} {
		b.Run(tc.name, func(b *testing.B) {
			c := tc.c
			if err := c.Fit(f.Xtr, f.ytr, f.nClass); err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			for b.Loop() {
				if _, _, err := c.PredictDetail(f.Xte); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(rows), "ns/prediction")
		})
	}
}

// BenchmarkNoisyIris times gate-level noisy predictions with the density
// matrix on Iris (first stratified fold, std pipeline) with training
// subsets of 8 rows: 3 classes give index 3 + data 2 + class 2 + ancilla 1
// = 8 qubits; versicolor vs virginica gives 7. Noise: depolarizing
// (0.001, 0.01) after every gate, 1000 shots. ns/gate divides by the
// elementary gates of the decomposed circuit (sim runs each with its noise).
func BenchmarkNoisyIris(b *testing.B) {
	for _, classes := range []int{3, 2} {
		b.Run(fmt.Sprintf("subset=8/classes=%d", classes), func(b *testing.B) {
			f := firstFold(b, "iris", 10)
			if classes == 2 {
				f = dropClass0(f)
			}
			c := &Classifier{Mode: ModeNoisy, TrainSubset: 8, Shots: 1000, Seed: 1,
				Noise: sim.NoiseModel{Depolarizing: [2]float64{0.001, 0.01}}}
			if err := c.Fit(f.Xtr, f.ytr, f.nClass); err != nil {
				b.Fatal(err)
			}
			p, err := c.makePlan()
			if err != nil {
				b.Fatal(err)
			}
			if p.method != sim.DensityMatrix || p.qubits != map[int]int{3: 8, 2: 7}[classes] {
				b.Fatalf("plan %+v", p)
			}
			s := c.newScratch(p)
			c.drawSubset(s, p.alloc, rowRand(c.Seed, 0))
			circ, err := circuit.Compile(f.Xte.RawRowView(0), s.train, s.ysub, f.nClass, nil)
			if err != nil {
				b.Fatal(err)
			}
			r := circ.Resources()
			gates := r.CNOT + r.SingleQubit
			rows, _ := f.Xte.Dims()
			b.ReportAllocs()
			for b.Loop() {
				if _, err := c.Predict(f.Xte); err != nil {
					b.Fatal(err)
				}
			}
			ns := float64(b.Elapsed().Nanoseconds()) / float64(b.N) / float64(rows)
			b.ReportMetric(ns, "ns/prediction")
			b.ReportMetric(ns/float64(gates), "ns/gate")
			b.ReportMetric(float64(gates), "gates")
			b.ReportMetric(float64(p.qubits), "qubits")
		})
	}
}

// dropClass0 removes class 0 from a fold and renumbers classes 1.. to 0..
func dropClass0(f fold) fold {
	keep := func(X *mat.Dense, y []int) (*mat.Dense, []int) {
		_, d := X.Dims()
		var data []float64
		var out []int
		for i, k := range y {
			if k != 0 {
				data = append(data, X.RawRowView(i)...)
				out = append(out, k-1)
			}
		}
		return mat.NewDense(len(out), d, data), out
	}
	g := fold{name: f.name, nClass: f.nClass - 1}
	g.Xtr, g.ytr = keep(f.Xtr, f.ytr)
	g.Xte, g.yte = keep(f.Xte, f.yte)
	return g
}

// BenchmarkShared times gate-level noisy predictions with the density
// matrix on Iris (first stratified fold, std pipeline, its test rows) with
// training subsets of K rows, every whole circuit simulated forwards
// (path=alone, the path before shared preparation) or through sim.Shared
// (path=shared: prefix once, suffix backwards once, per row the middle;
// the training rows are in class order, so all rows share one subset). classes=3 K=8 is 8 qubits,
// classes=2 K=8 is 7, classes=3 K=32 is 10. Noise: depolarizing (0.001,
// 0.01), 1000 shots. Reports ns per prediction.
func BenchmarkShared(b *testing.B) {
	for _, tc := range []struct{ classes, K, rows int }{{3, 8, 15}, {2, 8, 10}, {3, 32, 15}} {
		f := firstFold(b, "iris", 10)
		if tc.classes == 2 {
			f = dropClass0(f)
		}
		for _, path := range []string{"alone", "shared"} {
			b.Run(fmt.Sprintf("classes=%d/K=%d/path=%s", tc.classes, tc.K, path), func(b *testing.B) {
				c := &Classifier{Mode: ModeNoisy, TrainSubset: tc.K, Shots: 1000, Seed: 1,
					Noise: sim.NoiseModel{Depolarizing: [2]float64{0.001, 0.01}}, noShare: path == "alone"}
				if err := c.Fit(f.Xtr, f.ytr, f.nClass); err != nil {
					b.Fatal(err)
				}
				p, _ := c.makePlan()
				rows, _ := f.Xte.Dims()
				b.ReportAllocs()
				for b.Loop() {
					if _, err := c.Predict(f.Xte); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(rows), "ns/prediction")
				b.ReportMetric(float64(p.qubits), "qubits")
			})
		}
	}
}
