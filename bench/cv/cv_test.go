package cv

import (
	"errors"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"strings"
	"testing"
)

// labels builds a label vector with counts[c] members of class c, the
// classes interleaved so that no class occupies a contiguous block.
func labels(counts ...int) []int {
	left := slices.Clone(counts)
	var y []int
	for {
		added := false
		for c := range left {
			if left[c] > 0 {
				y = append(y, c)
				left[c]--
				added = true
			}
		}
		if !added {
			return y
		}
	}
}

func newRand(seed uint64) *rand.Rand { return rand.New(rand.NewPCG(seed, 0x5eed)) }

// checkPartition checks that each Train is the complement of its Test in
// 0..n-1 and that both are sorted ascending; with cover, also that every
// position is in exactly one test part.
func checkPartition(t *testing.T, label string, splits []Split, n int, cover bool) {
	t.Helper()
	seen := make([]int, n)
	for f, sp := range splits {
		if sp.Fold != f || sp.Repeat != 0 {
			t.Errorf("%s: split %d has Repeat %d Fold %d", label, f, sp.Repeat, sp.Fold)
		}
		if !slices.IsSorted(sp.Test) || !slices.IsSorted(sp.Train) {
			t.Errorf("%s fold %d: parts not sorted", label, f)
		}
		if len(sp.Test)+len(sp.Train) != n {
			t.Errorf("%s fold %d: %d test + %d train != %d", label, f, len(sp.Test), len(sp.Train), n)
		}
		in := make([]bool, n)
		for _, i := range sp.Test {
			in[i] = true
			seen[i]++
		}
		for _, i := range sp.Train {
			if in[i] {
				t.Errorf("%s fold %d: position %d in both parts", label, f, i)
			}
			in[i] = true
		}
		for i, ok := range in {
			if !ok {
				t.Errorf("%s fold %d: position %d in neither part", label, f, i)
			}
		}
	}
	for i, s := range seen {
		if cover && s != 1 {
			t.Errorf("%s: position %d in %d test folds, want 1", label, i, s)
		}
	}
}

func TestStratifiedPartitionAndStrata(t *testing.T) {
	cases := []struct {
		counts []int
		k      int
	}{
		{[]int{50, 50, 50}, 10},
		{[]int{59, 71, 48}, 10}, // class sizes of wine: numpy.bincount(load_wine().target), scikit-learn 1.2.1
		{[]int{212, 357}, 10},   // class sizes of breast cancer: numpy.bincount(load_breast_cancer().target), scikit-learn 1.2.1
		{[]int{7, 3, 11}, 3},
		{[]int{5, 5}, 5},
		{[]int{13, 0, 4}, 4}, // class 1 has no members: ignored
		{[]int{2, 2, 2}, 2},
		{[]int{100, 3}, 3},
	}
	for _, c := range cases {
		y := labels(c.counts...)
		n := len(y)
		splits, err := Stratified(y, len(c.counts), c.k, newRand(1))
		if err != nil {
			t.Fatalf("counts %v k %d: %v", c.counts, c.k, err)
		}
		label := "stratified"
		if len(splits) != c.k {
			t.Fatalf("counts %v: %d folds, want %d", c.counts, len(splits), c.k)
		}
		checkPartition(t, label, splits, n, true)
		lo, hi := n, 0
		for f, sp := range splits {
			lo, hi = min(lo, len(sp.Test)), max(hi, len(sp.Test))
			per := make([]int, len(c.counts))
			for _, i := range sp.Test {
				per[y[i]]++
			}
			for cl, nc := range c.counts {
				// Proportional share n_c/k; each fold gets its floor or ceil.
				share := float64(nc) / float64(c.k)
				if float64(per[cl]) < math.Floor(share) || float64(per[cl]) > math.Ceil(share) {
					t.Errorf("counts %v k %d fold %d: class %d has %d test members, want floor/ceil of %.3g",
						c.counts, c.k, f, cl, per[cl], share)
				}
			}
		}
		if hi-lo > 1 {
			t.Errorf("counts %v k %d: fold sizes range %d..%d, want a spread of at most 1", c.counts, c.k, lo, hi)
		}
	}
}

