package assess

import (
	"context"
	"errors"
	"fmt"
	"math"

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
// sample of the test instances of pipeline pi: o.DeviceInstances of them
// shared out over the folds of the first repeat one per fold, round after
// round, and within a fold's test part t of its n instances at positions
// floor(j n / t), j = 0..t-1 (spread evenly: stratified test parts keep
// the rows in dataset order, so the classes come in their proportions).
// Each fold's
// classifier has the run's interference seed of that split, so its
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
	take := make([]int, len(folds)) // test instances taken per fold
	left := o.DeviceInstances
	for j := 0; left > 0; j++ {
		more := false
		for f, si := range folds {
			if left > 0 && j < len(ds.Splits[si].Test) {
				take[f]++
				left--
				more = true
			}
		}
		if !more {
			break
		}
	}
	type tally struct{ n, right, exact, changed int }
	out := make([]tally, len(folds))
	g, ctx := errgroup.WithContext(o.ctx)
	g.SetLimit(max(1, o.Workers))
	for f, si := range folds {
		if take[f] == 0 {
			continue
		}
		g.Go(func() error {
			prep, err := ad.quantum.Prepare(0, pi, si)
			if err != nil {
				return err
			}
			// take[f] positions spread evenly over the test part (which
			// is in split order, so classes come in their proportions).
			test := ds.Splits[si].Test
			_, dim := prep.Zte.Dims()
			pos := make([]int, take[f])
			Zte := mat.NewDense(take[f], dim, nil)
			for j := range pos {
				pos[j] = j * len(test) / take[f]
				Zte.SetRow(j, prep.Zte.RawRowView(pos[j]))
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

// withContext returns o carrying ctx for the device simulations.
func (o Options) withContext(ctx context.Context) Options {
	o.ctx = ctx
	return o
}
