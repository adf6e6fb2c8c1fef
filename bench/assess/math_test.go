package assess

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"fringe/qkernel"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"
)

// assessRef is testdata/assess_reference.json, written by
// `/usr/bin/python3 scripts/ref_assess.py` (numpy 1.24.2, scipy 1.10.1;
// versions recorded in the fixture; the calls are in the script's doc).
type assessRef struct {
	Numpy     string  `json:"numpy"`
	Scipy     string  `json:"scipy"`
	Z         float64 `json:"z"`
	Alignment []struct {
		X               [][]float64 `json:"X"`
		Y               []int       `json:"y"`
		Gamma           float64     `json:"gamma"`
		Interference    float64     `json:"interference"`
		RBF             float64     `json:"rbf"`
		InterferenceRBF float64     `json:"interference_rbf"`
	} `json:"alignment"`
	Shots []struct {
		PAcc     float64 `json:"p_acc"`
		Q1       float64 `json:"q1"`
		Q2       float64 `json:"q2"`
		Conf     float64 `json:"conf"`
		NFormula float64 `json:"n_formula"`
		Exact    []struct {
			N int     `json:"n"`
			P float64 `json:"p"`
		} `json:"exact"`
		NExactMin int `json:"n_exact_min"`
	} `json:"shots"`
	Noise []struct {
		N2    int     `json:"n2"`
		N1    int     `json:"n1"`
		Ratio float64 `json:"ratio"`
		P2    float64 `json:"p2"`
	} `json:"noise"`
	Percentile []struct {
		V []float64 `json:"v"`
		Q []float64 `json:"q"`
		P []float64 `json:"p"`
	} `json:"percentile"`
}

func readAssessRef(t *testing.T) assessRef {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join("testdata", "assess_reference.json"))
	if err != nil {
		t.Fatal(err)
	}
	var r assessRef
	if err := json.Unmarshal(raw, &r); err != nil {
		t.Fatal(err)
	}
	if r.Numpy != "1.24.2" || r.Scipy != "1.10.1" {
		t.Fatalf("fixture from numpy %s scipy %s, want 1.24.2 / 1.10.1", r.Numpy, r.Scipy)
	}
	return r
}

// TestCenteredAlignmentNumpy checks CenteredAlignment, InterferenceGram,
// RBFGram and TargetKernel against numpy on fixed matrices
// (scripts/ref_assess.py: H K H by matrix products, then
// np.sum(Kc*Tc)/(np.linalg.norm(Kc)*np.linalg.norm(Tc))).
func TestCenteredAlignmentNumpy(t *testing.T) {
	ref := readAssessRef(t)
	for i, c := range ref.Alignment {
		n, d := len(c.X), len(c.X[0])
		X := mat.NewDense(n, d, nil)
		for r, row := range c.X {
			X.SetRow(r, row)
		}
		K, err := InterferenceGram(X)
		if err != nil {
			t.Fatal(err)
		}
		R := RBFGram(X, c.Gamma)
		T := TargetKernel(c.Y)
		// Sums of n² products of numbers of order 1, in another order than
		// numpy's matrix products: 1e-12 absolute is ample.
		for _, ch := range []struct {
			what      string
			got, want float64
		}{
			{"interference vs target", CenteredAlignment(K, T), c.Interference},
			{"rbf vs target", CenteredAlignment(R, T), c.RBF},
			{"interference vs rbf", CenteredAlignment(K, R), c.InterferenceRBF},
		} {
			if !scalar.EqualWithinAbsOrRel(ch.got, ch.want, 1e-12, 1e-12) {
				t.Errorf("case %d %s: %.15g, numpy %.15g", i, ch.what, ch.got, ch.want)
			}
		}
		// Properties: a kernel is perfectly aligned with itself and with
		// any positive multiple plus a constant (the centering removes it).
		K2 := mat.NewSymDense(n, nil)
		for a := range n {
			for b := a; b < n; b++ {
				K2.SetSym(a, b, 3*K.At(a, b)+7)
			}
		}
		if got := CenteredAlignment(K, K2); !scalar.EqualWithinAbs(got, 1, 1e-12) {
			t.Errorf("case %d: alignment with 3K+7 = %v, want 1", i, got)
		}
	}
	// A constant kernel has no alignment.
	if got := CenteredAlignment(TargetKernel([]int{0, 0, 0}), TargetKernel([]int{0, 1, 0})); !math.IsNaN(got) {
		t.Errorf("constant kernel: %v, want NaN", got)
	}
}

