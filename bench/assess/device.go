package assess

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"golang.org/x/sync/errgroup"
	"gonum.org/v1/gonum/mat"

	"fringe/bench/input"
	"fringe/qkernel"
	"fringe/qkernel/circuit"
	"fringe/qkernel/device"
	"fringe/qkernel/sim"
	"fringe/results"
)

// DefaultDeviceInstances is the number of test instances whose decision
// `fringe assess -device` simulates under the device's calibrated noise
// for every (dataset, pipeline, train_subset size).
const DefaultDeviceInstances = 20

// deviceResource compiles one assessed circuit to the device: the routed
// program's resources, its p2 budget (NoiseBudget with the routed counts,
// virtual rz left out) and estimated fidelity (device.Program.Fidelity).
// A circuit larger than the device's largest connected part gets Fits
// false and a note.
func deviceResource(o Options, c *circuit.Circuit) (*results.AssessDevice, error) {
	nan := math.NaN()
	d := &results.AssessDevice{Budget: nan, Fidelity: nan, Accuracy: nan, Exact: nan, Changed: nan, DurationNS: nan}
	p, err := device.Compile(c, o.Device, device.Options{})
	if errors.Is(err, device.ErrTooSmall) {
		d.Note = fmt.Sprintf("%d qubits do not fit %s (%d connected)", c.NQubits, o.Device.Name, connected(o.Device))
		return d, nil
	}
	if err != nil {
		return nil, fmt.Errorf("assess: device %s: %w", o.Device.Name, err)
	}
	a := p.After
	d.Fits = true
	d.TwoQubit, d.Swaps, d.SingleQubit, d.Depth, d.DurationNS = a.TwoQubit, a.Swaps, a.SingleQubit, a.Depth, a.DurationNS
	d.Budget = NoiseBudget(a.TwoQubit, a.SingleQubit-a.Virtual, o.Ratio, assessFidelity)
	d.Fidelity = p.Fidelity()
	return d, nil
}

// connected is the size of the device's largest connected part.
func connected(d *device.Device) int {
	big := 0
	for _, c := range d.Components() {
		big = max(big, len(c))
	}
	return big
}

