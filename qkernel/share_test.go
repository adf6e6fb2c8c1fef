package qkernel

import (
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"testing"
	"time"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"

	"fringe/qkernel/sim"
)

// TestSharedPredictions compares gate-level noisy predictions through
// shared state preparation against the same classifier simulating every
// whole circuit forwards (the path before sim.Shared): the same predictions
// and accepted shots, and probabilities within 1e-12 (the same channels,
// summed in another order). Iris (first stratified fold, std pipeline):
// training rows come in class order, so every subset of 8 has the same
// labels and all test rows share; and a small training set used whole.
func TestSharedPredictions(t *testing.T) {
	f := firstFold(t, "iris", 10)
	small := dropClass0(f)
	small.Xtr, small.ytr = pickRows(small.Xtr, 0, 1, 2, 50, 51, 52), []int{small.ytr[0], small.ytr[1], small.ytr[2], small.ytr[50], small.ytr[51], small.ytr[52]}
	noise := sim.NoiseModel{Depolarizing: [2]float64{0.01, 0.03}, AmplitudeDamping: 0.01, PhaseDamping: 0.02}
	for _, tc := range []struct {
		name string
		f    fold
		c    Classifier
	}{
		{"iris subset=8", f, Classifier{Mode: ModeNoisy, TrainSubset: 8, Seed: 3, Noise: noise}},
		{"iris subset=8 balanced shots", f, Classifier{Mode: ModeNoisy, TrainSubset: 8, Balance: true, Shots: 500, Seed: 3, Noise: noise}},
		{"iris-vv whole set of 6", small, Classifier{Mode: ModeNoisy, Seed: 3, Noise: noise, Method: sim.DensityMatrix}},
		{"noiseless density", small, Classifier{Mode: ModeNoisy, Seed: 3, Method: sim.DensityMatrix}},
	} {
		shared := tc.c
		alone := tc.c
		alone.noShare = true
		if err := shared.Fit(tc.f.Xtr, tc.f.ytr, tc.f.nClass); err != nil {
			t.Fatal(err)
		}
		if p, _ := shared.makePlan(); shared.newShareCache(p) == nil {
			t.Fatalf("%s: no shared preparation", tc.name)
		}
		sp, sd := fitPredict(t, &shared, tc.f.Xtr, tc.f.ytr, tc.f.nClass, tc.f.Xte)
		ap, ad := fitPredict(t, &alone, tc.f.Xtr, tc.f.ytr, tc.f.nClass, tc.f.Xte)
		for i := range sp {
			if sp[i] != ap[i] || sd[i].Shots != ad[i].Shots || sd[i].Exact != ad[i].Exact {
				t.Errorf("%s row %d: shared %d %+v, alone %d %+v", tc.name, i, sp[i], sd[i], ap[i], ad[i])
			}
			// 1e-12: the same probabilities up to rounding.
			if !scalar.EqualWithinAbsOrRel(sd[i].PAcc, ad[i].PAcc, 1e-12, 1e-12) {
				t.Errorf("%s row %d: p_acc shared %.17g, alone %.17g", tc.name, i, sd[i].PAcc, ad[i].PAcc)
			}
			for k := range sd[i].Probs {
				if !scalar.EqualWithinAbsOrRel(sd[i].Probs[k], ad[i].Probs[k], 1e-12, 1e-12) {
					t.Errorf("%s row %d: P(%d|acc) shared %.17g, alone %.17g", tc.name, i, k, sd[i].Probs[k], ad[i].Probs[k])
				}
			}
		}
	}
}

// TestDataOps checks the range of the data-loading operations of a compiled
// circuit: after the ancilla's H and the index tree, one UCRY per data
// qubit (circuit.Compile, steps 2 and 3).
func TestDataOps(t *testing.T) {
	f := firstFold(t, "iris", 10)
	c := &Classifier{}
	if err := c.Fit(f.Xtr, f.ytr, f.nClass); err != nil {
		t.Fatal(err)
	}
	circ, _, err := c.RowCircuit(f.Xte.RawRowView(0), 0)
	if err != nil {
		t.Fatal(err)
	}
	from, to := dataOps(circ)
	if want := 1 + len(circ.Regs.Index); from != want || to != want+len(circ.Regs.Data) {
		t.Errorf("data operations [%d,%d), want [%d,%d)", from, to, want, want+len(circ.Regs.Data))
	}
}

