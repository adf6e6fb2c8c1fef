package results

import (
	"encoding/json"
	"math"
	"os"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// TestScoreAgainstSklearn compares Score with scikit-learn 1.2.1
// (accuracy_score, balanced_accuracy_score, f1_score(average='macro',
// zero_division=0)); fixture written by scripts/ref_metrics.py.
func TestScoreAgainstSklearn(t *testing.T) {
	raw, err := os.ReadFile("testdata/metrics_sklearn.json")
	if err != nil {
		t.Fatal(err)
	}
	var fx struct {
		Source string
		Cases  []struct {
			Truth, Pred      []int
			NClass           int     `json:"n_class"`
			Accuracy         float64 `json:"accuracy"`
			BalancedAccuracy float64 `json:"balanced_accuracy"`
			MacroF1          float64 `json:"macro_f1"`
		}
	}
	if err := json.Unmarshal(raw, &fx); err != nil {
		t.Fatal(err)
	}
	if len(fx.Cases) < 5 {
		t.Fatalf("fixture has %d cases", len(fx.Cases))
	}
	for i, c := range fx.Cases {
		got := Score(c.Truth, c.Pred, c.NClass)
		// Both sides compute ratios of small integers: agreement to 1e-12
		// allows only the order of floating-point operations to differ.
		for _, m := range []struct {
			name      string
			got, want float64
		}{
			{"accuracy", got.Accuracy, c.Accuracy},
			{"balanced_accuracy", got.BalancedAccuracy, c.BalancedAccuracy},
			{"macro_f1", got.MacroF1, c.MacroF1},
		} {
			if !scalar.EqualWithinAbsOrRel(m.got, m.want, 1e-12, 1e-12) {
				t.Errorf("case %d (truth %v pred %v): %s = %v, want %v (%s)", i, c.Truth, c.Pred, m.name, m.got, m.want, fx.Source)
			}
		}
	}
}

func TestFmt(t *testing.T) {
	for _, c := range []struct {
		v    float64
		want string
	}{
		{0.5, "0.500000"},
		{math.NaN(), ""},
		{-1e-9, "0.000000"},
		{math.Copysign(0, -1), "0.000000"},
		{1, "1.000000"},
	} {
		if got := Fmt(c.v); got != c.want {
			t.Errorf("Fmt(%v) = %q, want %q", c.v, got, c.want)
		}
	}
}
