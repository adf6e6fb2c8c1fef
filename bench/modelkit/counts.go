package modelkit

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"sync"

	"gonum.org/v1/gonum/mat"

	"fringe/baselines"
	"fringe/bench/input"
	"fringe/qkernel"
	"fringe/qkernel/circuit"
)

// CountsColumns are the required columns of a counts file (kind "counts"),
// in the order fringe writes them; a pipeline column is optional.
var CountsColumns = []string{"dataset", "repeat", "fold", "row", "ancilla", "class", "count"}

// parseCounts reads the keys of a model of kind "counts": file (the counts
// CSV, relative to the spec's folder), balance and train_subset (those of
// the circuits that were run; they decide the exact-mode decision reported
// beside every prediction). It sets the model's params and builder and
// returns its default label.
func parseCounts(p *params, ms *Spec) string {
	file := p.str("file", "")
	balance := p.boolean("balance", false)
	subset := p.integer("train_subset", 0)
	if p.err != nil {
		return ""
	}
	if file == "" {
		p.fail("file", "missing counts file: give file = \"measured.csv\" (columns %s)", strings.Join(CountsColumns, ","))
		return ""
	}
	if p.has("train_subset") && subset <= 0 {
		p.fail("train_subset", "train_subset must be positive, got %d", subset)
		return ""
	}
	hw := parseHardware(p, true, qkernel.ModeExact, "", nil)
	if p.err != nil {
		return ""
	}
	ms.hw = hw
	ms.Params["mode"], ms.Params["file"] = "counts", file
	ms.Params["balance"], ms.Params["train_subset"] = balance, subset
	hw.setParams(ms.Params)
	src := &countsSource{file: file}
	ms.build = func(uint64) baselines.Model {
		if hw != nil && !hw.resolved {
			return unresolvedModel{name: "counts"}
		}
		return &countsModel{src: src, balance: balance, subset: subset, hw: hw}
	}
	base := filepath.Base(file)
	if ext := filepath.Ext(base); ext != "" && ext != base {
		base = strings.TrimSuffix(base, ext)
	}
	label := "counts-" + labelSafe(base)
	if subset > 0 {
		label += fmt.Sprintf("-k%d", subset)
	}
	if balance {
		label += "-balanced"
	}
	label += hw.labelMitigate()
	return label
}

// countsModel turns outcome counts measured on a device into predictions
// by post-selection, exactly as the interference classifier's shot mode
// does with sampled counts (qkernel.Classifier.PredictCounts), and reports
// the exact-mode decision on the same training set or subset beside each.
type countsModel struct {
	src     *countsSource
	balance bool
	subset  int
	hw      *hardware // mitigation keys (nil: none)

	task  TaskContext
	table *countsTable
	err   error
	qk    *qkernel.Classifier
}

var (
	_ baselines.Model = (*countsModel)(nil)
	_ TaskAware       = (*countsModel)(nil)
	_ Detailer        = (*countsModel)(nil)
)

// SetTask implements TaskAware: it loads the counts file (once per run)
// and checks it against the whole run (tc.Layout).
func (m *countsModel) SetTask(tc TaskContext) {
	m.task = tc
	m.table, m.err = m.src.load(tc.Layout)
}

// Fit fits the exact classifier on the training part (for the exact-mode
// decision), with the task's interference seed so that its training
// subsets are those of the exported circuits. A problem with the counts
// file is returned here.
func (m *countsModel) Fit(X *mat.Dense, y []int, nClass int) error {
	if m.err != nil {
		return m.err
	}
	if m.table == nil {
		return fmt.Errorf("modelkit: counts model: no task context (the model runs only inside a run)")
	}
	q := &qkernel.Classifier{Balance: m.balance, TrainSubset: m.subset, Seed: m.task.InterferenceSeed}
	if hw := m.hw; hw != nil && hw.mitigate {
		// The confusion matrices: the calibration file's per measured
		// bit or per physical qubit of the device, else the device's own
		// readout errors of the qubits each instance was measured on.
		q.Mitigate = qkernel.Mitigation{Readout: true, Device: hw.dev}
		if hw.cal != nil {
			if hw.cal.Physical != nil {
				q.Mitigate.Physical = hw.cal.Physical
			} else {
				conf, err := hw.cal.Bits(nClass)
				if err != nil {
					return err
				}
				q.Mitigate.Confusion = conf
			}
		}
	}
	if err := q.Fit(X, y, nClass); err != nil {
		return err
	}
	m.qk = q
	return nil
}