func TestStratifiedDeterminism(t *testing.T) {
	y := labels(40, 25, 12)
	a, err := Stratified(y, 3, 5, newRand(7))
	if err != nil {
		t.Fatal(err)
	}
	b, err := Stratified(y, 3, 5, newRand(7))
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(a, b) {
		t.Error("same seed gave different folds")
	}
	// A different seed gives different folds: 77 positions dealt at
	// random; the chance that two seeds agree is negligible.
	c, err := Stratified(y, 3, 5, newRand(8))
	if err != nil {
		t.Fatal(err)
	}
	if reflect.DeepEqual(a, c) {
		t.Error("seeds 7 and 8 gave identical folds")
	}

	// The generator is consumed by exactly one Shuffle per non-empty class,
	// in class order, as documented: replaying those draws leaves a second
	// generator in the same state.
	y2 := labels(9, 0, 6)
	r1, r2 := newRand(3), newRand(3)
	if _, err := Stratified(y2, 3, 3, r1); err != nil {
		t.Fatal(err)
	}
	for _, m := range []int{9, 6} {
		r2.Shuffle(m, func(i, j int) {})
	}
	if r1.Uint64() != r2.Uint64() {
		t.Error("Stratified consumed the generator differently from one Shuffle per non-empty class")
	}
	r1, r2 = newRand(4), newRand(4)
	if _, err := Holdout(y2, 3, 0.3, r1); err != nil {
		t.Fatal(err)
	}
	for _, m := range []int{9, 6} {
		r2.Shuffle(m, func(i, j int) {})
	}
	if r1.Uint64() != r2.Uint64() {
		t.Error("Holdout consumed the generator differently from one Shuffle per non-empty class")
	}
}

// TestStratifiedUniform checks that the shuffle treats members alike: over
// many seeds every position lands in every fold with frequency 1/k.
func TestStratifiedUniform(t *testing.T) {
	y := labels(10, 5)
	const k, seeds = 5, 2000
	hits := make([][]int, len(y))
	for i := range hits {
		hits[i] = make([]int, k)
	}
	for s := range uint64(seeds) {
		splits, err := Stratified(y, 2, k, newRand(s))
		if err != nil {
			t.Fatal(err)
		}
		for f, sp := range splits {
			for _, i := range sp.Test {
				hits[i][f]++
			}
		}
	}
	// Binomial(2000, 0.2): standard error sqrt(0.2*0.8/2000) ~ 0.0089;
	// 5 standard errors keep the 75 checks free of false alarms.
	const p = 1.0 / k
	tol := 5 * math.Sqrt(p*(1-p)/seeds)
	for i := range hits {
		for f, h := range hits[i] {
			if freq := float64(h) / seeds; math.Abs(freq-p) > tol {
				t.Errorf("position %d in fold %d with frequency %.4f, want %.2f +- %.4f", i, f, freq, p, tol)
			}
		}
	}
}

func TestStratifiedErrors(t *testing.T) {
	y := labels(10, 2, 6) // class 1 has 2 members
	cases := []struct {
		y      []int
		nClass int
		k      int
		want   error
	}{
		{y, 3, 1, ErrFolds},
		{y, 3, 0, ErrFolds},
		{y, 3, -3, ErrFolds},
		{y, 3, 19, ErrFolds},
		{nil, 2, 2, ErrFolds},
		{y, 3, 3, ErrTooFewPerClass},
		{[]int{0, 1, 2, 0}, 2, 2, ErrLabel},
		{[]int{0, -1, 1, 0}, 2, 2, ErrLabel},
		{[]int{0, 0, 0}, 0, 2, ErrLabel},
	}
	for _, c := range cases {
		_, err := Stratified(c.y, c.nClass, c.k, newRand(1))
		if !errors.Is(err, c.want) {
			t.Errorf("Stratified(%v, %d, %d): error %v, want %v", c.y, c.nClass, c.k, err, c.want)
			continue
		}
		if !strings.HasPrefix(err.Error(), "cv: ") {
			t.Errorf("error %q lacks the package prefix", err)
		}
	}
	_, err := Stratified(y, 3, 3, newRand(1))
	var ce *ClassError
	if !errors.As(err, &ce) || ce.Class != 1 || ce.Count != 2 || ce.Need != 3 {
		t.Fatalf("error %v, want a ClassError for class 1 with 2 members needing 3", err)
	}
	if !strings.Contains(err.Error(), "class 1 has 2 members") {
		t.Errorf("message %q does not name the class and its count", err)
	}
	// With k = 2 every class is large enough.
	if _, err := Stratified(y, 3, 2, newRand(1)); err != nil {
		t.Errorf("k = 2: %v", err)
	}
}

