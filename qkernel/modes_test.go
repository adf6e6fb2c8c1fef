package qkernel

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"

	"fringe/bench/cv"
	"fringe/datasets"
	"fringe/qkernel/circuit"
	"fringe/qkernel/sim"
)

// fold is one training/test split of a dataset after preprocessing.
type fold struct {
	name     string
	Xtr, Xte *mat.Dense
	ytr, yte []int
	nClass   int
}

// firstFold returns the first fold of a stratified 10-fold split (bench/cv,
// fixed seed) of an embedded dataset, z-scored with the "std" pipeline
// fitted on the training part (package datasets).
func firstFold(t testing.TB, name string, folds int) fold {
	t.Helper()
	d, err := datasets.Load(name)
	if err != nil {
		t.Fatal(err)
	}
	sp, err := cv.Stratified(d.Y, len(d.Classes), folds, rand.New(rand.NewPCG(1, 2)))
	if err != nil {
		t.Fatal(err)
	}
	gather := func(idx []int) (*mat.Dense, []int) {
		X := mat.NewDense(len(idx), d.Dim(), nil)
		y := make([]int, len(idx))
		for i, j := range idx {
			X.SetRow(i, d.X.RawRowView(j))
			y[i] = d.Y[j]
		}
		return X, y
	}
	f := fold{name: name, nClass: len(d.Classes)}
	Xtr, ytr := gather(sp[0].Train)
	Xte, yte := gather(sp[0].Test)
	p, err := datasets.ParsePipeline("std")
	if err != nil {
		t.Fatal(err)
	}
	if f.Xtr, err = p.FitTransform(Xtr, nil); err != nil {
		t.Fatal(err)
	}
	if f.Xte, err = p.Transform(Xte, nil); err != nil {
		t.Fatal(err)
	}
	f.ytr, f.yte = ytr, yte
	return f
}

// demoData returns the published demonstration data (see
// TestIrisDemonstration): Iris setosa vs versicolor, sepal length and width
// standardised over the first 100 rows, training rows 33 and 85.
func demoData(t *testing.T) (train *mat.Dense, y []int, X *mat.Dense) {
	t.Helper()
	X, _ = irisSepal(t, "fixture", "sklearn")
	standardize(X)
	return pickRows(X, 33, 85), []int{0, 1}, X
}

func fitPredict(t testing.TB, c *Classifier, Xtr *mat.Dense, ytr []int, nClass int, Xte *mat.Dense) ([]int, []Detail) {
	t.Helper()
	if err := c.Fit(Xtr, ytr, nClass); err != nil {
		t.Fatal(err)
	}
	pred, det, err := c.PredictDetail(Xte)
	if err != nil {
		t.Fatal(err)
	}
	return pred, det
}

// TestCircuitEqualsExact compiles and simulates the circuit (state vector)
// for every test row of the first stratified fold of each embedded dataset
// and compares with the closed form. breast-cancer has 512 training rows in
// that fold: index 9 + data 5 + class 1 + ancilla 1 = 16 qubits.
func TestCircuitEqualsExact(t *testing.T) {
	for _, name := range []string{"iris", "wine", "breast-cancer"} {
		f := firstFold(t, name, 10)
		for _, balance := range []bool{false, true} {
			t.Run(fmt.Sprintf("data=%s/balance=%v", name, balance), func(t *testing.T) {
				ex := &Classifier{Balance: balance}
				pe, de := fitPredict(t, ex, f.Xtr, f.ytr, f.nClass, f.Xte)
				cc := &Classifier{Mode: ModeCircuit, Balance: balance}
				pc, dc := fitPredict(t, cc, f.Xtr, f.ytr, f.nClass, f.Xte)
				p, err := cc.makePlan()
				if err != nil {
					t.Fatal(err)
				}
				if name == "breast-cancer" && (p.qubits != 16 || len(f.ytr) != 512) {
					t.Errorf("breast-cancer: %d training rows, %d qubits; want 512 and 16", len(f.ytr), p.qubits)
				}
				for i := range pe {
					// The simulation multiplies unit-norm amplitudes through
					// O(nQubits) passes: rounding of order 1e-15 per entry;
					// 1e-12 is the bound the design asks for.
					if !scalar.EqualWithinAbsOrRel(dc[i].PAcc, de[i].PAcc, 1e-12, 1e-12) {
						t.Errorf("row %d: circuit p_acc %.17g, closed form %.17g", i, dc[i].PAcc, de[i].PAcc)
					}
					for k := range de[i].Probs {
						if !scalar.EqualWithinAbsOrRel(dc[i].Probs[k], de[i].Probs[k], 1e-12, 1e-12) {
							t.Errorf("row %d class %d: circuit P %.17g, closed form %.17g", i, k, dc[i].Probs[k], de[i].Probs[k])
						}
					}
					if pc[i] != pe[i] || dc[i].Exact != pe[i] || de[i].Exact != pe[i] {
						t.Errorf("row %d: circuit predicts %d (Exact %d), closed form %d (Exact %d)", i, pc[i], dc[i].Exact, pe[i], de[i].Exact)
					}
					if dc[i].Shots != 0 {
						t.Errorf("row %d: circuit mode reports %d shots", i, dc[i].Shots)
					}
				}
			})
		}
	}
}

