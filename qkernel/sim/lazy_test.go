package sim

import (
	"context"
	"fmt"
	"math/rand/v2"
	"testing"

	"fringe/qkernel/circuit"
)

// refSuperop1 is the plain reference of ApplySuperop1: for every 2x2 block
// of rows and columns that differ only in bit q it forms the vector (rho00,
// rho01, rho10, rho11) and multiplies it by s, summing the four products
// of a row from left to right (the order the kernels use).
func refSuperop1(rho []complex128, n, q int, s Superop) {
	D := 1 << n
	m := 1 << q
	for r := 0; r < D; r++ {
		for c := 0; c < D; c++ {
			if r&m != 0 || c&m != 0 {
				continue
			}
			idx := [4]int{r*D + c, r*D + c | m, (r|m)*D + c, (r|m)*D + c | m}
			var v [4]complex128
			for i, j := range idx {
				v[i] = rho[j]
			}
			for i, j := range idx {
				if realS(s) {
					re := real(s[i][0])*real(v[0]) + real(s[i][1])*real(v[1]) + real(s[i][2])*real(v[2]) + real(s[i][3])*real(v[3])
					im := real(s[i][0])*imag(v[0]) + real(s[i][1])*imag(v[1]) + real(s[i][2])*imag(v[2]) + real(s[i][3])*imag(v[3])
					rho[j] = complex(re, im)
				} else {
					rho[j] = s[i][0]*v[0] + s[i][1]*v[1] + s[i][2]*v[2] + s[i][3]*v[3]
				}
			}
		}
	}
}

func realS(s Superop) bool {
	for i := range 4 {
		for j := range 4 {
			if imag(s[i][j]) != 0 {
				return false
			}
		}
	}
	return true
}

// refCNOTDepolarize2 is the plain reference of CNOT (control q1, target q2)
// followed by two-qubit depolarizing of strength p: new[R][C] =
// old[pi R][pi C] with pi the CNOT permutation of basis states, then
// (1-p) new + (p/4) tr on the diagonal of every 4x4 block, tr summed over
// the block's local states 00, 01 (q1 set), 10, 11 in that order.
func refCNOTDepolarize2(rho []complex128, n, q1, q2 int, cnot bool, p float64) {
	D := 1 << n
	m1, m2 := 1<<q1, 1<<q2
	perm := func(b int) int {
		if cnot && b&m1 != 0 {
			return b ^ m2
		}
		return b
	}
	old := append([]complex128(nil), rho...)
	for r := range D {
		for c := range D {
			rho[r*D+c] = old[perm(r)*D+perm(c)]
		}
	}
	if p == 0 {
		return
	}
	keep, mix := 1-p, p/4
	for r := range D {
		for c := range D {
			if r&(m1|m2) != 0 || c&(m1|m2) != 0 {
				continue
			}
			loc := [4]int{0, m1, m2, m1 | m2}
			var tr complex128
			for _, l := range loc {
				tr += rho[(r|l)*D+c|l]
			}
			add := complex(mix*real(tr), mix*imag(tr))
			for _, a := range loc {
				for _, b := range loc {
					v := rho[(r|a)*D+c|b]
					v = complex(keep*real(v), keep*imag(v))
					if a == b {
						v += add
					}
					rho[(r|a)*D+c|b] = v
				}
			}
		}
	}
}

