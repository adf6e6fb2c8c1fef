package export

import (
	"bufio"
	"bytes"
	"context"
	"encoding/csv"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"golang.org/x/sync/errgroup"

	"fringe/bench/input"
	"fringe/bench/modelkit"
	"fringe/bench/outdir"
	"fringe/bench/plan"
	"fringe/qkernel"
	"fringe/qkernel/circuit"
	"fringe/qkernel/device"
	"fringe/results"
)

// IndexColumns are the columns of index.csv in a circuit export.
var IndexColumns = []string{"file", "dataset", "pipeline", "repeat", "fold", "row", "qubits", "class_bits", "train_rows"}

// Options configure Circuits.
type Options struct {
	// Model names the spec's model (kind "interference" or "counts") whose
	// balance and train_subset the circuits use. "" picks the first counts
	// model, else the first interference model; a spec with neither gets
	// uniform weights on the whole training part.
	Model string
	// Workers is the number of splits compiled at once; 0 means 1.
	Workers int
	// Device, when set, compiles every circuit to the device (placement,
	// routing, native gates: device.Compile) and writes the native routed
	// program on the device's qubits; index.csv then gets the columns
	// DeviceIndexColumns. The measured bits keep their names (ancilla_out,
	// class_out), so a counts file reads back unchanged.
	Device *device.Device
	// QASMVersion is 3 (0 means 3) or 2 (OpenQASM 2.0).
	QASMVersion int
}

// DeviceIndexColumns are the columns index.csv adds for an export to a
// device: the device, the physical qubit that measures ancilla_out[0], the
// physical qubits that measure class_out[0], class_out[1], ... (in that
// order), the physical qubit of every logical qubit (ancilla, index, data,
// class registers in circuit order) before the first gate and after the
// last (routing's final permutation), and the routed program's two-qubit
// gates, SWAPs inserted, depth and duration in nanoseconds.
var DeviceIndexColumns = []string{"device", "ancilla_qubit", "class_qubits", "initial_layout", "final_layout", "two_qubit_gates", "swaps", "depth", "duration_ns"}

// Summary describes a finished export.
type Summary struct {
	Dir         string
	Circuits    int
	Model       string // the model whose settings were used; "" for none
	Balance     bool
	TrainSubset int
	MaxQubits   int
	Bytes       int64  // total size of the OpenQASM files
	Device      string // the device compiled for ("" for none)
	// MaxTwoQubit and MaxDurationNS are the largest routed program's
	// two-qubit gates and duration on the device (0 without one).
	MaxTwoQubit   int
	MaxDurationNS float64
}

// exportSettings are the circuit settings of an export.
type exportSettings struct {
	model   string
	balance bool
	subset  int
}

// resolveExport picks the model whose settings the circuits use.
func resolveExport(p *plan.Plan, name string) (exportSettings, error) {
	pick := func(m modelkit.Spec) exportSettings {
		b, _ := m.Params["balance"].(bool)
		k, _ := m.Params["train_subset"].(int)
		return exportSettings{model: m.Name, balance: b, subset: k}
	}
	if name != "" {
		for _, m := range p.Spec.Models {
			if m.Name != name {
				continue
			}
			if m.Kind != "interference" && m.Kind != "counts" {
				return exportSettings{}, &input.Error{File: p.Spec.File, Err: fmt.Errorf("model %s is of kind %s; the circuits take their settings from a model of kind interference or counts", name, m.Kind)}
			}
			return pick(m), nil
		}
		var names []string
		for _, m := range p.Spec.Models {
			if m.Kind == "interference" || m.Kind == "counts" {
				names = append(names, m.Name)
			}
		}
		return exportSettings{}, &input.Error{File: p.Spec.File, Err: fmt.Errorf("no model named %q (interference and counts models of the spec: %s)", name, orNoneList(names))}
	}
	for _, kind := range []string{"counts", "interference"} {
		for _, m := range p.Spec.Models {
			if m.Kind == kind {
				return pick(m), nil
			}
		}
	}
	return exportSettings{}, nil
}

func orNoneList(s []string) string {
	if len(s) == 0 {
		return "none"
	}
	return strings.Join(s, ", ")
}