// TestGlobalDepolarizing checks the closed-form global depolarizing channel
// on the published demonstration vectors, against a hand derivation and
// against the density-matrix simulation of the compiled circuit followed by
// a depolarizing channel on the whole register.
//
// Derived by hand from the depolarizing channel rho -> (1-p) rho + p I/2^n:
// on the outcome distribution of the ancilla and q class qubits it gives
// P'(a,k) = (1-p) P(a,k) + p/2^(1+q), so p_acc' = (1-p) p_acc + p/2 and,
// for two classes, P'(0|acc) - P'(1|acc) = (1-p)(P(0|acc) - P(1|acc)) p_acc/p_acc':
// the sign, hence the predicted label, never changes for p < 1.
func TestGlobalDepolarizing(t *testing.T) {
	train, y, X := demoData(t)
	test := pickRows(X, 28)
	_, de := fitPredict(t, &Classifier{}, train, y, 2, test)
	const p = 0.1
	c := &Classifier{Mode: ModeNoisy, Channels: Channels{GlobalDepolarizing: p}}
	pred, dn := fitPredict(t, c, train, y, 2, test)
	// Hand-derived from the 3-decimal exact values of TestIrisDemonstration
	// (p_acc 0.720, P(setosa|acc) 0.632): p_acc' = 0.9*0.720 + 0.05 = 0.698,
	// P' = (0.9*0.720*0.632 + 0.1/4) / 0.698 = 0.622. The 3-decimal inputs
	// carry 0.5e-3 each: 1e-3 covers the propagated rounding.
	if math.Abs(dn[0].PAcc-0.698) > 1e-3 || math.Abs(dn[0].Probs[0]-0.622) > 1e-3 {
		t.Errorf("p = %v: p_acc %.4f, P(setosa|acc) %.4f; hand-derived 0.698 and 0.622", p, dn[0].PAcc, dn[0].Probs[0])
	}
	// The same relations at full precision: a few operations on values
	// <= 1, 1e-14.
	wantAcc := (1-p)*de[0].PAcc + p/2
	wantP0 := ((1-p)*de[0].PAcc*de[0].Probs[0] + p/4) / wantAcc
	if !scalar.EqualWithinAbsOrRel(dn[0].PAcc, wantAcc, 1e-14, 1e-14) || !scalar.EqualWithinAbsOrRel(dn[0].Probs[0], wantP0, 1e-14, 1e-14) {
		t.Errorf("p_acc %.17g, P(setosa|acc) %.17g; from exact mode %.17g, %.17g", dn[0].PAcc, dn[0].Probs[0], wantAcc, wantP0)
	}
	if pred[0] != 0 || dn[0].Exact != 0 {
		t.Errorf("predicted %d (exact %d), want setosa", pred[0], dn[0].Exact)
	}

	// Density matrix: compiled circuit, then DepolarizeAll just before the
	// (deferred) measurement.
	u := unitRows(t, X)
	circ, err := circuit.Compile(u[28], [][]float64{u[33], u[85]}, y, 2, nil)
	if err != nil {
		t.Fatal(err)
	}
	rho, err := sim.NewDensity(circ.NQubits)
	if err != nil {
		t.Fatal(err)
	}
	for _, op := range circ.Ops {
		rho.ApplyOp(op)
	}
	rho.DepolarizeAll(p)
	joint := make([]float64, 4) // a*2 + k
	for b, v := range rho.Diag() {
		a := b >> circ.Regs.Ancilla & 1
		k := b >> circ.Regs.Class[0] & 1
		joint[a*2+k] += v
	}
	acc := joint[0] + joint[1]
	// Exact density-matrix arithmetic on 4 qubits versus the closed form:
	// rounding only, 1e-13.
	if !scalar.EqualWithinAbsOrRel(dn[0].PAcc, acc, 1e-13, 1e-13) {
		t.Errorf("p_acc: classifier %.17g, density matrix %.17g", dn[0].PAcc, acc)
	}
	for k := range 2 {
		if !scalar.EqualWithinAbsOrRel(dn[0].Probs[k], joint[k]/acc, 1e-13, 1e-13) {
			t.Errorf("P(%d|acc): classifier %.17g, density matrix %.17g", k, dn[0].Probs[k], joint[k]/acc)
		}
	}

	// The label never changes (p < 1) on any of the 100 demonstration rows.
	pe, _ := fitPredict(t, &Classifier{}, train, y, 2, X)
	for _, p := range []float64{0.1, 0.5, 0.9, 0.99} {
		pn, _ := fitPredict(t, &Classifier{Mode: ModeNoisy, Channels: Channels{GlobalDepolarizing: p}}, train, y, 2, X)
		if !slices.Equal(pn, pe) {
			t.Errorf("p = %v: labels changed under global depolarizing", p)
		}
	}
}

// TestShotStatistics checks ModeShots on demonstration row 28 over 2000
// task seeds (drawn from a fixed master seed). Sampling N shots from the
// joint distribution makes N_acc ~ Binomial(N, p_acc) and, given N_acc, the
// setosa count ~ Binomial(N_acc, P(setosa|acc)) (derived by hand from the
// multinomial), so the standardised errors
//
//	z_acc = (N_acc - N p_acc) / sqrt(N p_acc (1 - p_acc))
//	z_k   = (phat - p) / sqrt(p (1 - p) / N_acc)
//
// have mean 0 and variance 1. Tolerances: 4 standard errors of the mean
// (1/sqrt(R)) and of the sample variance (sqrt(2/(R-1)), normal
// approximation), the usual size of a stochastic tolerance.
func TestShotStatistics(t *testing.T) {
	train, y, X := demoData(t)
	test := pickRows(X, 28)
	_, de := fitPredict(t, &Classifier{}, train, y, 2, test)
	pacc, p := de[0].PAcc, de[0].Probs[0]
	const N, R = 1000, 2000
	master := rand.New(rand.NewPCG(2017, 60002))
	var zAcc, zK []float64
	for range R {
		c := &Classifier{Mode: ModeShots, Shots: N, Seed: master.Uint64()}
		pred, d := fitPredict(t, c, train, y, 2, test)
		nacc := d[0].Shots
		if nacc < 1 || nacc > N {
			t.Fatalf("seed %d: N_acc %d", c.Seed, nacc)
		}
		// PAcc and Probs are ratios of the integer counts: exact up to the
		// one rounding of each division.
		if !scalar.EqualWithinAbsOrRel(d[0].PAcc, float64(nacc)/N, 0, 1e-15) ||
			!scalar.EqualWithinAbsOrRel(d[0].Probs[0]+d[0].Probs[1], 1, 1e-15, 1e-15) {
			t.Fatalf("seed %d: PAcc %v with N_acc %d, Probs %v", c.Seed, d[0].PAcc, nacc, d[0].Probs)
		}
		if pred[0] != 0 || d[0].Exact != 0 {
			// P(setosa|acc) = 0.632 is 7 standard errors above 1/2.
			t.Errorf("seed %d: predicted %d (exact %d), Probs %v", c.Seed, pred[0], d[0].Exact, d[0].Probs)
		}
		zAcc = append(zAcc, (float64(nacc)-N*pacc)/math.Sqrt(N*pacc*(1-pacc)))
		zK = append(zK, (d[0].Probs[0]-p)/math.Sqrt(p*(1-p)/float64(nacc)))
	}
	for _, z := range []struct {
		name string
		v    []float64
	}{{"z_acc", zAcc}, {"z_setosa", zK}} {
		var m, v float64
		for _, x := range z.v {
			m += x
		}
		m /= R
		for _, x := range z.v {
			v += (x - m) * (x - m)
		}
		v /= R - 1
		if math.Abs(m) > 4/math.Sqrt(R) {
			t.Errorf("%s: mean %.4f, want 0 within %.4f", z.name, m, 4/math.Sqrt(R))
		}
		if math.Abs(v-1) > 4*math.Sqrt(2.0/(R-1)) {
			t.Errorf("%s: variance %.4f, want 1 within %.4f", z.name, v, 4*math.Sqrt(2.0/(R-1)))
		}
		t.Logf("%s: mean %.4f variance %.4f over %d seeds", z.name, m, v, R)
	}
}

