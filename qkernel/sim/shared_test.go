package sim

import (
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/qkernel/circuit"
)

// dataRange returns the operations of a compiled classifier circuit that
// load the data register (the only ones that depend on the test vector):
// [1 + index qubits, 1 + index qubits + data qubits), see circuit.Compile.
func dataRange(c *circuit.Circuit) (from, to int) {
	from = 1 + len(c.Regs.Index)
	return from, from + len(c.Regs.Data)
}

// TestSharedMatchesSimulate builds a Shared from the circuit of one test
// vector and runs the circuits of other test vectors on the same training
// set through it: the distributions must equal Simulate's within 1e-12 (the
// same channels; only the order of summation differs), under no gate noise,
// depolarizing, and every channel with readout error.
func TestSharedMatchesSimulate(t *testing.T) {
	rng := rand.New(rand.NewPCG(51, 52))
	noises := []NoiseModel{
		{},
		{Depolarizing: [2]float64{0.02, 0.05}},
		{Depolarizing: [2]float64{0.01, 0.03}, AmplitudeDamping: 0.02, PhaseDamping: 0.04, Readout: [2]float64{0.02, 0.05}},
	}
	for _, tc := range []struct{ M, d, C int }{{3, 2, 2}, {4, 4, 3}, {5, 1, 2}, {2, 3, 4}} {
		base := randomInstance(rng, tc.M, tc.d, tc.C, true)
		var circs []*circuit.Circuit
		for range 4 {
			in := base
			in.test = make([]float64, tc.d)
			for i := range in.test {
				in.test[i] = rng.NormFloat64()
			}
			circs = append(circs, in.compile(t))
		}
		for _, m := range noises {
			name := fmt.Sprintf("M=%d d=%d C=%d noise=%+v", tc.M, tc.d, tc.C, m)
			opt := Options{Noise: m, Method: DensityMatrix}
			from, to := dataRange(circs[0])
			sh, err := NewShared(context.Background(), circs[0], from, to, opt)
			if err != nil {
				t.Fatalf("%s: %v", name, err)
			}
			for i, c := range circs {
				want, err := Simulate(context.Background(), c, opt)
				if err != nil {
					t.Fatal(err)
				}
				got, err := sh.Simulate(context.Background(), c)
				if err != nil {
					t.Fatalf("%s circuit %d: %v", name, i, err)
				}
				sum := 0.0
				for o := range want.P {
					// 1e-12: the same linear map summed in another order.
					if !scalar.EqualWithinAbsOrRel(got.P[o], want.P[o], 1e-12, 1e-12) {
						t.Errorf("%s circuit %d: P[%d] = %.17g, Simulate %.17g", name, i, o, got.P[o], want.P[o])
					}
					sum += got.P[o]
				}
				if !scalar.EqualWithinAbsOrRel(sum, 1, 1e-12, 0) {
					t.Errorf("%s circuit %d: probabilities sum to %v", name, i, sum)
				}
			}
		}
	}
}

// TestSharedRejects checks that a circuit of another training set (other
// index weights or class labels) is refused with ErrNotShared.
func TestSharedRejects(t *testing.T) {
	rng := rand.New(rand.NewPCG(53, 54))
	a := randomInstance(rng, 4, 2, 2, true)
	b := a
	b.y = append([]int(nil), a.y...)
	b.y[0], b.y[1] = 1-a.y[0], 1-a.y[1]
	b.w = nil
	ca, cb := a.compile(t), b.compile(t)
	from, to := dataRange(ca)
	opt := Options{Noise: NoiseModel{Depolarizing: [2]float64{0.01, 0.02}}}
	sh, err := NewShared(context.Background(), ca, from, to, opt)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := sh.Simulate(context.Background(), cb); !errors.Is(err, ErrNotShared) {
		t.Errorf("other training set: err = %v, want ErrNotShared", err)
	}
	if _, err := NewShared(context.Background(), ca, from, to, Options{Noise: opt.Noise, Method: Trajectories, Rng: rng}); err == nil {
		t.Error("trajectories accepted")
	}
	if _, err := NewShared(context.Background(), ca, to, from, opt); err == nil {
		t.Error("from > to accepted")
	}
}