func TestLeaveOneOut(t *testing.T) {
	const n = 7
	splits := LeaveOneOut(n)
	if len(splits) != n {
		t.Fatalf("%d splits, want %d", len(splits), n)
	}
	checkPartition(t, "loo", splits, n, true)
	for i, sp := range splits {
		if len(sp.Test) != 1 || sp.Test[0] != i || len(sp.Train) != n-1 {
			t.Errorf("split %d: test %v, %d train", i, sp.Test, len(sp.Train))
		}
	}
	for _, n := range []int{1, 0, -2} {
		if s := LeaveOneOut(n); s != nil {
			t.Errorf("LeaveOneOut(%d) = %v, want nil", n, s)
		}
	}
}

func TestHoldoutProportions(t *testing.T) {
	counts := []int{50, 30, 7, 2, 0}
	y := labels(counts...)
	cases := []struct {
		frac float64
		want []int // test members per class, derived by hand from the rule in Holdout's doc
	}{
		// round(0.3*n_c): 15, 9, round(2.1) = 2, round(0.6) = 1; empty class 0.
		{0.3, []int{15, 9, 2, 1, 0}},
		// round(0.05*n_c): round(2.5) = 3 (halves away from zero),
		// round(1.5) = 2, round(0.35) = 0 -> clamped to 1, 0.1 -> 1.
		{0.05, []int{3, 2, 1, 1, 0}},
		// round(0.95*n_c): 48 (47.5 rounds up), round(28.5) = 29 -> 29,
		// round(6.65) = 7 -> clamped to 6, round(1.9) = 2 -> clamped to 1.
		{0.95, []int{48, 29, 6, 1, 0}},
		{0.5, []int{25, 15, 4, 1, 0}}, // round(3.5) = 4
	}
	for _, c := range cases {
		sp, err := Holdout(y, len(counts), c.frac, newRand(11))
		if err != nil {
			t.Fatalf("frac %v: %v", c.frac, err)
		}
		checkPartition(t, "holdout", []Split{sp}, len(y), false)
		per := make([]int, len(counts))
		for _, i := range sp.Test {
			per[y[i]]++
		}
		if !slices.Equal(per, c.want) {
			t.Errorf("frac %v: test members per class %v, want %v", c.frac, per, c.want)
		}
	}

	// Determinism and seed sensitivity.
	a, _ := Holdout(y, len(counts), 0.3, newRand(5))
	b, _ := Holdout(y, len(counts), 0.3, newRand(5))
	d, _ := Holdout(y, len(counts), 0.3, newRand(6))
	if !reflect.DeepEqual(a, b) {
		t.Error("same seed gave different holdout splits")
	}
	if reflect.DeepEqual(a, d) {
		t.Error("seeds 5 and 6 gave identical holdout splits")
	}
}

func TestHoldoutErrors(t *testing.T) {
	y := labels(10, 5)
	for _, f := range []float64{0, 1, -0.1, 1.5, math.NaN(), math.Inf(1)} {
		if _, err := Holdout(y, 2, f, newRand(1)); !errors.Is(err, ErrFraction) {
			t.Errorf("frac %v: error %v, want ErrFraction", f, err)
		}
	}
	_, err := Holdout(labels(10, 1), 2, 0.3, newRand(1))
	var ce *ClassError
	if !errors.As(err, &ce) || ce.Class != 1 || ce.Count != 1 || ce.Need != 2 {
		t.Errorf("single-member class: error %v, want a ClassError for class 1", err)
	}
	if _, err := Holdout(nil, 2, 0.3, newRand(1)); !errors.Is(err, ErrTooFewPerClass) {
		t.Errorf("no instances: error %v, want ErrTooFewPerClass", err)
	}
	if _, err := Holdout([]int{0, 3}, 2, 0.3, newRand(1)); !errors.Is(err, ErrLabel) {
		t.Errorf("label 3 of 2 classes: error %v, want ErrLabel", err)
	}
}
