package stats

import (
	"errors"
	"math"
	"strings"
	"testing"
)

func TestCorrectedPairedTAgainstScipy(t *testing.T) {
	for i, c := range ref(t).CorrectedT {
		// Reference: scripts/ref_stats.py, c.Call (scipy 1.10.1 t.sf).
		got, err := CorrectedPairedT(c.A, c.B, c.NTrain, c.NTest, 0.05)
		if err != nil {
			t.Fatalf("case %d: %v", i, err)
		}
		// t is the same closed form on both sides (1e-12 covers summation
		// order); the p-value goes through gonum's and scipy's regularized
		// incomplete beta, which agree to ~1e-12 relative (tolT).
		checkNear(t, "t", got.Statistic, c.T, 1e-12, 1e-12)
		checkNear(t, "p", got.P, c.P, 1e-14, tolT)
		if got.DF != c.DF {
			t.Errorf("case %d: DF = %d, want %d", i, got.DF, c.DF)
		}
		if got.Reject != (c.P <= 0.05) {
			t.Errorf("case %d: Reject = %v with p = %g at alpha 0.05", i, got.Reject, c.P)
		}
	}
}

func TestCorrectedPairedTUnevenFolds(t *testing.T) {
	// Reference: scripts/ref_stats.py, corrected_t_uneven (scikit-learn
	// 1.2.1 StratifiedKFold on Wine, 178 rows, 10 folds of 17 or 18 test
	// rows; scipy 1.10.1 t.sf and t.ppf; the call is in c.Call).
	c := ref(t).CorrectedTUneven
	s, err := MeanSizes(c.NTrain, c.NTest)
	if err != nil {
		t.Fatal(err)
	}
	// Means of whole numbers: rounding only.
	checkNear(t, "mean train", s.Train, c.MeanTrain, 1e-12, 0)
	checkNear(t, "mean test", s.Test, c.MeanTest, 1e-12, 0)
	// 10-fold cross-validation of 178 rows: 160.2 and 17.8, ratio 1/9
	// (derived by hand: N(k−1)/k and N/k).
	checkNear(t, "size ratio", s.Test/s.Train, 1.0/9, 1e-15, 0)
	got, err := CorrectedPairedTSizes(c.A, c.B, s, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	// Same closed form (1e-12 covers summation order); p through gonum's
	// and scipy's incomplete beta (tolT).
	checkNear(t, "t", got.Statistic, c.T, 1e-12, 1e-12)
	checkNear(t, "p", got.P, c.P, 1e-14, tolT)
	if got.DF != c.DF {
		t.Errorf("DF = %d, want %d", got.DF, c.DF)
	}
	d := make([]float64, len(c.A))
	for i := range d {
		d[i] = c.A[i] - c.B[i]
	}
	iv, err := CorrectedIntervalSizes(d, s, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	checkNear(t, "lo", iv.Lo, c.Lo, tolT, tolT)
	checkNear(t, "hi", iv.Hi, c.Hi, tolT, tolT)
	// Rounding the mean sizes (18 and 160) changes the statistic: the
	// integer form reproduces the rounded reference and differs from the
	// exact one by more than the tolerance.
	rounded, err := CorrectedPairedT(c.A, c.B, 160, 18, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	checkNear(t, "t rounded", rounded.Statistic, c.TRounded, 1e-12, 1e-12)
	checkNear(t, "p rounded", rounded.P, c.PRounded, 1e-14, tolT)
	if near(rounded.P, got.P, 1e-6, 0) {
		t.Errorf("rounded sizes give p %g, the exact sizes %g: expected a visible difference", rounded.P, got.P)
	}
}

func TestMeanSizesErrors(t *testing.T) {
	for _, c := range []struct {
		name        string
		train, test []int
		want        error
	}{
		{"lengths", []int{9, 9}, []int{1}, ErrLength},
		{"empty", nil, nil, ErrTooFew},
		{"zero test", []int{9, 9}, []int{1, 0}, ErrTooFew},
	} {
		if _, err := MeanSizes(c.train, c.test); !errors.Is(err, c.want) {
			t.Errorf("%s: err = %v, want %v", c.name, err, c.want)
		}
	}
	for _, s := range []Sizes{{0, 1}, {10, 0.5}, {math.NaN(), 1}, {math.Inf(1), 1}} {
		if _, err := CorrectedIntervalSizes([]float64{0.5, 0.6}, s, 0.05); !errors.Is(err, ErrTooFew) {
			t.Errorf("sizes %+v: err = %v, want ErrTooFew", s, err)
		}
		if _, err := CorrectedPairedTSizes([]float64{0.5, 0.6}, []float64{0.4, 0.6}, s, 0.05); !errors.Is(err, ErrTooFew) {
			t.Errorf("paired, sizes %+v: err = %v, want ErrTooFew", s, err)
		}
	}
}

func TestCorrectedPairedTMatchesInterval(t *testing.T) {
	// The test rejects at alpha exactly when the corrected interval of the
	// differences excludes 0 (same SE, same t quantile): a property of the
	// construction, checked on the fixture data.
	c := ref(t).CorrectedT[0]
	d := make([]float64, len(c.A))
	for i := range d {
		d[i] = c.A[i] - c.B[i]
	}
	for _, alpha := range []float64{0.001, 0.01, 0.05, 0.2} {
		tr, err := CorrectedPairedT(c.A, c.B, c.NTrain, c.NTest, alpha)
		if err != nil {
			t.Fatal(err)
		}
		iv, err := CorrectedInterval(d, c.NTrain, c.NTest, alpha)
		if err != nil {
			t.Fatal(err)
		}
		excludes := iv.Lo > 0 || iv.Hi < 0
		if tr.Reject != excludes {
			t.Errorf("alpha %g: Reject = %v but interval [%g, %g]", alpha, tr.Reject, iv.Lo, iv.Hi)
		}
	}
}

func TestCorrectedPairedTDegenerate(t *testing.T) {
	same, err := CorrectedPairedT([]float64{0.9, 0.8, 0.7}, []float64{0.9, 0.8, 0.7}, 90, 10, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	if same.Statistic != 0 || same.P != 1 || same.Reject || len(same.Warnings) != 1 {
		// Exact comparisons: these values are set, not computed.
		t.Errorf("identical samples: got %+v, want t = 0, p = 1, one warning", same)
	}
	shift, err := CorrectedPairedT([]float64{0.9, 0.8, 0.7}, []float64{0.8, 0.7, 0.6}, 90, 10, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	// 0.9−0.8, 0.8−0.7 and 0.7−0.6 differ in the last bits, so the
	// variance is tiny but not zero: a huge t, not an infinite one. The
	// p-value is 0 to double precision either way.
	if !(shift.Statistic > 1e10) || shift.P > 1e-20 || !shift.Reject {
		t.Errorf("constant shift: got %+v, want huge t and p ≈ 0", shift)
	}
	exact, err := CorrectedPairedT([]float64{1, 1, 1}, []float64{0.5, 0.5, 0.5}, 90, 10, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsInf(exact.Statistic, 1) || exact.P != 0 || !exact.Reject || len(exact.Warnings) != 1 ||
		!strings.Contains(exact.Warnings[0], "zero variance") {
		t.Errorf("exact constant shift: got %+v, want t = +Inf, p = 0 and a zero-variance warning", exact)
	}
	one, err := CorrectedPairedT([]float64{1}, []float64{0}, 90, 10, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	if !math.IsNaN(one.Statistic) || !math.IsNaN(one.P) || one.Reject || len(one.Warnings) != 1 {
		t.Errorf("single pair: got %+v, want NaN, no rejection, one warning", one)
	}
	for _, c := range []struct {
		name string
		a, b []float64
		want error
	}{
		{"length", []float64{1, 2}, []float64{1}, ErrLength},
		{"empty", nil, nil, ErrTooFew},
		{"nan", []float64{1, math.NaN()}, []float64{1, 2}, ErrNotFinite},
	} {
		if _, err := CorrectedPairedT(c.a, c.b, 90, 10, 0.05); !errors.Is(err, c.want) {
			t.Errorf("%s: err = %v, want %v", c.name, err, c.want)
		}
	}
}

func TestFiveByTwoCVAgainstScipy(t *testing.T) {
	for i, c := range ref(t).FiveByTwo {
		// Reference: scripts/ref_stats.py, c.Call (scipy 1.10.1 t.sf, 5 df);
		// tolerances as in TestCorrectedPairedTAgainstScipy.
		got, err := FiveByTwoCV(c.Diff, 0.05)
		if err != nil {
			t.Fatalf("case %d: %v", i, err)
		}
		checkNear(t, "5x2cv t", got.Statistic, c.T, 1e-12, 1e-12)
		checkNear(t, "5x2cv p", got.P, c.P, 1e-14, tolT)
		if got.DF != 5 {
			t.Errorf("case %d: DF = %d, want 5", i, got.DF)
		}
	}
}

func TestFiveByTwoCVByHand(t *testing.T) {
	// Derived by hand from Dietterich (1998), eq. for t̃: every replication
	// has fold differences 0.03 and 0.01, so p̄_i = 0.02 and s_i² =
	// 2·0.01² = 2e-4; t = 0.03 / sqrt(2e-4) = 2.1213203435596424 (=
	// 3/sqrt(2)).
	var diff [5][2]float64
	for i := range diff {
		diff[i] = [2]float64{0.03, 0.01}
	}
	got, err := FiveByTwoCV(diff, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	checkNear(t, "t", got.Statistic, 3/math.Sqrt2, 0, 1e-12)
	diff[2][1] = math.NaN()
	if _, err := FiveByTwoCV(diff, 0.05); !errors.Is(err, ErrNotFinite) || !strings.Contains(err.Error(), "diff[2][1]") {
		t.Errorf("NaN input: err = %v, want ErrNotFinite naming diff[2][1]", err)
	}
}

func TestMcNemarAgainstScipy(t *testing.T) {
	for _, c := range ref(t).McNemar {
		// Reference: scripts/ref_stats.py, c.Call (scipy 1.10.1 chi2.sf and
		// binomtest). The statistic is a ratio of integers (1e-14); the
		// p-values go through gonum's regularized gamma / beta functions,
		// which agree with scipy's to ~1e-12 relative (tolT).
		got, err := McNemar(c.B, c.C, 0.05)
		if err != nil {
			t.Fatalf("b=%d c=%d: %v", c.B, c.C, err)
		}
		checkNear(t, "chi2", got.Statistic, c.Chi2, 1e-14, 1e-14)
		checkNear(t, "p", got.P, c.P, 1e-14, tolT)
		checkNear(t, "p exact", got.PExact, c.PExact, 1e-14, tolT)
		if got.DF != 1 {
			t.Errorf("DF = %d, want 1", got.DF)
		}
		small := c.B+c.C < McNemarSmall
		warned := len(got.Warnings) == 1 && strings.Contains(got.Warnings[0], "prefer the exact binomial p-value")
		if small != warned {
			t.Errorf("b=%d c=%d: warnings %q, want a small-sample warning: %v", c.B, c.C, got.Warnings, small)
		}
	}
}

func TestMcNemarEdges(t *testing.T) {
	none, err := McNemar(0, 0, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	// Values set by the documented rule, hence exact comparison.
	if none.P != 1 || none.PExact != 1 || none.Statistic != 0 || none.Reject || len(none.Warnings) != 1 {
		t.Errorf("b = c = 0: got %+v, want p = 1 and a warning", none)
	}
	// Derived by hand from the formula: b = 12, c = 0 gives (12 − 1)²/12
	// and the exact p = 2·(1/2)^12 = 1/2048.
	r, err := McNemar(12, 0, 0.05)
	if err != nil {
		t.Fatal(err)
	}
	checkNear(t, "chi2", r.Statistic, 121.0/12, 0, 1e-15)
	checkNear(t, "p exact", r.PExact, 1.0/2048, 0, 1e-12)
	// Symmetric in b and c.
	r2, _ := McNemar(0, 12, 0.05)
	checkNear(t, "swapped chi2", r2.Statistic, r.Statistic, 0, 0)
	checkNear(t, "swapped p", r2.P, r.P, 0, 0)
	for _, bc := range [][2]int{{-1, 3}, {3, -1}} {
		if _, err := McNemar(bc[0], bc[1], 0.05); !errors.Is(err, ErrTooFew) {
			t.Errorf("McNemar(%d, %d): err = %v, want ErrTooFew", bc[0], bc[1], err)
		}
	}
	if _, err := McNemar(3, 4, 1.5); !errors.Is(err, ErrAlpha) {
		t.Errorf("alpha 1.5: err = %v, want ErrAlpha", err)
	}
}
