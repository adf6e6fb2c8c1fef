package modelkit

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"sync"
	"time"

	"gonum.org/v1/gonum/mat"

	"fringe/baselines"
	"fringe/qkernel"
)

// CommandStderrLines is how many of the last lines of a failed program's
// standard error its error message quotes.
const CommandStderrLines = 10

// parseCommand reads the keys of a model of kind "command": run (the
// program and its first arguments, a non-empty array of strings) and
// timeout (seconds, optional). It sets the model's params and builder and
// returns its default label.
func parseCommand(p *params, ms *Spec) string {
	run := stringList(p, "run")
	timeout := p.number("timeout", 0)
	if p.err != nil {
		return ""
	}
	if len(run) == 0 {
		p.fail("run", "missing program: give run = [\"program\", \"argument\", ...]; fringe appends the TRAIN, TEST and OUT paths")
		return ""
	}
	if run[0] == "" {
		p.fail("run", "empty program name")
		return ""
	}
	if p.has("timeout") && !(timeout > 0 && timeout <= math.MaxInt64/float64(time.Second)) {
		p.fail("timeout", "timeout must be a positive number of seconds, got %v", timeout)
		return ""
	}
	ms.Params["run"] = run
	if timeout > 0 {
		ms.Params["timeout"] = timeout
	}
	limit := time.Duration(timeout * float64(time.Second))
	ms.build = func(uint64) baselines.Model {
		return &commandModel{run: run, timeout: limit}
	}
	base := filepath.Base(run[len(run)-1])
	if ext := filepath.Ext(base); ext != "" && ext != base {
		base = strings.TrimSuffix(base, ext)
	}
	return "command-" + labelSafe(base)
}

// labelSafe replaces the characters a model label may not hold (commas,
// quotes, line breaks) and spaces by '_'.
func labelSafe(s string) string {
	return strings.Map(func(r rune) rune {
		switch r {
		case ',', '"', '\n', '\r', ' ', '\t':
			return '_'
		}
		return r
	}, s)
}

// commandModel is a classifier run as an external program, once per task:
// it writes the task's transformed training and test parts as CSV files
// into a fresh temporary folder, runs the program with their paths and the
// path of its output, and reads the predictions back. See
// docs-draft/external.md for the protocol.
type commandModel struct {
	run     []string
	timeout time.Duration // 0: no limit

	task   TaskContext
	hasCtx bool
	Xtr    *mat.Dense
	ytr    []int
}

var (
	_ baselines.Model = (*commandModel)(nil)
	_ TaskAware       = (*commandModel)(nil)
	_ Detailer        = (*commandModel)(nil)
)

// SetTask implements TaskAware.
func (m *commandModel) SetTask(tc TaskContext) { m.task, m.hasCtx = tc, true }

// Fit keeps the training part for Predict (which runs the program).
func (m *commandModel) Fit(X *mat.Dense, y []int, nClass int) error {
	if !m.hasCtx {
		return fmt.Errorf("modelkit: command model: no task context (the model runs only inside a run)")
	}
	r, c := X.Dims()
	if r != len(y) || r != len(m.task.TrainRows) || c != len(m.task.Features) || nClass != len(m.task.Classes) {
		// The runner builds the context from the same split, so this is
		// an internal error, reported rather than written into TRAIN.
		return fmt.Errorf("modelkit: command model: %dx%d training matrix, %d labels, %d classes; the task has %d rows, %d feature names, %d classes",
			r, c, len(y), nClass, len(m.task.TrainRows), len(m.task.Features), len(m.task.Classes))
	}
	m.Xtr, m.ytr = X, y
	return nil
}

// Predict runs the program and returns its predictions.
func (m *commandModel) Predict(X *mat.Dense) ([]int, error) {
	pred, _, err := m.PredictDetail(X)
	return pred, err
}

