package stats

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"
)

// WilcoxonExactMaxN is the largest number of ranked differences for which
// Wilcoxon computes the exact p-value and takes its decision on it; above
// it the normal approximation decides. Demšar (2006) points to tables of
// exact critical values for N up to 25; the exact distribution is cheap
// to compute well beyond that, and 50 is the switch-over of
// scipy.stats.wilcoxon's default (scipy 1.10.1, method='auto').
const WilcoxonExactMaxN = 50

// WilcoxonResult is the outcome of the Wilcoxon signed-ranks test.
type WilcoxonResult struct {
	// TestResult holds T = min(R+, R−) as Statistic, DF 0, and the p-value
	// the decision is taken on: PExact when N ≤ WilcoxonExactMaxN,
	// PNormal otherwise.
	TestResult
	// RPlus is the sum of ranks of the differences a_i − b_i > 0 plus half
	// the ranks of the zero differences; RMinus likewise for a_i < b_i.
	// RPlus + RMinus = N(N+1)/2.
	RPlus, RMinus float64
	// N is the number of differences ranked: all pairs, less one zero
	// difference when their count is odd.
	N int
	// Zeros is the number of zero differences in the input.
	Zeros int
	// Z is the normal deviate (T − N(N+1)/4) / sqrt(N(N+1)(2N+1)/24),
	// without tie correction, as in Demšar (2006); Z ≤ 0.
	Z float64
	// PNormal is the two-sided p-value of Z.
	PNormal float64
	// PExact is the exact two-sided p-value for N ≤ WilcoxonExactMaxN, NaN
	// above: the probability, over independent equally likely signs of the
	// non-zero differences with their ranks as given (ties averaged, zero
	// ranks split), that |R+ − R−| is at least its observed value. Without
	// ties and zeros it is the classical exact signed-rank p-value.
	PExact float64
}

// Wilcoxon is the Wilcoxon signed-ranks test of two models over N data
// sets, as recommended by Demšar (JMLR 7:1, 2006). The differences
// d_i = a_i − b_i are ranked by absolute value, ties getting average
// ranks. Zero differences (|d_i| within TieTolerance of the largest
// |score|) follow Demšar: "ranks of d_i = 0 are split evenly among the
// sums; if there is an odd number of them, one is ignored". Here the
// ignored one is removed before ranking, so the remaining N differences
// get ranks 1..N and R+ + R− = N(N+1)/2. T = min(R+, R−).
//
// Warnings report zero differences, ties among the non-zero differences,
// and an N so small that the smallest attainable exact p-value exceeds
// alpha. All differences zero gives T = N(N+1)/4, P = 1 and a warning. It
// returns an error for samples of different lengths, none, non-finite
// values, or alpha outside (0, 1).
func Wilcoxon(a, b []float64, alpha float64) (WilcoxonResult, error) {
	if err := checkAlpha(alpha); err != nil {
		return WilcoxonResult{}, fmt.Errorf("stats: wilcoxon: %w", err)
	}
	if err := checkPaired(a, b); err != nil {
		return WilcoxonResult{}, fmt.Errorf("stats: wilcoxon: %w", err)
	}
	if len(a) == 0 {
		return WilcoxonResult{}, fmt.Errorf("stats: wilcoxon: %w: no pairs", ErrTooFew)
	}
	tol := TieTolerance * max(maxAbs(a), maxAbs(b))
	var r WilcoxonResult
	d := make([]float64, 0, len(a))
	dropped := false
	for i := range a {
		di := a[i] - b[i]
		if math.Abs(di) <= tol {
			r.Zeros++
			di = 0
		}
		d = append(d, di)
	}
	if r.Zeros%2 == 1 {
		// Ignore one zero difference; all zeros share one rank group, so
		// which one is immaterial: take the first.
		i := slices.Index(d, 0)
		d = slices.Delete(d, i, i+1)
		dropped = true
	}
	n := len(d)
	r.N = n
	mag := make([]float64, n)
	for i, v := range d {
		mag[i] = math.Abs(v)
	}
	ranks := make([]float64, n)
	ties := rankAverage(ranks, mag, tol)
	nonzero := 0
	for i, v := range d {
		switch {
		case v > 0:
			r.RPlus += ranks[i]
			nonzero++
		case v < 0:
			r.RMinus += ranks[i]
			nonzero++
		default:
			r.RPlus += ranks[i] / 2
			r.RMinus += ranks[i] / 2
		}
	}
	r.Statistic = min(r.RPlus, r.RMinus)
	if fn := float64(n); n > 0 {
		r.Z = (r.Statistic - fn*(fn+1)/4) / math.Sqrt(fn*(fn+1)*(2*fn+1)/24)
		r.PNormal = min(1, 2*distuv.UnitNormal.CDF(r.Z))
	} else {
		// A single pair with a zero difference, ignored as an odd zero.
		r.Z, r.PNormal = 0, 1
	}
	r.PExact = math.NaN()
	if n <= WilcoxonExactMaxN {
		r.PExact = signedRankExact(d, ranks)
		r.decide(r.PExact, alpha)
	} else {
		r.decide(r.PNormal, alpha)
	}

	if r.Zeros > 0 {
		msg := fmt.Sprintf("%d zero differences: their ranks are split evenly between R+ and R-", r.Zeros)
		if dropped {
			msg += "; one was ignored as their number is odd"
		}
		r.warnf("%s", msg)
	}
	if r.Zeros > 0 && r.Zeros == len(a) {
		r.warnf("all differences are zero: no evidence either way")
	}
	// Tie groups among non-zero differences (the zero group, if any, is
	// the first group and is reported above).
	if len(ties) > 0 && r.Zeros-btoi(dropped) > 1 {
		ties = ties[1:]
	}
	if len(ties) > 0 {
		r.warnf("ties among |differences| (group sizes %s): average ranks used; the normal approximation has no tie correction", joinInts(ties))
	}
	if nonzero > 0 {
		if pmin := math.Ldexp(1, 1-nonzero); pmin > alpha {
			r.warnf("too few samples: with %d non-zero differences the smallest attainable exact p-value is %.4g > alpha = %g", nonzero, pmin, alpha)
		}
	}
	return r, nil
}