func randomRho(rng *rand.Rand, n int) []complex128 {
	rho := make([]complex128, 1<<(2*n))
	for i := range rho {
		rho[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	return rho
}

func sameEntries(t *testing.T, what string, got, want []complex128) {
	t.Helper()
	for i := range want {
		if got[i] != want[i] { // exact: the same arithmetic, visited in another order
			t.Fatalf("%s: entry %d = %v, reference %v", what, i, got[i], want[i])
		}
	}
}

// TestKernelsMatchReference checks the single-qubit and CNOT kernels
// against the plain references above, to the last bit, on random (not
// physical) matrices of 9 qubits, where every code path runs: column runs
// of 1, 2 and >= 4 entries, the phase-covariant path, and pairs of bits
// 8 and above (the split path of quad).
func TestKernelsMatchReference(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	const n = 9
	rho := randomRho(rng, n)
	u, _ := GateMatrix(circuit.RY, 0.7)
	damp, _ := NoiseModel{AmplitudeDamping: 0.03, PhaseDamping: 0.05}.dampingSuperop()
	for _, s := range []struct {
		name string
		s    Superop
	}{
		{"ry+depolarizing", KrausSuperop([]Matrix{u}).Then(DepolarizingSuperop(0.02))},
		{"damping", damp},
		{"complex unitary", KrausSuperop([]Matrix{randomUnitary(rng)})},
	} {
		for q := range n {
			d := &Density{N: n, Rho: append([]complex128(nil), rho...)}
			want := append([]complex128(nil), rho...)
			d.ApplySuperop1(q, s.s)
			refSuperop1(want, n, q, s.s)
			sameEntries(t, fmt.Sprintf("%s on qubit %d", s.name, q), d.Rho, want)
		}
	}
	dr, _ := realSuperop(&damp)
	for _, pr := range [][2]int{{0, 1}, {1, 0}, {0, 2}, {2, 5}, {6, 0}, {0, 8}, {7, 8}, {8, 7}} {
		for _, cnot := range []bool{false, true} {
			for _, p := range []float64{0, 0.07} {
				for _, withDamp := range []bool{false, true} {
					if !cnot && p == 0 {
						continue
					}
					d := &Density{N: n, Rho: append([]complex128(nil), rho...)}
					want := append([]complex128(nil), rho...)
					refCNOTDepolarize2(want, n, pr[0], pr[1], cnot, p)
					var dp *[4][4]float64
					if withDamp {
						refSuperop1(want, n, pr[0], damp)
						refSuperop1(want, n, pr[1], damp)
						dp = &dr
					}
					d.block2(pr[0], pr[1], cnot, p, dp)
					sameEntries(t, fmt.Sprintf("block2(%d, %d, cnot=%v, p=%v, damp=%v)", pr[0], pr[1], cnot, p, withDamp), d.Rho, want)
				}
			}
		}
	}
}

// TestGrowDensity checks that inserting an idle qubit at bit b gives
// rho ⊗ |0><0| with the new qubit at bit b (derived by hand from the
// layout of Density: entry r<<n | c).
func TestGrowDensity(t *testing.T) {
	rng := rand.New(rand.NewPCG(43, 44))
	for k := 0; k <= 3; k++ {
		for b := 0; b <= k; b++ {
			rho := randomRho(rng, k)
			buf := make([]complex128, 1<<(2*(k+1)))
			copy(buf, rho)
			growDensity(buf, k, b)
			K := k + 1
			for R := range 1 << K {
				for C := range 1 << K {
					want := complex(0, 0)
					if R>>b&1 == 0 && C>>b&1 == 0 {
						r := R&(1<<b-1) | R>>(b+1)<<b
						c := C&(1<<b-1) | C>>(b+1)<<b
						want = rho[r<<k|c]
					}
					if got := buf[R<<K|C]; got != want { // exact: entries are moved, not computed
						t.Fatalf("k=%d b=%d: entry (%d,%d) = %v, want %v", k, b, R, C, got, want)
					}
				}
			}
		}
	}
	amp := []complex128{1, 2, 3, 4}
	buf := append(append([]complex128(nil), amp...), 0, 0, 0, 0)
	growState(buf, 2, 1)
	// Inserting bit 1 into indices 0..3 gives 0, 1, 4, 5.
	want := []complex128{1, 2, 0, 0, 3, 4, 0, 0}
	sameEntries(t, "growState", buf, want)
}

// TestLazyMatchesEager runs compiled classifier circuits with idle qubits
// left out (as Simulate does) and with every qubit active from the start,
// and requires the same density matrix, state vector and trajectory
// average to the last bit, for every method and noise model.
func TestLazyMatchesEager(t *testing.T) {
	rng := rand.New(rand.NewPCG(45, 46))
	noises := []NoiseModel{
		{},
		{Depolarizing: [2]float64{0.01, 0.03}},
		{Depolarizing: [2]float64{0.01, 0.03}, AmplitudeDamping: 0.02, PhaseDamping: 0.04},
	}
	for _, tc := range []struct{ M, d, C int }{{3, 2, 2}, {4, 1, 3}, {2, 3, 4}} {
		c := randomInstance(rng, tc.M, tc.d, tc.C, true).compile(t)
		for _, m := range noises {
			name := fmt.Sprintf("M=%d d=%d C=%d noise=%+v", tc.M, tc.d, tc.C, m)
			lazy, _ := NewDensity(c.NQubits)
			if err := runDensity(context.Background(), lazy, c, m); err != nil {
				t.Fatal(err)
			}
			eager, _ := NewDensity(c.NQubits)
			if err := runDensityActive(context.Background(), eager, c, m); err != nil {
				t.Fatal(err)
			}
			sameEntries(t, name+" density", lazy.Rho, eager.Rho)

			if !m.gateNoise() {
				ls, _ := NewState(c.NQubits)
				if err := runState(context.Background(), ls, c.Ops); err != nil {
					t.Fatal(err)
				}
				es, _ := NewState(c.NQubits)
				for _, op := range c.Ops {
					es.ApplyOp(op)
				}
				sameEntries(t, name+" state", ls.Amp, es.Amp)
				continue
			}
			traj, err := Simulate(context.Background(), c, Options{Noise: m, Method: Trajectories, Trajectories: 50, Rng: rand.New(rand.NewPCG(1, 2))})
			if err != nil {
				t.Fatal(err)
			}
			want := eagerTrajectories(c, m, 50, rand.New(rand.NewPCG(1, 2)))
			for i := range want {
				if traj.P[i] != want[i] { // exact: same jumps, same arithmetic
					t.Fatalf("%s trajectories: P[%d] = %v, eager %v", name, i, traj.P[i], want[i])
				}
			}
		}
	}
}

// eagerTrajectories is the trajectory average with every qubit in the
// state vector from the start: the loop of runTrajectories without idle
// qubits, as a reference.
func eagerTrajectories(c *circuit.Circuit, m NoiseModel, T int, rng *rand.Rand) []float64 {
	ops := c.Decompose().Ops
	mean := make([]float64, 2<<len(c.Regs.Class))
	s, _ := NewState(c.NQubits)
	for t := 1; t <= T; t++ {
		clear(s.Amp)
		s.Amp[0] = 1
		for _, op := range ops {
			s.ApplyOp(op)
			switch op.Gate {
			case circuit.Measure:
			case circuit.CNOT:
				s.noisy2(op.Controls[0], op.Target, m, rng)
			default:
				s.noisy1(op.Target, m, rng)
			}
		}
		p := stateOutcomes(s, c.Regs)
		if m.Readout != [2]float64{} {
			p, _ = Readout(p, m.Readout[0], m.Readout[1])
		}
		for i, v := range p {
			d := v - mean[i]
			mean[i] += d / float64(t)
		}
	}
	return mean
}

// TestLazyPlan checks the schedule of a small circuit by hand: qubits are
// inserted at their rank among the active ones, and the renumbered
// operations name compact bits.
func TestLazyPlan(t *testing.T) {
	ops := []circuit.Op{
		{Gate: circuit.H, Target: 2},
		{Gate: circuit.CNOT, Target: 0, Controls: []int{2}},
		{Gate: circuit.UCRY, Target: 3, Controls: []int{0, 2}, Angles: []float64{1, 2, 3, 4}},
	}
	lp := planLazy(ops, 5, true)
	// Derived by hand: H on 2 inserts it at bit 0; the CNOT inserts 0
	// below it (bits: 0 -> 0, 2 -> 1); the UCRY inserts 3 at bit 2;
	// qubits 1 and 4 stay idle and are inserted at the end at their
	// ranks among {0, 2, 3}: 1 -> bit 1, then 4 -> bit 4.
	wantGrow := [][]int{{0}, {0}, {2}}
	for i := range ops {
		if fmt.Sprint(lp.grow[i]) != fmt.Sprint(wantGrow[i]) {
			t.Errorf("grow[%d] = %v, want %v", i, lp.grow[i], wantGrow[i])
		}
	}
	if fmt.Sprint(lp.tail) != "[1 4]" {
		t.Errorf("tail = %v, want [1 4]", lp.tail)
	}
	if got := fmt.Sprint(lp.ops[1].Target, lp.ops[1].Controls, lp.ops[2].Target, lp.ops[2].Controls); got != "0 [1] 2 [0 1]" {
		t.Errorf("renumbered ops: %s, want 0 [1] 2 [0 1]", got)
	}
	if ops[1].Controls[0] != 2 {
		t.Errorf("planLazy modified the circuit's controls: %v", ops[1].Controls)
	}
	if lp.work[0] != 4 || lp.work[2] != 64 {
		t.Errorf("work = %v, want 4 ... 64 (4^k entries)", lp.work)
	}
	// A gate kind the planner does not know activates every qubit and is
	// left as it is (its qubit fields are not renumbered): with qubit 3
	// active, qubits 0, 1 and 2 are inserted at bits 0, 1 and 2.
	odd := []circuit.Op{{Gate: circuit.H, Target: 3}, {Gate: circuit.Gate(200), Target: 1}}
	lp = planLazy(odd, 4, true)
	if fmt.Sprint(lp.grow[1]) != "[0 1 2]" || lp.size[1] != 4 || lp.ops[1].Target != 1 || len(lp.tail) != 0 {
		t.Errorf("unknown gate: grow %v, size %d, target %d, tail %v; want [0 1 2], 4, 1, []", lp.grow[1], lp.size[1], lp.ops[1].Target, lp.tail)
	}
}