// Predict returns the predictions of the measured counts.
func (m *countsModel) Predict(X *mat.Dense) ([]int, error) {
	pred, _, err := m.PredictDetail(X)
	return pred, err
}

// PredictDetail returns the predictions with p_acc, accepted shots, class
// probabilities and the exact-mode decision.
func (m *countsModel) PredictDetail(X *mat.Dense) ([]int, []qkernel.Detail, error) {
	if m.qk == nil {
		return nil, nil, fmt.Errorf("modelkit: counts model: %w", baselines.ErrNotFitted)
	}
	tc := m.task
	counts := make([][]int, len(tc.TestRows))
	for i, row := range tc.TestRows {
		c, ok := m.table.counts[countsKey{tc.Dataset, m.table.pipelineOf(tc.Pipeline), tc.Repeat, tc.Fold, row}]
		if !ok {
			// readCounts checked every test instance of the plan: an
			// internal error.
			return nil, nil, fmt.Errorf("modelkit: counts model: no counts for task %s, row %d, after the check", tc.Key, row)
		}
		counts[i] = c
	}
	return m.qk.PredictCounts(X, counts)
}

// countsSource is the counts file of one model entry, loaded once per plan
// and shared by the model's tasks.
type countsSource struct {
	file string // as written in the spec

	mu     sync.Mutex
	layout *Layout
	table  *countsTable
	err    error
}

// countsKey identifies a test instance (pipeline "" when the file has no
// pipeline column).
type countsKey struct {
	dataset, pipeline string
	repeat, fold, row int
}

// countsTable holds the counts of every test instance, 2^(1+q) per
// instance in the a*2^q + k layout of qkernel.PredictCounts.
type countsTable struct {
	counts      map[countsKey][]int
	hasPipeline bool
}

func (t *countsTable) pipelineOf(p string) string {
	if t.hasPipeline {
		return p
	}
	return ""
}

// load reads and checks the file for the run l (cached for the last run).
func (s *countsSource) load(l *Layout) (*countsTable, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if l == nil {
		return nil, fmt.Errorf("modelkit: counts model: no run layout (the model runs only inside a run)")
	}
	if s.layout != l {
		s.layout = l
		s.table, s.err = readCounts(l, s.file)
	}
	return s.table, s.err
}

// countsPath resolves a counts file name against the spec's folder.
func countsPath(dir, file string) string {
	if !filepath.IsAbs(file) && dir != "" {
		return filepath.Join(dir, file)
	}
	return file
}

// readCounts reads a counts file and checks it against every test instance
// of the plan: each needs at least one shot, and nothing else may appear.
// All errors are *input.Error naming the file and, where there is one, the
// line.
func readCounts(p *Layout, file string) (*countsTable, error) {
	path := countsPath(p.Dir, file)
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, &input.Error{File: path, Err: fmt.Errorf("read counts file: %w", err)}
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	bad := func(line int, format string, args ...any) error {
		return &input.Error{File: path, Line: line, Err: fmt.Errorf(format, args...)}
	}
	cr := csv.NewReader(bytes.NewReader(data))
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	head, err := cr.Read()
	if err == io.EOF {
		return nil, bad(0, "empty counts file (want a header %s)", strings.Join(CountsColumns, ","))
	}
	if err != nil {
		return nil, input.CSV(path, err)
	}
	col, err := countsHeader(head, bad)
	if err != nil {
		return nil, err
	}
	t := &countsTable{counts: map[countsKey][]int{}}
	_, t.hasPipeline = col["pipeline"]
	if !t.hasPipeline && len(p.Pipelines) > 1 {
		return nil, bad(1, "the spec has %d pipelines (%s) and each has its own circuits: add a pipeline column", len(p.Pipelines), strings.Join(p.Pipelines, ", "))
	}

	cp := &countsParser{layout: p, col: col, hasPipeline: t.hasPipeline, pipes: map[string]bool{}, bad: bad}
	cp.info, cp.names = countsIndex(p)
	for _, ps := range p.Pipelines {
		cp.pipes[ps] = true
	}
	type outcomeKey struct {
		inst countsKey
		a, k int
	}
	lineOf := map[outcomeKey]int{}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, input.CSV(path, err)
		}
		line, _ := cr.FieldPos(0)
		if len(rec) == 1 && strings.TrimSpace(rec[0]) == "" {
			continue
		}
		if len(rec) != len(head) {
			return nil, bad(line, "%d fields, the header has %d", len(rec), len(head))
		}
		o, err := cp.outcome(rec, line)
		if err != nil {
			return nil, err
		}
		key, a, k, di := o.inst, o.a, o.k, o.ds
		ok2 := outcomeKey{key, a, k}
		if l, dup := lineOf[ok2]; dup {
			return nil, bad(line, "outcome ancilla %d class %s of dataset %s, repeat %d, fold %d, row %d is also on line %d", a, o.bits, key.dataset, key.repeat, key.fold, key.row, l)
		}
		lineOf[ok2] = line
		c := t.counts[key]
		if c == nil {
			c = make([]int, 2<<di.bits)
			t.counts[key] = c
		}
		c[a<<di.bits|k] = o.n
	}

	if err := t.checkEveryInstance(p, bad); err != nil {
		return nil, err
	}
	return t, nil
}

