package assess

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// The formulas of the assessment report (fringe assess). Each is a plain
// function so that the tests can check it against an outside computation.

// NoiseBudget returns the two-qubit error rate p2 at which the expected
// fidelity of a circuit with n2 two-qubit and n1 single-qubit gates under
// independent depolarizing errors, estimated as the probability that no
// gate fails,
//
//	F(p2) = (1 − p2)^n2 · (1 − p2/ratio)^n1,
//
// drops to target (the report uses 1/2); the single-qubit error rate is
// p1 = p2/ratio. F decreases in p2, so the root is unique; it is found by
// bisection on log F to a relative precision of 1e-12. The estimate ignores
// that some errors leave the measured outcome unchanged, so the true
// tolerable rate is somewhat higher: read it as an order of magnitude.
//
// It returns 1 when even p2 = 1 keeps F above target (no two-qubit gate
// and few single-qubit ones), and NaN for n1 or n2 < 0, ratio < 1 or
// target outside (0, 1).
func NoiseBudget(n2, n1 int, ratio, target float64) float64 {
	if n1 < 0 || n2 < 0 || !(ratio >= 1) || math.IsInf(ratio, 0) || !(target > 0 && target < 1) {
		return math.NaN()
	}
	logF := func(p float64) float64 {
		return float64(n2)*math.Log1p(-p) + float64(n1)*math.Log1p(-p/ratio)
	}
	lt := math.Log(target)
	if n2 == 0 && n1 == 0 || logF(1) >= lt {
		return 1
	}
	lo, hi := 0.0, 1.0
	for range 200 {
		mid := (lo + hi) / 2
		if logF(mid) >= lt {
			lo = mid
		} else {
			hi = mid
		}
		if hi-lo <= 1e-12*hi {
			break
		}
	}
	return (lo + hi) / 2
}

// CenteredAlignment returns the centered alignment of two kernel matrices
// (Cortes, Mohri & Rostamizadeh, "Algorithms for learning kernels based on
// centered alignment", JMLR 13:795, 2012, Definition 4):
//
//	ρ(K, L) = <Kc, Lc>_F / (‖Kc‖_F ‖Lc‖_F),   Kc = H K H,  H = I − 11ᵀ/n.
//
// It returns NaN when the matrices differ in size or either centered
// matrix is zero (a constant kernel has no alignment).
func CenteredAlignment(K, L mat.Symmetric) float64 {
	n := K.SymmetricDim()
	if L.SymmetricDim() != n || n == 0 {
		return math.NaN()
	}
	kc, lc := centered(K), centered(L)
	var kl, kk, ll float64
	for i := range n {
		for j := range n {
			x, y := kc[i*n+j], lc[i*n+j]
			kl += x * y
			kk += x * x
			ll += y * y
		}
	}
	if kk == 0 || ll == 0 {
		return math.NaN()
	}
	return kl / (math.Sqrt(kk) * math.Sqrt(ll))
}

// centered returns H K H as a dense row-major slice: K_ij − r_i − r_j + m
// with r the row means and m the grand mean.
func centered(K mat.Symmetric) []float64 {
	n := K.SymmetricDim()
	out := make([]float64, n*n)
	r := make([]float64, n)
	var m float64
	for i := range n {
		var s float64
		for j := range n {
			v := K.At(i, j)
			out[i*n+j] = v
			s += v
		}
		r[i] = s / float64(n)
		m += r[i]
	}
	m /= float64(n)
	for i := range n {
		for j := range n {
			out[i*n+j] += m - r[i] - r[j]
		}
	}
	return out
}

// TargetKernel returns the ideal kernel of the labels y: 1 where two
// instances share a class and 0 elsewhere (Y Yᵀ for the one-hot matrix Y).
// Centered alignment is invariant to a·T + b·11ᵀ (a > 0), so this is the
// same target as the ±1 form of the two-class case.
func TargetKernel(y []int) *mat.SymDense {
	n := len(y)
	T := mat.NewSymDense(n, nil)
	for i := range n {
		for j := i; j < n; j++ {
			if y[i] == y[j] {
				T.SetSym(i, j, 1)
			}
		}
	}
	return T
}

// InterferenceGram returns the interference kernel κ(x, x') = (1 + <x̂,
// x̂'>)/2 of the rows of Z (each normalised; see qkernel.Kernel). A zero row
// is an error.
func InterferenceGram(Z *mat.Dense) (*mat.SymDense, error) {
	n, d := Z.Dims()
	U := mat.NewDense(n, d, nil)
	for i := range n {
		row := Z.RawRowView(i)
		var top float64
		for _, v := range row {
			top = math.Max(top, math.Abs(v))
		}
		if top == 0 {
			return nil, fmt.Errorf("row %d is zero: no amplitude encoding", i)
		}
		var s float64
		for _, v := range row {
			s += (v / top) * (v / top)
		}
		nrm := top * math.Sqrt(s)
		for j, v := range row {
			U.Set(i, j, v/nrm)
		}
	}
	G := mat.NewSymDense(n, nil)
	G.SymOuterK(1, U)
	for i := range n {
		for j := i; j < n; j++ {
			G.SetSym(i, j, (1+math.Max(-1, math.Min(1, G.At(i, j))))/2)
		}
	}
	return G, nil
}

// RBFGram returns exp(−γ‖z − z'‖²) over the rows of Z.
func RBFGram(Z *mat.Dense, gamma float64) *mat.SymDense {
	n, _ := Z.Dims()
	G := mat.NewSymDense(n, nil)
	G.SymOuterK(1, Z)
	sq := make([]float64, n)
	for i := range n {
		sq[i] = G.At(i, i)
	}
	for i := range n {
		for j := i; j < n; j++ {
			d2 := math.Max(0, sq[i]+sq[j]-2*G.At(i, j))
			G.SetSym(i, j, math.Exp(-gamma*d2))
		}
	}
	return G
}

// percentile returns the p-quantile (p in [0, 1]) of v by linear
// interpolation between order statistics, numpy's default rule
// (numpy.percentile, method "linear"): position h = (n − 1) p. NaN for no
// values. v is not modified.
func percentile(v []float64, p float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	s := slices.Clone(v)
	slices.Sort(s)
	h := float64(len(s)-1) * p
	lo := int(math.Floor(h))
	if lo >= len(s)-1 {
		return s[len(s)-1]
	}
	f := h - float64(lo)
	if math.IsInf(s[lo+1], 1) {
		if f == 0 {
			return s[lo]
		}
		return math.Inf(1)
	}
	return s[lo] + f*(s[lo+1]-s[lo])
}
