package results

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

// ErrFormat marks a run file that cannot be read: a missing column, a
// malformed field, a ragged row, invalid JSON. Every *ParseError wraps it.
var ErrFormat = errors.New("malformed run file")

// ParseError locates a problem in a run file. Line and Column are 1-based;
// 0 means unknown (Column counts bytes, as encoding/csv does).
type ParseError struct {
	File         string
	Line, Column int
	Err          error
}

func (e *ParseError) Error() string {
	var b strings.Builder
	b.WriteString("results: ")
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
		if e.Column > 0 {
			fmt.Fprintf(&b, ":%d", e.Column)
		}
	}
	b.WriteString(": ")
	b.WriteString(e.Err.Error())
	return b.String()
}

func (e *ParseError) Unwrap() []error { return []error{ErrFormat, e.Err} }

// table is a CSV file read into memory with its header mapped to column
// positions, so that readers accept any column order and extra columns.
type table struct {
	file string
	cr   *csv.Reader
	col  map[string]int
}

func newTable(r io.Reader, file string, required []string) (*table, error) {
	cr := csv.NewReader(r)
	cr.ReuseRecord = false
	head, err := cr.Read()
	if err == io.EOF {
		return nil, &ParseError{File: file, Line: 1, Err: errors.New("empty file (no header row)")}
	}
	if err != nil {
		return nil, csvError(file, err)
	}
	t := &table{file: file, cr: cr, col: map[string]int{}}
	for i, h := range head {
		h = strings.TrimSpace(strings.TrimPrefix(h, "\ufeff"))
		if _, dup := t.col[h]; dup {
			return nil, &ParseError{File: file, Line: 1, Err: fmt.Errorf("column %q appears twice", h)}
		}
		t.col[h] = i
	}
	for _, c := range required {
		if _, ok := t.col[c]; !ok {
			return nil, &ParseError{File: file, Line: 1, Err: fmt.Errorf("missing column %q (header: %s)", c, strings.Join(head, ","))}
		}
	}
	return t, nil
}

// csvError converts an encoding/csv error into a ParseError.
func csvError(file string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &ParseError{File: file, Line: pe.Line, Column: pe.Column, Err: pe.Err}
	}
	return &ParseError{File: file, Err: err}
}

// row is one record of a table.
type row struct {
	t   *table
	rec []string
}

// next returns the next record, or ok = false at the end of the file.
func (t *table) next() (row, bool, error) {
	rec, err := t.cr.Read()
	if err == io.EOF {
		return row{}, false, nil
	}
	if err != nil {
		return row{}, false, csvError(t.file, err)
	}
	return row{t: t, rec: rec}, true, nil
}

func (r row) has(col string) bool { _, ok := r.t.col[col]; return ok }

func (r row) errAt(col string, format string, args ...any) error {
	i := r.t.col[col]
	line, column := r.t.cr.FieldPos(i)
	return &ParseError{File: r.t.file, Line: line, Column: column, Err: fmt.Errorf("column %s: "+format, append([]any{col}, args...)...)}
}

// str returns a required text cell, undoing the writers' formula
// neutralisation (UnescapeCSVCell).
func (r row) str(col string) (string, error) {
	s := r.rec[r.t.col[col]]
	if s == "" {
		return "", r.errAt(col, "empty value")
	}
	return UnescapeCSVCell(s), nil
}

// text returns an optional text cell ("" when the column is absent),
// unescaped.
func (r row) text(col string) string {
	if !r.has(col) {
		return ""
	}
	return UnescapeCSVCell(r.rec[r.t.col[col]])
}

func (r row) integer(col string) (int, error) {
	s := r.rec[r.t.col[col]]
	v, err := strconv.Atoi(strings.TrimSpace(s))
	if err != nil {
		return 0, r.errAt(col, "want an integer, got %q", s)
	}
	return v, nil
}

// number reads a float; an empty field is NaN (the writers' encoding of an
// undefined value). Infinite values are rejected: no writer produces them.
func (r row) number(col string) (float64, error) {
	if !r.has(col) {
		return math.NaN(), nil
	}
	s := strings.TrimSpace(r.rec[r.t.col[col]])
	if s == "" {
		return math.NaN(), nil
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, r.errAt(col, "want a finite number or an empty field, got %q", s)
	}
	return v, nil
}

// readRows reads a CSV table with the required columns and turns each data
// row into a record with parse; the first error stops it.
func readRows[T any](r io.Reader, file string, req []string, parse func(row) (T, error)) ([]T, error) {
	t, err := newTable(r, file, req)
	if err != nil {
		return nil, err
	}
	var out []T
	for {
		rw, ok, err := t.next()
		if err != nil {
			return nil, err
		}
		if !ok {
			return out, nil
		}
		rec, err := parse(rw)
		if err != nil {
			return nil, err
		}
		out = append(out, rec)
	}
}

