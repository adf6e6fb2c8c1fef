package circuit

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"reflect"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/datasets"
)

// probs returns the basis-state probabilities of ops applied to |0...0>.
func probs(n int, ops []Op) []float64 {
	psi := naiveRun(&Circuit{NQubits: n}, ops)
	p := make([]float64, len(psi))
	for i, a := range psi {
		p[i] = real(a)*real(a) + imag(a)*imag(a)
	}
	return p
}

// checkSameProbs compares the full basis distributions of two op lists.
// 1e-12: Simplify drops rotations of angle at most AngleTol (1e-12), each
// moving a probability by less than that, and the rest is exact up to
// rounding (~1e-16 per gate).
func checkSameProbs(t *testing.T, where string, n int, a, b []Op) {
	t.Helper()
	pa, pb := probs(n, a), probs(n, b)
	for i := range pa {
		if !scalar.EqualWithinAbs(pa[i], pb[i], 1e-12) {
			t.Fatalf("%s: P[%d] = %v simplified, %v unsimplified", where, i, pb[i], pa[i])
		}
	}
}

// TestSimplifyCases checks each rewrite on a hand-made circuit; the
// expected results are derived by hand from the rules in Simplify's doc.
func TestSimplifyCases(t *testing.T) {
	ry := func(q int, a float64) Op { return Op{Gate: RY, Target: q, Angle: a} }
	cx := func(c, q int) Op { return Op{Gate: CNOT, Controls: []int{c}, Target: q} }
	for _, tc := range []struct {
		name string
		in   []Op
		want []Op
	}{
		{"zero", []Op{ry(0, 0)}, nil},
		{"2pi", []Op{ry(0, 2*math.Pi+1e-13), {Gate: RZ, Target: 1, Angle: -4 * math.Pi}}, nil},
		{"not dead", []Op{ry(0, 1e-11)}, []Op{ry(0, 1e-11)}},
		{"merge", []Op{ry(0, 0.25), ry(0, 0.5)}, []Op{ry(0, 0.75)}},
		{"merge to zero", []Op{ry(0, 0.3), ry(0, -0.3)}, nil},
		{"merge wraps 4pi", []Op{ry(0, 3), ry(0, 4)}, []Op{ry(0, 7-4*math.Pi)}},
		{"other qubit between", []Op{ry(0, 0.25), {Gate: H, Target: 1}, ry(0, 0.5)}, []Op{ry(0, 0.75), {Gate: H, Target: 1}}},
		{"blocked", []Op{ry(1, 0.25), cx(0, 1), ry(1, 0.5)}, []Op{ry(1, 0.25), cx(0, 1), ry(1, 0.5)}},
		{"axes differ", []Op{ry(0, 0.25), {Gate: RZ, Target: 0, Angle: 0.5}}, []Op{ry(0, 0.25), {Gate: RZ, Target: 0, Angle: 0.5}}},
		{"cnot pair", []Op{cx(0, 1), cx(0, 1)}, nil},
		{"cnot reversed", []Op{cx(0, 1), cx(1, 0)}, []Op{cx(0, 1), cx(1, 0)}},
		{"cascade", []Op{cx(0, 1), cx(2, 3), cx(2, 3), cx(0, 1)}, nil},
		{"dead exposes pair", []Op{cx(0, 1), ry(1, 0), cx(0, 1), ry(1, 0.5)}, []Op{ry(1, 0.5)}},
		{"shared target commutes", []Op{cx(0, 2), cx(1, 2), cx(0, 2), cx(1, 2)}, nil},
		{"shared control commutes", []Op{cx(0, 1), cx(0, 2), cx(0, 1)}, []Op{cx(0, 2)}},
		{"no commutation", []Op{cx(0, 1), cx(1, 2), cx(0, 1)}, []Op{cx(0, 1), cx(1, 2), cx(0, 1)}},
		{"control used as target", []Op{cx(0, 1), cx(2, 0), cx(0, 1)}, []Op{cx(0, 1), cx(2, 0), cx(0, 1)}},
		{"h h", []Op{{Gate: H, Target: 0}, {Gate: H, Target: 0}}, nil},
		{"sx sx is x", []Op{{Gate: SX, Target: 0}, {Gate: SX, Target: 0}}, []Op{{Gate: X, Target: 0}}},
		{"x sx sx", []Op{{Gate: X, Target: 0}, {Gate: SX, Target: 0}, {Gate: SX, Target: 0}}, nil},
		{"cz symmetric", []Op{{Gate: CZ, Controls: []int{0}, Target: 1}, {Gate: CZ, Controls: []int{1}, Target: 0}}, nil},
		{"swap pair", []Op{{Gate: SWAP, Controls: []int{2}, Target: 1}, {Gate: SWAP, Controls: []int{1}, Target: 2}}, nil},
		{"measure blocks", []Op{{Gate: H, Target: 1}, {Gate: Measure, Target: 0}, ry(0, 0)}, []Op{{Gate: H, Target: 1}, {Gate: Measure, Target: 0}}},
	} {
		c := &Circuit{NQubits: 4, Regs: Layout{Ancilla: 3}, Ops: tc.in}
		got := Simplify(c).Ops
		if len(got) == 0 {
			got = nil
		}
		if len(got) != len(tc.want) {
			t.Errorf("%s: got %v, want %v", tc.name, got, tc.want)
			continue
		}
		for i := range got {
			g, w := got[i], tc.want[i]
			// 1e-15: one addition and at most one subtraction of 4 pi.
			if g.Gate != w.Gate || g.Target != w.Target || !reflect.DeepEqual(g.Controls, w.Controls) ||
				!scalar.EqualWithinAbs(g.Angle, w.Angle, 1e-15) {
				t.Errorf("%s: op %d = %+v, want %+v", tc.name, i, g, w)
			}
		}
		if tc.name != "measure blocks" {
			checkSameProbs(t, tc.name, 4, tc.in, Simplify(c).Ops)
		}
	}
}