// TestShotsRules checks the documented count rules: exact integer ties go
// to the earlier class, accepted shots on unused class-register values
// count in N_acc but for no class, and N_acc = 0 predicts the first present
// class with NaN probabilities.
func TestShotsRules(t *testing.T) {
	nan := math.NaN()
	for _, tc := range []struct {
		counts  []int
		present []int
		pred    int
		nacc    int
		probs   []float64
	}{
		{[]int{5, 5, 1, 9}, []int{0, 1}, 0, 10, []float64{0.5, 0.5}},
		{[]int{3, 5, 9, 1}, []int{0, 1}, 1, 8, []float64{0.375, 0.625}},
		{[]int{0, 4, 4, 0, 2, 2, 2, 2}, []int{1, 2}, 1, 8, []float64{0, 0.5, 0.5}},
		{[]int{1, 2, 3, 2, 0, 0, 0, 0}, []int{0, 1, 2}, 2, 8, []float64{0.125, 0.25, 0.375}}, // value 3: no class
		{[]int{0, 0, 6, 4}, []int{0, 1}, 0, 0, []float64{nan, nan}},
		{[]int{0, 0, 0, 0, 1, 2, 3, 4}, []int{1, 2}, 1, 0, []float64{0, nan, nan}},
	} {
		dst := make([]float64, len(tc.probs))
		pred, nacc := decideCounts(dst, tc.counts[:len(tc.counts)/2], tc.present)
		if pred != tc.pred || nacc != tc.nacc {
			t.Errorf("counts %v: pred %d N_acc %d, want %d %d", tc.counts, pred, nacc, tc.pred, tc.nacc)
		}
		for k, want := range tc.probs {
			// Ratios of small integers: exact up to one rounding.
			if math.IsNaN(want) != math.IsNaN(dst[k]) || !math.IsNaN(want) && !scalar.EqualWithinAbsOrRel(dst[k], want, 1e-15, 1e-15) {
				t.Errorf("counts %v: probs %v, want %v", tc.counts, dst, tc.probs)
				break
			}
		}
	}

	// End to end: every training vector antipodal to the test vector
	// (d = 1, products exact) gives P(a=0) = 0, so no shot is accepted.
	c := &Classifier{Mode: ModeShots, Shots: 500, Seed: 3}
	pred, d := fitPredict(t, c, mat.NewDense(2, 1, []float64{1, 2}), []int{0, 1}, 2, mat.NewDense(1, 1, []float64{-3}))
	if pred[0] != 0 || d[0].Shots != 0 || d[0].PAcc != 0 || !math.IsNaN(d[0].Probs[0]) || !math.IsNaN(d[0].Probs[1]) {
		t.Errorf("zero acceptance: pred %d, detail %+v", pred[0], d[0])
	}
}

// TestSubsetAlloc checks the class-balanced allocation of TrainSubset.
func TestSubsetAlloc(t *testing.T) {
	for _, tc := range []struct {
		K       int
		count   []int
		present []int
		want    []int
	}{
		{8, []int{50, 50, 50}, []int{0, 1, 2}, []int{3, 3, 2}},       // remainder to the earlier classes
		{8, []int{1, 10, 10}, []int{0, 1, 2}, []int{1, 4, 3}},        // capped and redistributed
		{6, []int{0, 5, 2}, []int{1, 2}, []int{0, 4, 2}},             // absent class skipped
		{3, []int{1, 1, 1}, []int{0, 1, 2}, []int{1, 1, 1}},          // K = classes
		{12, []int{2, 7, 3}, []int{0, 1, 2}, []int{2, 7, 3}},         // K = n
		{9, []int{212, 357}, []int{0, 1}, []int{5, 4}},               // two classes, odd K
		{5, []int{1, 2, 9, 1}, []int{0, 1, 2, 3}, []int{1, 2, 1, 1}}, // minimum one each
	} {
		if got := subsetAlloc(tc.K, tc.count, tc.present); !slices.Equal(got, tc.want) {
			t.Errorf("subsetAlloc(%d, %v) = %v, want %v", tc.K, tc.count, got, tc.want)
		}
	}
}