// exportItem is the circuit of one test instance.
type exportItem struct {
	Dataset, Pipeline      string
	Repeat, Fold, Row, Pos int // Pos: position of the row in its fold's test part
	Classes                []string
	TrainRows              []int // dataset rows of the encoded training vectors, ascending
	Circuit                *circuit.Circuit
	qk                     *qkernel.Classifier // fitted on the split's training part
}

// exportUnit compiles the circuits of the test instances of one split of
// one dataset under one pipeline, in test order, and hands each to fn. The
// pipeline is fitted on the training part as in a run, and the training
// subset of each instance is the one the run's interference models (and a
// counts model) draw for it.
func exportUnit(p *plan.Plan, di, pi, si int, set exportSettings, fn func(exportItem) error) error {
	d := p.Datasets[di]
	sp := d.Splits[si]
	ps := p.Spec.Pipelines[pi]
	pr, err := p.Prepare(di, pi, si)
	if err != nil {
		return err
	}
	where, Ztr, ytr, rowsTr, Zte, rowsTe := pr.Where, pr.Ztr, pr.Ytr, pr.RowsTr, pr.Zte, pr.RowsTe
	model := set.model
	if model == "" {
		model = "(none: uniform weights)"
	}
	q := &qkernel.Classifier{Balance: set.balance, TrainSubset: set.subset, Seed: p.InterferenceSeed(di, si)}
	if err := q.Fit(Ztr, ytr, len(d.Data.Classes)); err != nil {
		return p.ClassifyModel(err, where, model, rowsTr)
	}
	for pos, row := range rowsTe {
		c, idx, err := q.RowCircuit(Zte.RawRowView(pos), pos)
		if err != nil {
			return p.ClassifyModel(err, where, model, rowsTe)
		}
		train := make([]int, len(idx))
		for i, j := range idx {
			train[i] = rowsTr[j]
		}
		err = fn(exportItem{
			Dataset: d.Name, Pipeline: ps, Repeat: sp.Repeat, Fold: sp.Fold, Row: row, Pos: pos,
			Classes: d.Data.Classes, TrainRows: train, Circuit: c, qk: q,
		})
		if err != nil {
			return err
		}
	}
	return nil
}

