package export

import (
	"bytes"
	"context"
	"encoding/csv"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"fringe/bench/modelkit"
	"fringe/bench/plan"
	"fringe/bench/runner"
	"fringe/bench/spec"
	"fringe/qkernel/circuit"
	"fringe/qkernel/device"
	"fringe/qkernel/sim"
)

// deviceLoopSpec has a shot-mode interference model and two counts
// models with the same circuit settings: "device" reads noiseless counts
// of the native routed programs, "mitigated" counts with the device's
// readout errors, mitigated with the device's confusion matrices.
const deviceLoopSpec = `
name = "loop-device"
seed = 2024
pipelines = ["std"]
[[dataset]]
name = "iris"
[cv]
folds = 3
[[model]]
kind = "interference"
mode = "shots"
shots = 400
name = "shots"
balance = true
train_subset = 8
[[model]]
kind = "counts"
file = "measured.csv"
name = "device"
balance = true
train_subset = 8
[[model]]
kind = "counts"
file = "noisy.csv"
name = "mitigated"
balance = true
train_subset = 8
mitigate = "readout"
device = "line-16"
`

// nativeProgram is an exported native program read back from its text:
// the gates on the device's qubits and the physical qubit each measured
// bit is read from.
type nativeProgram struct {
	ops     []circuit.Op
	ancilla int   // physical qubit of ancilla_out[0]
	class   []int // physical qubit of class_out[j]
}

var (
	nativeOne  = regexp.MustCompile(`^(x|sx|rx|ry|rz)(?:\(([^)]*)\))? q\[(\d+)\];$`)
	nativeTwo  = regexp.MustCompile(`^(cx|cz) q\[(\d+)\], ?q\[(\d+)\];$`)
	nativeMeas = regexp.MustCompile(`^(ancilla|class)_out\[(\d+)\] = measure q\[(\d+)\];$`)
)

