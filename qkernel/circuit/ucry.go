package circuit

import "math/bits"

// grayAngles returns the RY angles theta of the Gray-code decomposition of a
// uniformly controlled RY with multiplexed angles alpha (len 2^k).
//
// The decomposition (Möttönen, Vartiainen, Bergholm & Salomaa,
// quant-ph/0407010, eqs. (3)-(5)) is the sequence
//
//	RY(theta_0) CNOT(c_{t_0}) RY(theta_1) CNOT(c_{t_1}) ... RY(theta_{N-1}) CNOT(c_{t_{N-1}})
//
// with N = 2^k, where CNOT i is controlled by the bit t_i in which the Gray
// codes g_i = i ^ (i>>1) and g_{i+1 mod N} differ. Since X RY(t) X = RY(-t),
// control value j sees the total rotation
//
//	alpha_j = sum_i (-1)^popcount(j & g_i) theta_i,
//
// a Walsh–Hadamard matrix with columns in Gray-code order. Its inverse is
// 2^-k times its transpose, so theta_i = 2^-k WHT(alpha)[g_i], computed
// with the fast Walsh–Hadamard transform in O(N log N).
func grayAngles(alpha []float64) []float64 {
	n := len(alpha)
	w := append([]float64(nil), alpha...)
	for h := 1; h < n; h <<= 1 {
		for i := 0; i < n; i += 2 * h {
			for j := i; j < i+h; j++ {
				a, b := w[j], w[j+h]
				w[j], w[j+h] = a+b, a-b
			}
		}
	}
	theta := make([]float64, n)
	scale := 1 / float64(n)
	for i := range theta {
		theta[i] = w[i^(i>>1)] * scale
	}
	return theta
}

// grayControl returns the position of the control bit of the i-th CNOT in
// the Gray-code decomposition with k controls: the bit in which g_i and
// g_{i+1 mod 2^k} differ.
func grayControl(i, k int) int {
	if i == 1<<k-1 {
		return k - 1 // g_{N-1} = 1 << (k-1), g_0 = 0
	}
	return bits.TrailingZeros(uint(i + 1))
}

// decomposeUCRY expands one UCRY into 2^k RY and, for k >= 1, 2^k CNOT,
// appended to out.
func decomposeUCRY(out []Op, op Op) []Op {
	k := len(op.Controls)
	if k == 0 {
		return append(out, Op{Gate: RY, Target: op.Target, Angle: op.Angles[0]})
	}
	theta := grayAngles(op.Angles)
	ctl := make([]int, len(theta)) // one backing array for the CNOT controls
	for i, t := range theta {
		ctl[i] = op.Controls[grayControl(i, k)]
		out = append(out,
			Op{Gate: RY, Target: op.Target, Angle: t},
			Op{Gate: CNOT, Target: op.Target, Controls: ctl[i : i+1 : i+1]})
	}
	return out
}

// Expand returns a new circuit in which every UCRY is replaced by its
// Gray-code sequence of RY and CNOT gates (quant-ph/0407010): a UCRY with k
// controls becomes 2^k RY and 2^k CNOT (k >= 1), or one RY (k = 0). Every
// other operation is copied unchanged, and the expanded circuit acts on
// every state exactly as the original (up to rounding of the angles). Its
// gate counts are those of the formula in the package documentation; many
// of its rotations can be dead (angle 0) and CNOTs can meet in cancelling
// pairs. Decompose is Expand followed by Simplify.
func (c *Circuit) Expand() *Circuit {
	size := 0
	for _, op := range c.Ops {
		switch {
		case op.Gate != UCRY:
			size++
		case len(op.Controls) == 0:
			size++
		default:
			size += 2 << len(op.Controls)
		}
	}
	d := c.Clone() // registers and the copies of the non-UCRY operations
	ops := make([]Op, 0, size)
	for _, op := range d.Ops {
		if op.Gate == UCRY {
			ops = decomposeUCRY(ops, op)
			continue
		}
		ops = append(ops, op)
	}
	d.Ops = ops
	return d
}

// Decompose returns the elementary-gate form of the circuit that the
// simulators, Resources and the OpenQASM exporters use: Expand followed by
// Simplify (dead rotations dropped, adjacent rotations merged, adjacent
// CNOT pairs cancelled). It acts on every state as the original circuit up
// to a global phase and the dropped angles (at most AngleTol each), so
// every measured probability is unchanged to about 1e-12.
func (c *Circuit) Decompose() *Circuit {
	el := c.decomposeCompact()
	d := &Circuit{NQubits: c.NQubits, Regs: Layout{
		Ancilla: c.Regs.Ancilla,
		Index:   append([]int(nil), c.Regs.Index...),
		Data:    append([]int(nil), c.Regs.Data...),
		Class:   append([]int(nil), c.Regs.Class...),
	}, Ops: make([]Op, len(el))}
	two := 0
	for _, so := range el {
		if so.c >= 0 {
			two++
		}
	}
	ctl := make([]int, two) // one backing array for the controls
	k := 0
	for i, so := range el {
		op := Op{Gate: so.gate, Target: int(so.t), Angle: so.angle}
		if so.c >= 0 {
			ctl[k] = int(so.c)
			op.Controls = ctl[k : k+1 : k+1]
			k++
		}
		d.Ops[i] = op
	}
	return d
}

// Elementary is one operation of a decomposed circuit in compact form:
// its gate, target, control (the other qubit of CNOT, CZ and SWAP; -1 for
// none) and angle (RX, RY, RZ).
type Elementary struct {
	Gate    Gate
	Target  int32
	Control int32
	Angle   float64
}

// DecomposeElementary returns the operations of Decompose, the same gates
// in the same order, in compact form, without building them as Ops: the
// form for a compiler that rewrites millions of gates (Op holds two
// slices, which cost memory and the garbage collector's time). The
// circuit must be valid (Validate).
func (c *Circuit) DecomposeElementary() []Elementary {
	el := c.decomposeCompact()
	out := make([]Elementary, len(el))
	for i, so := range el {
		out[i] = Elementary{Gate: so.gate, Target: so.t, Control: so.c, Angle: so.angle}
	}
	return out
}

// decomposeCompact expands every UCRY (as Expand) straight into compact
// operations and simplifies them to a fixed point (as Simplify). After
// the expansion every operation has at most one control.
func (c *Circuit) decomposeCompact() []sop {
	size := 0
	for _, op := range c.Ops {
		switch {
		case op.Gate != UCRY, len(op.Controls) == 0:
			size++
		default:
			size += 2 << len(op.Controls)
		}
	}
	el := make([]sop, 0, size)
	for _, op := range c.Ops {
		switch {
		case op.Gate == UCRY && len(op.Controls) == 0:
			el = append(el, sop{gate: RY, t: int32(op.Target), c: -1, angle: op.Angles[0], src: -1})
		case op.Gate == UCRY:
			theta := grayAngles(op.Angles)
			k := len(op.Controls)
			for i, th := range theta {
				el = append(el,
					sop{gate: RY, t: int32(op.Target), c: -1, angle: th, src: -1},
					sop{gate: CNOT, t: int32(op.Target), c: int32(op.Controls[grayControl(i, k)]), src: -1})
			}
		default:
			so := sop{gate: op.Gate, t: int32(op.Target), c: -1, angle: op.Angle, src: -1}
			if len(op.Controls) == 1 {
				so.c = int32(op.Controls[0])
			}
			el = append(el, so)
		}
	}
	var s simplifier
	for {
		var changed bool
		el, changed = s.pass(c.NQubits, nil, el)
		if !changed {
			return el
		}
	}
}
