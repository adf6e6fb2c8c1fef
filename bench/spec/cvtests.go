package spec

import (
	"fmt"
	"strings"
)

// TestKind is the paired test used to compare two models on one dataset.
type TestKind int

const (
	// TestAuto: McNemar for leave-one-out and a single holdout (scores on
	// pooled predictions), the corrected resampled t-test otherwise.
	TestAuto TestKind = iota
	// TestCorrectedT: the corrected resampled t-test of Nadeau & Bengio
	// (2003) on paired fold scores.
	TestCorrectedT
	// Test5x2CV: Dietterich's (1998) 5x2cv paired t-test; the protocol must
	// be 5 repeats of stratified 2-fold cross-validation.
	Test5x2CV
	// TestMcNemar: McNemar's test on paired predictions, each instance
	// predicted once per model (leave-one-out, one holdout, or k-fold
	// cross-validation without repeats).
	TestMcNemar
)

var testNames = []string{"auto", "corrected-t", "5x2cv", "mcnemar"}

func (t TestKind) String() string {
	if int(t) >= 0 && int(t) < len(testNames) {
		return testNames[t]
	}
	return fmt.Sprintf("TestKind(%d)", int(t))
}

// ParseTestKind returns the test named s: auto, corrected-t, 5x2cv or
// mcnemar.
func ParseTestKind(s string) (TestKind, error) {
	for i, n := range testNames {
		if s == n {
			return TestKind(i), nil
		}
	}
	return 0, fmt.Errorf("unknown test %q (want %s)", s, strings.Join(testNames, ", "))
}

// DefaultTestAlpha is the significance level of the tests when the spec
// sets none.
const DefaultTestAlpha = 0.05

// Pooled reports whether the protocol scores each model on pooled
// predictions (one interval per cell from all its predictions).
func (cv CV) Pooled() bool {
	return cv.Method == CVLeaveOneOut || (cv.Method == CVHoldout && cv.Repeats == 1)
}

// ResolvedTest returns the test actually used (TestAuto resolved).
func (cv CV) ResolvedTest() TestKind {
	if cv.Test != TestAuto {
		return cv.Test
	}
	if cv.Pooled() {
		return TestMcNemar
	}
	return TestCorrectedT
}

// TestAlpha is the significance level of the tests (Alpha, or
// DefaultTestAlpha when the spec sets none).
func (cv CV) TestAlpha() float64 {
	if cv.Alpha > 0 {
		return cv.Alpha
	}
	return DefaultTestAlpha
}

// checkTest validates the test against the resampling scheme; it returns
// a message for the spec error, or "".
func (cv CV) checkTest() string {
	switch cv.Test {
	case Test5x2CV:
		if cv.Method != CVStratified || cv.Folds != 2 || cv.Repeats != 5 {
			return `test = "5x2cv" needs method = "stratified", folds = 2, repeats = 5 (Dietterich 1998)`
		}
	case TestMcNemar:
		if cv.Repeats > 1 {
			return `test = "mcnemar" needs each instance predicted once: repeats = 1`
		}
	case TestCorrectedT:
		if cv.Pooled() {
			return `test = "corrected-t" needs several splits with more than one test instance (stratified k-fold, or holdout with repeats > 1); leave-one-out and a single holdout use "mcnemar"`
		}
	}
	return ""
}

// Describe returns the protocol's resampling scheme in words.
func (cv CV) Describe() string {
	plural := func(n int, w string) string {
		if n == 1 {
			return fmt.Sprintf("%d %s", n, w)
		}
		return fmt.Sprintf("%d %ss", n, w)
	}
	switch cv.Method {
	case CVStratified:
		return fmt.Sprintf("stratified %d-fold cross-validation, %s", cv.Folds, plural(cv.Repeats, "repeat"))
	case CVLeaveOneOut:
		return "leave-one-out cross-validation"
	case CVHoldout:
		return fmt.Sprintf("stratified holdout (test fraction %g), %s", cv.TestFraction, plural(cv.Repeats, "repeat"))
	}
	return cv.Method.String()
}

// Describe names the test and its source in words, for captions.
func (t TestKind) Describe() string {
	switch t {
	case TestCorrectedT:
		return "corrected resampled t-test, Nadeau & Bengio 2003"
	case Test5x2CV:
		return "5x2cv paired t-test, Dietterich 1998"
	case TestMcNemar:
		return "McNemar's test with continuity correction, exact binomial p-value when fewer than 25 discordant pairs"
	}
	return t.String()
}

// parseCVTests reads the optional [cv] keys test, alpha and reference
// into cv (after method, folds and repeats); bad builds a located spec
// error. The reference is checked against the model names later.
func parseCVTests(cv *CV, raw *rawCV, bad func(key, format string, args ...any) error) error {
	if raw.Test != nil {
		t, err := ParseTestKind(*raw.Test)
		if err != nil {
			return bad("cv.test", "%v", err)
		}
		cv.Test = t
		if msg := cv.checkTest(); msg != "" {
			return bad("cv.test", "%s", msg)
		}
	}
	if raw.Alpha != nil {
		a := *raw.Alpha
		if !(a > 0 && a < 0.5) {
			return bad("cv.alpha", "alpha must lie in (0, 0.5), got %v", a)
		}
		cv.Alpha = a
	}
	if raw.Reference != nil {
		if *raw.Reference == "" {
			return bad("cv.reference", "empty reference (omit the key to test against the best classical baseline)")
		}
		cv.Reference = *raw.Reference
	}
	return nil
}
