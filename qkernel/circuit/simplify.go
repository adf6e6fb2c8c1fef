package circuit

import "math"

// AngleTol is the tolerance below which Simplify treats a rotation angle as
// a multiple of 2 pi (a dead rotation): |a - 2 pi round(a / 2 pi)| <= AngleTol.
// A rotation of angle e changes amplitudes by at most |e|/2, so dropping it
// moves no probability by more than about 1e-12.
const AngleTol = 1e-12

// Dead reports whether the rotation angle a (radians) is a multiple of 2 pi
// within AngleTol. Then RX(a), RY(a) and RZ(a) equal +I or -I: a global
// phase (see Simplify).
func Dead(a float64) bool {
	return math.Abs(a-2*math.Pi*math.Round(a/(2*math.Pi))) <= AngleTol
}

// wrap4pi reduces a merged angle into [-2 pi, 2 pi] by a multiple of 4 pi,
// the period of RX, RY and RZ (exact: no phase changes).
func wrap4pi(a float64) float64 {
	return a - 4*math.Pi*math.Round(a/(4*math.Pi))
}

// Simplify returns a copy of c with dead and redundant gates removed. Two
// operations are adjacent when no operation between them acts on any of
// their qubits. The rewrites are:
//
//  1. a rotation RX, RY or RZ whose angle is a multiple of 2 pi within
//     AngleTol (Dead) is dropped;
//  2. adjacent rotations about the same axis on one qubit merge into one,
//     RY(a) RY(b) = RY(a + b) (likewise RX, RZ; Nielsen & Chuang 2010,
//     section 4.2), the sum reduced by a multiple of 4 pi into [-2 pi, 2 pi]
//     (exact); a merged rotation that is dead is dropped;
//  3. adjacent pairs of a self-inverse gate cancel: H H, X X, CZ CZ and
//     SWAP SWAP on the same two qubits (in either order);
//  4. two CNOTs with the same control c and target t cancel when every
//     operation between them on t is a CNOT onto t and every one on c is a
//     CNOT controlled by c: CNOTs sharing a target (or a control) commute,
//     since CNOT(c, t) = |0><0|_c I + |1><1|_c X_t (common practice), so
//     the pair is adjacent up to commutation; this covers the Gray-code
//     CNOT chains that dead rotations leave behind;
//  5. adjacent SX SX become X (exact: SX^2 = X), which may cancel by rule 3.
//
// Operations are taken left to right; each new operation is compared with
// the last kept operation on its qubits, and a removal exposes the one
// before it, so cascades (CNOT a, CNOT b, CNOT b, CNOT a) collapse in the
// same pass. The pass is repeated until it changes nothing (a fixed point;
// in practice one repetition confirms it). Measure and UCRY are kept
// unchanged and nothing moves across them.
//
// Global phase: RX, RY and RZ of 2 pi k equal (-1)^k I. Every operation of
// a circuit acts unconditionally on the whole state (no circuit here is
// used as a controlled sub-circuit), so dropping such a rotation multiplies
// the state by +-1: no measured probability changes (|phase * amp|^2 =
// |amp|^2, and U rho U^dagger is unchanged for a density matrix). Do not
// apply Simplify to a circuit that a caller turns into a controlled
// operation. All other rewrites are exact operator identities; measured
// probabilities change only by the dropped angles (at most about 1e-12).
//
// Simplify does not validate c (call Validate first on circuits not built
// by this package); the result is valid whenever c is.
func Simplify(c *Circuit) *Circuit {
	d := c.Clone()
	simplifyOwned(d)
	return d
}

// simplifyOwned simplifies d in place; d's operations must not share
// their control or angle lists with another circuit's (a clone or a fresh
// expansion). The passes run on a compact copy of the operations (sop)
// and the result is written back once, into d.Ops's own array.
func simplifyOwned(d *Circuit) {
	cur := make([]sop, len(d.Ops))
	for i, op := range d.Ops {
		cur[i] = sop{gate: op.Gate, t: int32(op.Target), c: -1, angle: op.Angle, src: int32(i)}
		if len(op.Controls) == 1 {
			cur[i].c = int32(op.Controls[0])
		} else if len(op.Controls) > 1 {
			cur[i].c = multi
		}
	}
	var s simplifier
	for {
		var changed bool
		cur, changed = s.pass(d.NQubits, d.Ops, cur)
		if !changed {
			break
		}
	}
	// Every kept operation comes from an operation at the same or a later
	// position (a pass never moves one forward), so writing in place never
	// overwrites an operation still to be read.
	ops := d.Ops[:len(cur)]
	for w, so := range cur {
		switch {
		case so.src < 0:
			ops[w] = Op{Gate: so.gate, Target: int(so.t)}
		default:
			op := d.Ops[so.src]
			op.Angle = so.angle
			ops[w] = op
		}
	}
	clear(d.Ops[len(cur):]) // drop references held by the removed tail
	d.Ops = ops
}