// TestSubsetDraw checks the drawn subsets: sizes per class as allocated,
// distinct positions in ascending order, a fixed subset per (seed, row
// position) whatever else is predicted, and inclusion frequencies
// alloc_k / count_k for every training row (a uniform draw without
// replacement), within 5 binomial standard errors.
func TestSubsetDraw(t *testing.T) {
	f := firstFold(t, "wine", 10) // 160 training rows, classes 53/64/43
	const K, R = 7, 3000
	c := &Classifier{TrainSubset: K, Seed: 11}
	if err := c.Fit(f.Xtr, f.ytr, f.nClass); err != nil {
		t.Fatal(err)
	}
	p, err := c.makePlan()
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(p.alloc, []int{3, 2, 2}) {
		t.Fatalf("alloc %v, want [3 2 2]", p.alloc)
	}
	s := c.newScratch(p)
	seen := make([]int, c.n)
	var first []int
	for pos := range R {
		c.drawSubset(s, p.alloc, rowRand(c.Seed, pos))
		if pos == 0 {
			first = slices.Clone(s.idx)
		}
		if len(s.idx) != K || !slices.IsSorted(s.idx) || len(slices.Compact(slices.Clone(s.idx))) != K {
			t.Fatalf("pos %d: subset %v", pos, s.idx)
		}
		per := make([]int, f.nClass)
		for j, i := range s.idx {
			per[c.y[i]]++
			seen[i]++
			if s.ysub[j] != c.y[i] {
				t.Fatalf("pos %d: labels %v for %v", pos, s.ysub, s.idx)
			}
		}
		if !slices.Equal(per, p.alloc) {
			t.Fatalf("pos %d: per-class sizes %v, want %v", pos, per, p.alloc)
		}
	}
	c.drawSubset(s, p.alloc, rowRand(c.Seed, 0))
	if !slices.Equal(s.idx, first) {
		t.Errorf("position 0 drew %v, then %v", first, s.idx)
	}
	for i, n := range seen {
		k := c.y[i]
		q := float64(p.alloc[k]) / float64(c.count[k])
		if se := math.Sqrt(R * q * (1 - q)); math.Abs(float64(n)-R*q) > 5*se {
			t.Errorf("training row %d (class %d): in %d of %d subsets, expected %.1f ± %.1f", i, k, n, R, R*q, se)
		}
	}
}

// TestSubsetModes checks that the modes share the subset of a (seed, row)
// pair: Detail.Exact of every mode equals the exact-mode prediction with the
// same TrainSubset and seed, ModeCircuit equals ModeExact on the subset,
// and a subset of the whole training set is the whole-set classifier.
func TestSubsetModes(t *testing.T) {
	f := firstFold(t, "iris", 10)
	ex := &Classifier{TrainSubset: 8, Seed: 5, Balance: true}
	pe, de := fitPredict(t, ex, f.Xtr, f.ytr, f.nClass, f.Xte)
	for _, c := range []*Classifier{
		{Mode: ModeCircuit, TrainSubset: 8, Seed: 5, Balance: true},
		{Mode: ModeShots, Shots: 50, TrainSubset: 8, Seed: 5, Balance: true},
		{Mode: ModeNoisy, Channels: Channels{GlobalDepolarizing: 0.3}, TrainSubset: 8, Seed: 5, Balance: true},
	} {
		_, d := fitPredict(t, c, f.Xtr, f.ytr, f.nClass, f.Xte)
		for i := range d {
			if d[i].Exact != pe[i] {
				t.Errorf("%v row %d: Exact %d, exact mode on the subset %d", c.Mode, i, d[i].Exact, pe[i])
			}
			if c.Mode == ModeCircuit && !scalar.EqualWithinAbsOrRel(d[i].PAcc, de[i].PAcc, 1e-12, 1e-12) {
				t.Errorf("row %d: circuit p_acc %.17g, exact %.17g on the same subset", i, d[i].PAcc, de[i].PAcc)
			}
		}
	}
	_, dw := fitPredict(t, &Classifier{Balance: true}, f.Xtr, f.ytr, f.nClass, f.Xte)
	_, dn := fitPredict(t, &Classifier{Balance: true, TrainSubset: len(f.ytr), Seed: 8}, f.Xtr, f.ytr, f.nClass, f.Xte)
	for i := range dw {
		// Centroid form versus per-row sums: rounding, 1e-13.
		if !scalar.EqualWithinAbsOrRel(dn[i].PAcc, dw[i].PAcc, 1e-13, 1e-13) {
			t.Errorf("row %d: subset of all rows p_acc %.17g, whole set %.17g", i, dn[i].PAcc, dw[i].PAcc)
		}
	}
	// Different rows draw different subsets: the same test vector at
	// positions 0 and 1 gets two subsets, hence (almost surely) two p_acc.
	same := mat.NewDense(2, f.Xte.RawMatrix().Cols, nil)
	same.SetRow(0, f.Xte.RawRowView(0))
	same.SetRow(1, f.Xte.RawRowView(0))
	_, ds := fitPredict(t, &Classifier{TrainSubset: 8, Seed: 5}, f.Xtr, f.ytr, f.nClass, same)
	if scalar.EqualWithinAbsOrRel(ds[0].PAcc, ds[1].PAcc, 1e-15, 1e-15) {
		t.Errorf("rows 0 and 1 (same vector) got the same p_acc %v: same subset drawn twice?", ds[0].PAcc)
	}
}

