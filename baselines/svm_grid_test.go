package baselines

import (
	"fmt"
	"testing"
)

// gridCs and gridGammas are the grid of the speed comparison with
// scikit-learn (scripts/speed/svm_grid.py, scripts/speed/svm_grid.sh).
var (
	gridCs     = []float64{0.1, 1, 10, 100}
	gridGammas = []float64{0.001, 0.01, 0.1, 1}
)

// BenchmarkSVMGrid runs the tuned SVM of the speed comparison: on Breast
// Cancer (z-scored over all rows, population standard deviation), for each
// of the 10 folds of StratifiedFolds(y, 10), a TunedSVM with the 4 × 4 grid
// gridCs × gridGammas and 5 inner folds is fitted on the training rows and
// predicts the test rows. reuse=true shares kernel rows and warm starts
// (see TunedSVM); reuse=false fits every grid point and inner fold
// independently, as GridSearchCV does. Metrics: outer folds per second and
// the mean outer accuracy.
func BenchmarkSVMGrid(b *testing.B) {
	X, y, k, _, err := loadStandardised("breast-cancer")
	if err != nil {
		b.Fatal(err)
	}
	outer, err := StratifiedFolds(y, 10)
	if err != nil {
		b.Fatal(err)
	}
	n, _ := X.Dims()
	for _, reuse := range []bool{true, false} {
		b.Run(fmt.Sprintf("reuse=%v", reuse), func(b *testing.B) {
			b.ReportAllocs()
			var acc float64
			for b.Loop() {
				acc = 0
				for _, test := range outer {
					Xtr, ytr := subRows(X, y, complement(n, test))
					Xte, yte := subRows(X, y, test)
					m := &TunedSVM{Cs: gridCs, Gammas: gridGammas, Folds: 5, NoReuse: !reuse}
					if err := m.Fit(Xtr, ytr, k); err != nil {
						b.Fatal(err)
					}
					pred, err := m.Predict(Xte)
					if err != nil {
						b.Fatal(err)
					}
					var correct int
					for i, p := range pred {
						if p == yte[i] {
							correct++
						}
					}
					acc += float64(correct) / float64(len(yte)) / float64(len(outer))
				}
			}
			b.ReportMetric(float64(len(outer))/(b.Elapsed().Seconds()/float64(b.N)), "outer-folds/s")
			b.ReportMetric(acc, "accuracy")
		})
	}
}