// PredictDetail runs the program and returns its predictions and, when its
// output has prob_<class> columns, one Detail per row whose Probs are those
// probabilities in class order, 0 for a class without a column (the
// program sees only the classes of its training part); PAcc and Unused are NaN, Shots
// 0 and Exact the prediction. Without such columns the details are nil.
func (m *commandModel) PredictDetail(X *mat.Dense) ([]int, []qkernel.Detail, error) {
	if m.Xtr == nil {
		return nil, nil, fmt.Errorf("modelkit: command model: %w", baselines.ErrNotFitted)
	}
	r, c := X.Dims()
	if r != len(m.task.TestRows) || c != len(m.task.Features) {
		return nil, nil, fmt.Errorf("modelkit: command model: %dx%d test matrix; the task has %d test rows, %d feature names", r, c, len(m.task.TestRows), len(m.task.Features))
	}
	ctx := m.task.Ctx
	if ctx == nil {
		ctx = context.Background()
	}
	dir, err := os.MkdirTemp("", "fringe-task-")
	if err != nil {
		return nil, nil, fmt.Errorf("modelkit: command model: temporary folder: %w", err)
	}
	keep := false
	defer func() {
		if !keep {
			os.RemoveAll(dir)
		}
	}()
	train, test, out := filepath.Join(dir, "train.csv"), filepath.Join(dir, "test.csv"), filepath.Join(dir, "out.csv")
	if err := m.writeInputs(train, test, X); err != nil {
		return nil, nil, fmt.Errorf("modelkit: command model: %w", err)
	}
	stderr, runErr := m.exec(ctx, train, test, out)
	if ctx.Err() != nil {
		return nil, nil, fmt.Errorf("modelkit: command model: %w", ctx.Err())
	}
	fail := func(reason string) error {
		keep = true
		return &CommandError{Program: strings.Join(m.run, " "), Reason: reason, Stderr: stderr, Dir: dir}
	}
	if runErr != nil {
		return nil, nil, fail(runErr.Error())
	}
	pred, det, err := m.readOutput(out)
	if err != nil {
		return nil, nil, fail(err.Error())
	}
	return pred, det, nil
}

// CommandError is the failure of an external classifier's program: it
// could not start, exited with a non-zero status, ran out of time, or
// wrote output that does not answer the task. The runner reports it as a
// failed run (exit status 1), with the model and task named around it.
type CommandError struct {
	Program string   // the run array, joined by spaces
	Reason  string   // what went wrong
	Stderr  []string // the last lines of the program's standard error
	Dir     string   // the temporary folder kept with train.csv, test.csv and out.csv
}

func (e *CommandError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "modelkit: program %q: %s", e.Program, e.Reason)
	if len(e.Stderr) > 0 {
		fmt.Fprintf(&b, "; last lines of its stderr: %s", strings.Join(e.Stderr, " | "))
	} else {
		b.WriteString("; its stderr is empty")
	}
	if e.Dir != "" {
		fmt.Fprintf(&b, "; its input (train.csv, test.csv) and output (out.csv, if written) are kept in %s", e.Dir)
	}
	return b.String()
}

// formatFeature writes a feature value so that it reads back to the same
// float64 (shortest round-trip form).
func formatFeature(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// writeInputs writes TRAIN (row,label,<features>) and TEST (row,<features>).
func (m *commandModel) writeInputs(train, test string, X *mat.Dense) error {
	write := func(path string, head []string, n int, rec func(i int, dst []string) []string) error {
		var b bytes.Buffer
		w := csv.NewWriter(&b)
		w.Write(head)
		rowBuf := make([]string, 0, len(head))
		for i := range n {
			w.Write(rec(i, rowBuf[:0]))
		}
		w.Flush()
		if err := w.Error(); err != nil {
			return fmt.Errorf("write %s: %w", path, err)
		}
		if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
			return fmt.Errorf("write %s: %w", path, err)
		}
		return nil
	}
	tc := m.task
	head := append([]string{"row", "label"}, tc.Features...)
	err := write(train, head, len(tc.TrainRows), func(i int, dst []string) []string {
		dst = append(dst, strconv.Itoa(tc.TrainRows[i]), tc.Classes[m.ytr[i]])
		for _, v := range m.Xtr.RawRowView(i) {
			dst = append(dst, formatFeature(v))
		}
		return dst
	})
	if err != nil {
		return err
	}
	head = append([]string{"row"}, tc.Features...)
	return write(test, head, len(tc.TestRows), func(i int, dst []string) []string {
		dst = append(dst, strconv.Itoa(tc.TestRows[i]))
		for _, v := range X.RawRowView(i) {
			dst = append(dst, formatFeature(v))
		}
		return dst
	})
}

