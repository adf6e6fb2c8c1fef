// Command svmfit fits fringe's SVM once on seeded Gaussian blobs (the data
// of BenchmarkSVMFit in baselines/svm_scale_test.go: n rows, d features, k
// classes dealt round robin, unit spread around centres drawn N(0, sep²)
// per coordinate by a generator seeded with k) and prints the fit time, support vectors, iterations and
// kernel evaluations, and the memory estimate of SVM.MemoryBytes. It exists
// to measure peak memory from outside, e.g.
//
//	go build -o /tmp/svmfit ./scripts/speed/svmfit
//	/usr/bin/time -v /tmp/svmfit -n 50000 -classes 10
//
// With -folds F > 1 it fits the training part of each of F folds (rows
// whose index mod F differs from the fold) instead, as one stratified
// k-fold cross-validation run does (the rows are dealt round robin, so
// every fold keeps the class proportions).
package main

import (
	"flag"
	"fmt"
	"math/rand/v2"
	"os"
	"time"

	"fringe/baselines"

	"gonum.org/v1/gonum/mat"
)

func main() {
	n := flag.Int("n", 50000, "rows")
	d := flag.Int("d", 16, "features")
	k := flag.Int("classes", 2, "classes")
	sep := flag.Float64("sep", 0.75, "spread of the class centres")
	seed := flag.Uint64("seed", 0, "seed (0: n, as the benchmark)")
	cache := flag.Float64("cache", 0, "kernel cache bound per two-class task, MiB (0: 200)")
	noShrink := flag.Bool("no-shrinking", false, "turn shrinking off")
	folds := flag.Int("folds", 1, "fit the training part of each of this many folds")
	flag.Parse()
	if *seed == 0 {
		*seed = uint64(*n)
	}
	X, y := blobs(*seed, *n, *d, *k, *sep)
	s := baselines.SVM{CacheMiB: *cache, NoShrinking: *noShrink}
	nTrain := *n
	if *folds > 1 {
		nTrain = *n - *n / *folds
	}
	est, err := s.MemoryBytes(nTrain, *d, *k)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(2)
	}
	fmt.Printf("n=%d d=%d classes=%d folds=%d cache=%g MiB shrinking=%v: estimate %.1f MiB per fit\n",
		*n, *d, *k, *folds, *cache, !*noShrink, float64(est)/(1<<20))
	for f := range max(*folds, 1) {
		Xf, yf := X, y
		if *folds > 1 {
			Xf, yf = trainPart(X, y, *folds, f)
		}
		start := time.Now()
		m := s
		if err := m.Fit(Xf, yf, *k); err != nil {
			fmt.Fprintln(os.Stderr, err)
			os.Exit(1)
		}
		st := m.Stats()
		fmt.Printf("fold %d: %d rows, %.2f s, %d support vectors, %d iterations, %d kernel evaluations\n",
			f, Xf.RawMatrix().Rows, time.Since(start).Seconds(), len(m.SupportIndices()), st.Iterations, st.KernelEvals)
	}
}

// blobs is the generator of baselines/svm_scale_test.go (kept identical).
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

// trainPart returns the rows whose index mod folds is not fold.
func trainPart(X *mat.Dense, y []int, folds, fold int) (*mat.Dense, []int) {
	n, d := X.Dims()
	var rows []int
	for i := range n {
		if i%folds != fold {
			rows = append(rows, i)
		}
	}
	Xt := mat.NewDense(len(rows), d, nil)
	yt := make([]int, len(rows))
	for k, i := range rows {
		Xt.SetRow(k, X.RawRowView(i))
		yt[k] = y[i]
	}
	return Xt, yt
}
