package stats

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// Tolerance against scipy for t-based quantities: both sides evaluate the
// same closed forms; the only difference is the t quantile, where gonum's
// inverse regularized incomplete beta and scipy's agree to about 1e-12
// relative, so 1e-10 leaves two orders of margin.
const tolT = 1e-10

func TestCorrectedIntervalAgainstScipy(t *testing.T) {
	for i, c := range ref(t).Interval {
		// Reference: scripts/ref_stats.py, c.Call (scipy 1.10.1 t.ppf).
		got, err := CorrectedInterval(c.Scores, c.NTrain, c.NTest, c.Alpha)
		if err != nil {
			t.Fatalf("case %d: %v", i, err)
		}
		checkNear(t, "corrected mean", got.Mean, c.Mean, 1e-14, 1e-14)
		checkNear(t, "corrected std", got.Std, c.Std, 1e-14, 1e-12)
		checkNear(t, "corrected se", got.SE, c.Corrected.SE, 1e-14, 1e-12)
		checkNear(t, "corrected lo", got.Lo, c.Corrected.Lo, tolT, tolT)
		checkNear(t, "corrected hi", got.Hi, c.Corrected.Hi, tolT, tolT)
		if got.DF != c.DF {
			t.Errorf("case %d: DF = %d, want %d", i, got.DF, c.DF)
		}
		if len(got.Warnings) != 0 {
			t.Errorf("case %d: unexpected warnings %q", i, got.Warnings)
		}

		naive, err := NaiveInterval(c.Scores, c.Alpha)
		if err != nil {
			t.Fatalf("case %d naive: %v", i, err)
		}
		checkNear(t, "naive se", naive.SE, c.Naive.SE, 1e-14, 1e-12)
		checkNear(t, "naive lo", naive.Lo, c.Naive.Lo, tolT, tolT)
		checkNear(t, "naive hi", naive.Hi, c.Naive.Hi, tolT, tolT)
		// The correction only widens: (1/n + n2/n1) > 1/n.
		if !(got.Hi-got.Lo > naive.Hi-naive.Lo) {
			t.Errorf("case %d: corrected width %g not above naive width %g", i, got.Hi-got.Lo, naive.Hi-naive.Lo)
		}
	}
}

func TestCorrectedIntervalByHand(t *testing.T) {
	// Derived by hand from the formula in CorrectedInterval: scores 0.8,
	// 0.9, 1.0 have mean 0.9 and s² = 0.01; with nTrain = 2, nTest = 1 the
	// factor is 1/3 + 1/2 = 5/6, SE = sqrt(0.01·5/6). With 2 degrees of
	// freedom the t quantile has the closed form t_p = (2p − 1) /
	// sqrt(2p(1 − p)) (derived by hand from the t(2) CDF
	// 1/2 + t/(2 sqrt(2 + t²))); p = 0.975 here.
	a := 0.05
	p := 1 - a/2
	tq := (2*p - 1) / math.Sqrt(2*p*(1-p))
	iv, err := CorrectedInterval([]float64{0.8, 0.9, 1.0}, 2, 1, a)
	if err != nil {
		t.Fatal(err)
	}
	se := math.Sqrt(0.01 * 5 / 6)
	checkNear(t, "se", iv.SE, se, 0, 1e-12)
	checkNear(t, "lo", iv.Lo, 0.9-tq*se, 0, 1e-10)
	checkNear(t, "hi", iv.Hi, 0.9+tq*se, 0, 1e-10)
	// nTest = 1 is leave-one-out-like: a warning, never a silent switch.
	if len(iv.Warnings) != 1 || !strings.Contains(iv.Warnings[0], "leave-one-out") {
		t.Errorf("warnings = %q, want one leave-one-out warning", iv.Warnings)
	}
}

