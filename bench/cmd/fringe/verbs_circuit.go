package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"runtime"
	"strings"
	"text/tabwriter"

	"fringe/bench/export"
	"fringe/bench/modelkit"
	"fringe/bench/plan"
	"fringe/bench/spec"
	"fringe/qkernel/circuit"
	"fringe/qkernel/device"
)

func runCircuit(ctx context.Context, c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlags(c, stdout)
	ds := fs.String("dataset", "iris", "dataset: embedded name or CSV path; may also be given as the argument: fringe circuit wine")
	fs.StringVar(ds, "datasets", "iris", "same as -dataset (one dataset)")
	classes := fs.String("classes", "", "comma-separated class subset (default all)")
	features := fs.String("features", "", "comma-separated feature subset, names or 0-based indices (default all)")
	pipeline := fs.String("pipeline", "std+l2", "preprocessing pipeline, fitted on the training rows")
	train := fs.Int("train", 0, "training-set size: a class-balanced random subset of the other rows (0 = all other rows)")
	balance := fs.Bool("balance", false, "class-balancing index weights 1/(C*M_k)")
	row := fs.Int("row", 0, "dataset row (0-based) of the test instance")
	qasm := fs.Bool("qasm", false, "print the OpenQASM 3 program of the circuit instead of its resources")
	seed := fs.Uint64("seed", 1, "seed for drawing the training subset")
	exportDir := fs.String("export", "", "write the OpenQASM 3 program of every test instance of a spec's splits into folder `DIR`, with index.csv mapping files to (dataset, pipeline, repeat, fold, row): fringe circuit -export DIR SPEC.toml")
	model := fs.String("model", "", "with -export: the spec's interference or counts model whose balance and train_subset the circuits use (default: the first counts model, else the first interference model)")
	workers := fs.Int("workers", runtime.NumCPU(), "with -export: splits compiled at once")
	devName := fs.String("device", "", "compile to the device `NAME|FILE` (embedded: "+strings.Join(device.Names(), ", ")+"; or a device file): logical and routed native resources side by side; with -qasm, -qasm2 or -export the native routed programs")
	qasm2 := fs.Bool("qasm2", false, "print OpenQASM 2.0 instead of the resources (with -export: write OpenQASM 2.0 files)")
	pos, err := parse(fs, args, stderr)
	if err != nil {
		return helpOK(err)
	}
	var dev *device.Device
	if *devName != "" {
		if dev, err = loadDevice(*devName); err != nil {
			return err
		}
	}
	if *qasm && *qasm2 {
		return usagef("-qasm (OpenQASM 3) and -qasm2 (OpenQASM 2.0) exclude each other")
	}
	if *exportDir != "" {
		return runExport(ctx, fs, pos, *exportDir, *model, *workers, dev, *qasm2, stdout, stderr)
	}
	if *model != "" {
		return usagef("-model applies with -export only")
	}
	if len(pos) > 0 {
		set := false
		fs.Visit(func(f *flag.Flag) { set = set || f.Name == "dataset" || f.Name == "datasets" })
		switch {
		case strings.HasSuffix(strings.ToLower(pos[0]), ".toml"):
			return usagef("circuit reads a spec with -export only: fringe circuit -export DIR %s (see 'fringe circuit -h')", pos[0])
		case len(pos) > 1:
			return usagef("circuit shows the circuit of one dataset, got %d arguments (%s) (see 'fringe circuit -h')", len(pos), strings.Join(pos, " "))
		case set && *ds != pos[0]:
			return usagef("circuit: dataset given both as the argument %s and with -dataset %s; give it one way", pos[0], *ds)
		}
		*ds = pos[0]
	}
	if strings.Contains(*ds, ",") {
		return usagef("-dataset %s: circuit shows the circuit of one dataset; run it once per dataset", *ds)
	}
	if *train < 0 {
		return usagef("-train must be non-negative, got %d", *train)
	}
	req := export.CircuitRequest{
		Dataset:  spec.Dataset{Name: *ds, Classes: splitList(*classes), Features: splitList(*features)},
		Pipeline: *pipeline, Train: *train, Balance: *balance, Row: *row, Seed: *seed,
	}
	res, err := export.BuildCircuit(req)
	if err != nil {
		return err
	}
	if dev != nil || *qasm2 {
		switch {
		case *qasm || *qasm2:
			return printCircuitQASM(stdout, res, *ds, *pipeline, *balance, dev, map[bool]int{false: 3, true: 2}[*qasm2])
		default:
			return printDeviceResources(stdout, res, *ds, *pipeline, dev)
		}
	}
	if *qasm {
		text, err := circuit.QASM3(res.Circuit)
		if err != nil {
			return err
		}
		fmt.Fprintf(stdout, "// fringe: interference circuit, dataset %s, pipeline %s, test row %d, %d training rows (%s weights)\n",
			*ds, *pipeline, res.TestRow, len(res.TrainRows), map[bool]string{false: "uniform", true: "class-balancing"}[*balance])
		fmt.Fprintf(stdout, "// training rows (dataset rows, 0-based): %s\n", joinInts(res.TrainRows))
		_, err = io.WriteString(stdout, text)
		return err
	}
	r := res.Circuit.Resources()
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "dataset\t%s (%d classes, %d features after %s)\n", *ds, len(res.Dataset.Classes), res.Features, *pipeline)
	fmt.Fprintf(tw, "training rows\t%d: %s\n", len(res.TrainRows), joinInts(res.TrainRows))
	fmt.Fprintf(tw, "qubits\t%d = ancilla %d + index %d + data %d + class %d\n", r.Qubits, r.Ancilla, r.Index, r.Data, r.Class)
	fmt.Fprintf(tw, "CNOT gates\t%d\n", r.CNOT)
	fmt.Fprintf(tw, "single-qubit gates\t%d\n", r.SingleQubit)
	fmt.Fprintf(tw, "measurements\t%d\n", r.Measurements)
	fmt.Fprintf(tw, "depth\t%d (gates in the longest path, measurements excluded)\n", r.Depth)
	return tw.Flush()
}

