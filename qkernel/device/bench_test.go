package device

import (
	"context"
	"fmt"
	"math/rand/v2"
	"testing"
	"time"

	"gonum.org/v1/gonum/mat"

	"fringe/bench/cv"
	"fringe/datasets"
	"fringe/qkernel/circuit"
	"fringe/qkernel/sim"
)

// assessCase is one circuit that `fringe assess` builds by default: a
// dataset, a pipeline of bench.DefaultAssessPipelines and the whole
// training part of the first stratified 10-fold split (the largest of its
// sizes; bench.DefaultAssessSubsets are 8, 16 and 32).
type assessCase struct {
	dataset, pipeline  string
	train, dim, nClass int
	cnot               int // raw CNOT count (the formula of package circuit)
}

// assessCases lists the default assess circuits with their sizes.
func assessCases(tb testing.TB) []assessCase {
	tb.Helper()
	var out []assessCase
	for _, name := range datasets.Names() {
		d, err := datasets.Load(name)
		if err != nil {
			tb.Fatal(err)
		}
		sp, err := cv.Stratified(d.Y, len(d.Classes), 10, rand.New(rand.NewPCG(1, 2)))
		if err != nil {
			// glass: a class of 9 rows; its circuits (214 rows, 9 features)
			// are far from the largest.
			continue
		}
		for _, pipe := range []string{"std+l2", "l2", "std+lift"} { // bench.DefaultAssessPipelines
			dim := d.Dim()
			if pipe == "std+lift" {
				dim++ // lift appends one feature
			}
			m := len(sp[0].Train)
			nm, nd, nc := circuit.RegisterSizes(m, dim, len(d.Classes))
			cx := (1<<nm - 2) + (1<<(1+nm))*(1<<nd-1) + nc*(1<<nm)
			out = append(out, assessCase{name, pipe, m, dim, len(d.Classes), cx})
		}
	}
	return out
}

// largestAssessCircuit compiles the largest default assess circuit (most
// CNOTs by the formula; digits with std+lift: 1617 training rows of 65
// features, 1 + 11 + 7 + 4 = 23 qubits) for its first test row.
func largestAssessCircuit(tb testing.TB) (*circuit.Circuit, assessCase) {
	tb.Helper()
	cases := assessCases(tb)
	big := cases[0]
	for _, c := range cases {
		if c.cnot > big.cnot {
			big = c
		}
	}
	d, _ := datasets.Load(big.dataset)
	sp, _ := cv.Stratified(d.Y, len(d.Classes), 10, rand.New(rand.NewPCG(1, 2)))
	pipe, err := datasets.ParsePipeline(big.pipeline)
	if err != nil {
		tb.Fatal(err)
	}
	gather := func(idx []int) ([][]float64, []int) {
		var X [][]float64
		var y []int
		for _, i := range idx {
			X = append(X, d.X.RawRowView(i))
			y = append(y, d.Y[i])
		}
		return X, y
	}
	Xtr, ytr := gather(sp[0].Train)
	Xte, _ := gather(sp[0].Test[:1])
	Ztr, err := pipe.FitTransform(toDense(Xtr), nil)
	if err != nil {
		tb.Fatal(err)
	}
	Zte, err := pipe.Transform(toDense(Xte), nil)
	if err != nil {
		tb.Fatal(err)
	}
	train := make([][]float64, len(ytr))
	for i := range train {
		train[i] = Ztr.RawRowView(i)
	}
	w, _ := circuit.BalancedWeights(ytr, big.nClass)
	c, err := circuit.Compile(Zte.RawRowView(0), train, ytr, big.nClass, w)
	if err != nil {
		tb.Fatal(err)
	}
	return c, big
}

func toDense(rows [][]float64) *mat.Dense {
	m := mat.NewDense(len(rows), len(rows[0]), nil)
	for i, r := range rows {
		m.SetRow(i, r)
	}
	return m
}

// TestLargestAssessCircuit pins which default assess circuit is the
// largest, so the benchmark below measures the right one.
func TestLargestAssessCircuit(t *testing.T) {
	if testing.Short() {
		t.Skip("compiles a circuit of a million gates")
	}
	c, big := largestAssessCircuit(t)
	if big.dataset != "digits" || big.pipeline != "std+lift" || c.NQubits != 23 {
		t.Errorf("largest default assess circuit: %+v with %d qubits", big, c.NQubits)
	}
}

