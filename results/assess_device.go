package results

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// AssessDevice is one assessed circuit on the device of `fringe assess
// -device`: the routed native program's resources (device.Compile), its
// noise budget and estimated fidelity, and the accuracy of the classifier
// simulated under the device's calibrated noise on a sample of test
// instances, beside the exact (noiseless) accuracy on the same instances
// and training subsets.
type AssessDevice struct {
	// Fits reports whether the circuit fits the device's largest
	// connected part; the other fields are zero (NaN) when it does not.
	Fits bool
	// The routed program: two-qubit native gates, SWAPs inserted,
	// single-qubit gates, depth and duration (critical path, ns).
	TwoQubit, Swaps, SingleQubit, Depth int
	DurationNS                          float64
	// Budget is the two-qubit error rate at which the routed program
	// keeps an estimated fidelity of 1/2 (as AssessRow.NoiseBudget, with
	// the routed counts; virtual rz left out); Fidelity the estimated
	// fidelity with the device's own error rates (device.Program.Fidelity).
	Budget, Fidelity float64
	// Instances is the number of test instances simulated (0: none; see
	// Note). Accuracy is the share of them the classifier under the
	// device's noise decides right, Exact the share the exact classifier
	// decides right on the same instances and training subsets, Changed
	// the share whose decision the noise changed; NaN without instances.
	Instances                int
	Accuracy, Exact, Changed float64
	Note                     string // why a circuit was not routed or simulated; "" otherwise
}

// deviceColumns are the columns assess.csv adds with a device.
func deviceColumns(a *Assessment) []string {
	cols := []string{"device", "device_two_qubit", "device_swaps", "device_depth", "device_duration_us", "device_p2_budget", "device_fidelity"}
	for _, m := range a.Subsets {
		k := "k" + strconv.Itoa(m)
		cols = append(cols, "device_accuracy_"+k, "device_exact_"+k, "device_changed_"+k)
	}
	return append(cols, "device_instances")
}

// deviceCells are a row's cells of deviceColumns.
func deviceCells(a *Assessment, r AssessRow) []string {
	cells := []string{csvTexts(a.Device)[0]}
	cells = append(cells, deviceResourceCells(r.Device)[:6]...)
	for _, m := range a.Subsets {
		d := a.deviceAt(r.Dataset, r.Pipeline, m)
		if d == nil || d.Instances == 0 {
			cells = append(cells, "", "", "")
			continue
		}
		cells = append(cells, Fmt(d.Accuracy), Fmt(d.Exact), Fmt(d.Changed))
	}
	return append(cells, strconv.Itoa(a.DeviceInstances))
}

// deviceAt returns the device part of the resource row of (dataset,
// pipeline, train_subset m), or nil.
func (a *Assessment) deviceAt(dataset, pipeline string, m int) *AssessDevice {
	for _, r := range a.Resources {
		if r.Dataset == dataset && r.Pipeline == pipeline && r.Train == m && !r.Full {
			return r.Device
		}
	}
	return nil
}

// deviceResourceColumns are the columns assess-resources.csv adds with a
// device.
var deviceResourceColumns = []string{"device_two_qubit", "device_swaps", "device_depth", "device_duration_us", "device_p2_budget", "device_fidelity",
	"device_single_qubit", "device_instances", "device_accuracy", "device_exact_accuracy", "device_changed"}

// deviceResourceCells are the cells of deviceResourceColumns (empty for
// a circuit that does not fit).
func deviceResourceCells(d *AssessDevice) []string {
	if d == nil || !d.Fits {
		return make([]string, len(deviceResourceColumns))
	}
	it := strconv.Itoa
	out := []string{it(d.TwoQubit), it(d.Swaps), it(d.Depth), strconv.FormatFloat(d.DurationNS/1000, 'f', 3, 64), fmtSci(d.Budget), Fmt(d.Fidelity),
		it(d.SingleQubit), it(d.Instances)}
	if d.Instances == 0 {
		return append(out, "", "", "")
	}
	return append(out, Fmt(d.Accuracy), Fmt(d.Exact), Fmt(d.Changed))
}