// runExport is `fringe circuit -export DIR SPEC.toml`: the circuits of
// every test instance of the spec, for a device or simulator of the
// user's choice, whose counts a model of kind counts reads back.
func runExport(ctx context.Context, fs *flag.FlagSet, pos []string, dir, model string, workers int, dev *device.Device, qasm2 bool, stdout, stderr io.Writer) error {
	var clash []string
	fs.Visit(func(f *flag.Flag) {
		switch f.Name {
		case "export", "model", "workers", "device", "qasm2":
		default:
			clash = append(clash, "-"+f.Name)
		}
	})
	if len(clash) > 0 {
		return usagef("-export takes datasets, pipelines and settings from the spec; %s do(es) not apply", strings.Join(clash, ", "))
	}
	if len(pos) != 1 {
		return usagef("-export needs exactly one spec file: fringe circuit -export DIR SPEC.toml")
	}
	if workers < 1 {
		return usagef("-workers must be at least 1, got %d", workers)
	}
	s, err := loadSpec(pos[0], stderr)
	if err != nil {
		return err
	}
	pl, err := plan.New(s)
	if err != nil {
		return err
	}
	printWarnings(s, stderr)
	opt := export.Options{Model: model, Workers: workers, Device: dev}
	version := "OpenQASM 3"
	if qasm2 {
		opt.QASMVersion, version = 2, "OpenQASM 2.0"
	}
	sum, err := export.Circuits(ctx, pl, dir, opt)
	if err != nil {
		return err
	}
	settings := "uniform weights on the whole training part (the spec has no interference or counts model)"
	if sum.Model != "" {
		w := "uniform weights"
		if sum.Balance {
			w = "class-balancing weights"
		}
		sub := "the whole training part"
		if sum.TrainSubset > 0 {
			sub = fmt.Sprintf("class-balanced subsets of %d training vectors", sum.TrainSubset)
		}
		settings = fmt.Sprintf("settings of model %s: %s, %s", sum.Model, w, sub)
	}
	if sum.Device != "" {
		fmt.Fprintf(stdout, "wrote %d native %s programs routed on device %s (%.1f MB, at most %d qubits, %d two-qubit gates, %.1f us) and index.csv to %s\n",
			sum.Circuits, version, sum.Device, float64(sum.Bytes)/1e6, sum.MaxQubits, sum.MaxTwoQubit, sum.MaxDurationNS/1000, sum.Dir)
		fmt.Fprintf(stdout, "index.csv names each program's measured physical qubits (%s); the bits keep their names, so counts are reported as without a device\n", strings.Join(export.DeviceIndexColumns[1:3], ", "))
	} else {
		fmt.Fprintf(stdout, "wrote %d %s programs (%.1f MB, at most %d qubits) and index.csv to %s\n", sum.Circuits, version, float64(sum.Bytes)/1e6, sum.MaxQubits, sum.Dir)
	}
	fmt.Fprintf(stdout, "circuits: %s\n", settings)
	fmt.Fprintf(stdout, "report outcomes as CSV with columns %s (and pipeline when the spec has several); class is the bit string class_out[q-1]...class_out[0]\n", strings.Join(modelkit.CountsColumns, ","))
	return nil
}

func splitList(s string) []string {
	if strings.TrimSpace(s) == "" {
		return nil
	}
	var out []string
	for _, f := range strings.Split(s, ",") {
		out = append(out, strings.TrimSpace(f))
	}
	return out
}