// Circuits writes the OpenQASM 3 program of the interference circuit
// of every test instance of the plan (every dataset, pipeline, repeat and
// fold) into dir, with index.csv mapping each file to its instance
// (columns IndexColumns; file names are relative to dir). The
// circuits are those a run's interference models would simulate: the
// pipeline fitted on the training part, the training set or subset and the
// weights of the model opt.Model names (see Options). The class
// register holds the class index in binary, class_out[0] its least
// significant bit; each file's comments name the classes.
//
// The export is written into a temporary folder beside dir and renamed
// into place when complete; an existing dir is replaced only if it is an
// earlier export (it holds index.csv) or empty, else Circuits
// refuses. Errors caused by the input satisfy errors.Is(err, input.ErrBad).
func Circuits(ctx context.Context, p *plan.Plan, dir string, opt Options) (*Summary, error) {
	set, err := resolveExport(p, opt.Model)
	if err != nil {
		return nil, err
	}
	if err := checkExportDir(dir); err != nil {
		return nil, err
	}
	type unit struct{ di, pi, si, first int }
	var units []unit
	total := 0
	for di, d := range p.Datasets {
		for pi := range p.Spec.Pipelines {
			for si, sp := range d.Splits {
				units = append(units, unit{di, pi, si, total})
				total += len(sp.Test)
			}
		}
	}
	width := max(4, len(strconv.Itoa(total-1)))
	multiPipe := len(p.Spec.Pipelines) > 1

	tmp, err := outdir.TempBeside(dir)
	if err != nil {
		return nil, fmt.Errorf("export: %w", err)
	}
	ok := false
	defer func() {
		if !ok {
			os.RemoveAll(tmp)
		}
	}()

	index := make([][]string, total)
	sizes := make([]int64, total)
	qubits := make([]int, total)
	twoQ := make([]int, total)
	durs := make([]float64, total)
	version := opt.QASMVersion
	if version == 0 {
		version = 3
	}
	if version != 2 && version != 3 {
		return nil, fmt.Errorf("export: OpenQASM version %d, want 2 or 3", opt.QASMVersion)
	}
	workers := max(1, opt.Workers)
	g, gctx := errgroup.WithContext(ctx)
	g.SetLimit(workers)
	for _, u := range units {
		if gctx.Err() != nil {
			break
		}
		g.Go(func() error {
			k := u.first
			return exportUnit(p, u.di, u.pi, u.si, set, func(it exportItem) error {
				if err := gctx.Err(); err != nil {
					return err
				}
				name := fmt.Sprintf("%0*d-%s", width, k, outdir.SafeName(it.Dataset))
				if multiPipe {
					name += "-" + outdir.SafeName(it.Pipeline)
				}
				name += fmt.Sprintf("-r%d-f%d-row%d.qasm", it.Repeat, it.Fold, it.Row)
				var text []byte
				var prog *device.Program
				var err error
				if opt.Device == nil {
					text, err = exportTextVersion(it, set, version)
				} else {
					if prog, err = device.Compile(it.Circuit, opt.Device, device.Options{}); err != nil {
						return &input.Error{Err: fmt.Errorf("dataset %s, pipeline %s, repeat %d, fold %d, row %d: %w", it.Dataset, it.Pipeline, it.Repeat, it.Fold, it.Row, err)}
					}
					text, err = deviceText(it, set, prog, version)
				}
				if err != nil {
					return err
				}
				if err := os.WriteFile(filepath.Join(tmp, name), text, 0o644); err != nil {
					return fmt.Errorf("export: %w", err)
				}
				index[k] = []string{name, results.EscapeCSVCell(it.Dataset), results.EscapeCSVCell(it.Pipeline), strconv.Itoa(it.Repeat), strconv.Itoa(it.Fold),
					strconv.Itoa(it.Row), strconv.Itoa(it.Circuit.NQubits), strconv.Itoa(len(it.Circuit.Regs.Class)), joinRows(it.TrainRows)}
				if prog != nil {
					index[k] = append(index[k], deviceIndex(it, prog)...)
					twoQ[k], durs[k] = prog.After.TwoQubit, prog.After.DurationNS
				}
				sizes[k], qubits[k] = int64(len(text)), it.Circuit.NQubits
				k++
				return nil
			})
		})
	}
	if err := g.Wait(); err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	var b bytes.Buffer
	w := csv.NewWriter(&b)
	head := IndexColumns
	if opt.Device != nil {
		head = append(slices.Clone(IndexColumns), DeviceIndexColumns...)
	}
	w.Write(head)
	w.WriteAll(index)
	if err := w.Error(); err != nil {
		return nil, fmt.Errorf("export: index: %w", err)
	}
	if err := os.WriteFile(filepath.Join(tmp, "index.csv"), b.Bytes(), 0o644); err != nil {
		return nil, fmt.Errorf("export: %w", err)
	}
	if err := outdir.Replace(tmp, dir); err != nil {
		return nil, fmt.Errorf("export: %w", err)
	}
	ok = true
	sum := &Summary{Dir: dir, Circuits: total, Model: set.model, Balance: set.balance, TrainSubset: set.subset}
	if opt.Device != nil {
		sum.Device = opt.Device.Name
	}
	for k := range sizes {
		sum.Bytes += sizes[k]
		sum.MaxQubits = max(sum.MaxQubits, qubits[k])
		sum.MaxTwoQubit = max(sum.MaxTwoQubit, twoQ[k])
		sum.MaxDurationNS = max(sum.MaxDurationNS, durs[k])
	}
	return sum, nil
}

// exportText is one instance's OpenQASM 3 program with comments that say
// what it classifies and how to report its outcomes.
func exportText(it exportItem, set exportSettings) ([]byte, error) {
	return exportTextVersion(it, set, 3)
}

// exportTextVersion is exportText in OpenQASM version 3 or 2.
func exportTextVersion(it exportItem, set exportSettings, version int) ([]byte, error) {
	q, err := circuit.QASM(it.Circuit, circuit.QASMOptions{Version: version})
	if err != nil {
		return nil, err
	}
	var b bytes.Buffer
	instanceComments(&b, it, set)
	b.WriteString(q)
	return b.Bytes(), nil
}

