package circuit

import (
	"errors"
	"fmt"
	"math"
	"math/bits"
)

// ErrZeroVector is returned (wrapped) by Compile when the test vector or a
// training vector has zero norm and so cannot be amplitude encoded.
var ErrZeroVector = errors.New("zero vector cannot be amplitude encoded")

// WeightTol is the tolerance on |sum(w) - 1| that Compile accepts; the
// weights are then rescaled to sum to 1 exactly.
const WeightTol = 1e-9

// ceilLog2 returns the number of bits needed for n values (0 for n = 1).
func ceilLog2(n int) int {
	if n <= 1 {
		return 0
	}
	return bits.Len(uint(n - 1))
}

// RegisterSizes returns the number of qubits of the index, data and class
// registers for m training vectors of dimension d and nClass classes:
// ceil(log2 m), max(1, ceil(log2 d)) and ceil(log2 nClass). The data register
// has at least one qubit so that the sign of a one-feature vector is encoded.
func RegisterSizes(m, d, nClass int) (index, data, class int) {
	return ceilLog2(m), max(1, ceilLog2(d)), ceilLog2(nClass)
}

// Compile builds the interference classifier circuit of Schuld, Fingerhuth &
// Petruccione (EPL 119, 60002 (2017)) for one test vector.
//
// The circuit prepares
//
//	|D> = sum_m sqrt(w_m) |m>_index (|0>_a |x~>_data + |1>_a |x_m>_data) |y_m>_class / sqrt(2)
//
// with x~ = test/||test|| and x_m = train[m]/||train[m]||, then applies H to
// the ancilla and measures the ancilla and the class register, so that
//
//	P(a=0, c=k) = sum_{m: y_m = k} w_m ||x~ + x_m||^2 / 4.
//
// Features are zero padded to a power of two. The operations are:
//
//  1. H on the ancilla.
//  2. The index amplitudes sqrt(w_m) by a binary tree of UCRY (level j
//     targets index bit nm-1-j, controlled by the more significant index
//     bits); index states m >= M get amplitude 0.
//  3. The data register by a binary tree of UCRY multiplexed on the data
//     bits above the target, the ancilla and the index register: control
//     value (a, m) carries x~ for a = 0 and x_m for a = 1. Inner levels use
//     angles 2 atan2(||upper half||, ||lower half||); the last level uses
//     2 atan2(v_1, v_0), whose full range (-2pi, 2pi] encodes either sign.
//  4. The class register by one UCRY per class bit, controlled by the index
//     register, with angle pi where bit j of y_m is 1 and 0 elsewhere:
//     RY(pi)|0> = |1> exactly (amplitude +1, cos(pi/2) ~ 6e-17 left on |0>),
//     so the class register holds |y_m> with a positive amplitude.
//  5. H on the ancilla, then Measure on the ancilla and on every class qubit
//     (least significant first).
//
// w holds one non-negative weight per training vector summing to 1 within
// WeightTol (then rescaled exactly); nil means uniform weights 1/M. Use
// BalancedWeights for w_m = 1/(C M_k). Labels y must lie in [0, nClass).
//
// Errors (all prefixed "circuit: "): no training vectors, mismatched
// lengths, a non-finite value, a label outside [0, nClass), nClass < 1, a
// negative weight or weights not summing to 1, a zero vector (wrapping
// ErrZeroVector).
func Compile(test []float64, train [][]float64, y []int, nClass int, w []float64) (*Circuit, error) {
	M := len(train)
	d := len(test)
	switch {
	case M == 0:
		return nil, fmt.Errorf("circuit: no training vectors")
	case d == 0:
		return nil, fmt.Errorf("circuit: empty test vector")
	case len(y) != M:
		return nil, fmt.Errorf("circuit: %d labels for %d training vectors", len(y), M)
	case nClass < 1:
		return nil, fmt.Errorf("circuit: %d classes, need at least 1", nClass)
	case w != nil && len(w) != M:
		return nil, fmt.Errorf("circuit: %d weights for %d training vectors", len(w), M)
	}
	for m, row := range train {
		if len(row) != d {
			return nil, fmt.Errorf("circuit: training vector %d has %d features, test vector has %d", m, len(row), d)
		}
	}
	for m, k := range y {
		if k < 0 || k >= nClass {
			return nil, fmt.Errorf("circuit: label %d of training vector %d outside [0,%d)", k, m, nClass)
		}
	}
	weights, err := checkWeights(w, M)
	if err != nil {
		return nil, err
	}
	nm, nd, nc := RegisterSizes(M, d, nClass)
	D := 1 << nd
	xt, err := unitPadded(test, D)
	if err != nil {
		return nil, fmt.Errorf("circuit: test vector: %w", err)
	}
	xs := make([][]float64, M)
	for m, row := range train {
		if xs[m], err = unitPadded(row, D); err != nil {
			return nil, fmt.Errorf("circuit: training vector %d: %w", m, err)
		}
	}

	c := &Circuit{NQubits: 1 + nm + nd + nc}
	q := 1
	c.Regs.Ancilla = 0
	c.Regs.Index, q = seq(q, nm)
	c.Regs.Data, q = seq(q, nd)
	c.Regs.Class, _ = seq(q, nc)
	anc := c.Regs.Ancilla

	// 1. ancilla into (|0> + |1>)/sqrt2.
	c.Ops = append(c.Ops, Op{Gate: H, Target: anc})

	// 2. index register: amplitudes sqrt(w_m), zero for m >= M.
	idxAmp := make([]float64, 1<<nm)
	for m, wm := range weights {
		idxAmp[m] = math.Sqrt(wm)
	}
	for t, angles := range treeAngles(idxAmp, nm) {
		b := nm - 1 - t // target bit
		c.Ops = append(c.Ops, Op{Gate: UCRY, Target: c.Regs.Index[b],
			Controls: append([]int(nil), c.Regs.Index[b+1:]...), Angles: angles})
	}

	// 3. data register multiplexed on (data bits above the target, ancilla, index).
	// trees[a + 2m] holds the level angles of the vector for ancilla a, index m.
	zero := make([]float64, D)
	trees := make([][][]float64, 2<<nm)
	for m := 0; m < 1<<nm; m++ {
		trees[2*m] = treeAngles(xt, nd)
		if m < M {
			trees[2*m+1] = treeAngles(xs[m], nd)
		} else {
			trees[2*m+1] = treeAngles(zero, nd) // amplitude 0 on this branch
		}
	}
	for t := 0; t < nd; t++ {
		b := nd - 1 - t
		ctrl := append([]int(nil), c.Regs.Data[b+1:]...)
		ctrl = append(ctrl, anc)
		ctrl = append(ctrl, c.Regs.Index...)
		angles := make([]float64, 1<<len(ctrl))
		for am, tree := range trees {
			copy(angles[am<<t:(am+1)<<t], tree[t])
		}
		c.Ops = append(c.Ops, Op{Gate: UCRY, Target: c.Regs.Data[b], Controls: ctrl, Angles: angles})
	}

	// 4. class register: RY(pi) on class bit j where bit j of y_m is set.
	for j, cq := range c.Regs.Class {
		angles := make([]float64, 1<<nm)
		for m, k := range y {
			if k>>j&1 == 1 {
				angles[m] = math.Pi
			}
		}
		c.Ops = append(c.Ops, Op{Gate: UCRY, Target: cq,
			Controls: append([]int(nil), c.Regs.Index...), Angles: angles})
	}

	// 5. interference and read-out.
	c.Ops = append(c.Ops, Op{Gate: H, Target: anc}, Op{Gate: Measure, Target: anc})
	for _, cq := range c.Regs.Class {
		c.Ops = append(c.Ops, Op{Gate: Measure, Target: cq})
	}
	for i := range c.Ops {
		if len(c.Ops[i].Controls) == 0 {
			c.Ops[i].Controls = nil
		}
	}
	return c, nil
}

