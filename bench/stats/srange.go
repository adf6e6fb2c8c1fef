package stats

import (
	"math"
	"sync"

	"gonum.org/v1/gonum/integrate/quad"
	"gonum.org/v1/gonum/stat/distuv"
)

// The range distribution is integrated by composite Gauss–Legendre
// quadrature on [-rangeZMax, rangeZMax]: rangePanels panels of
// rangeNodes nodes each. The integrand carries the factor φ(z), below
// 2·10⁻¹⁶ beyond |z| = 8.5, and is smooth, so the truncation and
// quadrature errors are far below 10⁻¹² (checked against scipy 1.10.1 in
// the tests).
const (
	rangeZMax   = 8.5
	rangePanels = 17
	rangeNodes  = 20
)

var rangeRule = sync.OnceValues(func() (x, w []float64) {
	x = make([]float64, rangePanels*rangeNodes)
	w = make([]float64, rangePanels*rangeNodes)
	width := 2 * rangeZMax / rangePanels
	for p := range rangePanels {
		lo := -rangeZMax + float64(p)*width
		s := p * rangeNodes
		quad.Legendre{}.FixedLocations(x[s:s+rangeNodes], w[s:s+rangeNodes], lo, lo+width)
	}
	return x, w
})

// StudentizedRangeCDF returns P(R ≤ q) for the range R of k independent
// standard normal variables — the studentized range distribution with
// infinitely many degrees of freedom:
//
//	P(R ≤ q) = k ∫ φ(z) [Φ(z) − Φ(z − q)]^(k−1) dz,
//
// integrated numerically. It returns 0 for q ≤ 0 and NaN for k < 2 or a
// NaN q.
func StudentizedRangeCDF(q float64, k int) float64 {
	switch {
	case k < 2 || math.IsNaN(q):
		return math.NaN()
	case q <= 0:
		return 0
	case math.IsInf(q, 1):
		return 1
	}
	x, w := rangeRule()
	var sum float64
	for i, z := range x {
		// Φ(z) − Φ(z − q), computed from the side that avoids cancellation.
		var d float64
		if z > 0 {
			d = distuv.UnitNormal.Survival(z-q) - distuv.UnitNormal.Survival(z)
		} else {
			d = distuv.UnitNormal.CDF(z) - distuv.UnitNormal.CDF(z-q)
		}
		sum += w[i] * distuv.UnitNormal.Prob(z) * math.Pow(d, float64(k-1))
	}
	return min(1, float64(k)*sum)
}

// StudentizedRangeQuantile returns the q with StudentizedRangeCDF(q, k) =
// p, found by the Illinois variant of regula falsi on a bracket from
// closed-form bounds, to |CDF(q) − p| ≤ 1e-15 or a bracket of relative width 1e-13.
// It returns 0 for p = 0, +Inf for p = 1 and NaN for p outside [0, 1] or
// k < 2.
func StudentizedRangeQuantile(p float64, k int) float64 {
	switch {
	case k < 2 || !(p >= 0 && p <= 1):
		return math.NaN()
	case p == 0:
		return 0
	case p == 1:
		return math.Inf(1)
	}
	f := func(q float64) float64 { return StudentizedRangeCDF(q, k) - p }
	// Bracket from two bounds on the range R of k standard normals: R is at
	// least the range of the first two, √2·|Z|, and by Bonferroni
	// P(R > q) ≤ C(k,2)·P(√2·|Z| > q). Hence
	//	√2·Φ⁻¹((1+p)/2) ≤ q_p ≤ √2·Φ⁻¹(1 − (1−p)/(k(k−1))),
	// widened slightly so that rounding cannot put the root outside.
	a := math.Sqrt2 * distuv.UnitNormal.Quantile((1+p)/2) * (1 - 1e-6)
	b := math.Sqrt2*distuv.UnitNormal.Quantile(1-(1-p)/float64(k*(k-1)))*(1+1e-6) + 1e-12
	fa, fb := f(a), f(b)
	for fa > 0 && a > 0 {
		a, fa = a/2, f(a/2)
	}
	for fb < 0 {
		b *= 2
		if b > 1e3 || math.IsInf(b, 0) {
			// p is 1 to within the accuracy of the CDF.
			return math.Inf(1)
		}
		fb = f(b)
	}
	if fa == 0 {
		return a
	}
	// Invariant: fa and fb have opposite signs (or fb = 0); the root lies
	// between a and b.
	for range 200 {
		if fb == 0 {
			return b
		}
		x := b - fb*(b-a)/(fb-fa)
		fx := f(x)
		if math.Abs(fx) <= 1e-15 {
			return x
		}
		if (fx < 0) != (fb < 0) {
			a, fa = b, fb
		} else {
			fa /= 2 // Illinois step: keep the stale end from stalling
		}
		b, fb = x, fx
		if math.Abs(b-a) <= 1e-13*math.Abs(b) {
			break
		}
	}
	return b
}

// NemenyiQ returns the critical value q_alpha of the two-tailed Nemenyi
// test for k models: the 1 − alpha quantile of the studentized range of k
// means with infinite degrees of freedom, divided by √2 (Demšar 2006,
// section on post-hoc tests and Table 5). For k = 2 it equals Φ⁻¹(1 − alpha/2). It
// returns NaN for k < 2 or alpha outside (0, 1).
func NemenyiQ(k int, alpha float64) float64 {
	if k < 2 || !(alpha > 0 && alpha < 1) {
		return math.NaN()
	}
	return StudentizedRangeQuantile(1-alpha, k) / math.Sqrt2
}

// NemenyiCD returns the Nemenyi critical difference of average ranks of k
// models over n data sets at level alpha (Demšar 2006, section on post-hoc tests):
//
//	CD = q_alpha · sqrt(k(k+1) / (6n)),
//
// with q_alpha = NemenyiQ(k, alpha). Two models whose average ranks differ
// by at least CD differ significantly. It returns NaN for k < 2, n < 1 or
// alpha outside (0, 1).
func NemenyiCD(k, n int, alpha float64) float64 {
	if n < 1 {
		return math.NaN()
	}
	return NemenyiQ(k, alpha) * math.Sqrt(float64(k*(k+1))/(6*float64(n)))
}
