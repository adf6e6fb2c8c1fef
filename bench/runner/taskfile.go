package runner

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strconv"
	"time"

	"fringe/bench/plan"
	"fringe/qkernel"
	"fringe/results"
)

// The task files of a partial run directory (tasks/NNNNNNN.json): one JSON
// object {"run": digest, "sha256": digest, "tasks": [...]}, each task with
// its index, key, split sizes, elapsed time, predictions and, for models
// that report them, per-instance details. Floats are written so that they
// read back bit for bit (jsonFloat). Scores are not stored: they are
// recomputed from the predictions on loading.
//
// Integrity: "sha256" is the SHA-256 of the task list's bytes as written,
// bound to the run (taskDigest: the run identity's digest — canonical
// spec, seed, version, plan fingerprint with the data — comes first). A
// file whose list was edited, even into valid JSON, or that was copied
// from another run, fails the check: a resumed run recomputes its tasks
// (with a warning naming the file), a merge refuses the shard. The digest
// is not keyed, on purpose: the key would have to live beside fringe,
// where anyone who can run fringe can read it, so a key would protect
// against nobody who could not also recompute the digest. It catches
// accidents (editors, partial copies, sync tools, bit rot) and edits made
// without fringe; it is not a signature, and the README says so.

// damagedError is a task file that does not decode (truncated or garbled)
// or whose content does not match its digest, as opposed to one that
// decodes, matches and contradicts the run.
type damagedError struct{ err error }

func (e *damagedError) Error() string { return "damaged: " + e.err.Error() }

// taskFile is the JSON form of a batch of finished tasks.
type taskFile struct {
	Run    string          `json:"run"`    // runIdentity.digest of the run
	Digest string          `json:"sha256"` // taskDigest(Run, Tasks)
	Tasks  json.RawMessage `json:"tasks"`  // []taskJSON
}

// taskDigest is the hex SHA-256 of a task list's bytes, bound to the run.
func taskDigest(run string, tasks []byte) string {
	h := sha256.New()
	fmt.Fprintf(h, "fringe task file\x00%s\x00", run)
	h.Write(tasks)
	return hex.EncodeToString(h.Sum(nil))
}

type taskJSON struct {
	Index     int          `json:"index"`
	Key       string       `json:"key"`
	NTrain    int          `json:"n_train"`
	NTest     int          `json:"n_test"`
	ElapsedNS int64        `json:"elapsed_ns"`
	Pred      []int        `json:"pred"`
	Details   []detailJSON `json:"details"` // null for models without details
	Constant  bool         `json:"constant_decision,omitempty"`
	Tuning    *tuningJSON  `json:"tuning,omitempty"`
}

type tuningJSON struct {
	Scores []jsonFloat `json:"scores"`
	Chosen int         `json:"chosen"`
}

type detailJSON struct {
	PAcc   jsonFloat   `json:"p_acc"`
	Probs  []jsonFloat `json:"probs"`
	Unused jsonFloat   `json:"unused"`
	Shots  int         `json:"shots"`
	Exact  int         `json:"exact"`
	Raw    *rawJSON    `json:"raw,omitempty"` // the decision before readout mitigation (mitigating models only)
}

type rawJSON struct {
	Pred   int         `json:"pred"`
	PAcc   jsonFloat   `json:"p_acc"`
	Probs  []jsonFloat `json:"probs"`
	Unused jsonFloat   `json:"unused"`
}

// floatsJSON and floatsOf convert probability lists (nil stays nil).
func floatsJSON(v []float64) []jsonFloat {
	if v == nil {
		return nil
	}
	out := make([]jsonFloat, len(v))
	for i, x := range v {
		out[i] = jsonFloat(x)
	}
	return out
}

func floatsOf(v []jsonFloat) []float64 {
	if v == nil {
		return nil
	}
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = float64(x)
	}
	return out
}

// jsonFloat is a float64 that survives JSON exactly: finite values as
// numbers in the shortest form that parses back to the same bits
// (strconv 'g', -1), NaN and the infinities as the strings "NaN", "+Inf"
// and "-Inf", which JSON numbers cannot express.
type jsonFloat float64

func (f jsonFloat) MarshalJSON() ([]byte, error) {
	x := float64(f)
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return []byte(`"` + strconv.FormatFloat(x, 'g', -1, 64) + `"`), nil
	}
	return []byte(strconv.FormatFloat(x, 'g', -1, 64)), nil
}