// seq returns the n consecutive qubits starting at q and the next free qubit.
func seq(q, n int) ([]int, int) {
	if n == 0 {
		return nil, q
	}
	s := make([]int, n)
	for i := range s {
		s[i] = q + i
	}
	return s, q + n
}

// checkWeights validates w and returns weights summing to 1 (uniform if w is nil).
func checkWeights(w []float64, M int) ([]float64, error) {
	out := make([]float64, M)
	if w == nil {
		for i := range out {
			out[i] = 1 / float64(M)
		}
		return out, nil
	}
	sum := 0.0
	for m, v := range w {
		if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
			return nil, fmt.Errorf("circuit: weight %d = %v, want finite and non-negative", m, v)
		}
		sum += v
	}
	if math.Abs(sum-1) > WeightTol {
		return nil, fmt.Errorf("circuit: weights sum to %.17g, want 1 (within %g)", sum, WeightTol)
	}
	for m, v := range w {
		out[m] = v / sum
	}
	return out, nil
}

// unitPadded returns x / ||x|| zero padded to length D.
func unitPadded(x []float64, D int) ([]float64, error) {
	// Scale by the largest magnitude first so the norm neither overflows nor underflows.
	big := 0.0
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("feature %d = %v not finite", i, v)
		}
		big = max(big, math.Abs(v))
	}
	if big == 0 {
		return nil, ErrZeroVector
	}
	out := make([]float64, D)
	ss := 0.0
	for i, v := range x {
		out[i] = v / big
		ss += out[i] * out[i]
	}
	norm := math.Sqrt(ss)
	for i := range x {
		out[i] /= norm
	}
	return out, nil
}