// TestDeterminism: Predict gives identical results when called twice, and a
// row's random draws depend only on the seed and its position, not on the
// other rows predicted with it.
func TestDeterminism(t *testing.T) {
	f := firstFold(t, "iris", 10)
	c := &Classifier{Mode: ModeNoisy, Shots: 200, TrainSubset: 4, Seed: 99,
		Noise: sim.NoiseModel{Depolarizing: [2]float64{0.01, 0.02}}, Method: sim.Trajectories, Trajectories: 20}
	p1, d1 := fitPredict(t, c, f.Xtr, f.ytr, f.nClass, f.Xte)
	p2, d2, err := c.PredictDetail(f.Xte)
	if err != nil {
		t.Fatal(err)
	}
	// Replace every row but row 5 by another test row: row 5 must not move.
	X3 := mat.DenseCopyOf(f.Xte)
	r, _ := X3.Dims()
	for i := range r {
		if i != 5 {
			X3.SetRow(i, f.Xte.RawRowView((i+7)%r))
		}
	}
	_, d3, err := c.PredictDetail(X3)
	if err != nil {
		t.Fatal(err)
	}
	for i := range p1 {
		// exact: identical seeded computations
		if p1[i] != p2[i] || d1[i].Shots != d2[i].Shots || d1[i].PAcc != d2[i].PAcc || !slices.Equal(d1[i].Probs, d2[i].Probs) {
			t.Errorf("row %d: second call %v %+v, first %v %+v", i, p2[i], d2[i], p1[i], d1[i])
		}
	}
	if d3[5].Shots != d1[5].Shots || !slices.Equal(d3[5].Probs, d1[5].Probs) { // exact: same draws
		t.Errorf("row 5 changed with the other rows: %+v, was %+v", d3[5], d1[5])
	}
	c2 := *c
	c2.Seed = 100
	_, d4, err := c2.PredictDetail(f.Xte)
	if err != nil {
		t.Fatal(err)
	}
	differ := 0
	for i := range d4 {
		if d4[i].Shots != d1[i].Shots {
			differ++
		}
	}
	if differ == 0 {
		t.Errorf("seed 100 gave the accepted shots of seed 99 on every row")
	}
}

// TestNoisyWithoutNoise: the gate-level path with all noise zero (forced by
// an explicit simulator) equals circuit mode, and readout error alone gives
// the same distribution through the gate-level simulation as in closed
// form.
func TestNoisyWithoutNoise(t *testing.T) {
	f := firstFold(t, "iris", 10)
	base := Classifier{TrainSubset: 8, Seed: 21, Balance: true}
	cc := base
	cc.Mode = ModeCircuit
	_, dc := fitPredict(t, &cc, f.Xtr, f.ytr, f.nClass, f.Xte)
	ro := sim.NoiseModel{Readout: [2]float64{0.03, 0.08}}
	_, dro := fitPredict(t, &Classifier{Mode: ModeNoisy, Noise: ro, TrainSubset: 8, Seed: 21, Balance: true}, f.Xtr, f.ytr, f.nClass, f.Xte)
	for _, m := range []sim.Method{sim.DensityMatrix, sim.Trajectories, sim.StateVector} {
		for _, noise := range []sim.NoiseModel{{}, ro} {
			c := base
			c.Mode, c.Method, c.Noise = ModeNoisy, m, noise
			p, err := func() (*plan, error) {
				if err := c.Fit(f.Xtr, f.ytr, f.nClass); err != nil {
					return nil, err
				}
				return c.makePlan()
			}()
			if err != nil {
				t.Fatal(err)
			}
			if !p.gate || p.method != m {
				t.Fatalf("method %v: plan %+v, want a gate-level run", m, p)
			}
			_, d, err := c.PredictDetail(f.Xte)
			if err != nil {
				t.Fatal(err)
			}
			want := dc
			if noise != (sim.NoiseModel{}) {
				want = dro
			}
			for i := range d {
				// Different simulators of the same unitary: rounding, 1e-12.
				if !scalar.EqualWithinAbsOrRel(d[i].PAcc, want[i].PAcc, 1e-12, 1e-12) {
					t.Errorf("method %v readout %v row %d: p_acc %.17g, want %.17g", m, noise.Readout, i, d[i].PAcc, want[i].PAcc)
				}
				for k := range d[i].Probs {
					if !scalar.EqualWithinAbsOrRel(d[i].Probs[k], want[i].Probs[k], 1e-12, 1e-12) {
						t.Errorf("method %v readout %v row %d class %d: P %.17g, want %.17g", m, noise.Readout, i, k, d[i].Probs[k], want[i].Probs[k])
					}
				}
			}
		}
	}
}

// TestChannelsAfterGateNoise: Channels act on the distribution the
// gate-level simulation produced. For the global depolarizing channel
// (derived by hand, see TestGlobalDepolarizing) p_acc' = (1-s) p_acc + s/2
// and P'(k|acc) = ((1-s) p_acc P(k|acc) + s/2^(1+q)) / p_acc'.
func TestChannelsAfterGateNoise(t *testing.T) {
	f := firstFold(t, "iris", 10) // 3 classes: q = 2
	gate := sim.NoiseModel{Depolarizing: [2]float64{0.002, 0.01}, AmplitudeDamping: 0.003}
	const s = 0.2
	_, dg := fitPredict(t, &Classifier{Mode: ModeNoisy, Noise: gate, TrainSubset: 4, Seed: 4}, f.Xtr, f.ytr, f.nClass, f.Xte)
	_, dgc := fitPredict(t, &Classifier{Mode: ModeNoisy, Noise: gate, Channels: Channels{GlobalDepolarizing: s}, TrainSubset: 4, Seed: 4}, f.Xtr, f.ytr, f.nClass, f.Xte)
	for i := range dg {
		acc := (1-s)*dg[i].PAcc + s/2
		// A few operations on values <= 1: 1e-14.
		if !scalar.EqualWithinAbsOrRel(dgc[i].PAcc, acc, 1e-14, 1e-14) {
			t.Errorf("row %d: p_acc %.17g, want %.17g", i, dgc[i].PAcc, acc)
		}
		for k := range dg[i].Probs {
			want := ((1-s)*dg[i].PAcc*dg[i].Probs[k] + s/8) / acc
			if !scalar.EqualWithinAbsOrRel(dgc[i].Probs[k], want, 1e-14, 1e-14) {
				t.Errorf("row %d class %d: P %.17g, want %.17g", i, k, dgc[i].Probs[k], want)
			}
		}
	}
}

