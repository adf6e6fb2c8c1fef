package main

import (
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"fringe/bench/export"
	"fringe/bench/input"
	"fringe/qkernel/circuit"
	"fringe/qkernel/device"
)

// loadDevice loads the device of a -device flag: an embedded name or the
// path of a device file. Its errors are input errors (exit status 2); a
// device file's error names its file, line and key.
func loadDevice(name string) (*device.Device, error) {
	dev, err := device.Load(name)
	if err != nil {
		return nil, &input.Error{Key: "-device", Err: err}
	}
	return dev, nil
}

// printCircuitQASM writes the circuit of one test instance as OpenQASM
// (version 3 or 2) with comments naming what it classifies: the logical
// circuit, or with a device the native routed program on its qubits.
func printCircuitQASM(w io.Writer, res *export.CircuitResult, ds, pipeline string, balance bool, dev *device.Device, version int) error {
	var text string
	var err error
	if dev == nil {
		text, err = circuit.QASM(res.Circuit, circuit.QASMOptions{Version: version})
	} else {
		var p *device.Program
		if p, err = device.Compile(res.Circuit, dev, device.Options{}); err != nil {
			return &input.Error{Key: "-device", Err: err}
		}
		text, err = p.QASM(version)
	}
	if err != nil {
		return err
	}
	fmt.Fprintf(w, "// fringe: interference circuit, dataset %s, pipeline %s, test row %d, %d training rows (%s weights)\n",
		ds, pipeline, res.TestRow, len(res.TrainRows), map[bool]string{false: "uniform", true: "class-balancing"}[balance])
	fmt.Fprintf(w, "// training rows (dataset rows, 0-based): %s\n", joinInts(res.TrainRows))
	_, err = io.WriteString(w, text)
	return err
}

// printDeviceResources prints the circuit's resources before and after
// compilation to the device side by side: qubits, two-qubit gates, SWAPs
// routing added, single-qubit gates, depth and duration (the critical path
// with the device's gate durations; before routing its median ones), and
// where the registers start and end on the device.
func printDeviceResources(w io.Writer, res *export.CircuitResult, ds, pipeline string, dev *device.Device) error {
	p, err := device.Compile(res.Circuit, dev, device.Options{})
	if err != nil {
		return &input.Error{Key: "-device", Err: err}
	}
	b, a := p.Before, p.After
	l := p.Regs
	place := func(at []int) string {
		var parts []string
		reg := func(name string, qs []int) {
			if len(qs) == 0 {
				return
			}
			s := make([]string, len(qs))
			for i, q := range qs {
				s[i] = fmt.Sprintf("q[%d]", at[q])
			}
			parts = append(parts, name+" "+strings.Join(s, " "))
		}
		reg("ancilla", []int{l.Ancilla})
		reg("index", l.Index)
		reg("data", l.Data)
		reg("class", l.Class)
		return strings.Join(parts, ", ")
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "dataset\t%s (%d classes, %d features after %s)\n", ds, len(res.Dataset.Classes), res.Features, pipeline)
	fmt.Fprintf(tw, "training rows\t%d: %s\n", len(res.TrainRows), joinInts(res.TrainRows))
	fmt.Fprintf(tw, "device\t%s: %d qubits, native %s (%s)\n", dev.Name, dev.N(), dev.Family, dev.Note)
	fmt.Fprintf(tw, "start\t%s\n", place(p.Initial))
	fmt.Fprintf(tw, "end (measured)\t%s\n", place(p.Final))
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintln(w)
	tw = tabwriter.NewWriter(w, 0, 0, 3, ' ', 0)
	fmt.Fprintf(tw, "\tlogical (all-to-all, ry and cx)\trouted native on %s\n", dev.Name)
	fmt.Fprintf(tw, "qubits\t%d\t%d\n", b.Qubits, a.Qubits)
	fmt.Fprintf(tw, "two-qubit gates\t%d %s\t%d %s\n", b.TwoQubit, b.Gate, a.TwoQubit, a.Gate)
	fmt.Fprintf(tw, "SWAPs added\t%d\t%d\n", b.Swaps, a.Swaps)
	fmt.Fprintf(tw, "single-qubit gates\t%d\t%d\n", b.SingleQubit, a.SingleQubit)
	fmt.Fprintf(tw, "measurements\t%d\t%d\n", b.Measurements, a.Measurements)
	fmt.Fprintf(tw, "depth\t%d\t%d\n", b.Depth, a.Depth)
	fmt.Fprintf(tw, "duration (us)\t%.3f\t%.3f\n", b.DurationNS/1000, a.DurationNS/1000)
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintln(w, "\ndepth: gate layers of the as-soon-as-possible schedule, measurements excluded; duration: its critical path with the device's gate durations (the logical column with the device's median single- and two-qubit durations); SWAPs are counted in the two-qubit gates as three each, fewer where they cancel")
	return nil
}
