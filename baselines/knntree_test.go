package baselines

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestKDTreeMatchesBrute checks the k-d tree against brute force: the same
// neighbours in the same order, the same distances bit for bit, the same
// predictions and the same vote fractions bit for bit, for k = 1, 5, 15
// and every metric and weighting. The data are built to tie: integer grids
// with few levels (many rows at exactly the same distance, many duplicate
// rows, so the k-th distance is usually shared and the lower training
// index must win), in low and high dimension, plus a set of continuous
// rows, a set where every row is equal, and one smaller than a leaf.
func TestKDTreeMatchesBrute(t *testing.T) {
	type dataCase struct {
		name    string
		n, d    int
		levels  int     // grid levels 0..levels-1; 0: Gaussian
		testOff float64 // added to test values (half-integers tie differently)
	}
	cases := []dataCase{
		{"grid-d2", 3000, 2, 6, 0},
		{"grid-d3-half", 2000, 3, 5, 0.5},
		{"grid-d8", 2000, 8, 3, 0},
		{"grid-d16", 1500, 16, 2, 0},
		{"grid-d40", 600, 40, 3, 0.5},
		{"gauss-d5", 2000, 5, 0, 0},
		{"equal", 200, 4, 1, 0},
		{"tiny", 9, 3, 3, 0},
	}
	rng := rand.New(rand.NewPCG(21, 22))
	for _, c := range cases {
		gen := func(rows int, off float64) *mat.Dense {
			X := mat.NewDense(rows, c.d, nil)
			for i := range rows {
				for j := range c.d {
					var v float64
					if c.levels == 0 {
						v = rng.NormFloat64()
					} else {
						v = float64(rng.IntN(c.levels)) + off*float64(rng.IntN(2))
					}
					// Cosine needs non-zero rows; a constant first
					// feature of 1 keeps the grid's ties.
					if j == 0 && c.levels > 0 {
						v++
					}
					X.Set(i, j, v)
				}
			}
			return X
		}
		n, nt := c.n, 300
		if testing.Short() { // -race -short in CI: a fifth of the work
			n, nt = max(c.n/2, min(c.n, 9)), 60
		}
		X := gen(n, 0)
		T := gen(nt, c.testOff)
		y := make([]int, n)
		for i := range y {
			y[i] = rng.IntN(3)
		}
		for _, metric := range []Metric{Euclidean, Manhattan, Cosine} {
			for _, k := range []int{1, 5, 15} {
				if k > n {
					continue
				}
				for _, w := range []Weighting{Uniform, Distance} {
					t.Run(fmt.Sprintf("data=%s/metric=%v/k=%d/weights=%v", c.name, metric, k, w), func(t *testing.T) {
						brute := &KNN{K: k, Metric: metric, Weights: w, Method: KNNBrute}
						tree := &KNN{K: k, Metric: metric, Weights: w, Method: KNNTree}
						for _, m := range []*KNN{brute, tree} {
							if err := m.Fit(X, y, 3); err != nil {
								t.Fatal(err)
							}
						}
						if tree.MethodUsed() != KNNTree || brute.MethodUsed() != KNNBrute {
							t.Fatalf("methods used: %v, %v", tree.MethodUsed(), brute.MethodUsed())
						}
						compareKNN(t, brute, tree, T)
					})
				}
			}
		}
	}
}

// compareKNN checks that two fitted models give bit-identical neighbours,
// distances, predictions and vote fractions on T.
func compareKNN(t *testing.T, want, got *KNN, T *mat.Dense) {
	t.Helper()
	wi, wd, err := want.Neighbors(T)
	if err != nil {
		t.Fatal(err)
	}
	gi, gd, err := got.Neighbors(T)
	if err != nil {
		t.Fatal(err)
	}
	ties := 0
	for i := range wi {
		if !slices.Equal(wi[i], gi[i]) {
			t.Fatalf("test row %d: neighbours %v, brute force %v", i, gi[i], wi[i])
		}
		for j := range wd[i] {
			if math.Float64bits(wd[i][j]) != math.Float64bits(gd[i][j]) {
				t.Fatalf("test row %d: distance %d = %v, brute force %v", i, j, gd[i][j], wd[i][j])
			}
		}
		if n := len(wd[i]); n > 1 && wd[i][n-1] == wd[i][n-2] {
			ties++
		}
	}
	wp, _ := want.Predict(T)
	gp, _ := got.Predict(T)
	if !slices.Equal(wp, gp) {
		t.Fatalf("predictions differ: %v, brute force %v", gp, wp)
	}
	wq, _ := want.PredictProba(T)
	gq, _ := got.PredictProba(T)
	r, c := wq.Dims()
	for i := range r {
		for j := range c {
			if math.Float64bits(wq.At(i, j)) != math.Float64bits(gq.At(i, j)) {
				t.Fatalf("test row %d class %d: vote fraction %v, brute force %v", i, j, gq.At(i, j), wq.At(i, j))
			}
		}
	}
	if k := want.k; k > 1 && ties == 0 && want.n > k+1 {
		t.Logf("no test row had a tie at the k-th distance")
	}
}

