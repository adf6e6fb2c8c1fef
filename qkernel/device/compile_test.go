package device

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"reflect"
	"slices"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/datasets"
	"fringe/qkernel/circuit"
	"fringe/qkernel/sim"
)

// phaseEqual reports whether a = exp(i phi) b for some phi, within tol per
// entry.
func phaseEqual(a, b mat2, tol float64) bool {
	// Fix the phase on the largest entry of b.
	bi, bj, big := 0, 0, 0.0
	for i := range 2 {
		for j := range 2 {
			if v := cmplx.Abs(b[i][j]); v > big {
				bi, bj, big = i, j, v
			}
		}
	}
	ph := a[bi][bj] / b[bi][bj]
	ph /= complex(cmplx.Abs(ph), 0)
	for i := range 2 {
		for j := range 2 {
			if cmplx.Abs(a[i][j]-ph*b[i][j]) > tol {
				return false
			}
		}
	}
	return true
}

func product(gs []gate) mat2 {
	u := ident2
	for _, g := range gs {
		u = mul2(gateMat2(g.kind, g.angle), u)
	}
	return u
}

// TestSynth checks the native one-qubit synthesis (synth's doc lists the
// identities, derived by hand) on random unitaries and on the special
// cases: the product of the emitted gates equals the input up to a global
// phase (1e-12: a few products and one Euler extraction, ~1e-15 each),
// only native gates appear, and the counts are the documented ones.
func TestSynth(t *testing.T) {
	rng := rand.New(rand.NewPCG(61, 62))
	native := map[Family]map[circuit.Gate]bool{
		FamilyCX: {circuit.RZ: true, circuit.SX: true, circuit.X: true},
		FamilyCZ: {circuit.RZ: true, circuit.RX: true, circuit.RY: true},
	}
	rot := func(g circuit.Gate, a float64) mat2 { return gateMat2(g, a) }
	var us []mat2
	for range 200 {
		u := mul2(rot(circuit.RZ, rng.Float64()*7-3.5), mul2(rot(circuit.RY, rng.Float64()*7-3.5), rot(circuit.RZ, rng.Float64()*7-3.5)))
		us = append(us, u)
	}
	type special struct {
		name    string
		u       mat2
		cx, cz  int // gate counts in each family
		cxFirst circuit.Gate
	}
	specials := []special{
		{"identity", ident2, 0, 0, 0},
		{"x", rot(circuit.X, 0), 1, 1, 0},
		{"h", rot(circuit.H, 0), 3, 2, 0},
		{"sx", rot(circuit.SX, 0), 1, 1, 0},
		{"rz", rot(circuit.RZ, 0.4), 1, 1, 0},
		{"ry", rot(circuit.RY, 0.4), 4, 1, 0}, // sx, rz, sx, rz(pi)
		{"rx", rot(circuit.RX, 0.4), 5, 1, 0},
		{"ry(pi/2)", rot(circuit.RY, math.Pi/2), 3, 1, 0},
		{"ry(pi)", rot(circuit.RY, math.Pi), 2, 1, 0},
		{"-i y", mul2(rot(circuit.X, 0), rot(circuit.RZ, math.Pi)), 2, 1, 0},
	}
	for _, s := range specials {
		us = append(us, s.u)
	}
	for i, u := range us {
		for _, fam := range Families() {
			gs := synth(nil, fam, u, 0)
			if !phaseEqual(product(gs), u, 1e-12) {
				t.Fatalf("%s, unitary %d: synthesis %v is not the unitary up to phase", fam, i, gs)
			}
			for _, g := range gs {
				if !native[fam][g.kind] {
					t.Fatalf("%s: non-native gate %s", fam, g.kind)
				}
				if (g.kind == circuit.RZ || g.kind == circuit.RX || g.kind == circuit.RY) && circuit.Dead(g.angle) {
					t.Fatalf("%s: dead rotation %+v", fam, g)
				}
			}
			limit := map[Family]int{FamilyCX: 5, FamilyCZ: 3}[fam]
			if len(gs) > limit {
				t.Fatalf("%s: %d gates for a one-qubit unitary, at most %d", fam, len(gs), limit)
			}
			if j := i - (len(us) - len(specials)); j >= 0 {
				want := map[Family]int{FamilyCX: specials[j].cx, FamilyCZ: specials[j].cz}[fam]
				if len(gs) != want {
					t.Errorf("%s %s: %d gates %v, want %d", fam, specials[j].name, len(gs), gs, want)
				}
			}
		}
	}
}

