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
// p, found by bisection to a relative width of 10⁻¹³. It returns 0 for
// p = 0, +Inf for p = 1 and NaN for p outside [0, 1] or k < 2.
func StudentizedRangeQuantile(p float64, k int) float64 {
	switch {
	case k < 2 || !(p >= 0 && p <= 1):
		return math.NaN()
	case p == 0:
		return 0
	case p == 1:
		return math.Inf(1)
	}
	lo, hi := 0.0, 8.0
	for StudentizedRangeCDF(hi, k) < p {
		lo, hi = hi, 2*hi
		if hi > 1e3 {
			// p is 1 to within the accuracy of the CDF.
			return math.Inf(1)
		}
	}
	for hi-lo > 1e-13*hi {
		mid := lo + (hi-lo)/2
		if StudentizedRangeCDF(mid, k) < p {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo + (hi-lo)/2
}

// NemenyiQ returns the critical value q_alpha of the two-tailed Nemenyi
// test for k models: the 1 − alpha quantile of the studentized range of k
// means with infinite degrees of freedom, divided by √2 (Demšar 2006,
// Sec. 3.2.2 and Table 5). For k = 2 it equals Φ⁻¹(1 − alpha/2). It
// returns NaN for k < 2 or alpha outside (0, 1).
func NemenyiQ(k int, alpha float64) float64 {
	if k < 2 || !(alpha > 0 && alpha < 1) {
		return math.NaN()
	}
	return StudentizedRangeQuantile(1-alpha, k) / math.Sqrt2
}

// NemenyiCD returns the Nemenyi critical difference of average ranks of k
// models over n data sets at level alpha (Demšar 2006, Sec. 3.2.2):
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