// TestNoiseDegradesAccuracy is a property check at a fixed seed: on Iris
// (three classes, 7 qubits with training subsets of 4, density matrix) the
// accuracy does not rise as gate depolarizing grows, and strong noise costs
// accuracy. Exact probabilities (no shots), so the only randomness is the
// subsets, which are the same at every noise level.
func TestNoiseDegradesAccuracy(t *testing.T) {
	d, err := datasets.Load("iris")
	if err != nil {
		t.Fatal(err)
	}
	sp, err := cv.Stratified(d.Y, 3, 5, rand.New(rand.NewPCG(3, 4)))
	if err != nil {
		t.Fatal(err)
	}
	levels := []float64{0, 0.003, 0.01, 0.03}
	acc := make([]float64, len(levels))
	for _, split := range sp[:2] {
		f := fold{nClass: 3}
		tr := mat.NewDense(len(split.Train), 4, nil)
		te := mat.NewDense(len(split.Test), 4, nil)
		for i, j := range split.Train {
			tr.SetRow(i, d.X.RawRowView(j))
			f.ytr = append(f.ytr, d.Y[j])
		}
		for i, j := range split.Test {
			te.SetRow(i, d.X.RawRowView(j))
			f.yte = append(f.yte, d.Y[j])
		}
		pipe, err := datasets.ParsePipeline("std")
		if err != nil {
			t.Fatal(err)
		}
		if f.Xtr, err = pipe.FitTransform(tr, nil); err != nil {
			t.Fatal(err)
		}
		if f.Xte, err = pipe.Transform(te, nil); err != nil {
			t.Fatal(err)
		}
		for l, p := range levels {
			c := &Classifier{Mode: ModeNoisy, TrainSubset: 4, Seed: 12, Method: sim.DensityMatrix,
				Noise: sim.NoiseModel{Depolarizing: [2]float64{p, p}}}
			pred, _ := fitPredict(t, c, f.Xtr, f.ytr, 3, f.Xte)
			for i, k := range pred {
				if k == f.yte[i] {
					acc[l]++
				}
			}
		}
	}
	n := float64(len(sp[0].Test) + len(sp[1].Test))
	for l := range acc {
		acc[l] /= n
	}
	t.Logf("depolarizing %v: accuracy %.3f", levels, acc)
	for l := 1; l < len(acc); l++ {
		if acc[l] > acc[l-1] {
			t.Errorf("accuracy rose from %.3f to %.3f as depolarizing grew from %v to %v", acc[l-1], acc[l], levels[l-1], levels[l])
		}
	}
	if acc[0]-acc[len(acc)-1] < 0.2 {
		t.Errorf("accuracy %.3f without noise, %.3f at depolarizing %v: want a drop of at least 0.2", acc[0], acc[len(acc)-1], levels[len(levels)-1])
	}
}

// TestValidate covers every documented option error.
func TestValidate(t *testing.T) {
	noisy := func(c Classifier) Classifier { c.Mode = ModeNoisy; return c }
	for _, tc := range []struct {
		name string
		c    Classifier
		key  string // "" = valid
		want error
	}{
		{"zero value", Classifier{}, "", nil},
		{"shots mode", Classifier{Mode: ModeShots, Shots: 10}, "", nil},
		{"noisy full", noisy(Classifier{Shots: 5, Noise: sim.NoiseModel{Depolarizing: [2]float64{0.1, 0.2}, AmplitudeDamping: 0.1, PhaseDamping: 1, Readout: [2]float64{0, 1}},
			Channels: Channels{GlobalDepolarizing: 1, AncillaDephasing: 0.5}, Method: sim.Trajectories, Trajectories: 10}), "", nil},
		{"noisy no noise", noisy(Classifier{}), "", nil},
		{"noisy auto trajectories", noisy(Classifier{Trajectories: 10}), "", nil},
		{"unknown mode", Classifier{Mode: 4}, "mode", ErrMode},
		{"negative mode", Classifier{Mode: -1}, "mode", ErrMode},
		{"negative shots", Classifier{Mode: ModeShots, Shots: -1}, "shots", ErrOption},
		{"no shots", Classifier{Mode: ModeShots}, "shots", ErrOption},
		{"noisy negative shots", noisy(Classifier{Shots: -5}), "shots", ErrOption},
		{"exact shots", Classifier{Shots: 100}, "shots", ErrOption},
		{"circuit shots", Classifier{Mode: ModeCircuit, Shots: 100}, "shots", ErrOption},
		{"negative subset", Classifier{TrainSubset: -1}, "train_subset", ErrOption},
		{"depolarizing", noisy(Classifier{Noise: sim.NoiseModel{Depolarizing: [2]float64{0, 1.5}}}), "depolarizing", ErrOption},
		{"depolarizing NaN", noisy(Classifier{Noise: sim.NoiseModel{Depolarizing: [2]float64{math.NaN(), 0}}}), "depolarizing", ErrOption},
		{"amplitude_damping", noisy(Classifier{Noise: sim.NoiseModel{AmplitudeDamping: -0.1}}), "amplitude_damping", ErrOption},
		{"phase_damping", noisy(Classifier{Noise: sim.NoiseModel{PhaseDamping: 2}}), "phase_damping", ErrOption},
		{"readout", noisy(Classifier{Noise: sim.NoiseModel{Readout: [2]float64{-1e-9, 0}}}), "readout", ErrOption},
		{"global_depolarizing", noisy(Classifier{Channels: Channels{GlobalDepolarizing: 1.01}}), "global_depolarizing", ErrOption},
		{"ancilla_dephasing", noisy(Classifier{Channels: Channels{AncillaDephasing: math.Inf(1)}}), "ancilla_dephasing", ErrOption},
		{"channel readout", noisy(Classifier{Channels: Channels{Readout: [2]float64{0, math.NaN()}}}), "readout", ErrOption},
		{"readout twice", noisy(Classifier{Noise: sim.NoiseModel{Readout: [2]float64{0.1, 0}}, Channels: Channels{Readout: [2]float64{0.1, 0}}}), "readout", ErrOption},
		{"noise in exact", Classifier{Noise: sim.NoiseModel{PhaseDamping: 0.1}}, "phase_damping", ErrOption},
		{"noise in shots", Classifier{Mode: ModeShots, Shots: 10, Noise: sim.NoiseModel{Depolarizing: [2]float64{0.1, 0}}}, "depolarizing", ErrOption},
		{"amplitude in circuit", Classifier{Mode: ModeCircuit, Noise: sim.NoiseModel{AmplitudeDamping: 0.1}}, "amplitude_damping", ErrOption},
		{"readout in shots", Classifier{Mode: ModeShots, Shots: 10, Noise: sim.NoiseModel{Readout: [2]float64{0.1, 0}}}, "readout", ErrOption},
		{"channel in exact", Classifier{Channels: Channels{GlobalDepolarizing: 0.1}}, "global_depolarizing", ErrOption},
		{"dephasing in circuit", Classifier{Mode: ModeCircuit, Channels: Channels{AncillaDephasing: 0.1}}, "ancilla_dephasing", ErrOption},
		{"channel readout in shots", Classifier{Mode: ModeShots, Shots: 1, Channels: Channels{Readout: [2]float64{0, 0.1}}}, "readout", ErrOption},
		{"method in exact", Classifier{Method: sim.DensityMatrix}, "simulator", ErrOption},
		{"trajectories in shots", Classifier{Mode: ModeShots, Shots: 1, Trajectories: 5}, "trajectories", ErrOption},
		{"unknown method", noisy(Classifier{Method: sim.Method(9)}), "simulator", ErrOption},
		{"negative trajectories", noisy(Classifier{Trajectories: -1}), "trajectories", ErrOption},
		{"state vector with gate noise", noisy(Classifier{Method: sim.StateVector, Noise: sim.NoiseModel{PhaseDamping: 0.1}}), "simulator", ErrOption},
		{"trajectories with density", noisy(Classifier{Method: sim.DensityMatrix, Trajectories: 10}), "trajectories", ErrOption},
	} {
		t.Run(tc.name, func(t *testing.T) {
			err := tc.c.Validate()
			if tc.key == "" {
				if err != nil {
					t.Fatalf("Validate: %v", err)
				}
				return
			}
			var oe *OptionError
			if !errors.Is(err, tc.want) || !errors.As(err, &oe) || oe.Key != tc.key {
				t.Fatalf("Validate: %v, want an *OptionError for key %q wrapping %v", err, tc.key, tc.want)
			}
			if !strings.HasPrefix(err.Error(), "qkernel: ") || !strings.Contains(err.Error(), `"`+tc.key+`"`) {
				t.Errorf("message %q: want prefix \"qkernel: \" and the key", err)
			}
			// Fit refuses the same options.
			c := tc.c
			if err := c.Fit(mat.NewDense(2, 1, []float64{1, -1}), []int{0, 1}, 2); !errors.Is(err, tc.want) {
				t.Errorf("Fit: %v, want %v", err, tc.want)
			}
		})
	}
}