// randomGates builds a circuit of elementary gates that is rich in dead
// rotations, mergeable rotations and cancelling pairs.
func randomGates(rng *rand.Rand, n, size int) *Circuit {
	angles := []float64{0, 2 * math.Pi, -2 * math.Pi, 4 * math.Pi, 1e-13, math.Pi / 2, -math.Pi, 0}
	c := &Circuit{NQubits: n, Regs: Layout{Ancilla: 0}}
	gates := []Gate{H, X, SX, RX, RY, RZ, CNOT, CZ, SWAP}
	for len(c.Ops) < size {
		g := gates[rng.IntN(len(gates))]
		op := Op{Gate: g, Target: rng.IntN(n)}
		switch g {
		case RX, RY, RZ:
			op.Angle = rng.NormFloat64() * 3
			if rng.IntN(2) == 0 {
				op.Angle = angles[rng.IntN(len(angles))]
			}
		case CNOT, CZ, SWAP:
			o := (op.Target + 1 + rng.IntN(n-1)) % n
			op.Controls = []int{o}
		}
		c.Ops = append(c.Ops, op)
		if rng.IntN(3) == 0 { // repeat the gate (a pair to cancel or merge)
			op2 := op.clone()
			if g == RX || g == RY || g == RZ {
				op2.Angle = -op.Angle
				if rng.IntN(2) == 0 {
					op2.Angle = rng.NormFloat64()
				}
			}
			c.Ops = append(c.Ops, op2)
		}
	}
	return c
}

// TestSimplifyRandom: on random circuits Simplify keeps the full output
// distribution (1e-12, see checkSameProbs), never adds gates, keeps a
// valid circuit, and is idempotent (a property: Simplify is a fixed point
// of its own rewrites, so a second call returns the same operations).
func TestSimplifyRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	for trial := range 300 {
		n := 2 + rng.IntN(4)
		c := randomGates(rng, n, 5+rng.IntN(40))
		s := Simplify(c)
		if err := s.Validate(); err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		if len(s.Ops) > len(c.Ops) {
			t.Fatalf("trial %d: %d ops from %d", trial, len(s.Ops), len(c.Ops))
		}
		checkSameProbs(t, "random", n, c.Ops, s.Ops)
		// Amplitudes agree up to one global phase: |<a|b>| = 1.
		a, b := naiveRun(c, c.Ops), naiveRun(s, s.Ops)
		var ip complex128
		for i := range a {
			ip += cmplx.Conj(a[i]) * b[i]
		}
		// 1e-12: as in checkSameProbs.
		if !scalar.EqualWithinAbs(cmplx.Abs(ip), 1, 1e-12) {
			t.Fatalf("trial %d: |<raw|simplified>| = %v, want 1", trial, cmplx.Abs(ip))
		}
		again := Simplify(s)
		if !reflect.DeepEqual(again.Ops, s.Ops) {
			t.Fatalf("trial %d: Simplify not idempotent:\n%v\n%v", trial, s.Ops, again.Ops)
		}
		for _, op := range s.Ops {
			if (op.Gate == RX || op.Gate == RY || op.Gate == RZ) && Dead(op.Angle) {
				t.Fatalf("trial %d: dead rotation %+v left", trial, op)
			}
		}
	}
}