// ReadFolds reads folds.csv; file names the source in errors. Columns may
// come in any order; extra columns are ignored; mean_p_acc is optional.
func ReadFolds(r io.Reader, file string) ([]Fold, error) {
	req := append([]string{"dataset", "pipeline", "model", "repeat", "fold", "n_train", "n_test"}, MetricNames...)
	return readRows(r, file, req, func(rw row) (Fold, error) {
		var err error
		var f Fold
		if f.Dataset, f.Pipeline, f.Model, err = cellKey(rw); err != nil {
			return f, err
		}
		ints := []struct {
			col string
			dst *int
			min int
		}{{"repeat", &f.Repeat, 0}, {"fold", &f.Fold, 0}, {"n_train", &f.NTrain, 1}, {"n_test", &f.NTest, 1}}
		for _, c := range ints {
			if *c.dst, err = rw.integer(c.col); err != nil {
				return f, err
			}
			if *c.dst < c.min {
				return f, rw.errAt(c.col, "want at least %d, got %d", c.min, *c.dst)
			}
		}
		vals := make([]float64, len(MetricNames))
		for i, m := range MetricNames {
			if vals[i], err = rw.number(m); err != nil {
				return f, err
			}
			if math.IsNaN(vals[i]) {
				return f, rw.errAt(m, "empty metric in a fold record")
			}
		}
		f.Scores = Scores{Accuracy: vals[0], BalancedAccuracy: vals[1], MacroF1: vals[2]}
		if f.MeanPAcc, err = rw.number("mean_p_acc"); err != nil {
			return f, err
		}
		f.Chosen = rw.text("chosen")
		if rw.has("mitigation_changed") && strings.TrimSpace(rw.rec[rw.t.col["mitigation_changed"]]) != "" {
			if f.MitigationChanged, err = rw.integer("mitigation_changed"); err != nil {
				return f, err
			}
			if f.MitigationChanged < 0 || f.MitigationChanged > f.NTest {
				return f, rw.errAt("mitigation_changed", "want a count from 0 to n_test = %d, got %d", f.NTest, f.MitigationChanged)
			}
			f.Mitigated = true
		}
		return f, nil
	})
}

// ReadPredictions reads predictions.csv; p_acc and unused are optional
// (NaN when absent or empty), so are shots (0), probs (nil; "nan" entries
// are NaN) and exact_predicted (""); the correct column is ignored (it is
// derived).
func ReadPredictions(r io.Reader, file string) ([]Prediction, error) {
	req := []string{"dataset", "pipeline", "model", "repeat", "fold", "row", "label", "predicted"}
	return readRows(r, file, req, func(rw row) (Prediction, error) {
		var err error
		var p Prediction
		if p.Dataset, p.Pipeline, p.Model, err = cellKey(rw); err != nil {
			return p, err
		}
		for _, c := range []struct {
			col string
			dst *int
		}{{"repeat", &p.Repeat}, {"fold", &p.Fold}, {"row", &p.Row}} {
			if *c.dst, err = rw.integer(c.col); err != nil {
				return p, err
			}
			if *c.dst < 0 {
				return p, rw.errAt(c.col, "negative value %d", *c.dst)
			}
		}
		if p.Label, err = rw.str("label"); err != nil {
			return p, err
		}
		if p.Predicted, err = rw.str("predicted"); err != nil {
			return p, err
		}
		if p.PAcc, err = rw.number("p_acc"); err != nil {
			return p, err
		}
		if p.Unused, err = rw.number("unused"); err != nil {
			return p, err
		}
		if rw.has("shots") && strings.TrimSpace(rw.rec[rw.t.col["shots"]]) != "" {
			if p.Shots, err = rw.integer("shots"); err != nil {
				return p, err
			}
			if p.Shots < 0 {
				return p, rw.errAt("shots", "negative value %d", p.Shots)
			}
		}
		if rw.has("probs") {
			if s := strings.TrimSpace(rw.rec[rw.t.col["probs"]]); s != "" {
				for _, f := range strings.Split(s, ";") {
					if f == "nan" {
						p.Probs = append(p.Probs, math.NaN())
						continue
					}
					v, err := strconv.ParseFloat(f, 64)
					if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
						return p, rw.errAt("probs", "want numbers (or nan) separated by ';', got %q", f)
					}
					p.Probs = append(p.Probs, v)
				}
			}
		}
		p.Exact = rw.text("exact_predicted")
		p.RawPredicted = rw.text("raw_predicted")
		p.RawPAcc = math.NaN()
		if p.RawPredicted != "" {
			if p.RawPAcc, err = rw.number("raw_p_acc"); err != nil {
				return p, err
			}
			if p.RawProbs, err = readProbs(rw, "raw_probs"); err != nil {
				return p, err
			}
		}
		return p, nil
	})
}

// readProbs reads an optional column of probabilities separated by ';'
// ("nan" entries are NaN; an empty or absent field is nil).
func readProbs(rw row, col string) ([]float64, error) {
	if !rw.has(col) {
		return nil, nil
	}
	s := strings.TrimSpace(rw.rec[rw.t.col[col]])
	if s == "" {
		return nil, nil
	}
	var out []float64
	for _, f := range strings.Split(s, ";") {
		if f == "nan" {
			out = append(out, math.NaN())
			continue
		}
		v, err := strconv.ParseFloat(f, 64)
		if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
			return nil, rw.errAt(col, "want numbers (or nan) separated by ';', got %q", f)
		}
		out = append(out, v)
	}
	return out, nil
}