// exec runs the program and returns the last lines of its standard error
// and an error describing a failure to start, a non-zero exit or a
// timeout. The program runs in the spec's folder with FRINGE_SEED (the
// task's seed in decimal) and FRINGE_TASK (the task key) added to the
// environment, in a process group of its own that is killed as a whole
// when the timeout passes or the run stops.
func (m *commandModel) exec(ctx context.Context, train, test, out string) ([]string, error) {
	runCtx := ctx
	if m.timeout > 0 {
		var cancel context.CancelFunc
		runCtx, cancel = context.WithTimeout(ctx, m.timeout)
		defer cancel()
	}
	args := append(append([]string(nil), m.run[1:]...), train, test, out)
	cmd := exec.CommandContext(runCtx, m.run[0], args...)
	cmd.Dir = m.task.Dir
	cmd.Env = append(os.Environ(), "FRINGE_SEED="+strconv.FormatUint(m.task.Seed, 10), "FRINGE_TASK="+m.task.Key)
	tail := &tailWriter{max: 64 << 10}
	cmd.Stderr = tail
	cmd.WaitDelay = 2 * time.Second
	ownProcessGroup(cmd)
	start := time.Now()
	err := cmd.Run()
	lines := tail.lines(CommandStderrLines)
	var exitErr *exec.ExitError
	switch {
	case err == nil:
		return lines, nil
	case ctx.Err() != nil:
		return lines, ctx.Err()
	case m.timeout > 0 && errors.Is(runCtx.Err(), context.DeadlineExceeded):
		return lines, fmt.Errorf("did not finish within its timeout of %s and was stopped", fmtSeconds(m.timeout))
	case errors.As(err, &exitErr):
		if code := exitErr.ExitCode(); code >= 0 {
			return lines, fmt.Errorf("exited with status %d after %s", code, fmtSeconds(time.Since(start)))
		}
		return lines, fmt.Errorf("was stopped (%v) after %s", exitErr.ProcessState, fmtSeconds(time.Since(start)))
	}
	return lines, fmt.Errorf("could not run: %w", err)
}

// fmtSeconds writes a duration in seconds with three significant digits.
func fmtSeconds(d time.Duration) string {
	return strconv.FormatFloat(d.Seconds(), 'g', 3, 64) + " s"
}

// readOutput reads OUT: a header with row and predicted and, optionally,
// prob_<class> columns (any classes of the dataset, each at most once; the
// others get probability 0); one line per test row, in any order.
func (m *commandModel) readOutput(path string) ([]int, []qkernel.Detail, error) {
	tc := m.task
	data, err := os.ReadFile(path)
	if err != nil {
		if errors.Is(err, os.ErrNotExist) {
			return nil, nil, fmt.Errorf("wrote no output file (OUT, the third argument it was given)")
		}
		return nil, nil, fmt.Errorf("read its output: %w", err)
	}
	data = bytes.TrimPrefix(data, []byte("\xef\xbb\xbf"))
	bad := func(line int, format string, args ...any) error {
		return fmt.Errorf("output out.csv:%d: %s", line, fmt.Sprintf(format, args...))
	}
	cr := csv.NewReader(bytes.NewReader(data))
	cr.FieldsPerRecord = -1
	head, err := cr.Read()
	if err == io.EOF {
		return nil, nil, fmt.Errorf("output out.csv is empty (want a header row,predicted and one line per test row)")
	}
	if err != nil {
		return nil, nil, fmt.Errorf("output: %w", err)
	}
	classIdx := make(map[string]int, len(tc.Classes))
	for k, c := range tc.Classes {
		classIdx[c] = k
	}
	colRow, colPred, probCol, nProb, err := outputColumns(head, tc.Classes, classIdx)
	if err != nil {
		return nil, nil, err
	}
	pos := make(map[int]int, len(tc.TestRows))
	for i, r := range tc.TestRows {
		pos[r] = i
	}
	pred := make([]int, len(tc.TestRows))
	seen := make([]int, len(tc.TestRows)) // line of each test row, 0 if absent
	var probs []float64
	if nProb > 0 {
		probs = make([]float64, len(tc.TestRows)*len(tc.Classes))
	}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		line, _ := cr.FieldPos(0)
		if err != nil {
			return nil, nil, fmt.Errorf("output: %w", err)
		}
		if len(rec) == 1 && strings.TrimSpace(rec[0]) == "" {
			continue // a blank line
		}
		if len(rec) != len(head) {
			return nil, nil, bad(line, "%d fields, the header has %d", len(rec), len(head))
		}
		rs := strings.TrimSpace(rec[colRow])
		row, err := strconv.Atoi(rs)
		if err != nil {
			return nil, nil, bad(line, "row %q is not an integer", rs)
		}
		i, ok := pos[row]
		if !ok {
			return nil, nil, bad(line, "row %d is not a test row of this task", row)
		}
		if seen[i] > 0 {
			return nil, nil, bad(line, "row %d appears twice (also on line %d)", row, seen[i])
		}
		seen[i] = line
		ps := strings.TrimSpace(rec[colPred])
		k, ok := classIdx[ps]
		if !ok {
			return nil, nil, bad(line, "row %d: predicted class %q is unknown (classes: %s)", row, ps, strings.Join(tc.Classes, ", "))
		}
		pred[i] = k
		for c, j := range probCol {
			if j < 0 {
				continue
			}
			s := strings.TrimSpace(rec[j])
			v, err := strconv.ParseFloat(s, 64)
			// A probability computed by the program may overshoot [0, 1]
			// by rounding; 1e-9 is far above double rounding and far
			// below any meaningful probability.
			if err != nil || math.IsNaN(v) || v < -1e-9 || v > 1+1e-9 {
				return nil, nil, bad(line, "row %d: %s = %q is not a probability in [0, 1]", row, head[j], s)
			}
			probs[i*len(tc.Classes)+c] = math.Min(1, math.Max(0, v))
		}
	}
	missing := 0
	first := -1
	for i, l := range seen {
		if l == 0 {
			if first < 0 {
				first = tc.TestRows[i]
			}
			missing++
		}
	}
	if missing > 0 {
		return nil, nil, fmt.Errorf("output out.csv lacks %d of the %d test rows (first missing: row %d)", missing, len(tc.TestRows), first)
	}
	if probs == nil {
		return pred, nil, nil
	}
	det := make([]qkernel.Detail, len(pred))
	nc := len(tc.Classes)
	for i := range det {
		det[i] = qkernel.Detail{PAcc: math.NaN(), Probs: probs[i*nc : (i+1)*nc : (i+1)*nc], Unused: math.NaN(), Exact: pred[i]}
	}
	return pred, det, nil
}