// TestShotsForConfidence checks the normal-approximation budget against
// scipy (the same formula, z = scipy.stats.norm.ppf(0.95)) and the exact
// trinomial probability qkernel.ShotsExactTwoClass against scipy.stats.binom sums;
// it then records how close the approximation is to the exact budget.
func TestShotsForConfidence(t *testing.T) {
	ref := readAssessRef(t)
	for _, c := range ref.Shots {
		got := qkernel.ShotsForConfidence(c.PAcc, c.Q1, c.Q2, c.Conf)
		// Same closed form; the normal quantile of gonum and scipy agree
		// to about 1e-15 relative.
		if !scalar.EqualWithinAbsOrRel(got, c.NFormula, 1e-12, 1e-12) {
			t.Errorf("p_acc %v q %v/%v: N = %.12g, scipy %.12g", c.PAcc, c.Q1, c.Q2, got, c.NFormula)
		}
		for _, e := range c.Exact {
			p := qkernel.ShotsExactTwoClass(e.N, c.PAcc, c.Q1, c.Q2)
			// Log-space sums of up to N terms against scipy's boost pmf:
			// agreement to 1e-10 absolute.
			if !scalar.EqualWithinAbs(p, e.P, 1e-10) {
				t.Errorf("p_acc %v q %v/%v, N = %d: exact P = %.12g, scipy %.12g", c.PAcc, c.Q1, c.Q2, e.N, p, e.P)
			}
		}
		// The approximation against the exact smallest budget (from
		// scipy): it never overshoots by more than one shot, and it falls
		// short by at most 10% once more than 50 shots are needed; with a
		// handful of shots the discreteness matters more (4.3 against 7
		// for p_acc 0.6, q 0.9/0.1; measured on the fixture's grid).
		short := (float64(c.NExactMin) - got) / float64(c.NExactMin)
		if got > float64(c.NExactMin)+1 || (c.NExactMin > 50 && short > 0.10) {
			t.Errorf("p_acc %v q %v/%v: formula %.1f against the exact minimum %d", c.PAcc, c.Q1, c.Q2, got, c.NExactMin)
		}
	}
	if !math.IsInf(qkernel.ShotsForConfidence(0.7, 0.5, 0.5, 0.95), 1) || !math.IsInf(qkernel.ShotsForConfidence(0, 0.6, 0.4, 0.95), 1) {
		t.Error("a tie or zero acceptance must need infinitely many shots")
	}
	if !math.IsNaN(qkernel.ShotsForConfidence(0.7, 0.6, 0.4, 0.4)) || !math.IsNaN(qkernel.ShotsForConfidence(1.2, 0.6, 0.4, 0.95)) {
		t.Error("bad arguments must give NaN")
	}
}

// TestNoiseBudget checks the solution of (1-p2)^n2 (1-p2/r)^n1 = 1/2
// against scipy.optimize.brentq (scripts/ref_assess.py), and that the
// fidelity at the returned rate is 1/2.
func TestNoiseBudget(t *testing.T) {
	ref := readAssessRef(t)
	for _, c := range ref.Noise {
		got := NoiseBudget(c.N2, c.N1, c.Ratio, 0.5)
		// Bisection to 1e-12 relative; brentq to 1e-14.
		if !scalar.EqualWithinAbsOrRel(got, c.P2, 1e-15, 1e-11) {
			t.Errorf("n2 %d n1 %d r %v: p2 = %.15g, brentq %.15g", c.N2, c.N1, c.Ratio, got, c.P2)
		}
		f := math.Pow(1-got, float64(c.N2)) * math.Pow(1-got/c.Ratio, float64(c.N1))
		if !scalar.EqualWithinAbs(f, 0.5, 1e-9) {
			t.Errorf("fidelity at the budget %v = %v, want 0.5", got, f)
		}
	}
	// Derived by hand: one CNOT and nothing else fails half the time at
	// p2 = 1/2; no gate at all tolerates any rate.
	if got := NoiseBudget(1, 0, 10, 0.5); !scalar.EqualWithinAbs(got, 0.5, 1e-12) {
		t.Errorf("one CNOT: %v, want 0.5", got)
	}
	if got := NoiseBudget(0, 0, 10, 0.5); got != 1 {
		t.Errorf("no gates: %v, want 1", got)
	}
	if !math.IsNaN(NoiseBudget(5, 5, 0.5, 0.5)) || !math.IsNaN(NoiseBudget(-1, 5, 10, 0.5)) {
		t.Error("bad arguments must give NaN")
	}
}

// TestPercentile checks the interpolation rule against numpy.percentile.
func TestPercentile(t *testing.T) {
	ref := readAssessRef(t)
	for _, c := range ref.Percentile {
		for i, q := range c.Q {
			got := percentile(c.V, q/100)
			// One multiply-add: a couple of ulps.
			if !scalar.EqualWithinAbsOrRel(got, c.P[i], 1e-15, 1e-14) {
				t.Errorf("percentile(%v, %v) = %v, numpy %v", c.V, q, got, c.P[i])
			}
		}
	}
	if !math.IsNaN(percentile(nil, 0.5)) {
		t.Error("no values must give NaN")
	}
}