func (f *jsonFloat) UnmarshalJSON(b []byte) error {
	s := string(b)
	if len(s) >= 2 && s[0] == '"' && s[len(s)-1] == '"' {
		switch s[1 : len(s)-1] {
		case "NaN":
			*f = jsonFloat(math.NaN())
		case "+Inf":
			*f = jsonFloat(math.Inf(1))
		case "-Inf":
			*f = jsonFloat(math.Inf(-1))
		default:
			return fmt.Errorf("not a number: %s", s)
		}
		return nil
	}
	x, err := strconv.ParseFloat(s, 64)
	if err != nil {
		return fmt.Errorf("not a number: %s", s)
	}
	*f = jsonFloat(x)
	return nil
}

// encodeTasks writes a batch of results as a task file.
func encodeTasks(p *plan.Plan, run string, batch []TaskResult) ([]byte, error) {
	tasks := make([]taskJSON, len(batch))
	for k, r := range batch {
		tj := taskJSON{Index: r.Task.Index, Key: p.Key(r.Task), NTrain: r.NTrain, NTest: r.NTest, ElapsedNS: int64(r.Elapsed), Pred: r.Pred, Constant: r.ConstantDecision}
		if r.Tuning != nil {
			tj.Tuning = &tuningJSON{Chosen: r.Tuning.Chosen, Scores: make([]jsonFloat, len(r.Tuning.Scores))}
			for i, s := range r.Tuning.Scores {
				tj.Tuning.Scores[i] = jsonFloat(s)
			}
		}
		if r.Details != nil {
			tj.Details = make([]detailJSON, len(r.Details))
			for i, d := range r.Details {
				dj := detailJSON{PAcc: jsonFloat(d.PAcc), Unused: jsonFloat(d.Unused), Shots: d.Shots, Exact: d.Exact}
				if d.Probs != nil {
					dj.Probs = make([]jsonFloat, len(d.Probs))
					for j, v := range d.Probs {
						dj.Probs[j] = jsonFloat(v)
					}
				}
				if raw := d.Raw; raw != nil {
					dj.Raw = &rawJSON{Pred: raw.Pred, PAcc: jsonFloat(raw.PAcc), Probs: floatsJSON(raw.Probs), Unused: jsonFloat(raw.Unused)}
				}
				tj.Details[i] = dj
			}
		}
		tasks[k] = tj
	}
	list, err := json.Marshal(tasks)
	if err != nil {
		return nil, fmt.Errorf("encode finished tasks: %w", err)
	}
	data, err := json.Marshal(taskFile{Run: run, Digest: taskDigest(run, list), Tasks: list})
	if err != nil {
		return nil, fmt.Errorf("encode finished tasks: %w", err)
	}
	return append(data, '\n'), nil
}

// decodeTasks reads a task file and rebuilds its results, checking every
// task against the plan: the run digest, the task's index, key and shard
// membership, the split sizes, and every class index. Scores are
// recomputed from the predictions (results.Score is a function of them),
// so a task file cannot carry scores that contradict its predictions.
// Syntax errors and a content that does not match its digest are
// *damagedError.
func decodeTasks(p *plan.Plan, run string, member []bool, data []byte) ([]*TaskResult, error) {
	var tf taskFile
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&tf); err != nil {
		return nil, &damagedError{err}
	}
	if dec.More() {
		return nil, &damagedError{errors.New("data after the task list")}
	}
	if tf.Run != run {
		return nil, fmt.Errorf("the tasks belong to another run (run %.12s, not %.12s)", tf.Run, run)
	}
	if tf.Digest != taskDigest(run, tf.Tasks) {
		return nil, &damagedError{errors.New("its content does not match its sha256 digest (edited or corrupted after fringe wrote it)")}
	}
	var tasks []taskJSON
	dec = json.NewDecoder(bytes.NewReader(tf.Tasks))
	dec.DisallowUnknownFields()
	if err := dec.Decode(&tasks); err != nil {
		return nil, &damagedError{err}
	}
	if len(tasks) == 0 {
		return nil, errors.New("no tasks")
	}
	out := make([]*TaskResult, 0, len(tasks))
	for _, tj := range tasks {
		r, err := decodeTask(p, member, tj)
		if err != nil {
			return nil, err
		}
		out = append(out, r)
	}
	return out, nil
}