// readNative parses an exported OpenQASM 3 native program (one register
// q, measurements into ancilla_out and class_out).
func readNative(t *testing.T, text string) nativeProgram {
	t.Helper()
	names := map[string]circuit.Gate{"x": circuit.X, "sx": circuit.SX, "rx": circuit.RX, "ry": circuit.RY, "rz": circuit.RZ, "cx": circuit.CNOT, "cz": circuit.CZ}
	atoi := func(s string) int {
		v, err := strconv.Atoi(s)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	p := nativeProgram{ancilla: -1}
	for _, line := range strings.Split(text, "\n") {
		switch {
		case line == "", strings.HasPrefix(line, "//"), strings.HasPrefix(line, "OPENQASM"), strings.HasPrefix(line, "include"),
			strings.HasPrefix(line, "qubit["), strings.HasPrefix(line, "bit["):
		case nativeOne.MatchString(line):
			m := nativeOne.FindStringSubmatch(line)
			op := circuit.Op{Gate: names[m[1]], Target: atoi(m[3])}
			if m[2] != "" {
				a, err := strconv.ParseFloat(m[2], 64)
				if err != nil {
					t.Fatal(err)
				}
				op.Angle = a
			}
			p.ops = append(p.ops, op)
		case nativeTwo.MatchString(line):
			m := nativeTwo.FindStringSubmatch(line)
			p.ops = append(p.ops, circuit.Op{Gate: names[m[1]], Controls: []int{atoi(m[2])}, Target: atoi(m[3])})
		case nativeMeas.MatchString(line):
			m := nativeMeas.FindStringSubmatch(line)
			bit, q := atoi(m[2]), atoi(m[3])
			if m[1] == "ancilla" {
				p.ancilla = q
			} else {
				for len(p.class) <= bit {
					p.class = append(p.class, -1)
				}
				p.class[bit] = q
			}
		default:
			t.Fatalf("unexpected line %q", line)
		}
	}
	return p
}

// outcomes simulates the program on the qubits it touches (state vector)
// and returns the joint distribution of (ancilla_out, class_out) in the
// layout a*2^q + k, read from the measured physical qubits.
func (p nativeProgram) outcomes(t *testing.T) []float64 {
	t.Helper()
	var used []int
	for _, op := range p.ops {
		used = append(used, op.Target)
		used = append(used, op.Controls...)
	}
	used = append(append(used, p.ancilla), p.class...)
	slices.Sort(used)
	used = slices.Compact(used)
	local := map[int]int{}
	for i, q := range used {
		local[q] = i
	}
	c := &circuit.Circuit{NQubits: len(used), Regs: circuit.Layout{Ancilla: local[p.ancilla]}}
	for _, q := range p.class {
		c.Regs.Class = append(c.Regs.Class, local[q])
	}
	for _, op := range p.ops {
		o := op
		o.Target = local[op.Target]
		if len(op.Controls) > 0 {
			o.Controls = []int{local[op.Controls[0]]}
		}
		c.Ops = append(c.Ops, o)
	}
	c.Ops = append(c.Ops, circuit.Op{Gate: circuit.Measure, Target: c.Regs.Ancilla})
	for _, q := range c.Regs.Class {
		c.Ops = append(c.Ops, circuit.Op{Gate: circuit.Measure, Target: q})
	}
	dist, err := sim.Outcomes(c, sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	return dist
}

// TestCountsClosesLoopDevice exports a spec's circuits routed on line-16,
// reads every native program back from its text (gates on the device's
// qubits and the physical qubit of each measured bit, independently of
// the compiler's own bookkeeping), simulates it, draws the shots as shot
// mode does and imports them: the counts model decides exactly as shot
// mode on the logical circuits (the routed programs reproduce their
// distributions within 1e-10, checked, so the same draws give the same
// counts). A second counts file has the device's readout errors applied
// to the bits at the physical qubits the text names; the counts model
// with device = "line-16" and mitigate = "readout" (which recompiles each
// row to find those qubits) recovers the noiseless class probabilities
// within the shot error. index.csv's physical qubits agree with the text.
func TestCountsClosesLoopDevice(t *testing.T) {
	dir := t.TempDir()
	s, err := spec.Parse(filepath.Join(dir, "loop.toml"), []byte(deviceLoopSpec))
	if err != nil {
		t.Fatal(err)
	}
	s.Dir = dir
	for _, f := range []string{"measured.csv", "noisy.csv"} { // placeholders for the plan
		if err := os.WriteFile(filepath.Join(dir, f), nil, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	p, err := plan.New(s)
	if err != nil {
		t.Fatal(err)
	}
	dev, err := device.Load("line-16")
	if err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "circuits")
	if _, err := Circuits(context.Background(), p, out, Options{Workers: 2, Device: dev}); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(filepath.Join(out, "index.csv"))
	if err != nil {
		t.Fatal(err)
	}
	index, err := csv.NewReader(f).ReadAll()
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for j, h := range index[0] {
		col[h] = j
	}
	for _, h := range append(slices.Clone(IndexColumns), DeviceIndexColumns...) {
		if _, ok := col[h]; !ok {
			t.Fatalf("index.csv lacks column %s: %v", h, index[0])
		}
	}
	fileOf := map[string][]string{}
	for _, r := range index[1:] {
		fileOf[strings.Join(r[1:6], "/")] = r
	}
	set, err := resolveExport(p, "shots")
	if err != nil {
		t.Fatal(err)
	}
	var clean, noisy bytes.Buffer
	wc, wn := csv.NewWriter(&clean), csv.NewWriter(&noisy)
	wc.Write(modelkit.CountsColumns)
	wn.Write(modelkit.CountsColumns)
	aux := rand.New(rand.NewPCG(3, 4))
	const shots = 400
	n := 0
	type inst struct{ repeat, fold, row int }
	noiseless := map[inst][]float64{} // P(k | acc) of the routed program, per class
	d := p.Datasets[0]
	for si := range d.Splits {
		err := exportUnit(p, 0, 0, si, set, func(it exportItem) error {
			key := fmt.Sprintf("%s/%s/%d/%d/%d", it.Dataset, it.Pipeline, it.Repeat, it.Fold, it.Row)
			rec, ok := fileOf[key]
			if !ok {
				return fmt.Errorf("index lacks %s", key)
			}
			text, err := os.ReadFile(filepath.Join(out, rec[0]))
			if err != nil {
				return err
			}
			prog := readNative(t, string(text))
			if got := rec[col["ancilla_qubit"]]; got != strconv.Itoa(prog.ancilla) {
				t.Errorf("%s: index.csv ancilla_qubit %s, the program measures ancilla_out on q[%d]", key, got, prog.ancilla)
			}
			if got, want := rec[col["class_qubits"]], joinRows(prog.class); got != want {
				t.Errorf("%s: index.csv class_qubits %q, the program measures class_out on %q", key, got, want)
			}
			dist := prog.outcomes(t)
			h0 := len(dist) / 2
			acc0 := 0.0
			for _, v := range dist[:h0] {
				acc0 += v
			}
			for k := range it.Classes {
				noiseless[inst{it.Repeat, it.Fold, it.Row}] = append(noiseless[inst{it.Repeat, it.Fold, it.Row}], dist[k]/acc0)
			}
			logical, err := sim.Outcomes(it.Circuit, sim.Options{})
			if err != nil {
				return err
			}
			for k := range logical {
				if math.Abs(dist[k]-logical[k]) > 1e-10 {
					t.Fatalf("%s: outcome %d: routed program %v, logical circuit %v", key, k, dist[k], logical[k])
				}
			}
			// The draws of shot mode, from the row's stream.
			rng, err := it.qk.RowRand(it.Pos)
			if err != nil {
				return err
			}
			h := len(dist) / 2
			agg := make([]float64, h+1)
			copy(agg, dist[:h])
			for _, v := range dist[h:] {
				agg[h] += v
			}
			acc := sim.SampleCounts(agg, shots, rng)
			rej := make([]int, h)
			if acc[h] > 0 {
				rej = sim.SampleCounts(dist[h:], acc[h], aux)
			}
			q := len(prog.class)
			write := func(w *csv.Writer, counts []int) {
				for o, c := range counts {
					a, k := o/h, o%h
					w.Write([]string{it.Dataset, strconv.Itoa(it.Repeat), strconv.Itoa(it.Fold), strconv.Itoa(it.Row),
						strconv.Itoa(a), modelkit.FormatBits(k, q), strconv.Itoa(c)})
				}
			}
			write(wc, append(slices.Clone(acc[:h]), rej...))
			// Readout errors of the measured physical qubits, bit by bit
			// (bit b < q: class_out[b]; bit q: ancilla_out), then shots.
			bits := append(slices.Clone(prog.class), prog.ancilla)
			ro := slices.Clone(dist)
			for b, pq := range bits {
				p01, p10 := dev.Qubits[pq].ReadoutP01, dev.Qubits[pq].ReadoutP10
				m := 1 << b
				for i := range ro {
					if i&m == 0 {
						v0, v1 := ro[i], ro[i|m]
						ro[i], ro[i|m] = (1-p01)*v0+p10*v1, p01*v0+(1-p10)*v1
					}
				}
			}
			write(wn, sim.SampleCounts(ro, 200000, aux))
			n++
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
	}
	if n != len(index)-1 {
		t.Fatalf("measured %d instances, the index lists %d", n, len(index)-1)
	}
	wc.Flush()
	wn.Flush()
	if err := os.WriteFile(filepath.Join(dir, "measured.csv"), clean.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "noisy.csv"), noisy.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	p, err = plan.New(s)
	if err != nil {
		t.Fatal(err)
	}
	res, err := runner.Execute(context.Background(), p, runner.Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	preds, _, _ := runner.Records(p, res)
	by := map[string]map[inst]int{}
	for i, pr := range preds {
		if by[pr.Model] == nil {
			by[pr.Model] = map[inst]int{}
		}
		by[pr.Model][inst{pr.Repeat, pr.Fold, pr.Row}] = i
	}
	for k, i := range by["shots"] {
		pr := preds[i]
		dv := preds[by["device"][k]]
		if dv.Predicted != pr.Predicted || dv.Shots != pr.Shots || dv.Exact != pr.Exact {
			t.Errorf("%+v: device counts predict %s (%d shots), shot mode %s (%d)", k, dv.Predicted, dv.Shots, pr.Predicted, pr.Shots)
		}
		for c := range pr.Probs {
			if dv.Probs[c] != pr.Probs[c] { // exact: the same ratios of the same integers
				t.Errorf("%+v class %d: %v, shot mode %v", k, c, dv.Probs[c], pr.Probs[c])
			}
		}
	}
	// Mitigated counts against the routed program's noiseless P(k | acc):
	// 200000 shots, so 6 standard errors of a proportion of N_acc shots,
	// sqrt(1/(4 N_acc)), times 3 for the inversion of three bits'
	// confusion (p01 + p10 <= 0.06 on line-16's qubits, each inverse
	// amplifying by at most 1/0.94). The raw counts are off by more on
	// average (readout errors of 1 to 4%).
	var rawErr, mitErr float64
	for k, i := range by["mitigated"] {
		pr := preds[i]
		want := noiseless[k]
		if pr.RawPredicted == "" || len(pr.RawProbs) != len(want) {
			t.Fatalf("%+v: no raw decision of the mitigated counts", k)
		}
		tol := 6 * 3 * math.Sqrt(0.25/float64(pr.Shots))
		for c := range want {
			if d := math.Abs(pr.Probs[c] - want[c]); d > tol {
				t.Errorf("%+v class %d: mitigated %v, noiseless %v (|d| %.3g > %.3g)", k, c, pr.Probs[c], want[c], d, tol)
			}
			mitErr += math.Abs(pr.Probs[c] - want[c])
			rawErr += math.Abs(pr.RawProbs[c] - want[c])
		}
	}
	if len(by["mitigated"]) != d.Data.Len() {
		t.Errorf("%d mitigated instances, want %d", len(by["mitigated"]), d.Data.Len())
	}
	if !(mitErr < rawErr/3) {
		t.Errorf("mitigation does not help: mean |error| %.3g mitigated, %.3g raw", mitErr, rawErr)
	}
	t.Logf("%d instances: counts of the routed programs decide as shot mode; mitigated |error| %.2g, raw %.2g (sums over instances and classes)", len(by["shots"]), mitErr, rawErr)
}