// sop is an operation inside Simplify: its gate, target, single other
// qubit (-1 for none, multi for several: read them from the source
// operation), angle, and the index of the operation it came from in the
// circuit being simplified (-1 for an X made from SX SX).
type sop struct {
	gate  Gate
	t, c  int32
	angle float64
	src   int32
}

// multi marks an operation with several controls (UCRY).
const multi = -2

// simplifier holds the scratch space of Simplify's passes.
type simplifier struct {
	top   [][]int32 // per qubit: indices into out of its live operations
	alive []bool
	buf   []sop
}

// commutingCNOT returns the index in out of a live CNOT(c, t) that an
// incoming CNOT(c, t) cancels, or -1: the nearest CNOT(c, t) such that
// every live operation after it on t is a CNOT onto t and every one after
// it on c is a CNOT controlled by c (these commute with CNOT(c, t)).
func commutingCNOT(out []sop, top [][]int32, c, t int32) int32 {
	st := top[t]
	for j := len(st) - 1; j >= 0; j-- {
		o := out[st[j]]
		if o.gate != CNOT || o.t != t {
			return -1
		}
		if o.c != c {
			continue
		}
		i := st[j]
		sc := top[c]
		for k := len(sc) - 1; k >= 0 && sc[k] != i; k-- {
			if p := out[sc[k]]; p.gate != CNOT || p.c != c {
				return -1
			}
		}
		return i
	}
	return -1
}

// remove deletes index i from the live-operation stack of qubit q.
func remove(top [][]int32, q, i int32) {
	s := top[q]
	for k := len(s) - 1; k >= 0; k-- {
		if s[k] == i {
			top[q] = append(s[:k], s[k+1:]...)
			return
		}
	}
	panic("circuit: simplify lost track of an operation") // broken internal invariant
}

// pass runs the rewrites of Simplify once over in (compact operations of
// the circuit whose operations are ops) and returns the kept operations
// and whether anything changed. The result may share in's array.
func (s *simplifier) pass(n int, ops []Op, in []sop) ([]sop, bool) {
	out := s.buf[:0]
	if cap(out) < len(in) {
		out = make([]sop, 0, len(in))
	}
	alive := s.alive[:0]
	if cap(alive) < len(in) {
		alive = make([]bool, 0, len(in))
	}
	if s.top == nil {
		s.top = make([][]int32, n)
	}
	top := s.top
	for q := range top {
		top[q] = top[q][:0]
	}
	changed := false
	last := func(q int32) int32 {
		if s := top[q]; len(s) > 0 {
			return s[len(s)-1]
		}
		return -1
	}
	pop := func(q int32) { top[q] = top[q][:len(top[q])-1] }
	var insert func(op sop)
	insert = func(op sop) {
		switch op.gate {
		case RX, RY, RZ:
			q := op.t
			if i := last(q); i >= 0 && out[i].gate == op.gate {
				changed = true
				a := wrap4pi(out[i].angle + op.angle)
				if Dead(a) {
					alive[i] = false
					pop(q)
				} else {
					out[i].angle = a
				}
				return
			}
			if Dead(op.angle) {
				changed = true
				return
			}
		case H, X:
			q := op.t
			if i := last(q); i >= 0 && out[i].gate == op.gate {
				changed = true
				alive[i] = false
				pop(q)
				return
			}
		case SX:
			q := op.t
			if i := last(q); i >= 0 && out[i].gate == SX {
				changed = true
				alive[i] = false
				pop(q)
				insert(sop{gate: X, t: q, c: -1, src: -1})
				return
			}
		case CNOT:
			if i := commutingCNOT(out, top, op.c, op.t); i >= 0 {
				changed = true
				alive[i] = false
				remove(top, op.c, i)
				remove(top, op.t, i)
				return
			}
		case CZ, SWAP:
			a, b := op.c, op.t
			if i := last(a); i >= 0 && i == last(b) && out[i].gate == op.gate {
				// CZ and SWAP are symmetric: either orientation cancels.
				changed = true
				alive[i] = false
				pop(a)
				pop(b)
				return
			}
		}
		idx := int32(len(out))
		out = append(out, op)
		alive = append(alive, true)
		top[op.t] = append(top[op.t], idx)
		switch {
		case op.c >= 0:
			top[op.c] = append(top[op.c], idx)
		case op.c == multi:
			for _, q := range ops[op.src].Controls {
				top[q] = append(top[q], idx)
			}
		}
	}
	for _, op := range in {
		insert(op)
	}
	kept := in[:0] // in is read: write the kept operations over it
	for i, op := range out {
		if alive[i] {
			kept = append(kept, op)
		}
	}
	s.buf, s.alive = out, alive
	return kept, changed
}
