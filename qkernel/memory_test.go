package qkernel

import (
	"errors"
	"fmt"
	"math/rand/v2"
	"runtime"
	"testing"

	"gonum.org/v1/gonum/mat"

	"fringe/qkernel/sim"
)

// TestMemoryBytes checks Classifier.MemoryBytes against what a fit and the
// prediction of one test row allocate (runtime.MemStats.TotalAlloc, every
// allocation counted once, garbage included): the estimate is of the peak
// with the garbage collector's headroom (twice the memory in use), so it
// must cover one row's allocations and not exceed them by more than 8
// times (the headroom, and the estimate's rounding up of what a larger
// circuit would hold at once).
// Circuits: 16 training rows of 4 features in 2 classes, 1 + 4 + 2 + 1 = 8
// qubits (7 active while the data register is loaded), with the density
// matrix and with trajectories.
func TestMemoryBytes(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	X := mat.NewDense(16, 4, nil)
	y := make([]int, 16)
	for i := range 16 {
		y[i] = i % 2
		for j := range 4 {
			X.Set(i, j, rng.NormFloat64()+float64(y[i]))
		}
	}
	test := mat.NewDense(1, 4, []float64{0.3, 0.4, 0.5, 0.6})
	noise := sim.NoiseModel{Depolarizing: [2]float64{0.001, 0.01}}
	for _, c := range []struct {
		name string
		q    Classifier
		want int // qubits
	}{
		{"exact", Classifier{}, 0},
		{"density", Classifier{Mode: ModeNoisy, Noise: noise, Method: sim.DensityMatrix}, 8},
		{"trajectories", Classifier{Mode: ModeNoisy, Noise: noise, Method: sim.Trajectories, Trajectories: 4}, 8},
	} {
		t.Run(fmt.Sprintf("method=%s", c.name), func(t *testing.T) {
			est, q, err := c.q.MemoryBytes(16, 1, 4, 2)
			if err != nil {
				t.Fatal(err)
			}
			if q != c.want {
				t.Errorf("qubits %d, want %d", q, c.want)
			}
			var before, after runtime.MemStats
			runtime.GC()
			runtime.ReadMemStats(&before)
			m := c.q
			if err := m.Fit(X, y, 2); err != nil {
				t.Fatal(err)
			}
			if _, _, err := m.PredictDetail(test); err != nil {
				t.Fatal(err)
			}
			runtime.ReadMemStats(&after)
			got := int64(after.TotalAlloc - before.TotalAlloc)
			t.Logf("allocated %d, estimate %d (%.2fx)", got, est, float64(est)/float64(got))
			if c.want > 0 && (got > est || est > 8*got) {
				t.Errorf("allocated %d bytes, estimate %d: want allocated <= estimate <= 8 allocated", got, est)
			}
		})
	}
	// The gate-level estimate grows with the qubits: 4^a for the density
	// matrix (a active qubits), 2^q for state vectors.
	dm := Classifier{Mode: ModeNoisy, Noise: noise, Method: sim.DensityMatrix}
	small, _, _ := dm.MemoryBytes(16, 1, 4, 2)
	large, q, _ := dm.MemoryBytes(64, 1, 4, 2) // two more index qubits
	if q != 10 || large < 12*small {
		t.Errorf("density estimate: %d bytes at 8 qubits, %d at %d; want about 16 times more at 10", small, large, q)
	}
	if _, _, err := dm.MemoryBytes(-1, 1, 4, 2); !errors.Is(err, ErrOption) {
		t.Errorf("negative rows: error %v, want ErrOption", err)
	}
}