// twoQubit returns the 4x4 unitary of two-qubit gates on qubits 0 and 1 by
// applying them to the basis states (the simulator of package sim).
func twoQubit(t *testing.T, ops []circuit.Op) [4][4]complex128 {
	t.Helper()
	var u [4][4]complex128
	for col := range 4 {
		s, _ := sim.NewState(2)
		s.Amp[0] = 0
		s.Amp[col] = 1
		for _, op := range ops {
			s.ApplyOp(op)
		}
		for row := range 4 {
			u[row][col] = s.Amp[row]
		}
	}
	return u
}

// TestTwoQubitTranslation checks the translations of CNOT and SWAP that
// merger.cnot and Compile use as 4x4 unitaries up to a global phase (1e-12,
// rounding only): CNOT from the reversed CNOT and four Hadamards, CNOT from
// CZ between RY(-pi/2) and RY(pi/2) on the target, SWAP from three CNOTs.
func TestTwoQubitTranslation(t *testing.T) {
	cx := func(c, q int) circuit.Op { return circuit.Op{Gate: circuit.CNOT, Controls: []int{c}, Target: q} }
	one := func(g circuit.Gate, q int, a float64) circuit.Op { return circuit.Op{Gate: g, Target: q, Angle: a} }
	for _, tc := range []struct {
		name       string
		want, have []circuit.Op
	}{
		{"cx reversed", []circuit.Op{cx(0, 1)}, []circuit.Op{one(circuit.H, 0, 0), one(circuit.H, 1, 0), cx(1, 0), one(circuit.H, 0, 0), one(circuit.H, 1, 0)}},
		{"cx from cz", []circuit.Op{cx(0, 1)}, []circuit.Op{one(circuit.RY, 1, -math.Pi/2), {Gate: circuit.CZ, Controls: []int{0}, Target: 1}, one(circuit.RY, 1, math.Pi/2)}},
		{"swap", []circuit.Op{{Gate: circuit.SWAP, Controls: []int{0}, Target: 1}}, []circuit.Op{cx(0, 1), cx(1, 0), cx(0, 1)}},
	} {
		a, b := twoQubit(t, tc.want), twoQubit(t, tc.have)
		var ph complex128
		for i := range 4 {
			for j := range 4 {
				if ph == 0 && cmplx.Abs(a[i][j]) > 0.5 {
					ph = b[i][j] / a[i][j]
				}
			}
		}
		for i := range 4 {
			for j := range 4 {
				if cmplx.Abs(b[i][j]-ph*a[i][j]) > 1e-12 {
					t.Fatalf("%s: entry %d,%d = %v, want %v (phase %v)", tc.name, i, j, b[i][j], a[i][j], ph)
				}
			}
		}
	}
}