func TestIntervalDegenerate(t *testing.T) {
	one, err := CorrectedInterval([]float64{0.7}, 90, 10, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsNaN(one.Lo) || !math.IsNaN(one.Hi) || !math.IsNaN(one.Std) || len(one.Warnings) != 1 ||
		!strings.Contains(one.Warnings[0], "too few samples") {
		t.Errorf("single score: got %+v, want NaN bounds and a too-few warning", one)
	}
	checkNear(t, "single score mean", one.Mean, 0.7, 0, 0)

	flat, err := CorrectedInterval([]float64{1, 1, 1, 1}, 90, 10, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	if flat.Lo != 1 || flat.Hi != 1 || len(flat.Warnings) != 1 || !strings.Contains(flat.Warnings[0], "zero variance") {
		// Exact comparison is deliberate: SE is exactly 0, so the bounds
		// are the mean itself.
		t.Errorf("constant scores: got %+v, want [1, 1] and a zero-variance warning", flat)
	}
}

func TestIntervalErrors(t *testing.T) {
	cases := []struct {
		name   string
		scores []float64
		n1, n2 int
		alpha  float64
		want   error
	}{
		{"empty", nil, 10, 2, 0.05, ErrTooFew},
		{"nan", []float64{0.5, math.NaN()}, 10, 2, 0.05, ErrNotFinite},
		{"inf", []float64{math.Inf(1), 0.5}, 10, 2, 0.05, ErrNotFinite},
		{"ntrain", []float64{0.5, 0.6}, 0, 2, 0.05, ErrTooFew},
		{"ntest", []float64{0.5, 0.6}, 10, 0, 0.05, ErrTooFew},
		{"alpha0", []float64{0.5, 0.6}, 10, 2, 0, ErrAlpha},
		{"alpha1", []float64{0.5, 0.6}, 10, 2, 1, ErrAlpha},
		{"alphaNaN", []float64{0.5, 0.6}, 10, 2, math.NaN(), ErrAlpha},
	}
	for _, c := range cases {
		_, err := CorrectedInterval(c.scores, c.n1, c.n2, c.alpha)
		if !errors.Is(err, c.want) {
			t.Errorf("%s: err = %v, want %v", c.name, err, c.want)
		}
		if err != nil && !strings.HasPrefix(err.Error(), "stats: ") {
			t.Errorf("%s: error %q lacks the package prefix", c.name, err)
		}
	}
}

func TestWilsonNewcombe(t *testing.T) {
	// Newcombe (Stat. Med. 17:857, 1998), worked examples of the score
	// interval without continuity correction, 95%: 81/263 -> 0.2553 to
	// 0.3662 and 15/148 -> 0.0624 to 0.1605 (values as quoted in our task
	// brief, not re-read from the paper; scipy 1.10.1 agrees, see
	// TestWilsonAgainstScipy). Printed to 4 decimals: agreement to 5e-5.
	for _, c := range []struct {
		k, n   int
		lo, hi float64
	}{
		{81, 263, 0.2553, 0.3662},
		{15, 148, 0.0624, 0.1605},
	} {
		lo, hi := Wilson(c.k, c.n, 0.05)
		checkNear(t, "Wilson lo", lo, c.lo, 5e-5, 0)
		checkNear(t, "Wilson hi", hi, c.hi, 5e-5, 0)
	}
}

func TestWilsonAgainstScipy(t *testing.T) {
	w := ref(t).Wilson
	for _, c := range w.Cases {
		// Reference: scipy 1.10.1, w.Call. The only numerical difference is
		// the normal quantile (gonum's vs scipy's ndtri, both ~1e-15), so
		// the bounds agree to 1e-13.
		lo, hi := Wilson(c.K, c.N, c.Alpha)
		checkNear(t, "Wilson lo", lo, c.Lo, 1e-13, 1e-13)
		checkNear(t, "Wilson hi", hi, c.Hi, 1e-13, 1e-13)
	}
}

func TestWilsonProperties(t *testing.T) {
	for n := 1; n <= 40; n++ {
		for k := 0; k <= n; k++ {
			lo, hi := Wilson(k, n, 0.05)
			p := float64(k) / float64(n)
			if !(0 <= lo && lo <= p && p <= hi && hi <= 1) {
				t.Fatalf("Wilson(%d, %d) = [%g, %g] does not bracket %g inside [0, 1]", k, n, lo, hi, p)
			}
			// Symmetry: the interval of n−k is the mirror image.
			lo2, hi2 := Wilson(n-k, n, 0.05)
			if !near(lo, 1-hi2, 1e-14, 0) || !near(hi, 1-lo2, 1e-14, 0) {
				t.Fatalf("Wilson(%d, %d) = [%g, %g] is not the mirror of [%g, %g]", k, n, lo, hi, lo2, hi2)
			}
		}
	}
	for _, bad := range [][3]float64{{-1, 5, 0.05}, {6, 5, 0.05}, {0, 0, 0.05}, {1, 5, 0}, {1, 5, 1}} {
		lo, hi := Wilson(int(bad[0]), int(bad[1]), bad[2])
		if !math.IsNaN(lo) || !math.IsNaN(hi) {
			t.Errorf("Wilson(%v) = [%g, %g], want NaN", bad, lo, hi)
		}
	}
}

func TestLeaveOneOutWarnsAndWilsonServes(t *testing.T) {
	// Leave-one-out on 30 instances, all predicted correctly: per-fold
	// accuracies are 1, the t interval collapses to [1, 1] (zero variance)
	// and both problems are reported; Wilson on the pooled count 30/30 is
	// the documented replacement and has positive width.
	scores := make([]float64, 30)
	for i := range scores {
		scores[i] = 1
	}
	iv, err := CorrectedInterval(scores, 29, 1, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	if len(iv.Warnings) != 2 || !strings.Contains(iv.Warnings[0], "zero variance") ||
		!strings.Contains(iv.Warnings[1], "leave-one-out") {
		t.Errorf("warnings = %q, want zero-variance then leave-one-out", iv.Warnings)
	}
	lo, hi := Wilson(30, 30, 0.05)
	// Derived by hand from the Wilson formula with k = n: lo = n/(n + z²).
	z := 1.959963984540054 // Φ⁻¹(0.975), scipy 1.10.1 scipy.stats.norm.ppf(0.975)
	checkNear(t, "Wilson lo", lo, 30/(30+z*z), 1e-14, 0)
	checkNear(t, "Wilson hi", hi, 1, 0, 0)

	a := []float64{1, 1, 0, 1, 1, 0, 1, 1}
	b := []float64{1, 0, 0, 1, 0, 0, 1, 1}
	r, err := CorrectedPairedT(a, b, 7, 1, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Warnings) != 1 || !strings.Contains(r.Warnings[0], "prefer McNemar") {
		t.Errorf("paired t warnings = %q, want the leave-one-out note", r.Warnings)
	}
}