// writeAssessDeviceMarkdown writes assess.md's section on the device.
func writeAssessDeviceMarkdown(b *strings.Builder, a *Assessment) {
	fmt.Fprintf(b, "\n## On device %s\n\n", MDEscape(a.Device))
	fmt.Fprintf(b, "%s. Every circuit of the table above compiled to the device (placement, SABRE routing, native %s gates, one-qubit runs merged): its two-qubit gates, the SWAPs routing inserted, depth and duration (critical path with the device's gate durations), the p2 budget of the routed program (as above, with the routed counts; virtual rz left out) and its estimated fidelity with the device's own error rates (the product of 1 − error over its gates and readouts). Accuracy under the device's calibrated noise is simulated (density matrix up to 12 qubits, gate and readout errors, T1/T2 relaxation during gates and idling) on %d test instances per row, taken from the test parts of the first repeat, the classes in their proportions, round the folds; exact = the noiseless classifier on the same instances and training subsets; changed = the share of decisions the noise changed.\n\n",
		MDEscape(a.DeviceNote), MDEscape(a.DeviceFamily), a.DeviceInstances)
	b.WriteString("| dataset | pipeline | training set | two-qubit (logical → routed) | SWAPs | depth | duration (µs) | p2 budget | fidelity | accuracy on device | exact, same instances | changed | note |\n")
	b.WriteString("|---|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---|\n")
	for _, r := range a.Resources {
		d := r.Device
		if d == nil {
			continue
		}
		train := strconv.Itoa(r.Train)
		if r.Full {
			train += " (full)"
		}
		if !d.Fits {
			fmt.Fprintf(b, "| %s | %s | %s | %d → – | – | – | – | – | – | – | – | – | %s |\n", MDEscape(r.Dataset), MDEscape(r.Pipeline), train, r.CNOT, MDEscape(d.Note))
			continue
		}
		acc, ex, ch := "–", "–", "–"
		if d.Instances > 0 {
			acc, ex, ch = af3(d.Accuracy), af3(d.Exact), af3(d.Changed)
		}
		fmt.Fprintf(b, "| %s | %s | %s | %d → %d | %d | %d | %.1f | %s | %s | %s | %s | %s | %s |\n", MDEscape(r.Dataset), MDEscape(r.Pipeline), train,
			r.CNOT, d.TwoQubit, d.Swaps, d.Depth, d.DurationNS/1000, f2e(d.Budget), fidelityCell(d.Fidelity), acc, ex, ch, MDEscape(d.Note))
	}
}

// fidelityCell formats an estimated fidelity: three decimals, or
// scientific notation below 10^-3.
func fidelityCell(f float64) string {
	if math.IsNaN(f) {
		return "–"
	}
	if f < 1e-3 {
		return strconv.FormatFloat(f, 'e', 1, 64)
	}
	return fmt.Sprintf("%.3f", f)
}

// writeAssessDeviceTeX writes assess.tex's table of the device.
func writeAssessDeviceTeX(b *strings.Builder, a *Assessment) {
	b.WriteString("\n\\begin{table}\n\\centering\n\\small\n")
	fmt.Fprintf(b, "\\caption{The circuits on device %s (%s): routed native two-qubit gates, SWAPs, depth, duration, estimated fidelity, and accuracy under the device's calibrated noise (simulated on %d test instances per row) beside the exact accuracy on the same instances.}\n",
		TeXEscape(a.Device), TeXEscape(a.DeviceNote), a.DeviceInstances)
	b.WriteString("\\label{tab:assess-device}\n")
	b.WriteString("\\begin{tabular}{llrrrrrrrr}\n\\toprule\n")
	b.WriteString("Dataset & Pipeline & $M$ & 2-qubit & SWAPs & Depth & $\\mu$s & Fidelity & Device acc. & Exact acc. \\\\\n\\midrule\n")
	for _, r := range a.Resources {
		d := r.Device
		if d == nil {
			continue
		}
		m := strconv.Itoa(r.Train)
		if r.Full {
			m += "*"
		}
		if !d.Fits {
			fmt.Fprintf(b, "%s & %s & %s & -- & -- & -- & -- & -- & -- & -- \\\\\n", TeXEscape(r.Dataset), TeXEscape(r.Pipeline), m)
			continue
		}
		acc, ex := "--", "--"
		if d.Instances > 0 {
			acc, ex = texF3(d.Accuracy), texF3(d.Exact)
		}
		fid := texF3(d.Fidelity)
		if d.Fidelity < 1e-3 {
			fid = texSci(d.Fidelity)
		}
		fmt.Fprintf(b, "%s & %s & %s & %d & %d & %d & %.1f & %s & %s & %s \\\\\n", TeXEscape(r.Dataset), TeXEscape(r.Pipeline), m,
			d.TwoQubit, d.Swaps, d.Depth, d.DurationNS/1000, fid, acc, ex)
	}
	b.WriteString("\\bottomrule\n\\end{tabular}\n\\end{table}\n")
}