// deviceText is one instance's native routed program on the device
// (device.Program.QASM) with exportText's comments.
func deviceText(it exportItem, set exportSettings, prog *device.Program, version int) ([]byte, error) {
	q, err := prog.QASM(version)
	if err != nil {
		return nil, err
	}
	var b bytes.Buffer
	instanceComments(&b, it, set)
	b.WriteString(q)
	return b.Bytes(), nil
}

// deviceIndex is the DeviceIndexColumns part of an instance's index line.
func deviceIndex(it exportItem, prog *device.Program) []string {
	regs := it.Circuit.Regs
	class := make([]int, len(regs.Class))
	for j, q := range regs.Class {
		class[j] = prog.Final[q]
	}
	return []string{results.EscapeCSVCell(prog.Device.Name), strconv.Itoa(prog.Final[regs.Ancilla]), joinRows(class),
		joinRows(prog.Initial), joinRows(prog.Final), strconv.Itoa(prog.After.TwoQubit), strconv.Itoa(prog.After.Swaps),
		strconv.Itoa(prog.After.Depth), strconv.FormatFloat(prog.After.DurationNS, 'f', 0, 64)}
}

// instanceComments writes the comments that say what an instance's
// program classifies and how to report its outcomes.
func instanceComments(b *bytes.Buffer, it exportItem, set exportSettings) {
	nc := len(it.Circuit.Regs.Class)
	fmt.Fprintf(b, "// fringe: interference circuit of dataset %s, pipeline %s, repeat %d, fold %d, test row %d\n",
		input.OneLine(it.Dataset), input.OneLine(it.Pipeline), it.Repeat, it.Fold, it.Row)
	weights := "uniform weights 1/M"
	if set.balance {
		weights = "class-balancing weights 1/(C*M_k)"
	}
	fmt.Fprintf(b, "// %d training vectors (%s), dataset rows %s\n", len(it.TrainRows), weights, joinRows(it.TrainRows))
	var cls []string
	for k, c := range it.Classes {
		cls = append(cls, fmt.Sprintf("%s = %s", modelkit.FormatBits(k, nc), input.OneLine(c)))
	}
	order := "class_out[0]"
	if nc > 1 {
		order = fmt.Sprintf("the bit string class_out[%d]...class_out[0]", nc-1)
	}
	fmt.Fprintf(b, "// class register: class_out[0] is the least significant bit of the class index; as %s: %s\n",
		order, strings.Join(cls, ", "))
	b.WriteString("// report outcomes as dataset,repeat,fold,row,ancilla,class,count with ancilla = ancilla_out[0] and class as written above\n")
}

// checkExportDir refuses to replace a folder that is neither absent, empty,
// nor an earlier export.
func checkExportDir(dir string) error {
	st, err := os.Stat(dir)
	if os.IsNotExist(err) {
		return nil
	}
	if err != nil {
		return &input.Error{File: dir, Err: err}
	}
	if !st.IsDir() {
		return &input.Error{File: dir, Err: fmt.Errorf("exists and is not a folder")}
	}
	entries, err := os.ReadDir(dir)
	if err != nil {
		return &input.Error{File: dir, Err: err}
	}
	if len(entries) == 0 {
		return nil
	}
	f, err := os.Open(filepath.Join(dir, "index.csv"))
	if err == nil {
		defer f.Close()
		line, _ := bufio.NewReader(f).ReadString('\n')
		// An export of this or an earlier version (which had fewer
		// columns after these).
		if strings.HasPrefix(strings.TrimSpace(line), "file,dataset,pipeline,repeat,fold,row") {
			return nil
		}
	}
	return &input.Error{File: dir, Err: fmt.Errorf("folder exists and is not a circuit export of fringe (no index.csv); choose a new folder")}
}

// joinRows writes dataset rows separated by spaces, ascending as given.
func joinRows(rows []int) string {
	s := make([]string, len(rows))
	for i, r := range rows {
		s[i] = strconv.Itoa(r)
	}
	return strings.Join(s, " ")
}
