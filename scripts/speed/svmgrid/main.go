// Command svmgrid runs fringe's side of the tuned-SVM speed comparison
// (scripts/speed/svm_grid.sh): Breast Cancer z-scored over all rows
// (population standard deviation), 10-fold stratified outer cross-validation
// (baselines.StratifiedFolds, the folds of scikit-learn's StratifiedKFold(10)),
// and in each outer fold a baselines.TunedSVM with C in {0.1, 1, 10, 100},
// gamma in {0.001, 0.01, 0.1, 1} and 5 inner folds, refitted on the outer
// training rows and scored on the outer test rows. It prints the chosen
// parameters and accuracy of every outer fold and the mean accuracy, the
// same lines as scripts/speed/svm_grid.py prints for scikit-learn.
//
//	go build -o /tmp/svmgrid ./scripts/speed/svmgrid && /tmp/svmgrid -workers 1
//
// -reuse=false fits every grid point and inner fold independently.
// -workers runs that many outer folds at once.
package main

import (
	"flag"
	"fmt"
	"math"
	"os"

	"fringe/baselines"
	"fringe/datasets"

	"golang.org/x/sync/errgroup"
	"gonum.org/v1/gonum/mat"
)

func main() {
	reuse := flag.Bool("reuse", true, "share kernel rows and warm starts across the grid")
	workers := flag.Int("workers", 1, "outer folds run at once")
	flag.Parse()
	if err := run(*reuse, *workers); err != nil {
		fmt.Fprintln(os.Stderr, "svmgrid:", err)
		os.Exit(1)
	}
}

func run(reuse bool, workers int) error {
	ds, err := datasets.Load("breast-cancer")
	if err != nil {
		return err
	}
	X := zscore(ds.X)
	y := ds.Y
	n, d := X.Dims()
	outer, err := baselines.StratifiedFolds(y, 10)
	if err != nil {
		return err
	}
	type result struct {
		c, gamma float64
		acc      float64
	}
	res := make([]result, len(outer))
	var g errgroup.Group
	g.SetLimit(max(workers, 1))
	for f, test := range outer {
		g.Go(func() error {
			inTest := make([]bool, n)
			for _, i := range test {
				inTest[i] = true
			}
			var tr, te []int
			for i := range n {
				if inTest[i] {
					te = append(te, i)
				} else {
					tr = append(tr, i)
				}
			}
			Xtr, ytr := rows(X, y, tr, d)
			Xte, yte := rows(X, y, te, d)
			m := &baselines.TunedSVM{
				Cs:      []float64{0.1, 1, 10, 100},
				Gammas:  []float64{0.001, 0.01, 0.1, 1},
				Folds:   5,
				NoReuse: !reuse,
			}
			if err := m.Fit(Xtr, ytr, len(ds.Classes)); err != nil {
				return fmt.Errorf("outer fold %d: %w", f, err)
			}
			pred, err := m.Predict(Xte)
			if err != nil {
				return err
			}
			var ok int
			for i, p := range pred {
				if p == yte[i] {
					ok++
				}
			}
			c, gm := m.Best()
			res[f] = result{c, gm, float64(ok) / float64(len(yte))}
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return err
	}
	var mean float64
	for f, r := range res {
		fmt.Printf("fold %d C=%g gamma=%g accuracy %.6f\n", f, r.c, r.gamma, r.acc)
		mean += r.acc
	}
	fmt.Printf("mean accuracy %.6f\n", mean/float64(len(res)))
	return nil
}

// zscore standardises every column with its mean and population standard
// deviation (scikit-learn's StandardScaler on all rows).
func zscore(A *mat.Dense) *mat.Dense {
	n, d := A.Dims()
	X := mat.NewDense(n, d, nil)
	for j := range d {
		var mean, ss float64
		for i := range n {
			mean += A.At(i, j)
		}
		mean /= float64(n)
		for i := range n {
			v := A.At(i, j) - mean
			ss += v * v
		}
		sd := math.Sqrt(ss / float64(n))
		for i := range n {
			X.Set(i, j, (A.At(i, j)-mean)/sd)
		}
	}
	return X
}

func rows(X *mat.Dense, y []int, idx []int, d int) (*mat.Dense, []int) {
	out := mat.NewDense(len(idx), d, nil)
	yy := make([]int, len(idx))
	for k, i := range idx {
		out.SetRow(k, X.RawRowView(i))
		yy[k] = y[i]
	}
	return out, yy
}
