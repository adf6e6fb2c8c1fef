package stats

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// tolRange is the agreement required with scipy 1.10.1's
// studentized_range (df = inf) quantiles and CDF. Both sides integrate the
// same formula (scipy adaptively, we by fixed composite Gauss–Legendre)
// and invert it numerically; the measured disagreement is below 1e-13, so
// 1e-11 keeps a hundredfold margin.
const tolRange = 1e-11

// Demšar (2006), Table 5(a): q_alpha of the two-tailed Nemenyi test for
// k = 2..10. The values were quoted from memory in our task brief; they
// agree with several public transcriptions of the table, but we could not
// read the paper's table itself.
var demsarTable5 = map[float64][]float64{
	0.05: {1.960, 2.343, 2.569, 2.728, 2.850, 2.949, 3.031, 3.102, 3.164},
	0.10: {1.645, 2.052, 2.291, 2.459, 2.589, 2.693, 2.780, 2.855, 2.920},
}

func TestNemenyiQDemsarTable5(t *testing.T) {
	for _, alpha := range []float64{0.05, 0.10} {
		for i, want := range demsarTable5[alpha] {
			k := i + 2
			// The table prints 3 decimals, but three entries (k = 3 and 7 at
			// 0.05, k = 5 at 0.10) differ from the exact quantile by 4e-4 to
			// 7e-4 (2.3437, 2.9483, 2.4595: truncated or from an older table),
			// so "to the printed digits" means within one unit of the third
			// decimal.
			checkNear(t, "Nemenyi q", NemenyiQ(k, alpha), want, 1e-3, 0)
		}
	}
}

func TestNemenyiQAgainstScipy(t *testing.T) {
	sr := ref(t).StudentizedRange
	for _, c := range sr.NemenyiQ {
		// Reference: scipy 1.10.1, sr.PPFCall.
		checkNear(t, "Nemenyi q", NemenyiQ(c.K, c.Alpha), c.Q, tolRange, tolRange)
	}
	for _, c := range sr.CDF {
		// Reference: scipy 1.10.1, sr.CDFCall.
		checkNear(t, "range CDF", StudentizedRangeCDF(c.Q, c.K), c.P, tolRange, tolRange)
	}
}

func TestStudentizedRangeProperties(t *testing.T) {
	// k = 2: the range of two standard normals is sqrt(2)·|Z|, so
	// P(R ≤ q) = 2Φ(q/√2) − 1 and q_alpha = Φ⁻¹(1 − alpha/2) (derived by
	// hand). The quadrature error of the CDF is far below 1e-12.
	for _, q := range []float64{0.1, 1, 2.5, 4, 7} {
		want := 2*distuv.UnitNormal.CDF(q/math.Sqrt2) - 1
		checkNear(t, "k=2 CDF", StudentizedRangeCDF(q, 2), want, 1e-13, 0)
	}
	for _, alpha := range []float64{0.001, 0.05, 0.1, 0.5} {
		checkNear(t, "k=2 q", NemenyiQ(2, alpha), distuv.UnitNormal.Quantile(1-alpha/2), 1e-11, 1e-11)
	}
	// The quantile inverts the CDF; the CDF rises with q and falls with k.
	for _, k := range []int{2, 3, 5, 10, 30} {
		prev := 0.0
		for _, p := range []float64{0.01, 0.1, 0.5, 0.9, 0.99, 0.999} {
			q := StudentizedRangeQuantile(p, k)
			checkNear(t, "CDF(quantile)", StudentizedRangeCDF(q, k), p, 1e-12, 0)
			if !(q > prev) {
				t.Errorf("k = %d: quantile(%g) = %g not above %g", k, p, q, prev)
			}
			prev = q
		}
		if StudentizedRangeCDF(3, k+1) >= StudentizedRangeCDF(3, k) {
			t.Errorf("CDF(3; k) does not fall with k at k = %d", k)
		}
	}
	// Domain.
	if StudentizedRangeCDF(-1, 3) != 0 || StudentizedRangeCDF(math.Inf(1), 3) != 1 {
		t.Error("CDF outside (0, inf) not 0 / 1")
	}
	for _, v := range []float64{StudentizedRangeCDF(1, 1), StudentizedRangeQuantile(1.5, 3), NemenyiQ(3, 0), NemenyiCD(3, 0, 0.05)} {
		if !math.IsNaN(v) {
			t.Errorf("out-of-domain value %g, want NaN", v)
		}
	}
}

func TestNemenyiCDFormula(t *testing.T) {
	// Demšar (2006), section on post-hoc tests: CD = q_alpha sqrt(k(k+1)/(6N)); with
	// k = 4, N = 14 and the table's q_0.05 = 2.569 this gives 1.2535
	// (derived by hand), printed as 1.25 in the worked example on Table 6.
	checkNear(t, "CD", NemenyiCD(4, 14, 0.05), 2.569*math.Sqrt(20.0/84), 1e-3*math.Sqrt(20.0/84), 0)
}