func btoi(b bool) int {
	if b {
		return 1
	}
	return 0
}

func joinInts(x []int) string {
	s := make([]string, len(x))
	for i, v := range x {
		s[i] = fmt.Sprint(v)
	}
	return strings.Join(s, ", ")
}

// signedRankExact returns the exact two-sided p-value of the signed-rank
// statistic given the differences d and their ranks: over independent
// equally likely signs of the non-zero differences, the probability that
// |Σ sign_i·rank_i| is at least the observed value. Zero differences
// contribute equally to R+ and R− and drop out of R+ − R−. Ranks are
// multiples of 1/2, so the computation is done exactly on doubled ranks by
// dynamic programming over the attainable sums.
func signedRankExact(d, ranks []float64) float64 {
	var r2 []int
	obs := 0 // doubled R+ over non-zero differences
	for i, v := range d {
		if v == 0 {
			continue
		}
		k := int(math.Round(2 * ranks[i]))
		if math.Abs(float64(k)-2*ranks[i]) > 1e-9 {
			panic("stats: internal: rank is not a multiple of 1/2")
		}
		r2 = append(r2, k)
		if v > 0 {
			obs += k
		}
	}
	total := 0
	for _, k := range r2 {
		total += k
	}
	// prob[s] = P(doubled R+ over non-zero differences = s).
	prob := make([]float64, total+1)
	prob[0] = 1
	hi := 0
	for _, k := range r2 {
		for s := hi + k; s >= 0; s-- {
			var v float64
			if s <= hi {
				v = prob[s]
			}
			if s >= k {
				v += prob[s-k]
			}
			prob[s] = v / 2
		}
		hi += k
	}
	// R+ − R− in doubled units is 2s − total.
	dev := absInt(2*obs - total)
	var p float64
	for s, ps := range prob {
		if absInt(2*s-total) >= dev {
			p += ps
		}
	}
	return min(p, 1)
}