// TestKDTreeTieBoundary builds a case where the k-th distance is shared by
// rows that the tree visits in an order unlike the training order: the
// training rows are the points of a 2-d grid listed from the far corner
// inward, so the lowest index at a tied distance lies in another leaf than
// the first tied row found.
func TestKDTreeTieBoundary(t *testing.T) {
	const side = 40
	X := mat.NewDense(side*side, 2, nil)
	y := make([]int, side*side)
	for i := range side * side {
		r := side*side - 1 - i
		X.Set(i, 0, float64(r/side))
		X.Set(i, 1, float64(r%side))
		y[i] = (r/side + r%side) % 2
	}
	T := mat.NewDense(4, 2, []float64{20, 20, 0.5, 0.5, 10.5, 3, 39, 0})
	for _, metric := range []Metric{Euclidean, Manhattan} {
		for _, k := range []int{1, 2, 4, 5, 9, 13} {
			brute := &KNN{K: k, Metric: metric, Method: KNNBrute}
			tree := &KNN{K: k, Metric: metric, Method: KNNTree}
			for _, m := range []*KNN{brute, tree} {
				if err := m.Fit(X, y, 2); err != nil {
					t.Fatal(err)
				}
			}
			compareKNN(t, brute, tree, T)
		}
	}
}

// TestKNNAutoMethod checks the rule of KNNAuto: a tree on many rows in few
// dimensions once a call asks for at least kdMinQueries rows (brute force
// before, for smaller calls); brute force below kdMinRows rows or above
// kdMaxDim features; and brute force when the probe queries find the tree
// no cheaper (uniform data in 20 dimensions). Whatever it picks, the
// answers equal brute force's.
func TestKNNAutoMethod(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	mk := func(n, d int) (*mat.Dense, []int) {
		X := mat.NewDense(n, d, nil)
		y := make([]int, n)
		for i := range n {
			for j := range d {
				X.Set(i, j, rng.Float64())
			}
			y[i] = i % 2
		}
		return X, y
	}
	for _, tc := range []struct {
		n, d int
		want KNNMethod
	}{
		{5000, 3, KNNTree},
		{kdMinRows - 1, 3, KNNBrute},
		{3000, kdMaxDim + 1, KNNBrute},
		{3000, 20, KNNBrute},
	} {
		X, y := mk(tc.n, tc.d)
		T, _ := mk(kdMinQueries, tc.d)
		m := &KNN{K: 5}
		if err := m.Fit(X, y, 2); err != nil {
			t.Fatal(err)
		}
		if _, err := m.Predict(T.Slice(0, 10, 0, tc.d).(*mat.Dense)); err != nil {
			t.Fatal(err)
		}
		if got := m.MethodUsed(); got != KNNBrute {
			t.Errorf("n = %d, d = %d: method %v after a call on 10 rows, want brute", tc.n, tc.d, got)
		}
		brute := &KNN{K: 5, Method: KNNBrute}
		if err := brute.Fit(X, y, 2); err != nil {
			t.Fatal(err)
		}
		compareKNN(t, brute, m, T)
		if got := m.MethodUsed(); got != tc.want {
			t.Errorf("n = %d, d = %d: method %v, want %v", tc.n, tc.d, got, tc.want)
		}
	}
	var m KNN
	if m.MethodUsed() != KNNAuto {
		t.Error("unfitted model reports a method")
	}
}

func TestParseKNNMethod(t *testing.T) {
	for _, c := range []struct {
		s    string
		want KNNMethod
	}{{"auto", KNNAuto}, {" Tree ", KNNTree}, {"BRUTE", KNNBrute}} {
		got, err := ParseKNNMethod(c.s)
		if err != nil || got != c.want || got.String() != knnMethodNames[c.want] {
			t.Errorf("ParseKNNMethod(%q) = %v, %v", c.s, got, err)
		}
	}
	if _, err := ParseKNNMethod("ball"); !errors.Is(err, ErrParam) {
		t.Errorf("unknown method: error %v", err)
	}
	m := &KNN{Method: 7}
	if err := m.Fit(mat.NewDense(2, 1, []float64{0, 1}), []int{0, 1}, 2); !errors.Is(err, ErrParam) {
		t.Errorf("Fit with method 7: error %v", err)
	}
}

// knnBenchData returns seeded training and test rows: nClass Gaussian
// class clouds of unit spread around centres drawn from N(0, 4) per
// feature, labels round robin.
func knnBenchData(n, nt, d, nClass int, seed uint64) (*mat.Dense, []int, *mat.Dense) {
	rng := rand.New(rand.NewPCG(seed, 3))
	centre := make([][]float64, nClass)
	for c := range centre {
		centre[c] = make([]float64, d)
		for j := range centre[c] {
			centre[c][j] = 2 * rng.NormFloat64()
		}
	}
	gen := func(rows int) (*mat.Dense, []int) {
		X := mat.NewDense(rows, d, nil)
		y := make([]int, rows)
		for i := range rows {
			y[i] = i % nClass
			for j := range d {
				X.Set(i, j, centre[y[i]][j]+rng.NormFloat64())
			}
		}
		return X, y
	}
	X, y := gen(n)
	T, _ := gen(nt)
	return X, y, T
}