// TestDataLimits covers TrainSubset against the data (ErrSubset) and the
// qubit limits (ErrTooLarge), at Fit and at Predict after the options
// changed.
func TestDataLimits(t *testing.T) {
	f := firstFold(t, "breast-cancer", 10) // 512 training rows, 30 features
	X3 := mat.NewDense(4, 2, []float64{1, 0, 0, 1, 1, 1, -1, 0})
	y3 := []int{0, 1, 2, 2}
	depol := sim.NoiseModel{Depolarizing: [2]float64{0.01, 0.01}}
	for _, tc := range []struct {
		name   string
		c      Classifier
		X      *mat.Dense
		y      []int
		nClass int
		want   error
		msg    string
	}{
		{"subset too large", Classifier{TrainSubset: 5}, X3, y3, 3, ErrSubset, "train_subset 5 exceeds the 4 training rows"},
		{"subset below classes", Classifier{TrainSubset: 2}, X3, y3, 3, ErrSubset, "train_subset 2 is below the 3 classes present"},
		{"density 16 qubits", Classifier{Mode: ModeNoisy, Noise: depol, Method: sim.DensityMatrix}, f.Xtr, f.ytr, 2, ErrTooLarge,
			`needs 16 qubits; the density-matrix simulator holds at most 12; set train_subset or simulator = "trajectories"`},
		// 2^20 class labels with two present: 1 + 2 + 1 + 20 = 24 qubits
		// fits a state vector; 2^23 gives 27.
		{"state vector 27 qubits", Classifier{Mode: ModeCircuit}, X3, []int{0, 1, 1, 0}, 1 << 23, ErrTooLarge,
			"needs 27 qubits; the state-vector simulator holds at most 26"},
		{"trajectories 27 qubits", Classifier{Mode: ModeNoisy, Noise: depol}, X3, []int{0, 1, 1, 0}, 1 << 23, ErrTooLarge,
			"needs 27 qubits; the trajectory simulator holds at most 26"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := tc.c
			err := c.Fit(tc.X, tc.y, tc.nClass)
			checkErr(t, err, tc.want, tc.msg)
			if _, err := c.Predict(tc.X); !errors.Is(err, ErrNotFitted) {
				t.Errorf("Predict after failed Fit: %v", err)
			}
		})
	}
	// Auto picks the density matrix up to 12 qubits, trajectories above.
	for _, tc := range []struct {
		subset int
		qubits int
		method sim.Method
	}{{8, 1 + 3 + 5 + 1, sim.DensityMatrix}, {0, 16, sim.Trajectories}} {
		c := &Classifier{Mode: ModeNoisy, Noise: depol, TrainSubset: tc.subset}
		if err := c.Fit(f.Xtr, f.ytr, 2); err != nil {
			t.Fatal(err)
		}
		p, err := c.makePlan()
		if err != nil || p.qubits != tc.qubits || p.method != tc.method || !p.gate {
			t.Errorf("subset %d: plan %+v, %v; want %d qubits, %v", tc.subset, p, err, tc.qubits, tc.method)
		}
	}
	// Options changed after Fit are checked again by Predict.
	c := &Classifier{}
	if err := c.Fit(f.Xtr, f.ytr, 2); err != nil {
		t.Fatal(err)
	}
	c.Mode, c.Method, c.Noise = ModeNoisy, sim.DensityMatrix, depol
	_, err := c.Predict(f.Xte)
	checkErr(t, err, ErrTooLarge, "needs 16 qubits")
	c.Mode, c.Shots = ModeShots, 0
	_, err = c.Predict(f.Xte)
	checkErr(t, err, ErrOption, `"shots"`)
}