// countsParser decodes the lines of a counts file against a run.
type countsParser struct {
	layout      *Layout
	col         map[string]int // column of each header name
	hasPipeline bool
	info        map[string]*countsDataset
	names       []string // the run's datasets, in order
	pipes       map[string]bool
	bad         func(line int, format string, args ...any) error
}

// countsOutcome is one line of a counts file: a test instance, an outcome
// (ancilla bit a, class register value k written as bits) and its count.
type countsOutcome struct {
	inst countsKey
	a, k int
	bits string
	n    int
	ds   *countsDataset
}

// outcome decodes and checks the record rec on line line.
func (cp *countsParser) outcome(rec []string, line int) (countsOutcome, error) {
	var err error
	field := func(c string) string { return strings.TrimSpace(rec[cp.col[c]]) }
	integer := func(c string) (int, error) {
		v, err := strconv.Atoi(field(c))
		if err != nil || v < 0 {
			return 0, cp.bad(line, "column %s: %q is not a non-negative integer", c, field(c))
		}
		return v, nil
	}
	var key countsKey
	key.dataset = field("dataset")
	di, ok := cp.info[key.dataset]
	if !ok {
		return countsOutcome{}, cp.bad(line, "column dataset: %q is not a dataset of the spec (%s)", key.dataset, strings.Join(cp.names, ", "))
	}
	if cp.hasPipeline {
		key.pipeline = field("pipeline")
		if !cp.pipes[key.pipeline] {
			return countsOutcome{}, cp.bad(line, "column pipeline: %q is not a pipeline of the spec (%s)", key.pipeline, strings.Join(cp.layout.Pipelines, ", "))
		}
	}
	if key.repeat, err = integer("repeat"); err != nil {
		return countsOutcome{}, err
	}
	if key.fold, err = integer("fold"); err != nil {
		return countsOutcome{}, err
	}
	if key.row, err = integer("row"); err != nil {
		return countsOutcome{}, err
	}
	if !di.folds[[2]int{key.repeat, key.fold}] {
		return countsOutcome{}, cp.bad(line, "dataset %s has no repeat %d fold %d in the spec's protocol", key.dataset, key.repeat, key.fold)
	}
	if !di.rows[key.row] {
		return countsOutcome{}, cp.bad(line, "dataset %s has no row %d (after its class selection)", key.dataset, key.row)
	}
	f, isTest := di.testIn[[2]int{key.repeat, key.row}]
	if !isTest {
		return countsOutcome{}, cp.bad(line, "row %d of dataset %s is no test instance in repeat %d", key.row, key.dataset, key.repeat)
	}
	if f != key.fold {
		return countsOutcome{}, cp.bad(line, "row %d of dataset %s is a test instance of repeat %d fold %d, not fold %d", key.row, key.dataset, key.repeat, f, key.fold)
	}
	var a int
	switch field("ancilla") {
	case "0":
	case "1":
		a = 1
	default:
		return countsOutcome{}, cp.bad(line, "column ancilla: %q is not a measured bit (0 or 1)", field("ancilla"))
	}
	bitsS := field("class")
	k, ok := ParseBits(bitsS, di.bits)
	if !ok {
		return countsOutcome{}, cp.bad(line, "column class: %q is not a %d-bit string: dataset %s has %d classes, so its class register has %s; %s", bitsS, di.bits, key.dataset, len(cp.layout.dataset(key.dataset).Data.Classes), plural(di.bits, "qubit"), bitOrder(di.bits))
	}
	n, err := integer("count")
	if err != nil {
		return countsOutcome{}, err
	}
	return countsOutcome{inst: key, a: a, k: k, bits: bitsS, n: n, ds: di}, nil
}