// BenchmarkKNN measures k = 5 Euclidean prediction by k-d tree and by brute
// force (same run, same data: ten Gaussian class clouds in 16 dimensions,
// knnBenchData) for growing training sets; ns/query is the time per test
// row. The ratio of the two is the tree's speed-up.
func BenchmarkKNN(b *testing.B) {
	const d, nt, nClass = 16, 200, 10
	for _, n := range []int{2000, 8000, 32000, 50000} {
		X, y, T := knnBenchData(n, nt, d, nClass, 17)
		for _, method := range []KNNMethod{KNNTree, KNNBrute} {
			b.Run(fmt.Sprintf("n=%d/d=%d/method=%v", n, d, method), func(b *testing.B) {
				m := &KNN{K: 5, Method: method}
				if err := m.Fit(X, y, nClass); err != nil {
					b.Fatal(err)
				}
				b.ReportAllocs()
				for b.Loop() {
					if _, err := m.Predict(T); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/nt, "ns/query")
			})
		}
	}
}

// BenchmarkKNNDim is BenchmarkKNN at n = 50000 over the dimension, to show
// where the tree stops paying, on two kinds of data: data=clouds
// (knnBenchData: ten well separated class clouds, so a query's search stays
// mostly within its own cloud of 5000 rows) and data=gauss (one standard
// Gaussian cloud, labels round robin: the intrinsic dimension is d). The
// tree reports the rows whose key it computed per query (rows/query);
// method=auto reports whether KNNAuto's rule chose the tree (tree=1) for a
// call on at least kdMinQueries rows, and times that choice.
func BenchmarkKNNDim(b *testing.B) {
	const n, nt, nClass = 50000, 200, 10
	for _, data := range []string{"clouds", "gauss"} {
		for _, d := range []int{2, 4, 8, 12, 16, 20, 24, 32} {
			X, y, T := knnBenchData(n, nt, d, nClass, 19)
			if data == "gauss" {
				X, _, T = knnBenchData(n, nt, d, 1, 19)
			}
			for _, method := range []KNNMethod{KNNTree, KNNBrute, KNNAuto} {
				b.Run(fmt.Sprintf("data=%s/n=%d/d=%d/method=%v", data, n, d, method), func(b *testing.B) {
					m := &KNN{K: 5, Method: method}
					if err := m.Fit(X, y, nClass); err != nil {
						b.Fatal(err)
					}
					if method == KNNAuto {
						m.treeFor(kdMinQueries) // the choice a large call makes
					}
					b.ReportAllocs()
					for b.Loop() {
						if _, err := m.Predict(T); err != nil {
							b.Fatal(err)
						}
					}
					b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/nt, "ns/query")
					switch method {
					case KNNTree:
						s := m.newScratch(nt)
						var rows int
						for i := range nt {
							rows += s.tree.search(s, T.RawRowView(i), 0, 5)
						}
						b.ReportMetric(float64(rows)/nt, "work/query")
					case KNNAuto:
						chosen := 0.0
						if m.MethodUsed() == KNNTree {
							chosen = 1
						}
						b.ReportMetric(chosen, "tree")
					}
				})
			}
		}
	}
}

// TestKNNAutoConcurrent runs Predict from several goroutines on a KNNAuto
// model whose tree is built by whichever call comes first (run with -race):
// every call returns brute force's answer.
func TestKNNAutoConcurrent(t *testing.T) {
	X, y, T := knnBenchData(4000, kdMinQueries, 3, 4, 23)
	brute := &KNN{K: 7, Method: KNNBrute}
	auto := &KNN{K: 7}
	for _, m := range []*KNN{brute, auto} {
		if err := m.Fit(X, y, 4); err != nil {
			t.Fatal(err)
		}
	}
	want, _ := brute.Predict(T)
	errs := make(chan error, 4)
	for g := range 4 {
		go func() {
			// Goroutines 0 and 1 ask for one row at a time (brute force
			// until the tree exists), 2 and 3 for all rows (may build it).
			var got []int
			for i := range kdMinQueries {
				if g < 2 {
					p, err := auto.Predict(T.Slice(i, i+1, 0, 3).(*mat.Dense))
					if err != nil {
						errs <- err
						return
					}
					got = append(got, p...)
				}
			}
			if g >= 2 {
				var err error
				if got, err = auto.Predict(T); err != nil {
					errs <- err
					return
				}
			}
			if !slices.Equal(got, want) {
				errs <- fmt.Errorf("goroutine %d: predictions differ from brute force", g)
				return
			}
			errs <- nil
		}()
	}
	for range 4 {
		if err := <-errs; err != nil {
			t.Error(err)
		}
	}
	if auto.MethodUsed() != KNNTree {
		t.Errorf("method %v, want tree", auto.MethodUsed())
	}
}
