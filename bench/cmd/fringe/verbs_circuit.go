package main

import (
	"context"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"fringe/bench"
	"fringe/qkernel/circuit"
)

func runCircuit(ctx context.Context, c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlags(c, stdout)
	ds := fs.String("dataset", "iris", "dataset: embedded name or CSV path")
	classes := fs.String("classes", "", "comma-separated class subset (default all)")
	features := fs.String("features", "", "comma-separated feature subset, names or 0-based indices (default all)")
	pipeline := fs.String("pipeline", "std+l2", "preprocessing pipeline, fitted on the training rows")
	train := fs.Int("train", 0, "training-set size: a class-balanced random subset of the other rows (0 = all other rows)")
	balance := fs.Bool("balance", false, "class-balancing index weights 1/(C*M_k)")
	row := fs.Int("row", 0, "dataset row (0-based) of the test instance")
	qasm := fs.Bool("qasm", false, "print the OpenQASM 3 program of the circuit instead of its resources")
	seed := fs.Uint64("seed", 1, "seed for drawing the training subset")
	pos, err := parse(fs, args, stderr)
	if err != nil {
		return helpOK(err)
	}
	if len(pos) > 0 {
		return usagef("circuit takes no arguments, got %q (see 'fringe circuit -h')", pos[0])
	}
	if *train < 0 {
		return usagef("-train must be non-negative, got %d", *train)
	}
	req := bench.CircuitRequest{
		Dataset:  bench.DatasetSpec{Name: *ds, Classes: splitList(*classes), Features: splitList(*features)},
		Pipeline: *pipeline, Train: *train, Balance: *balance, Row: *row, Seed: *seed,
	}
	res, err := bench.BuildCircuit(req)
	if err != nil {
		return err
	}
	if *qasm {
		text, err := circuit.QASM3(res.Circuit)
		if err != nil {
			return err
		}
		fmt.Fprintf(stdout, "// fringe: interference circuit, dataset %s, pipeline %s, test row %d, %d training rows (%s weights)\n",
			*ds, *pipeline, res.TestRow, len(res.TrainRows), map[bool]string{false: "uniform", true: "class-balancing"}[*balance])
		_, err = io.WriteString(stdout, text)
		return err
	}
	r := res.Circuit.Resources()
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "dataset\t%s (%d classes, %d features after %s)\n", *ds, len(res.Dataset.Classes), res.Features, *pipeline)
	fmt.Fprintf(tw, "training rows\t%d\n", len(res.TrainRows))
	fmt.Fprintf(tw, "qubits\t%d = ancilla %d + index %d + data %d + class %d\n", r.Qubits, r.Ancilla, r.Index, r.Data, r.Class)
	fmt.Fprintf(tw, "CNOT gates\t%d\n", r.CNOT)
	fmt.Fprintf(tw, "single-qubit gates\t%d\n", r.SingleQubit)
	fmt.Fprintf(tw, "measurements\t%d\n", r.Measurements)
	fmt.Fprintf(tw, "depth\t%d (gates in the longest path, measurements excluded)\n", r.Depth)
	return tw.Flush()
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