// ReadSummary reads summary.csv; mean_p_acc is optional.
func ReadSummary(r io.Reader, file string) ([]Summary, error) {
	req := []string{"dataset", "pipeline", "model", "n_scores", "interval"}
	for _, m := range MetricNames {
		req = append(req, m+"_mean", m+"_std", m+"_lo", m+"_hi")
	}
	return readRows(r, file, req, func(rw row) (Summary, error) {
		var err error
		var s Summary
		if s.Dataset, s.Pipeline, s.Model, err = cellKey(rw); err != nil {
			return s, err
		}
		if s.Folds, err = rw.integer("n_scores"); err != nil {
			return s, err
		}
		if s.Folds < 1 {
			return s, rw.errAt("n_scores", "want at least 1, got %d", s.Folds)
		}
		s.Interval = rw.text("interval")
		for _, m := range MetricNames {
			var ms MetricSummary
			for _, c := range []struct {
				suffix string
				dst    *float64
			}{{"_mean", &ms.Mean}, {"_std", &ms.Std}, {"_lo", &ms.Lo}, {"_hi", &ms.Hi}} {
				if *c.dst, err = rw.number(m + c.suffix); err != nil {
					return s, err
				}
			}
			s.Metrics = append(s.Metrics, ms)
		}
		if s.MeanPAcc, err = rw.number("mean_p_acc"); err != nil {
			return s, err
		}
		return s, nil
	})
}

func cellKey(rw row) (ds, pipe, model string, err error) {
	if ds, err = rw.str("dataset"); err != nil {
		return
	}
	if pipe, err = rw.str("pipeline"); err != nil {
		return
	}
	model, err = rw.str("model")
	return
}

// ReadManifest reads manifest.json. Syntax errors carry the line and
// column; unknown fields are accepted (later versions may add some).
func ReadManifest(r io.Reader, file string) (*Manifest, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, &ParseError{File: file, Err: err}
	}
	var m Manifest
	if err := json.Unmarshal(data, &m); err != nil {
		var se *json.SyntaxError
		var te *json.UnmarshalTypeError
		switch {
		case errors.As(err, &se):
			line, col := lineCol(data, se.Offset)
			return nil, &ParseError{File: file, Line: line, Column: col, Err: err}
		case errors.As(err, &te):
			line, col := lineCol(data, te.Offset)
			return nil, &ParseError{File: file, Line: line, Column: col, Err: err}
		}
		return nil, &ParseError{File: file, Err: err}
	}
	return &m, nil
}

// lineCol converts a byte offset into a 1-based line and column.
func lineCol(data []byte, off int64) (int, int) {
	if off > int64(len(data)) {
		off = int64(len(data))
	}
	before := data[:off]
	line := bytes.Count(before, []byte("\n")) + 1
	col := int(off) - bytes.LastIndexByte(before, '\n')
	return line, col
}

// Run is a run directory read back: the records fringe wrote.
type Run struct {
	Dir         string
	Manifest    *Manifest
	Summary     []Summary
	Folds       []Fold
	Predictions []Prediction // nil when predictions.csv is absent
}

// ReadRun reads the run directory dir: manifest.json, summary.csv and
// folds.csv are required, predictions.csv is optional (a stored baseline
// may omit it; paired tests then rely on the manifests, see bench/report.Compare).
// Errors name the file and, for malformed content, the line.
func ReadRun(dir string) (*Run, error) {
	st, err := os.Stat(dir)
	if err != nil {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return nil, fmt.Errorf("results: run directory %s: %w", dir, err)
	}
	if !st.IsDir() {
		return nil, fmt.Errorf("results: %s is not a directory", dir)
	}
	run := &Run{Dir: dir}
	open := func(name string, required bool, read func(io.Reader, string) error) error {
		path := filepath.Join(dir, name)
		f, err := os.Open(path)
		if err != nil {
			if !required && errors.Is(err, os.ErrNotExist) {
				return nil
			}
			var pe *fs.PathError
			if errors.As(err, &pe) {
				err = pe.Err
			}
			return fmt.Errorf("results: %s: %w", path, err)
		}
		defer f.Close()
		return read(f, path)
	}
	err = open("manifest.json", true, func(r io.Reader, p string) (err error) {
		run.Manifest, err = ReadManifest(r, p)
		return
	})
	if err == nil {
		err = open("summary.csv", true, func(r io.Reader, p string) (err error) {
			run.Summary, err = ReadSummary(r, p)
			return
		})
	}
	if err == nil {
		err = open("folds.csv", true, func(r io.Reader, p string) (err error) {
			run.Folds, err = ReadFolds(r, p)
			return
		})
	}
	if err == nil {
		err = open("predictions.csv", false, func(r io.Reader, p string) (err error) {
			run.Predictions, err = ReadPredictions(r, p)
			return
		})
	}
	if err != nil {
		return nil, err
	}
	return run, nil
}
