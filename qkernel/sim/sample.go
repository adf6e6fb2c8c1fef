package sim

import (
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/stat/distuv"
)

// SampleCounts draws one multinomial sample of shots trials over the
// outcomes with probabilities p (normalised by their sum) by sequential
// binomials: count_i ~ Binomial(shots - sum_{j<i} count_j,
// p_i / sum_{j>=i} p_j), the last outcome with non-zero probability taking
// the rest; outcomes with p_i = 0 never occur.
//
// Each binomial is exact and costs O(1) expected time whatever the number
// of trials (see binomial), so the cost is O(len(p)) and does not grow with
// shots (BenchmarkSample).
//
// It panics if shots < 0, if an entry of p is negative or not finite, or if
// p sums to zero: callers pass distributions from Outcomes and validated
// shot counts.
func SampleCounts(p []float64, shots int, rng *rand.Rand) []int {
	if shots < 0 {
		panic(fmt.Sprintf("sim: %d shots", shots))
	}
	total := 0.0
	for i, v := range p {
		if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
			panic(fmt.Sprintf("sim: probability %d = %v", i, v))
		}
		total += v
	}
	if !(total > 0) {
		panic("sim: probabilities sum to zero")
	}
	// suffix[i] = sum_{j>=i} p_j, summed from the end so that a tail of
	// zeros has mass exactly 0 and never receives a shot.
	suffix := make([]float64, len(p)+1)
	for i := len(p) - 1; i >= 0; i-- {
		suffix[i] = suffix[i+1] + p[i]
	}
	counts := make([]int, len(p))
	left := shots
	for i := 0; i < len(p) && left > 0; i++ {
		if p[i] == 0 { // exact: a zero-probability outcome gets no shot
			continue
		}
		if suffix[i+1] == 0 { // exact: the last outcome with mass takes the rest
			counts[i] = left
			break
		}
		q := min(p[i]/suffix[i], 1)
		k := binomial(left, q, rng)
		counts[i] = k
		left -= k
	}
	return counts
}

// binomial draws from Binomial(n, p). For n p < 10 (with p <= 1/2 by
// symmetry) it inverts the CDF by sequential search with the recurrence
// f(k)/f(k-1) = ((n+1) s / k - s), s = p/(1-p) (the BINV algorithm of
// Kachitvichyanukul & Schmeiser, "Binomial random variate generation",
// Commun. ACM 31 (1988) 216), exact up to rounding with an expected
// 1 + n p steps. For n p >= 10 it uses gonum distuv.Binomial (v0.17.0),
// whose Rand is the rejection method with a Lorentzian comparison function
// of Numerical Recipes in C, 2nd ed., section 7.3 ("bnldev"), exact with an
// expected O(1) trials. (gonum's own branch for n p < 1 approximates the
// acceptance ratio with a Pade approximant and Stirling's series, which is
// why small means are inverted here.)
func binomial(n int, p float64, rng *rand.Rand) int {
	if p > 0.5 {
		return n - binomial(n, 1-p, rng)
	}
	if float64(n)*p >= 10 {
		return int(distuv.Binomial{N: float64(n), P: p, Src: rng}.Rand())
	}
	q := 1 - p
	s := p / q
	a := float64(n+1) * s
	r := math.Exp(float64(n) * math.Log1p(-p)) // f(0) = (1-p)^n
	u := rng.Float64()
	for k := 0; k < n; k++ {
		if u < r {
			return k
		}
		u -= r
		r *= a/float64(k+1) - s
	}
	return n
}