// countsHeader reads the header of a counts file: the column of each of
// CountsColumns and of the optional pipeline column.
func countsHeader(head []string, bad func(line int, format string, args ...any) error) (map[string]int, error) {
	want := strings.Join(CountsColumns, ",") + " (optionally pipeline)"
	col := map[string]int{}
	for j, h := range head {
		h = strings.TrimSpace(h)
		known := h == "pipeline"
		for _, c := range CountsColumns {
			known = known || h == c
		}
		if !known {
			return nil, bad(1, "unexpected column %q (want %s)", h, want)
		}
		if _, dup := col[h]; dup {
			return nil, bad(1, "column %q appears twice", h)
		}
		col[h] = j
	}
	var missing []string
	for _, c := range CountsColumns {
		if _, ok := col[c]; !ok {
			missing = append(missing, c)
		}
	}
	if len(missing) > 0 {
		return nil, bad(1, "header lacks column(s) %s (want %s)", strings.Join(missing, ", "), want)
	}
	return col, nil
}

// countsDataset is what a run allows for one dataset in a counts file:
// its class bits and, per repeat, the fold of each test row.
type countsDataset struct {
	bits   int
	folds  map[[2]int]bool // (repeat, fold) of the splits
	testIn map[[2]int]int  // (repeat, row) -> fold
	rows   map[int]bool    // dataset rows after selection
}

// countsIndex describes every dataset of the run by display name, with
// the names in run order.
func countsIndex(p *Layout) (map[string]*countsDataset, []string) {
	info := map[string]*countsDataset{}
	var names []string
	for _, d := range p.Datasets {
		_, _, nc := circuit.RegisterSizes(1, 1, len(d.Data.Classes))
		di := &countsDataset{bits: nc, folds: map[[2]int]bool{}, testIn: map[[2]int]int{}, rows: map[int]bool{}}
		for _, r := range d.Data.Rows {
			di.rows[r] = true
		}
		for _, sp := range d.Splits {
			di.folds[[2]int{sp.Repeat, sp.Fold}] = true
			for _, j := range sp.Test {
				di.testIn[[2]int{sp.Repeat, d.Data.Rows[j]}] = sp.Fold
			}
		}
		info[d.Name] = di
		names = append(names, d.Name)
	}
	return info, names
}

// checkEveryInstance checks that every test instance of the run has
// counts, and at least one shot: an instance with only zero counts has
// nothing to decide by.
func (t *countsTable) checkEveryInstance(p *Layout, bad func(line int, format string, args ...any) error) error {
	var lacking []string
	pipelines := []string{""}
	if t.hasPipeline {
		pipelines = p.Pipelines
	}
	for _, d := range p.Datasets {
		for _, ps := range pipelines {
			for _, sp := range d.Splits {
				for _, j := range sp.Test {
					key := countsKey{d.Name, ps, sp.Repeat, sp.Fold, d.Data.Rows[j]}
					c, ok := t.counts[key]
					where := fmt.Sprintf("dataset %s", d.Name)
					if ps != "" {
						where += ", pipeline " + ps
					}
					where += fmt.Sprintf(", repeat %d, fold %d, row %d", sp.Repeat, sp.Fold, key.row)
					if !ok {
						lacking = append(lacking, where)
						continue
					}
					total := 0
					for _, n := range c {
						total += n
					}
					if total == 0 {
						return bad(0, "%s: every count is zero; an instance needs at least one shot", where)
					}
				}
			}
		}
	}
	if len(lacking) > 0 {
		more := ""
		if len(lacking) > 1 {
			more = fmt.Sprintf(" and %d more test instance(s)", len(lacking)-1)
		}
		return bad(0, "no counts for %s%s: every test instance of the spec needs its counts (see fringe circuit -export)", lacking[0], more)
	}
	return nil
}

// ParseBits reads a bit string of exactly n characters, most significant
// bit first.
func ParseBits(s string, n int) (int, bool) {
	if len(s) != n || n == 0 {
		return 0, false
	}
	k := 0
	for _, ch := range s {
		switch ch {
		case '0':
			k <<= 1
		case '1':
			k = k<<1 | 1
		default:
			return 0, false
		}
	}
	return k, true
}

// plural writes "1 qubit", "2 qubits".
func plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}

// bitOrder says how to write the class register's bits as a string.
func bitOrder(n int) string {
	if n == 1 {
		return "write its bit class_out[0] as 0 or 1"
	}
	return fmt.Sprintf("write class_out[%d] first and class_out[0] last", n-1)
}

// FormatBits writes k as an n-bit string, most significant bit first.
func FormatBits(k, n int) string {
	b := make([]byte, n)
	for i := range b {
		b[n-1-i] = byte('0' + (k>>i)&1)
	}
	return string(b)
}