// TestDecomposeDatasets compiles small instances of every embedded dataset
// (datasets.Load) and random instances, and checks that the decomposed
// (simplified) circuit gives the same full output distribution as the raw
// Gray-code expansion (1e-12, see checkSameProbs), that its counts stay
// within the published formula (which the raw expansion meets exactly, see
// TestCompileResources), and that Decompose is idempotent under Simplify.
func TestDecomposeDatasets(t *testing.T) {
	type inst struct {
		name string
		in   instance
	}
	var cases []inst
	for _, name := range datasets.Names() {
		d, err := datasets.Load(name)
		if err != nil {
			t.Fatal(err)
		}
		rows, _ := d.X.Dims()
		for _, M := range []int{3, 4} {
			in := instance{test: d.X.RawRowView(0), nClass: len(d.Classes)}
			for m := range M {
				// Spread the training rows over the file so that classes mix.
				r := 1 + m*(rows-1)/M
				in.train = append(in.train, d.X.RawRowView(r))
				in.y = append(in.y, d.Y[r])
			}
			cases = append(cases, inst{name, in})
		}
	}
	rng := rand.New(rand.NewPCG(43, 44))
	for _, tc := range []struct{ M, d, C int }{{2, 2, 2}, {4, 4, 2}, {5, 3, 3}, {8, 2, 4}} {
		cases = append(cases, inst{"random", randomInstance(rng, tc.M, tc.d, tc.C, tc.M%2 == 0)})
	}
	pow := func(k int) int { return 1 << k }
	for _, tc := range cases {
		c, err := Compile(tc.in.test, tc.in.train, tc.in.y, tc.in.nClass, tc.in.w)
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		if c.NQubits > 14 {
			continue // the naive reference needs 2^n amplitudes per gate
		}
		raw, dec := c.Expand(), c.Decompose()
		checkSameProbs(t, tc.name, c.NQubits, raw.Ops, dec.Ops)
		nm, nd, nc := len(c.Regs.Index), len(c.Regs.Data), len(c.Regs.Class)
		ge1 := 0
		if nm >= 1 {
			ge1 = 1
		}
		wantCX := (pow(nm)-2)*ge1 + pow(1+nm)*(pow(nd)-1) + nc*pow(nm)*ge1
		wantRY := (pow(nm) - 1) + pow(1+nm)*(pow(nd)-1) + nc*pow(nm)
		r := c.Resources()
		if r.CNOT > wantCX || r.SingleQubit > wantRY+2 {
			t.Errorf("%s: %d cx, %d single-qubit, formula bound %d and %d", tc.name, r.CNOT, r.SingleQubit, wantCX, wantRY+2)
		}
		if raw := c.RawResources(); raw.CNOT != wantCX || raw.SingleQubit != wantRY+2 {
			t.Errorf("%s: raw %d cx, %d single-qubit, formula %d and %d", tc.name, raw.CNOT, raw.SingleQubit, wantCX, wantRY+2)
		}
		if again := Simplify(dec); !reflect.DeepEqual(again.Ops, dec.Ops) {
			t.Errorf("%s: Simplify(Decompose()) changed the circuit", tc.name)
		}
		// Decompose (compact expansion and simplification) is exactly
		// Simplify(Expand()), and DecomposeElementary holds its operations.
		if ref := Simplify(raw); !reflect.DeepEqual(ref.Ops, dec.Ops) || !reflect.DeepEqual(ref.Regs, dec.Regs) {
			t.Errorf("%s: Decompose differs from Simplify(Expand())", tc.name)
		}
		el := c.DecomposeElementary()
		if len(el) != len(dec.Ops) {
			t.Fatalf("%s: %d elementary operations, Decompose has %d", tc.name, len(el), len(dec.Ops))
		}
		for i, e := range el {
			op := dec.Ops[i]
			ctl := int32(-1)
			if len(op.Controls) == 1 {
				ctl = int32(op.Controls[0])
			}
			if e.Gate != op.Gate || int(e.Target) != op.Target || e.Control != ctl || math.Float64bits(e.Angle) != math.Float64bits(op.Angle) {
				t.Fatalf("%s: operation %d: %+v, Decompose %+v", tc.name, i, e, op)
			}
		}
	}
}