// TestChannelsPhysicalOrder checks the documented composition of Channels
// against a gate-level density-matrix run of the same physics: phase damping
// of the ancilla (Nielsen & Chuang 2010, section 8.3.6) just before the
// final Hadamard, a depolarizing channel on the whole register after it,
// and readout assignment error as a channel on every measured qubit
// (sim.ReadoutKraus) before the deferred measurement. Cases: the
// demonstration vectors (2 classes, 4 qubits) and an Iris subset of 4 rows
// with 3 classes (q = 2, 7 qubits, so class-register value 3 exists).
func TestChannelsPhysicalOrder(t *testing.T) {
	train, y, X := demoData(t)
	iris := firstFold(t, "iris", 10)
	ch := Channels{GlobalDepolarizing: 0.15, AncillaDephasing: 0.3, Readout: [2]float64{0.02, 0.07}}
	for _, tc := range []struct {
		name   string
		c      Classifier
		Xtr    *mat.Dense
		ytr    []int
		nClass int
		Xte    *mat.Dense
	}{
		{"demo", Classifier{}, train, y, 2, pickRows(X, 28, 36, 70)},
		{"iris-subset", Classifier{TrainSubset: 4, Seed: 17, Balance: true}, iris.Xtr, iris.ytr, 3, iris.Xte},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c := tc.c
			c.Mode, c.Channels = ModeNoisy, ch
			_, got := fitPredict(t, &c, tc.Xtr, tc.ytr, tc.nClass, tc.Xte)
			if err := c.Fit(tc.Xtr, tc.ytr, tc.nClass); err != nil {
				t.Fatal(err)
			}
			p, err := c.makePlan()
			if err != nil {
				t.Fatal(err)
			}
			s := c.newScratch(p)
			test := unitRows(t, tc.Xte)
			for i, x := range test {
				// The training set of row i: the subset drawn for position
				// i, or all rows.
				rows, ys := c.rows(s), c.y
				w := Weights(c.y, c.nClass, c.Balance)
				if c.TrainSubset > 0 {
					c.drawSubset(s, p.alloc, rowRand(c.Seed, i))
					rows, ys = s.train, s.ysub
					w = Weights(ys, c.nClass, c.Balance)
				}
				circ, err := circuit.Compile(x, rows, ys, c.nClass, w)
				if err != nil {
					t.Fatal(err)
				}
				rho, err := sim.NewDensity(circ.NQubits)
				if err != nil {
					t.Fatal(err)
				}
				anc := circ.Regs.Ancilla
				hs := 0
				for _, op := range circ.Ops {
					if op.Gate == circuit.H && op.Target == anc {
						if hs++; hs == 2 { // the final Hadamard
							rho.PhaseDamp(anc, ch.AncillaDephasing)
						}
					}
					rho.ApplyOp(op)
				}
				rho.DepolarizeAll(ch.GlobalDepolarizing)
				ro := sim.ReadoutKraus(ch.Readout[0], ch.Readout[1])
				for _, q := range append([]int{anc}, circ.Regs.Class...) {
					rho.ApplyKraus1(q, ro)
				}
				h := 1 << len(circ.Regs.Class)
				joint := make([]float64, 2*h)
				for b, v := range rho.Diag() {
					k := 0
					for j, q := range circ.Regs.Class {
						k |= (b >> q & 1) << j
					}
					joint[(b>>anc&1)*h+k] += v
				}
				acc := 0.0
				for _, v := range joint[:h] {
					acc += v
				}
				// Exact density-matrix arithmetic (<= 7 qubits) against the
				// closed forms: rounding only, 1e-12.
				if !scalar.EqualWithinAbsOrRel(got[i].PAcc, acc, 1e-12, 1e-12) {
					t.Errorf("row %d: p_acc %.17g, density matrix %.17g", i, got[i].PAcc, acc)
				}
				for k := range got[i].Probs {
					if !scalar.EqualWithinAbsOrRel(got[i].Probs[k], joint[k]/acc, 1e-12, 1e-12) {
						t.Errorf("row %d class %d: P %.17g, density matrix %.17g", i, k, got[i].Probs[k], joint[k]/acc)
					}
				}
			}
		})
	}
}

// TestConcurrentModes backs the documented claim that one fitted classifier
// may serve several goroutines in every mode (run with -race): each call
// has its own scratch space and generators, so concurrent results equal the
// serial ones.
func TestConcurrentModes(t *testing.T) {
	f := firstFold(t, "iris", 10)
	for _, c := range []*Classifier{
		{Mode: ModeShots, Shots: 300, TrainSubset: 9, Seed: 2},
		{Mode: ModeNoisy, Shots: 300, Seed: 2, Channels: Channels{GlobalDepolarizing: 0.2, AncillaDephasing: 0.1, Readout: [2]float64{0.01, 0.02}}},
		{Mode: ModeNoisy, TrainSubset: 3, Seed: 2, Noise: sim.NoiseModel{Depolarizing: [2]float64{0.01, 0.01}}},
	} {
		want, wd := fitPredict(t, c, f.Xtr, f.ytr, f.nClass, f.Xte)
		errc := make(chan error, 3)
		for range 3 {
			go func() {
				got, gd, err := c.PredictDetail(f.Xte)
				if err == nil && !slices.Equal(got, want) {
					err = fmt.Errorf("%v: concurrent predictions %v, want %v", c.Mode, got, want)
				}
				for i := range gd {
					if err == nil && (gd[i].Shots != wd[i].Shots || gd[i].PAcc != wd[i].PAcc) { // exact: same draws
						err = fmt.Errorf("%v row %d: concurrent detail %+v, serial %+v", c.Mode, i, gd[i], wd[i])
					}
				}
				errc <- err
			}()
		}
		for range 3 {
			if err := <-errc; err != nil {
				t.Error(err)
			}
		}
	}
}