// outputColumns reads the header of a command model's output: the columns
// of row and predicted, and per class the column of prob_<class> (-1 if
// absent) with the number of such columns.
func outputColumns(head, classes []string, classIdx map[string]int) (colRow, colPred int, probCol []int, nProb int, err error) {
	bad := func(format string, args ...any) error {
		return fmt.Errorf("output out.csv:1: %s", fmt.Sprintf(format, args...))
	}
	colRow, colPred = -1, -1
	probCol = make([]int, len(classes))
	for k := range probCol {
		probCol[k] = -1
	}
	for j, h := range head {
		h = strings.TrimSpace(h)
		switch {
		case h == "row" && colRow < 0:
			colRow = j
		case h == "predicted" && colPred < 0:
			colPred = j
		case strings.HasPrefix(h, "prob_"):
			k, ok := classIdx[strings.TrimPrefix(h, "prob_")]
			if !ok {
				return 0, 0, nil, 0, bad("column %q names no class (classes: %s)", h, strings.Join(classes, ", "))
			}
			if probCol[k] >= 0 {
				return 0, 0, nil, 0, bad("column %q appears twice", h)
			}
			probCol[k] = j
			nProb++
		default:
			return 0, 0, nil, 0, bad("unexpected column %q (want row, predicted and optionally prob_<class> columns)", h)
		}
	}
	if colRow < 0 || colPred < 0 {
		return 0, 0, nil, 0, bad("header %q lacks row or predicted (want row,predicted[,prob_<class>...])", strings.Join(head, ","))
	}
	return colRow, colPred, probCol, nProb, nil
}

// tailWriter keeps the last max bytes written to it.
type tailWriter struct {
	mu  sync.Mutex
	buf []byte
	max int
}

func (t *tailWriter) Write(p []byte) (int, error) {
	t.mu.Lock()
	defer t.mu.Unlock()
	t.buf = append(t.buf, p...)
	if over := len(t.buf) - t.max; over > 0 {
		t.buf = append(t.buf[:0], t.buf[over:]...)
	}
	return len(p), nil
}

// lines returns the last n non-blank lines, trimmed, each cut to 300 bytes.
func (t *tailWriter) lines(n int) []string {
	t.mu.Lock()
	defer t.mu.Unlock()
	var out []string
	for _, l := range strings.Split(string(t.buf), "\n") {
		l = strings.TrimSpace(l)
		if l == "" {
			continue
		}
		if len(l) > 300 {
			l = strings.ToValidUTF8(l[:300], "") + "..."
		}
		out = append(out, l)
	}
	if len(out) > n {
		out = out[len(out)-n:]
	}
	return out
}
