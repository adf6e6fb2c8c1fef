package qkernel

import (
	"errors"
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"

	"fringe/qkernel/circuit"
	"fringe/qkernel/sim"
)

// sampleRow draws the shots of one row as ModeShots does: one multinomial
// sample (sim.SampleCounts) over the accepted outcomes (a = 0, k) and one
// merged rejected outcome, from the row's stream after its subset draw. It
// returns the counts in the a*2^q + k layout of PredictCounts, the rejected
// shots all put on (a = 1, k = 0): PredictCounts needs only their total.
func sampleRow(t *testing.T, c *Classifier, dist []float64, pos, shots int) []int {
	t.Helper()
	rng, err := c.RowRand(pos)
	if err != nil {
		t.Fatal(err)
	}
	h := len(dist) / 2
	agg := make([]float64, h+1)
	copy(agg, dist[:h])
	for _, v := range dist[h:] {
		agg[h] += v
	}
	s := sim.SampleCounts(agg, shots, rng)
	out := make([]int, 2*h)
	copy(out, s[:h])
	out[h] = s[h]
	return out
}

// TestPredictCountsClosesLoop compiles each test row's circuit with
// RowCircuit, simulates it (state vector), samples its shots from RowRand
// exactly as the shot modes do, and feeds the counts to PredictCounts. The
// result must be bit for bit that of ModeNoisy on the state-vector
// simulator with the same shots (the same circuit, the same distribution,
// the same stream), and the decisions those of ModeShots, which samples the
// closed form (equal to the circuit's distribution to rounding).
func TestPredictCountsClosesLoop(t *testing.T) {
	f := firstFold(t, "iris", 10)
	const shots = 300
	for _, tc := range []struct {
		balance bool
		subset  int
	}{{false, 0}, {true, 0}, {true, 8}, {false, 12}} {
		t.Run(fmt.Sprintf("balance=%v/subset=%d", tc.balance, tc.subset), func(t *testing.T) {
			base := Classifier{Balance: tc.balance, TrainSubset: tc.subset, Seed: 41}
			ref := base
			ref.Mode, ref.Shots, ref.Method = ModeNoisy, shots, sim.StateVector
			pr, dr := fitPredict(t, &ref, f.Xtr, f.ytr, f.nClass, f.Xte)
			sh := base
			sh.Mode, sh.Shots = ModeShots, shots
			ps, ds := fitPredict(t, &sh, f.Xtr, f.ytr, f.nClass, f.Xte)

			cc := base
			if err := cc.Fit(f.Xtr, f.ytr, f.nClass); err != nil {
				t.Fatal(err)
			}
			n, _ := f.Xte.Dims()
			counts := make([][]int, n)
			for i := range n {
				circ, idx, err := cc.RowCircuit(f.Xte.RawRowView(i), i)
				if err != nil {
					t.Fatal(err)
				}
				want := len(f.ytr)
				if tc.subset > 0 {
					want = tc.subset
				}
				if len(idx) != want {
					t.Fatalf("row %d: circuit encodes %d training rows, want %d", i, len(idx), want)
				}
				dist, err := sim.Outcomes(circ, sim.Options{})
				if err != nil {
					t.Fatal(err)
				}
				counts[i] = sampleRow(t, &cc, dist, i, shots)
			}
			pc, dc, err := cc.PredictCounts(f.Xte, counts)
			if err != nil {
				t.Fatal(err)
			}
			for i := range pc {
				if pc[i] != pr[i] || dc[i].Shots != dr[i].Shots || dc[i].Exact != dr[i].Exact {
					t.Fatalf("row %d: counts give pred %d, N_acc %d, exact %d; state-vector shots %d, %d, %d",
						i, pc[i], dc[i].Shots, dc[i].Exact, pr[i], dr[i].Shots, dr[i].Exact)
				}
				// Both are the same ratios of the same integers, computed
				// by the same division: no tolerance is needed, and 0 is
				// the tightest EqualWithinAbsOrRel accepts.
				if !scalar.EqualWithinAbsOrRel(dc[i].PAcc, dr[i].PAcc, 0, 0) {
					t.Errorf("row %d: p_acc %.17g, want %.17g", i, dc[i].PAcc, dr[i].PAcc)
				}
				for k := range dc[i].Probs {
					if !scalar.EqualWithinAbsOrRel(dc[i].Probs[k], dr[i].Probs[k], 0, 0) {
						t.Errorf("row %d class %d: P %.17g, want %.17g", i, k, dc[i].Probs[k], dr[i].Probs[k])
					}
				}
				if pc[i] != ps[i] || dc[i].Shots != ds[i].Shots || dc[i].Exact != ds[i].Exact {
					t.Errorf("row %d: counts give pred %d N_acc %d exact %d; ModeShots %d %d %d",
						i, pc[i], dc[i].Shots, dc[i].Exact, ps[i], ds[i].Shots, ds[i].Exact)
				}
			}
		})
	}
}

