package baselines

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// gridShape is the size of one dataset of the speed-comparison grid
// (scripts/speed/grid.toml): the training part of a 10-fold split and the
// test part, features and classes of Iris, Wine and Breast Cancer.
type gridShape struct {
	name                string
	nTrain, nTest, d, k int
}

var gridShapes = []gridShape{
	{"iris", 135, 15, 4, 3},
	{"wine", 160, 18, 13, 3},
	{"breast-cancer", 512, 57, 30, 2},
}

// shapeData returns seeded training and test matrices of the shape: each
// class a Gaussian cloud around its own random centre (unit spread, centres
// N(0, 1) per feature), rows scaled to unit length as the grid's std+l2
// pipeline leaves them, and labels dealt round robin.
func shapeData(s gridShape, seed uint64) (Xtr *mat.Dense, ytr []int, Xte *mat.Dense) {
	rng := rand.New(rand.NewPCG(seed, 1))
	centre := make([][]float64, s.k)
	for c := range centre {
		centre[c] = make([]float64, s.d)
		for j := range centre[c] {
			centre[c][j] = rng.NormFloat64()
		}
	}
	gen := func(n int) (*mat.Dense, []int) {
		X := mat.NewDense(n, s.d, nil)
		y := make([]int, n)
		for i := range n {
			y[i] = i % s.k
			row := X.RawRowView(i)
			for j := range row {
				row[j] = centre[y[i]][j] + rng.NormFloat64()
			}
			nrm := math.Sqrt(rowDot(row, row))
			for j := range row {
				row[j] /= nrm
			}
		}
		return X, y
	}
	Xtr, ytr = gen(s.nTrain)
	Xte, _ = gen(s.nTest)
	return Xtr, ytr, Xte
}

// BenchmarkGridShapes fits each model of the speed-comparison grid (k-NN
// with k = 5, RBF SVM with C = 1 and gamma "scale", logistic regression
// with C = 1) on data of each dataset shape of the grid and predicts the
// test part: one fold's work. Metrics: folds/s and µs/fold (fit and
// predict); the grid runs 100 folds per dataset and model.
func BenchmarkGridShapes(b *testing.B) {
	models := []struct {
		name string
		mk   func() Model
	}{
		{"knn", func() Model { return &KNN{K: 5} }},
		{"svm", func() Model { return &SVM{C: 1} }},
		{"logreg", func() Model { return &LogReg{C: 1} }},
	}
	for _, s := range gridShapes {
		Xtr, ytr, Xte := shapeData(s, 11)
		for _, m := range models {
			b.Run(fmt.Sprintf("shape=%s/model=%s", s.name, m.name), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					mod := m.mk()
					if err := mod.Fit(Xtr, ytr, s.k); err != nil {
						b.Fatal(err)
					}
					if _, err := mod.Predict(Xte); err != nil {
						b.Fatal(err)
					}
				}
				sec := b.Elapsed().Seconds() / float64(b.N)
				b.ReportMetric(1/sec, "folds/s")
				b.ReportMetric(1e6*sec, "µs/fold")
			})
		}
	}
}