func decodeTask(p *plan.Plan, member []bool, tj taskJSON) (*TaskResult, error) {
	if tj.Index < 0 || tj.Index >= len(p.Tasks) {
		return nil, fmt.Errorf("task index %d out of range (the plan has %d tasks)", tj.Index, len(p.Tasks))
	}
	t := p.Tasks[tj.Index]
	key := p.Key(t)
	bad := func(format string, args ...any) (*TaskResult, error) {
		return nil, fmt.Errorf("task %d (%s): %s", tj.Index, key, fmt.Sprintf(format, args...))
	}
	if tj.Key != key {
		return bad("recorded key %q does not match the plan", tj.Key)
	}
	if member != nil && !member[tj.Index] {
		return bad("does not belong to this shard")
	}
	d := p.Datasets[t.Dataset]
	sp := d.Splits[t.Split]
	nClass := len(d.Data.Classes)
	if tj.NTrain != len(p.TrainRows(t)) || tj.NTest != len(sp.Test) {
		return bad("split sizes %d/%d, the plan has %d/%d", tj.NTrain, tj.NTest, len(p.TrainRows(t)), len(sp.Test))
	}
	if len(tj.Pred) != len(sp.Test) {
		return bad("%d predictions for %d test instances", len(tj.Pred), len(sp.Test))
	}
	for _, c := range tj.Pred {
		if c < 0 || c >= nClass {
			return bad("predicted class %d out of range [0, %d)", c, nClass)
		}
	}
	if tj.ElapsedNS < 0 {
		return bad("negative elapsed time")
	}
	r := &TaskResult{Task: t, NTrain: tj.NTrain, NTest: tj.NTest, Pred: tj.Pred, Elapsed: time.Duration(tj.ElapsedNS), ConstantDecision: tj.Constant}
	if g := p.Spec.Models[t.Model].Grid; g != nil {
		if tj.Tuning == nil || len(tj.Tuning.Scores) != len(g.Points) || tj.Tuning.Chosen < 0 || tj.Tuning.Chosen >= len(g.Points) {
			return bad("a tuned model's task without its grid search (%d grid points)", len(g.Points))
		}
		r.Tuning = &Tuning{Chosen: tj.Tuning.Chosen, Scores: make([]float64, len(g.Points))}
		for i, s := range tj.Tuning.Scores {
			r.Tuning.Scores[i] = float64(s)
		}
	} else if tj.Tuning != nil {
		return bad("grid search results for a model that is not tuned")
	}
	if tj.Details != nil {
		if len(tj.Details) != len(sp.Test) {
			return bad("%d details for %d test instances", len(tj.Details), len(sp.Test))
		}
		r.Details = make([]qkernel.Detail, len(tj.Details))
		for i, dj := range tj.Details {
			if dj.Exact < 0 || dj.Exact >= nClass {
				return bad("exact-mode class %d out of range [0, %d)", dj.Exact, nClass)
			}
			if dj.Shots < 0 {
				return bad("negative shot count")
			}
			det := qkernel.Detail{PAcc: float64(dj.PAcc), Unused: float64(dj.Unused), Shots: dj.Shots, Exact: dj.Exact}
			if dj.Probs != nil {
				det.Probs = make([]float64, len(dj.Probs))
				for j, v := range dj.Probs {
					det.Probs[j] = float64(v)
				}
			}
			if raw := dj.Raw; raw != nil {
				if raw.Pred < 0 || raw.Pred >= nClass {
					return bad("unmitigated class %d out of range [0, %d)", raw.Pred, nClass)
				}
				det.Raw = &qkernel.RawDetail{Pred: raw.Pred, PAcc: float64(raw.PAcc), Probs: floatsOf(raw.Probs), Unused: float64(raw.Unused)}
			}
			if i > 0 && (det.Raw != nil) != (r.Details[0].Raw != nil) {
				return bad("unmitigated decisions for some test instances only")
			}
			r.Details[i] = det
		}
	}
	truth := make([]int, len(sp.Test))
	for i, j := range sp.Test {
		truth[i] = d.Data.Y[j]
	}
	r.Scores = results.Score(truth, r.Pred, nClass)
	return r, nil
}