// TestRowCircuitMatchesExact checks that the circuit RowCircuit compiles for
// a row reproduces the closed form that ModeExact evaluates on the same
// training set or subset.
func TestRowCircuitMatchesExact(t *testing.T) {
	f := firstFold(t, "wine", 10)
	c := &Classifier{Balance: true, TrainSubset: 6, Seed: 9}
	_, de := fitPredict(t, c, f.Xtr, f.ytr, f.nClass, f.Xte)
	n, _ := f.Xte.Dims()
	for i := range n {
		circ, _, err := c.RowCircuit(f.Xte.RawRowView(i), i)
		if err != nil {
			t.Fatal(err)
		}
		_, _, nc := circuit.RegisterSizes(6, 13, 3)
		if len(circ.Regs.Class) != nc {
			t.Fatalf("row %d: %d class qubits, want %d", i, len(circ.Regs.Class), nc)
		}
		dist, err := sim.Outcomes(circ, sim.Options{})
		if err != nil {
			t.Fatal(err)
		}
		h := len(dist) / 2
		acc := 0.0
		for _, v := range dist[:h] {
			acc += v
		}
		// State-vector simulation against the closed form: rounding of
		// order 1e-15 per pass; 1e-12 is the bound of TestCircuitEqualsExact.
		if !scalar.EqualWithinAbsOrRel(acc, de[i].PAcc, 1e-12, 1e-12) {
			t.Errorf("row %d: circuit p_acc %.17g, exact %.17g", i, acc, de[i].PAcc)
		}
		for k := range de[i].Probs {
			if !scalar.EqualWithinAbsOrRel(dist[k]/acc, de[i].Probs[k], 1e-12, 1e-12) {
				t.Errorf("row %d class %d: circuit %.17g, exact %.17g", i, k, dist[k]/acc, de[i].Probs[k])
			}
		}
	}
}

// TestPredictCountsRules checks the decision on hand-made counts (the rules
// of ModeShots, derived by hand from the package documentation) and the
// errors.
func TestPredictCountsRules(t *testing.T) {
	// Two training vectors of two classes, one feature: any test row.
	Xtr := mat.NewDense(2, 1, []float64{1, -1})
	Xte := mat.NewDense(3, 1, []float64{2, -2, 5})
	c := &Classifier{}
	if err := c.Fit(Xtr, []int{0, 1}, 2); err != nil {
		t.Fatal(err)
	}
	// Layout a*2 + k: (a=0,k=0), (a=0,k=1), (a=1,k=0), (a=1,k=1).
	counts := [][]int{{3, 7, 6, 4}, {5, 5, 0, 0}, {0, 0, 1, 2}}
	pred, det, err := c.PredictCounts(Xte, counts)
	if err != nil {
		t.Fatal(err)
	}
	// Row 0: N_acc 10 of 20, class 1 has more; exact decision for x = +2
	// is class 0 (parallel to the class-0 vector).
	// Row 1: tie 5/5 goes to class 0; exact decision class 1.
	// Row 2: nothing accepted: class 0, p_acc 0, NaN probabilities.
	want := []struct {
		pred, shots, exact int
		pacc               float64
		probs              []float64
	}{
		{1, 10, 0, 0.5, []float64{0.3, 0.7}},
		{0, 10, 1, 1, []float64{0.5, 0.5}},
		{0, 0, 0, 0, []float64{math.NaN(), math.NaN()}},
	}
	for i, w := range want {
		d := det[i]
		if pred[i] != w.pred || d.Shots != w.shots || d.Exact != w.exact {
			t.Errorf("row %d: pred %d shots %d exact %d, want %d %d %d", i, pred[i], d.Shots, d.Exact, w.pred, w.shots, w.exact)
		}
		// Ratios of small integers: one rounding.
		if !scalar.EqualWithinAbsOrRel(d.PAcc, w.pacc, 1e-15, 1e-15) {
			t.Errorf("row %d: p_acc %v, want %v", i, d.PAcc, w.pacc)
		}
		for k, p := range w.probs {
			if math.IsNaN(p) != math.IsNaN(d.Probs[k]) || !math.IsNaN(p) && !scalar.EqualWithinAbsOrRel(d.Probs[k], p, 1e-15, 1e-15) {
				t.Errorf("row %d: probs %v, want %v", i, d.Probs, w.probs)
				break
			}
		}
	}

	for _, tc := range []struct {
		name   string
		counts [][]int
		want   error
	}{
		{"short", [][]int{{1, 2, 3}, {1, 1, 1, 1}, {1, 1, 1, 1}}, ErrCounts},
		{"negative", [][]int{{1, 2, 3, -1}, {1, 1, 1, 1}, {1, 1, 1, 1}}, ErrCounts},
		{"no shots", [][]int{{1, 2, 3, 4}, {0, 0, 0, 0}, {1, 1, 1, 1}}, ErrCounts},
		{"rows", [][]int{{1, 2, 3, 4}}, ErrDim},
	} {
		if _, _, err := c.PredictCounts(Xte, tc.counts); !errors.Is(err, tc.want) {
			t.Errorf("%s: error %v, want %v", tc.name, err, tc.want)
		}
	}
	if _, _, err := (&Classifier{}).PredictCounts(Xte, counts); !errors.Is(err, ErrNotFitted) {
		t.Errorf("unfitted: error %v, want ErrNotFitted", err)
	}
	if _, _, err := c.RowCircuit([]float64{1, 2}, 0); !errors.Is(err, ErrDim) {
		t.Errorf("row circuit, 2 features: error %v, want ErrDim", err)
	}
	if _, _, err := c.RowCircuit([]float64{0}, 4); !errors.Is(err, ErrZeroVector) {
		t.Errorf("row circuit, zero vector: error %v, want ErrZeroVector", err)
	}
}