// treeAngles returns the RY angles that prepare the real vector v (length
// 2^n, unit norm or zero) from |0...0> with a binary tree of uniformly
// controlled rotations. Level t targets bit b = n-1-t; its angle vector is
// indexed by the prefix p = i >> (b+1) of the more significant bits. For
// b > 0 the angle is 2 atan2(||v on bit b = 1||, ||v on bit b = 0||) within the
// block of prefix p; for b = 0 it is 2 atan2(v[2p+1], v[2p]), which carries
// the sign. A block of norm zero gets angle 0.
func treeAngles(v []float64, n int) [][]float64 {
	levels := make([][]float64, n)
	// sq[i] holds squared norms of blocks at the current level, built bottom up.
	sq := make([]float64, len(v))
	for i, x := range v {
		sq[i] = x * x
	}
	for t := n - 1; t >= 0; t-- {
		b := n - 1 - t
		angles := make([]float64, 1<<t)
		for p := range angles {
			if b == 0 {
				angles[p] = 2 * math.Atan2(v[2*p+1], v[2*p])
			} else {
				angles[p] = 2 * math.Atan2(math.Sqrt(sq[2*p+1]), math.Sqrt(sq[2*p]))
			}
		}
		levels[t] = angles
		next := make([]float64, len(sq)/2)
		for i := range next {
			next[i] = sq[2*i] + sq[2*i+1]
		}
		sq = next
	}
	return levels
}

// BalancedWeights returns the class-balancing index weights
// w_m = 1/(C' M_{y_m}), where M_k is the number of training vectors of class k
// and C' the number of classes that occur in y, so that every class present
// carries total weight 1/C'. Labels must lie in [0, nClass).
func BalancedWeights(y []int, nClass int) ([]float64, error) {
	if len(y) == 0 {
		return nil, fmt.Errorf("circuit: no labels")
	}
	if nClass < 1 {
		return nil, fmt.Errorf("circuit: %d classes, need at least 1", nClass)
	}
	count := make([]int, nClass)
	for m, k := range y {
		if k < 0 || k >= nClass {
			return nil, fmt.Errorf("circuit: label %d of training vector %d outside [0,%d)", k, m, nClass)
		}
		count[k]++
	}
	present := 0
	for _, n := range count {
		if n > 0 {
			present++
		}
	}
	w := make([]float64, len(y))
	for m, k := range y {
		w[m] = 1 / float64(present*count[k])
	}
	return w, nil
}