// deviceAccuracy simulates the assessed form of the classifier (mode
// noisy on the device, train_subset m, the assessment's weights) on a
// sample of the test instances of pipeline pi (deviceSample: o.DeviceInstances
// of the first repeat's test rows, the classes in their proportions).
// Each fold's classifier has the run's interference seed of that split, so its
// training subsets are those every interference model of a run would
// draw. It fills Instances, Accuracy, Exact (the noiseless decision on the
// same subset, qkernel.Detail.Exact) and Changed. Circuits beyond the
// density matrix's qubits (sim.MaxDensityQubits) are not simulated: the
// trajectories they would need cost minutes per instance.
func deviceAccuracy(o Options, ad *assessDataset, pi, m int, d *results.AssessDevice, qubits int) error {
	if !d.Fits {
		return nil
	}
	if qubits > sim.MaxDensityQubits {
		d.Note = fmt.Sprintf("not simulated: %d qubits (the density matrix holds %d)", qubits, sim.MaxDensityQubits)
		return nil
	}
	ds := ad.quantum.Datasets[0]
	var folds []int // splits of the first repeat
	for si, sp := range ds.Splits {
		if sp.Repeat == 0 {
			folds = append(folds, si)
		}
	}
	tests := make([][]int, len(folds))
	for f, si := range folds {
		tests[f] = ds.Splits[si].Test
	}
	picks := deviceSample(tests, ad.data.Y, len(ad.data.Classes), o.DeviceInstances)
	type tally struct{ n, right, exact, changed int }
	out := make([]tally, len(folds))
	g, ctx := errgroup.WithContext(o.ctx)
	g.SetLimit(max(1, o.Workers))
	for f, si := range folds {
		if len(picks[f]) == 0 {
			continue
		}
		g.Go(func() error {
			prep, err := ad.quantum.Prepare(0, pi, si)
			if err != nil {
				return err
			}
			test := ds.Splits[si].Test
			_, dim := prep.Zte.Dims()
			pos := picks[f]
			Zte := mat.NewDense(len(pos), dim, nil)
			for j, p := range pos {
				Zte.SetRow(j, prep.Zte.RawRowView(p))
			}
			q := &qkernel.Classifier{Mode: qkernel.ModeNoisy, Device: o.Device, TrainSubset: m, Balance: !o.Uniform,
				Seed: ad.quantum.InterferenceSeed(0, si)}
			if err := q.Fit(prep.Ztr, prep.Ytr, len(ad.data.Classes)); err != nil {
				return &input.Error{File: o.File, Err: fmt.Errorf("%s: device %s, train_subset %d: %w", prep.Where, o.Device.Name, m, err)}
			}
			pred, det, err := q.PredictDetailContext(ctx, Zte)
			if err != nil {
				return err
			}
			t := tally{n: len(pred)}
			for i, k := range pred {
				y := ad.data.Y[test[pos[i]]]
				if k == y {
					t.right++
				}
				if det[i].Exact == y {
					t.exact++
				}
				if det[i].Exact != k {
					t.changed++
				}
			}
			out[f] = t
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return err
	}
	var sum tally
	for _, t := range out {
		sum.n += t.n
		sum.right += t.right
		sum.exact += t.exact
		sum.changed += t.changed
	}
	if sum.n > 0 {
		n := float64(sum.n)
		d.Instances = sum.n
		d.Accuracy, d.Exact, d.Changed = float64(sum.right)/n, float64(sum.exact)/n, float64(sum.changed)/n
	}
	return nil
}

// deviceSample chooses t test instances among the test parts of the
// folds (tests[f]: dataset rows; y: the rows' classes) and returns, per
// fold, the positions in its test part, ascending. The classes get their
// share of t by largest remainder (ties to the earlier class), every
// present class at least one instance while t allows (taken from the
// share furthest above its quota). The instances then go round the folds, class after
// class, one fold after the other (a fold without an unused row of the
// class passes its turn to the next), and within a fold a class's rows are
// taken from the middle of its run on. Evenly spread positions within each
// fold alone would not do: a test part keeps the dataset's order, and on
// Iris, sorted by class, two instances per fold were always a setosa and a
// versicolor, never a virginica.
func deviceSample(tests [][]int, y []int, nClass, t int) [][]int {
	nFold := len(tests)
	rows := make([][][]int, nClass) // rows[c][f]: positions of class c in fold f
	count := make([]int, nClass)
	total := 0
	for c := range rows {
		rows[c] = make([][]int, nFold)
	}
	for f, test := range tests {
		for p, row := range test {
			rows[y[row]][f] = append(rows[y[row]][f], p)
			count[y[row]]++
			total++
		}
	}
	t = min(t, total)
	share := make([]int, nClass)
	quota := make([]float64, nClass)
	if t > 0 {
		rem := make([]float64, nClass)
		given := 0
		for c, n := range count {
			quota[c] = float64(t) * float64(n) / float64(total)
			share[c] = int(quota[c])
			rem[c] = quota[c] - float64(share[c])
			given += share[c]
		}
		for ; given < t; given++ {
			best := -1
			for c := range count {
				if share[c] < count[c] && (best < 0 || rem[c] > rem[best]) {
					best = c
				}
			}
			share[best]++
			rem[best] = -1
		}
		present := 0
		for _, n := range count {
			if n > 0 {
				present++
			}
		}
		for c, n := range count {
			if n == 0 || share[c] > 0 || t < present {
				continue
			}
			big := -1 // the share furthest above its quota
			for b := range share {
				if share[b] > 1 && (big < 0 || float64(share[b])-quota[b] > float64(share[big])-quota[big]) {
					big = b
				}
			}
			share[big]--
			share[c]++
		}
	}
	picks := make([][]int, nFold)
	g := 0
	for c := range nClass {
		for range share[c] {
			f := g % nFold
			for len(rows[c][f]) == 0 {
				f = (f + 1) % nFold
			}
			l := rows[c][f]
			i := len(l) / 2 // the middle of the run first, then outwards
			picks[f] = append(picks[f], l[i])
			rows[c][f] = append(l[:i:i], l[i+1:]...)
			g = f + 1
		}
	}
	for f := range picks {
		slices.Sort(picks[f])
	}
	return picks
}

// withContext returns o carrying ctx for the device simulations.
func (o Options) withContext(ctx context.Context) Options {
	o.ctx = ctx
	return o
}
