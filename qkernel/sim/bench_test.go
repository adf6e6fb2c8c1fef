package sim

import (
	"context"
	"fmt"
	"math/rand/v2"
	"testing"

	"fringe/qkernel/circuit"
)

// BenchmarkGate applies a dense 2x2 gate to every qubit in turn, as
// ../shared/perf/sv_gate.c does (same matrix [[0.8,-0.6],[0.6,0.8]], same
// initial amplitudes 1/2^n), and reports ns per amplitude per gate.
// kernel=apply1 goes through State.Apply1, which takes the real-arithmetic
// path for this real matrix (gcc likewise propagates the zero imaginary
// parts of the C constants); kernel=complex forces the general complex
// kernel used for matrices with imaginary parts (RZ, Pauli Y).
func BenchmarkGate(b *testing.B) {
	for _, n := range []int{10, 20} {
		for _, kernel := range []string{"apply1", "complex"} {
			b.Run(fmt.Sprintf("qubits=%d/kernel=%s", n, kernel), func(b *testing.B) {
				s, err := NewState(n)
				if err != nil {
					b.Fatal(err)
				}
				for i := range s.Amp {
					s.Amp[i] = complex(1/float64(len(s.Amp)), 0)
				}
				u := Matrix{{0.8, -0.6}, {0.6, 0.8}}
				b.ReportAllocs()
				gates := 0
				for b.Loop() {
					for q := 0; q < n; q++ {
						if kernel == "complex" {
							apply1(s.Amp, q, &u)
						} else {
							s.Apply1(q, u)
						}
						gates++
					}
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(gates)/float64(len(s.Amp)), "ns/amplitude")
			})
		}
	}
}

// BenchmarkDensityMatrix runs noisy gates on a density matrix: RY layers
// with single-qubit depolarizing (p1 = 1e-3) after each, CNOT ladders with
// two-qubit depolarizing (p2 = 1e-2) after each, the workload of
// ../shared/perf/numpy_dm.py (which depolarizes each CNOT qubit separately).
// Reports ns per noisy gate.
func BenchmarkDensityMatrix(b *testing.B) {
	for _, n := range []int{7, 8, 10} {
		b.Run(fmt.Sprintf("qubits=%d", n), func(b *testing.B) {
			c := layerCircuit(n, rand.New(rand.NewPCG(1, 2)))
			d, err := NewDensity(n)
			if err != nil {
				b.Fatal(err)
			}
			m := NoiseModel{Depolarizing: [2]float64{1e-3, 1e-2}}
			ctx := context.Background()
			b.ReportAllocs()
			gates := 0
			for b.Loop() {
				if err := runDensityActive(ctx, d, c, m); err != nil {
					b.Fatal(err)
				}
				gates += len(c.Ops)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(gates), "ns/gate")
		})
	}
}

// BenchmarkSample draws one multinomial sample over 8 outcomes; the cost
// should not grow with shots.
func BenchmarkSample(b *testing.B) {
	p := []float64{0.3, 0.01, 0.05, 0.15, 1e-4, 0.2, 0.2899, 0}
	for _, shots := range []int{100, 1000000} {
		b.Run(fmt.Sprintf("shots=%d", shots), func(b *testing.B) {
			rng := rand.New(rand.NewPCG(3, 4))
			b.ReportAllocs()
			for b.Loop() {
				SampleCounts(p, shots, rng)
			}
			b.ReportMetric(float64(shots)*float64(b.N)/b.Elapsed().Seconds(), "shots/s")
		})
	}
}

