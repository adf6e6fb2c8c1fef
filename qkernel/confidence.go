package qkernel

import (
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// ShotsForConfidence returns the number of measurement shots N for which
// the most frequent accepted class is, with probability conf, the class k1
// with the largest post-selected probability, when the runner-up k2 is the
// only competitor:
//
//	N = z² (a + b − (a − b)²) / (a − b)²,   a = p_acc·q1,  b = p_acc·q2,
//	z = Φ⁻¹(conf),
//
// with q1 = P(k1 | acc) > q2 = P(k2 | acc) and p_acc the post-selection
// probability. Derivation (normal approximation): every shot of the
// circuit adds X = +1 when it reads (a = 0, k1) (probability a), −1 when it
// reads (a = 0, k2) (probability b) and 0 otherwise (rejected, or another
// class); the decision is right when D = ΣX > 0. The shots are independent,
// so E[D] = N(a − b) and Var[D] = N(a + b − (a − b)²), and
// P(D > 0) ≈ Φ(√N (a − b)/√(a + b − (a − b)²)) ≥ conf gives N. The rejected
// shots are part of the count, so N is the total budget, not the accepted
// shots. Other classes than k2 are ignored (with C > 2 classes the true
// probability of a right decision is a little lower); a tie (D = 0) counts
// as wrong. ShotsExactTwoClass gives the exact value for checking.
//
// It returns +Inf when q1 <= q2 or p_acc <= 0 (no number of shots decides)
// and NaN for arguments outside [0, 1] or conf outside (0.5, 1).
func ShotsForConfidence(pAcc, q1, q2, conf float64) float64 {
	if !(pAcc >= 0 && pAcc <= 1 && q1 >= 0 && q1 <= 1 && q2 >= 0 && q2 <= 1 && conf > 0.5 && conf < 1) {
		return math.NaN()
	}
	a, b := pAcc*q1, pAcc*q2
	d := a - b
	if !(d > 0) {
		return math.Inf(1)
	}
	z := distuv.UnitNormal.Quantile(conf)
	return z * z * (a + b - d*d) / (d * d)
}

// ShotsExactTwoClass returns the exact probability that N shots decide for
// k1: P(n1 > n2), where each shot reads (a = 0, k1) with probability
// a = pAcc·q1, (a = 0, k2) with probability b = pAcc·q2, and anything else
// otherwise (a trinomial; a tie counts as wrong). It sums
//
//	Σ_m Binom(m; N, a + b) · P(Binom(N1; m, a/(a + b)) > m/2)
//
// over the number m of shots that read k1 or k2, in log space. Cost O(N²);
// meant for checks, not for the report. It returns NaN for N < 0 or
// probabilities outside [0, 1].
func ShotsExactTwoClass(N int, pAcc, q1, q2 float64) float64 {
	a, b := pAcc*q1, pAcc*q2
	if N < 0 || !(pAcc >= 0 && pAcc <= 1 && q1 >= 0 && q2 >= 0 && q1+q2 <= 1+1e-12) {
		return math.NaN()
	}
	s := a + b
	if N == 0 || s == 0 {
		return 0
	}
	r := a / s
	lg := func(n int) float64 { v, _ := math.Lgamma(float64(n) + 1); return v }
	logp := func(k, n int, p float64) float64 { // log Binom(k; n, p)
		switch {
		case p == 0:
			if k == 0 {
				return 0
			}
			return math.Inf(-1)
		case p == 1:
			if k == n {
				return 0
			}
			return math.Inf(-1)
		}
		return lg(n) - lg(k) - lg(n-k) + float64(k)*math.Log(p) + float64(n-k)*math.Log1p(-p)
	}
	total := 0.0
	for m := 1; m <= N; m++ {
		pm := math.Exp(logp(m, N, s))
		if pm == 0 {
			continue
		}
		win := 0.0
		for k := m/2 + 1; k <= m; k++ {
			win += math.Exp(logp(k, m, r))
		}
		total += pm * win
	}
	return math.Min(total, 1)
}