func absInt(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// FriedmanResult is the outcome of the Friedman test with the
// Iman–Davenport correction and the Nemenyi critical difference.
//
// Two forms of Friedman's statistic are given. ChiSq is the form printed
// by Demšar (2006), which assumes untied ranks; ChiSqTieCorrected divides
// it by the tie correction and equals scipy.stats.friedmanchisquare
// (scipy 1.10.1). Without ties they are equal. The decision uses the
// tie-corrected form: the Iman–Davenport F computed from it is exactly the
// two-way analysis-of-variance F on the (average) ranks, which is how
// Iman and Davenport (Commun. Statist. A 9:571, 1980) derive their
// statistic, so ties neither inflate nor deflate it; Demšar's form
// understates the statistic when ranks tie.
type FriedmanResult struct {
	// Ranks[i][j] is the rank of model j on data set i: 1 for the highest
	// score, ties sharing the average of their ranks.
	Ranks [][]float64
	// AvgRanks[j] is the mean rank of model j over the data sets.
	AvgRanks []float64
	// ChiSq is Friedman's statistic in the form given by Demšar (2006),
	// 12N/(k(k+1)) · (Σ_j R_j² − k(k+1)²/4), without tie correction.
	ChiSq float64
	// PChiSq is the chi-square p-value of ChiSq with DF degrees of freedom.
	PChiSq float64
	// ChiSqTieCorrected is ChiSq divided by 1 − Σ(t³ − t)/(N·k·(k² − 1)),
	// the sum over tie groups of size t within data sets; it equals the
	// statistic of scipy.stats.friedmanchisquare. NaN when every data set
	// is one tie group (0/0).
	ChiSqTieCorrected float64
	// PChiSqTieCorrected is the chi-square p-value of ChiSqTieCorrected
	// (scipy's p-value); NaN with it.
	PChiSqTieCorrected float64
	// DF is k − 1.
	DF int
	// ImanDavenportF is (N−1)·X / (N(k−1) − X) with X = ChiSqTieCorrected
	// (X = ChiSq = 0 when that is NaN), +Inf when every data set ranks the
	// models identically.
	ImanDavenportF float64
	// DF1 = k − 1 and DF2 = (k − 1)(N − 1) are the degrees of freedom of F.
	DF1, DF2 int
	// P is the p-value of ImanDavenportF; the decision is taken on it.
	P float64
	// Alpha is the significance level.
	Alpha float64
	// Reject is P ≤ Alpha: the models do not all perform alike.
	Reject bool
	// CD is the Nemenyi critical difference of average ranks at Alpha.
	CD float64
	// Warnings lists doubtful conditions, in a fixed order.
	Warnings []string
}

// FriedmanSmallN is the number of data sets at or below which Friedman
// warns that the chi-square and F approximations are rough (Demšar 2006,
// section on the Friedman test, recalled from memory: the approximations are considered
// adequate for N > 10 and k > 5, exact tables exist for smaller designs).
const FriedmanSmallN = 10

// Friedman is the Friedman test of k models over N data sets with the
// Iman–Davenport F statistic and the Nemenyi critical difference (Demšar,
// JMLR 7:1, 2006, section on the Friedman test). scores[i][j] is the score of model j on
// data set i, higher is better. Within a data set, scores within
// TieTolerance (relative to the largest |score| in the table) tie and
// share their average rank.
//
// Warnings report ties, few data sets (N ≤ FriedmanSmallN), and k = 2
// (where the Friedman test reduces to a sign test; use Wilcoxon). It
// returns an error for fewer than 2 data sets or 2 models, a ragged
// table, non-finite scores, or alpha outside (0, 1).
func Friedman(scores [][]float64, alpha float64) (FriedmanResult, error) {
	if err := checkAlpha(alpha); err != nil {
		return FriedmanResult{}, fmt.Errorf("stats: friedman: %w", err)
	}
	n := len(scores)
	if n < 2 {
		return FriedmanResult{}, fmt.Errorf("stats: friedman: %w: %d data sets, need at least 2", ErrTooFew, n)
	}
	k := len(scores[0])
	if k < 2 {
		return FriedmanResult{}, fmt.Errorf("stats: friedman: %w: %d models, need at least 2", ErrTooFew, k)
	}
	var scale float64
	for i, row := range scores {
		if len(row) != k {
			return FriedmanResult{}, fmt.Errorf("stats: friedman: %w: data set %d has %d scores, data set 0 has %d", ErrLength, i, len(row), k)
		}
		if err := checkFinite(fmt.Sprintf("scores[%d]", i), row); err != nil {
			return FriedmanResult{}, fmt.Errorf("stats: friedman: %w", err)
		}
		scale = max(scale, maxAbs(row))
	}
	tol := TieTolerance * scale

	res := FriedmanResult{
		Ranks:    make([][]float64, n),
		AvgRanks: make([]float64, k),
		DF:       k - 1,
		DF1:      k - 1,
		DF2:      (k - 1) * (n - 1),
		Alpha:    alpha,
	}
	neg := make([]float64, k)
	var tieSum float64 // Σ (t³ − t) over tie groups
	var tiedSets []int
	for i, row := range scores {
		for j, v := range row {
			neg[j] = -v // rank 1 for the highest score
		}
		res.Ranks[i] = make([]float64, k)
		ties := rankAverage(res.Ranks[i], neg, tol)
		for _, t := range ties {
			ft := float64(t)
			tieSum += ft*ft*ft - ft
		}
		if len(ties) > 0 {
			tiedSets = append(tiedSets, i)
		}
		for j, r := range res.Ranks[i] {
			res.AvgRanks[j] += r
		}
	}
	fn, fk := float64(n), float64(k)
	var sumSq float64
	for j := range res.AvgRanks {
		res.AvgRanks[j] /= fn
		sumSq += res.AvgRanks[j] * res.AvgRanks[j]
	}
	res.ChiSq = max(0, 12*fn/(fk*(fk+1))*(sumSq-fk*(fk+1)*(fk+1)/4))
	chi2 := distuv.ChiSquared{K: fk - 1}
	res.PChiSq = chi2.Survival(res.ChiSq)
	res.ChiSqTieCorrected, res.PChiSqTieCorrected = math.NaN(), math.NaN()
	x := res.ChiSq // the statistic the decision uses
	if c := 1 - tieSum/(fn*fk*(fk*fk-1)); c > 1e-12 {
		res.ChiSqTieCorrected = res.ChiSq / c
		res.PChiSqTieCorrected = chi2.Survival(res.ChiSqTieCorrected)
		x = res.ChiSqTieCorrected
	}
	// With identical rankings X reaches its maximum N(k − 1) (also under
	// ties, where the correction scales both alike) and F is infinite.
	den := fn*(fk-1) - x
	if den <= 1e-12*fn*(fk-1) {
		res.ImanDavenportF = math.Inf(1)
		res.P = 0
	} else {
		res.ImanDavenportF = (fn - 1) * x / den
		res.P = distuv.F{D1: float64(res.DF1), D2: float64(res.DF2)}.Survival(res.ImanDavenportF)
	}
	res.Reject = res.P <= alpha
	res.CD = NemenyiCD(k, n, alpha)

	if len(tiedSets) > 0 {
		res.Warnings = append(res.Warnings, fmt.Sprintf("ties within %d data sets (indices %s): average ranks used; the decision uses the tie-corrected Friedman statistic (Demšar's uncorrected form is given beside it)", len(tiedSets), joinInts(tiedSets)))
	}
	if math.IsNaN(res.ChiSqTieCorrected) {
		res.Warnings = append(res.Warnings, "every data set ties all models: no evidence either way")
	}
	if n <= FriedmanSmallN {
		res.Warnings = append(res.Warnings, fmt.Sprintf("few data sets (N = %d ≤ %d): the chi-square and F approximations are rough", n, FriedmanSmallN))
	}
	if k == 2 {
		res.Warnings = append(res.Warnings, "k = 2 models: the Friedman test reduces to a sign test; prefer Wilcoxon")
	}
	return res, nil
}

// HolmAdjust returns Holm's step-down adjusted p-values (Holm, Scand. J.
// Statist. 6:65, 1979): with p sorted ascending as p_(1) ≤ … ≤ p_(m),
//
//	adj_(i) = max_{j ≤ i} min(1, (m − j + 1)·p_(j)),
//
// returned in the input order. Equal p-values keep their input order. It
// returns an error for an empty slice or a p-value that is NaN or outside
// [0, 1].
func HolmAdjust(p []float64) ([]float64, error) {
	idx, err := holmOrder(p)
	if err != nil {
		return nil, err
	}
	m := len(p)
	adj := make([]float64, m)
	running := 0.0
	for rank, i := range idx {
		running = max(running, min(1, float64(m-rank)*p[i]))
		adj[i] = running
	}
	return adj, nil
}

// Holm returns Holm's step-down decisions at family-wise level alpha
// (Holm, Scand. J. Statist. 6:65, 1979): with p sorted ascending,
// hypothesis (i) is rejected when p_(1) ≤ alpha/m, …, p_(i) ≤
// alpha/(m − i + 1) all hold; the first retained hypothesis retains all
// later ones. This is HolmAdjust(p)[i] ≤ alpha up to the rounding of a
// product against a quotient. Errors as HolmAdjust, and for alpha outside
// (0, 1).
func Holm(p []float64, alpha float64) ([]bool, error) {
	if err := checkAlpha(alpha); err != nil {
		return nil, fmt.Errorf("stats: holm: %w", err)
	}
	idx, err := holmOrder(p)
	if err != nil {
		return nil, err
	}
	m := len(p)
	reject := make([]bool, m)
	for rank, i := range idx {
		if p[i] > alpha/float64(m-rank) {
			break // step-down: stop at the first hypothesis retained
		}
		reject[i] = true
	}
	return reject, nil
}

// holmOrder validates p and returns its indices in ascending order of p,
// equal values in input order.
func holmOrder(p []float64) ([]int, error) {
	if len(p) == 0 {
		return nil, fmt.Errorf("stats: holm: %w: no p-values", ErrTooFew)
	}
	for i, v := range p {
		if !(v >= 0 && v <= 1) {
			return nil, fmt.Errorf("stats: holm: %w: p[%d] = %v", ErrProbability, i, v)
		}
	}
	idx := make([]int, len(p))
	for i := range idx {
		idx[i] = i
	}
	slices.SortStableFunc(idx, func(i, j int) int { return cmp.Compare(p[i], p[j]) })
	return idx, nil
}