// BenchmarkOutcomes simulates a compiled classifier circuit without noise,
// with the one-pass UCRY kernel and with the Gray-code decomposition.
func BenchmarkOutcomes(b *testing.B) {
	rng := rand.New(rand.NewPCG(5, 6))
	for _, M := range []int{16, 256} {
		in := randomInstance(rng, M, 8, 3, false)
		c, err := circuit.Compile(in.test, in.train, in.y, in.nClass, in.w)
		if err != nil {
			b.Fatal(err)
		}
		for _, path := range []string{"ucry", "decomposed"} {
			cc := c
			if path == "decomposed" {
				cc = c.Decompose()
			}
			b.Run(fmt.Sprintf("M=%d/qubits=%d/path=%s", M, c.NQubits, path), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					if _, err := Outcomes(cc, Options{}); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}

// classifierCircuit compiles a classifier circuit of M training vectors of
// d features and nClass classes from seeded random data.
func classifierCircuit(tb testing.TB, M, d, nClass int) *circuit.Circuit {
	tb.Helper()
	in := randomInstance(rand.New(rand.NewPCG(7, uint64(M*1000+d*10+nClass))), M, d, nClass, false)
	c, err := circuit.Compile(in.test, in.train, in.y, in.nClass, in.w)
	if err != nil {
		tb.Fatal(err)
	}
	return c
}

// BenchmarkNoisyGate reports ns per noisy gate (the gate and every channel
// the noise model attaches to it) of the density-matrix simulator, for
// scripts/bench_dm.sh, which divides it by the time of one memory pass over
// the density matrix (16 * 4^n bytes read and written) at the bandwidth of
// the triad of ../shared/perf/stream.c, measured in the same run.
//
// workload=layers is the RY layer and CNOT ladder of numpy_dm.py, applied
// again and again to one matrix (every gate on all n qubits, as a per-gate
// cost); workload=classifier is a compiled classifier circuit (M=32, d=8, C=2 on
// 10 qubits; M=8, d=4, C=2 on 7) simulated from |0...0> by Simulate
// (decomposed, so its CNOTs join distant qubits; its class qubit is idle
// until the end), per elementary gate. noise=depol is
// depolarizing (1e-3, 1e-2); noise=all adds amplitude damping 1e-3 and
// phase damping 2e-3 after every gate on every qubit it touches.
func BenchmarkNoisyGate(b *testing.B) {
	noises := []struct {
		name string
		m    NoiseModel
	}{
		{"depol", NoiseModel{Depolarizing: [2]float64{1e-3, 1e-2}}},
		{"all", NoiseModel{Depolarizing: [2]float64{1e-3, 1e-2}, AmplitudeDamping: 1e-3, PhaseDamping: 2e-3}},
	}
	for _, n := range []int{7, 10} {
		for _, work := range []string{"layers", "classifier"} {
			var c *circuit.Circuit
			if work == "layers" {
				c = layerCircuit(n, rand.New(rand.NewPCG(1, 2)))
			} else if n == 10 {
				c = classifierCircuit(b, 32, 8, 2)
			} else {
				c = classifierCircuit(b, 8, 4, 2)
			}
			if c.NQubits != n {
				b.Fatalf("%s circuit has %d qubits, want %d", work, c.NQubits, n)
			}
			r := c.Decompose().Resources()
			gates := r.CNOT + r.SingleQubit
			for _, nz := range noises {
				b.Run(fmt.Sprintf("qubits=%d/workload=%s/noise=%s", n, work, nz.name), func(b *testing.B) {
					ctx := context.Background()
					d, err := NewDensity(n)
					if err != nil {
						b.Fatal(err)
					}
					b.ReportAllocs()
					for b.Loop() {
						if work == "layers" {
							// Layers keep evolving one matrix, every gate on all n qubits.
							if err := runDensityActive(ctx, d, c, nz.m); err != nil {
								b.Fatal(err)
							}
						} else if _, err := Simulate(ctx, c, Options{Noise: nz.m, Method: DensityMatrix}); err != nil {
							b.Fatal(err)
						}
					}
					b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(gates), "ns/gate")
					b.ReportMetric(float64(int(16)<<(2*n)), "bytes/pass")
				})
			}
		}
	}
}

// runDensityActive is runDensity on a matrix in any state: every qubit is
// active from the start (no idle qubits), so every gate runs at full size.
func runDensityActive(ctx context.Context, d *Density, c *circuit.Circuit, m NoiseModel) error {
	ops := c.Ops
	if m.gateNoise() {
		ops = c.Decompose().Ops
	}
	all := make([]int, d.N)
	for q := range all {
		all[q] = q
	}
	return applyDensity(ctx, d, d.Rho, planLazyFrom(ops, d.N, all, true), m)
}