// smallCase compiles an instance of a dataset: the test row 0 and M
// training rows spread over the file (so that classes mix), raw features
// (Compile normalises).
func smallCase(t testing.TB, name string, M int) *circuit.Circuit {
	t.Helper()
	d, err := datasets.Load(name)
	if err != nil {
		t.Fatal(err)
	}
	rows, _ := d.X.Dims()
	var train [][]float64
	var y []int
	for m := range M {
		r := 1 + m*(rows-1)/M
		train = append(train, d.X.RawRowView(r))
		y = append(y, d.Y[r])
	}
	w, err := circuit.BalancedWeights(y, len(d.Classes))
	if err != nil {
		t.Fatal(err)
	}
	c, err := circuit.Compile(d.X.RawRowView(0), train, y, len(d.Classes), w)
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// accProbs returns p_acc = sum_k P(0, k) and P(k | acc) from a joint
// distribution in the layout of sim.Simulate.
func accProbs(p []float64) (float64, []float64) {
	h := len(p) / 2
	acc := 0.0
	for _, v := range p[:h] {
		acc += v
	}
	out := make([]float64, h)
	for k := range out {
		out[k] = p[k] / acc
	}
	return acc, out
}

// checkNative checks that every gate of a compiled program is native,
// two-qubit gates on edges in a native orientation, and that nothing
// leaves the region.
func checkNative(t *testing.T, p *Program) {
	t.Helper()
	d := p.Device
	allowed := map[Family]map[circuit.Gate]bool{
		FamilyCX: {circuit.RZ: true, circuit.SX: true, circuit.X: true, circuit.CNOT: true, circuit.Measure: true},
		FamilyCZ: {circuit.RZ: true, circuit.RX: true, circuit.RY: true, circuit.CZ: true, circuit.Measure: true},
	}[d.Family]
	in := make([]bool, d.N())
	for _, q := range p.Region {
		in[q] = true
	}
	for i, op := range p.Circuit().Ops {
		if !allowed[op.Gate] {
			t.Fatalf("%s: op %d: gate %s not native to %s", d.Name, i, op.Gate, d.Family)
		}
		for _, q := range op.Qubits() {
			if !in[q] {
				t.Fatalf("%s: op %d on qubit %d outside the region %v", d.Name, i, q, p.Region)
			}
		}
		if len(op.Controls) == 1 && !d.Native(op.Controls[0], op.Target) && (d.Family == FamilyCX || d.EdgeIndex(op.Controls[0], op.Target) < 0) {
			t.Fatalf("%s: op %d: %s %d -> %d not native", d.Name, i, op.Gate, op.Controls[0], op.Target)
		}
	}
}

// TestRoutingPreservesCircuit: for every embedded device and small cases
// of each embedded dataset (compiled by circuit.Compile), the routed native
// circuit simulated on the state vector gives the same p_acc and class
// probabilities as the logical circuit, with the final qubit permutation
// applied (the routed circuit's registers sit at their final places).
// 1e-10: thousands of gates, each exact to ~1e-16, plus the dead angles
// (<= 1e-12 each) that Simplify and the synthesis drop.
func TestRoutingPreservesCircuit(t *testing.T) {
	for _, dn := range Names() {
		dev, err := Load(dn)
		if err != nil {
			t.Fatal(err)
		}
		for _, ds := range datasets.Names() {
			for _, M := range []int{3, 5} {
				c := smallCase(t, ds, M)
				where := fmt.Sprintf("%s/%s/M=%d", dn, ds, M)
				if c.NQubits > dev.N() {
					t.Fatalf("%s: %d qubits do not fit", where, c.NQubits)
				}
				p, err := Compile(c, dev, Options{})
				if err != nil {
					t.Fatalf("%s: %v", where, err)
				}
				checkNative(t, p)
				want, err := sim.Simulate(context.Background(), c, sim.Options{})
				if err != nil {
					t.Fatal(err)
				}
				got, err := sim.Simulate(context.Background(), p.Compact(), sim.Options{})
				if err != nil {
					t.Fatalf("%s: %v", where, err)
				}
				wa, wp := accProbs(want.P)
				ga, gp := accProbs(got.P)
				if !scalar.EqualWithinAbs(ga, wa, 1e-10) {
					t.Errorf("%s: p_acc routed %v, logical %v", where, ga, wa)
				}
				for k := range wp {
					if !scalar.EqualWithinAbs(gp[k], wp[k], 1e-10) {
						t.Errorf("%s: P(%d|acc) routed %v, logical %v", where, k, gp[k], wp[k])
					}
				}
				if dev.Name == "ions-20" && p.After.Swaps != 0 {
					t.Errorf("%s: %d swaps on an all-to-all device", where, p.After.Swaps)
				}
			}
		}
	}
}

// TestCompileDeterministic: the same circuit and device give the same
// program.
func TestCompileDeterministic(t *testing.T) {
	dev, _ := Load("heavy-27")
	c := smallCase(t, "wine", 6)
	a, err := Compile(c, dev, Options{})
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Compile(c, dev, Options{})
	if !reflect.DeepEqual(a.Circuit().Ops, b.Circuit().Ops) || !reflect.DeepEqual(a.Final, b.Final) {
		t.Error("two compilations differ")
	}
}

func TestCompileTooSmall(t *testing.T) {
	dev, _ := Load("line-16")
	c := smallCase(t, "digits", 64) // 1 + 6 + 6 + 4 = 17 qubits
	_, err := Compile(c, dev, Options{})
	if !errors.Is(err, ErrTooSmall) {
		t.Errorf("17 qubits on 16: error %v, want ErrTooSmall", err)
	}
}

// TestFidelity: Program.Fidelity is the product of 1 - error over the
// routed program's gates and of 1 - (p01 + p10)/2 over its measured
// qubits, recomputed here from the operations of Program.Circuit (on the
// device's qubits) and the description's rates (derived by hand from the
// definition); virtual rz count for nothing, and Resources.Virtual counts
// them.
func TestFidelity(t *testing.T) {
	for _, name := range Names() {
		dev, _ := Load(name)
		p, err := Compile(smallCase(t, "iris", 4), dev, Options{})
		if err != nil {
			t.Fatal(err)
		}
		want, virtual := 1.0, 0
		for _, op := range p.Circuit().Ops {
			switch {
			case op.Gate == circuit.Measure:
				q := dev.Qubits[op.Target]
				want *= 1 - (q.ReadoutP01+q.ReadoutP10)/2
			case len(op.Controls) == 1:
				want *= 1 - dev.Edges[dev.EdgeIndex(op.Target, op.Controls[0])].Error
			case op.Gate == circuit.RZ && dev.VirtualRZ:
				virtual++
			default:
				want *= 1 - dev.Qubits[op.Target].Error
			}
		}
		// 1e-12: the same products in another order.
		if got := p.Fidelity(); math.Abs(got-want) > 1e-12 || !(got > 0 && got < 1) {
			t.Errorf("%s: fidelity %v, want %v", name, got, want)
		}
		if p.After.Virtual != virtual {
			t.Errorf("%s: %d virtual rz, counted %d", name, virtual, p.After.Virtual)
		}
	}
}

// TestNoPairsLeft: a compiled program is a fixed point of the
// cancellation: cancelPairs finds no pair in it (Compile runs it only when
// a one-qubit run merged into the identity), and circuit.Simplify removes
// none of its two-qubit gates, on every embedded device for small and
// medium cases of several datasets.
func TestNoPairsLeft(t *testing.T) {
	for _, name := range Names() {
		dev, _ := Load(name)
		for _, tc := range []struct {
			data string
			m    int
		}{{"iris", 4}, {"iris", 16}, {"wine", 8}, {"cats", 32}, {"penguins", 64}} {
			p, err := Compile(smallCase(t, tc.data, tc.m), dev, Options{})
			if errors.Is(err, ErrTooSmall) {
				continue
			}
			if err != nil {
				t.Fatal(err)
			}
			if cancelPairs(slices.Clone(p.native), len(p.Region)) {
				t.Errorf("%s %s M=%d: pairs left to cancel", name, tc.data, tc.m)
			}
			c := p.Compact()
			s := circuit.Simplify(c)
			if a, b := c.Resources(), s.Resources(); a.CNOT != b.CNOT {
				t.Errorf("%s %s M=%d: Simplify removes two-qubit gates: %d -> %d", name, tc.data, tc.m, a.CNOT, b.CNOT)
			}
		}
	}
}