// BenchmarkCompileLargest compiles the largest circuit `fringe assess`
// builds by default (digits, std+lift, the whole training part of a
// 10-fold split: 23 qubits, about 530 000 CNOTs after Decompose) for
// heavy-27, the only embedded device with 23 connected qubits: Decompose,
// placement, refinement, SABRE routing, translation, one-qubit
// resynthesis and cancellation (Compile). In the same loop it times
// circuit.Decompose alone, the reference (the cost every gate-level use of
// the circuit already pays), and reports compile/decompose.
// BenchmarkProgramCircuit times building the routed program's operations
// (Program.Circuit), apart: its garbage (about 600 MB) would be collected
// in the compile's time.
func BenchmarkCompileLargest(b *testing.B) {
	c, _ := largestAssessCircuit(b)
	dev, err := Load("heavy-27")
	if err != nil {
		b.Fatal(err)
	}
	var tc, td time.Duration
	var p *Program
	b.ReportAllocs()
	for b.Loop() {
		t0 := time.Now()
		_ = c.Decompose()
		td += time.Since(t0)
		t1 := time.Now()
		if p, err = Compile(c, dev, Options{}); err != nil {
			b.Fatal(err)
		}
		tc += time.Since(t1)
	}
	n := float64(b.N)
	b.ReportMetric(float64(tc.Nanoseconds())/n, "compile-ns")
	b.ReportMetric(float64(td.Nanoseconds())/n, "decompose-ns")
	b.ReportMetric(float64(tc)/float64(td), "compile/decompose")
	b.ReportMetric(float64(p.Before.TwoQubit), "cx-before")
	b.ReportMetric(float64(p.After.TwoQubit), "cx-after")
	b.ReportMetric(float64(p.After.Swaps), "swaps")
}

// BenchmarkProgramCircuit builds the operations of the routed program of
// BenchmarkCompileLargest (Program.Circuit: about 8 million native gates
// as circuit.Op values, what QASM export and the simulators read).
func BenchmarkProgramCircuit(b *testing.B) {
	c, _ := largestAssessCircuit(b)
	dev, err := Load("heavy-27")
	if err != nil {
		b.Fatal(err)
	}
	p, err := Compile(c, dev, Options{})
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		_ = p.Circuit()
	}
	b.ReportMetric(float64(p.After.TwoQubit+p.After.SingleQubit+p.After.Measurements), "ops")
}

// BenchmarkNoisyIris simulates an 8-training-vector Iris instance (3
// classes: 1 + 3 + 2 + 2 = 8 qubits) under each embedded device's
// calibrated noise on the density matrix (compilation included, as every
// prediction pays it) and, in the same loop, today's gate-level noisy mode
// on the same logical circuit (sim.Simulate, density matrix, depolarizing
// 1e-3 / 1e-2, amplitude and phase damping 1e-3, readout 0.01 / 0.02: the
// gate-level model with the same kinds of channel). It reports
// device/gate-level, the ratio the speed target names (within 3).
func BenchmarkNoisyIris(b *testing.B) {
	c := smallCase(b, "iris", 8)
	m := sim.NoiseModel{Depolarizing: [2]float64{1e-3, 1e-2}, AmplitudeDamping: 1e-3, PhaseDamping: 1e-3, Readout: [2]float64{0.01, 0.02}}
	for _, name := range Names() {
		dev, err := Load(name)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("device=%s", name), func(b *testing.B) {
			var tg, td time.Duration
			var p *Program
			b.ReportAllocs()
			for b.Loop() {
				t0 := time.Now()
				if _, err := sim.Simulate(context.Background(), c, sim.Options{Noise: m, Method: sim.DensityMatrix}); err != nil {
					b.Fatal(err)
				}
				t1 := time.Now()
				if p, err = Compile(c, dev, Options{}); err != nil {
					b.Fatal(err)
				}
				if _, err := p.Simulate(context.Background(), sim.Options{}); err != nil {
					b.Fatal(err)
				}
				t2 := time.Now()
				tg += t1.Sub(t0)
				td += t2.Sub(t1)
			}
			n := float64(b.N)
			b.ReportMetric(float64(td.Nanoseconds())/n, "device-ns")
			b.ReportMetric(float64(tg.Nanoseconds())/n, "gate-level-ns")
			b.ReportMetric(float64(td)/float64(tg), "device/gate-level")
			b.ReportMetric(float64(p.After.TwoQubit), "2q-gates")
			b.ReportMetric(float64(p.After.SingleQubit), "1q-gates")
		})
	}
}