// TestPredictCancel starts large predictions (an 11-qubit density matrix;
// 14-qubit trajectories; a million shot rows), cancels them after a few
// milliseconds and requires context.Canceled. The latency from cancel to
// return is logged; the only timed bound is a generous watchdog.
func TestPredictCancel(t *testing.T) {
	if testing.Short() {
		t.Skip("allocates a 64 MiB density matrix")
	}
	rng := rand.New(rand.NewPCG(61, 62))
	big, ybig, Tbig := randomProblem(rng, 32, 4, 16, 2) // 1 + 5 + 4 + 1 = 11 qubits
	many, ymany, Tmany := randomProblem(rng, 20, 1_000_000, 4, 2)
	noise := sim.NoiseModel{Depolarizing: [2]float64{0.001, 0.01}}
	for _, tc := range []struct {
		name    string
		c       *Classifier
		X       *mat.Dense
		y       []int
		T       *mat.Dense
		qubits  int
		method  sim.Method
		nothing bool
	}{
		{"density matrix", &Classifier{Mode: ModeNoisy, Noise: noise, Shots: 100, Seed: 1}, big, ybig, Tbig, 11, sim.DensityMatrix, false},
		{"trajectories", &Classifier{Mode: ModeNoisy, Noise: noise, Method: sim.Trajectories, Trajectories: 100000, Seed: 1}, big, ybig, Tbig, 11, sim.Trajectories, false},
		{"shots", &Classifier{Mode: ModeShots, Shots: 1000, TrainSubset: 10, Seed: 1}, many, ymany, Tmany, 0, 0, true},
	} {
		if err := tc.c.Fit(tc.X, tc.y, 2); err != nil {
			t.Fatal(err)
		}
		if p, _ := tc.c.makePlan(); !tc.nothing && (p.qubits != tc.qubits || p.method != tc.method) {
			t.Fatalf("%s: plan %+v", tc.name, p)
		}
		ctx, cancel := context.WithCancel(context.Background())
		done := make(chan error, 1)
		go func() {
			_, _, err := tc.c.PredictDetailContext(ctx, tc.T)
			done <- err
		}()
		time.Sleep(5 * time.Millisecond)
		start := time.Now()
		cancel()
		select {
		case err := <-done:
			if !errors.Is(err, context.Canceled) {
				t.Errorf("%s: err = %v, want context.Canceled", tc.name, err)
			}
			t.Logf("%s: returned %v after cancel", tc.name, time.Since(start))
		case <-time.After(2 * time.Minute): // watchdog only
			t.Fatalf("%s: no return 2 minutes after cancel", tc.name)
		}
	}
}

// TestPredictContextUncancelled: with a live context the Context variants
// give exactly Predict's results.
func TestPredictContextUncancelled(t *testing.T) {
	f := firstFold(t, "iris", 10)
	c := &Classifier{Mode: ModeNoisy, TrainSubset: 4, Shots: 200, Seed: 9, Noise: sim.NoiseModel{Depolarizing: [2]float64{0.01, 0.02}}}
	want, wd := fitPredict(t, c, f.Xtr, f.ytr, f.nClass, f.Xte)
	got, gd, err := c.PredictDetailContext(context.Background(), f.Xte)
	if err != nil {
		t.Fatal(err)
	}
	for i := range want {
		if got[i] != want[i] || gd[i].Shots != wd[i].Shots || gd[i].PAcc != wd[i].PAcc { // exact: same draws
			t.Errorf("row %d: %d %+v, want %d %+v", i, got[i], gd[i], want[i], wd[i])
		}
	}
	p2, err := c.PredictContext(context.Background(), f.Xte)
	if err != nil || fmt.Sprint(p2) != fmt.Sprint(want) {
		t.Errorf("PredictContext = %v, %v; want %v", p2, err, want)
	}
}
