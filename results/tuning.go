package results

import (
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
)

// TuningRow is one row of tuning.csv: one grid point of a tuned model on
// one outer fold, with its mean inner cross-validation score.
type TuningRow struct {
	Dataset, Pipeline, Model string
	Repeat, Fold             int
	Point                    int    // 0-based index in grid order
	Params                   string // the point's tuned values, "C=1 gamma=0.1"
	Metric                   string // the tuning metric
	Score                    float64
	Chosen                   bool
}

// TuningColumns are the columns of tuning.csv.
var TuningColumns = []string{"dataset", "pipeline", "model", "repeat", "fold", "point", "params", "metric", "inner_score", "chosen"}

// WriteTuning writes tuning.csv.
func WriteTuning(w io.Writer, rows []TuningRow) error {
	cw := csv.NewWriter(w)
	cw.Write(TuningColumns)
	for _, r := range rows {
		chosen := "0"
		if r.Chosen {
			chosen = "1"
		}
		rec := csvTexts(r.Dataset, r.Pipeline, r.Model)
		rec = append(rec, strconv.Itoa(r.Repeat), strconv.Itoa(r.Fold), strconv.Itoa(r.Point),
			EscapeCSVCell(r.Params), r.Metric, Fmt(r.Score), chosen)
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// ReadTuning reads tuning.csv.
func ReadTuning(r io.Reader, file string) ([]TuningRow, error) {
	return readRows(r, file, TuningColumns, func(rw row) (TuningRow, error) {
		var t TuningRow
		var err error
		if t.Dataset, t.Pipeline, t.Model, err = cellKey(rw); err != nil {
			return t, err
		}
		for _, c := range []struct {
			col string
			dst *int
		}{{"repeat", &t.Repeat}, {"fold", &t.Fold}, {"point", &t.Point}} {
			if *c.dst, err = rw.integer(c.col); err != nil {
				return t, err
			}
		}
		t.Params = rw.text("params")
		t.Metric = rw.text("metric")
		if t.Score, err = rw.number("inner_score"); err != nil {
			return t, err
		}
		switch rw.text("chosen") {
		case "1":
			t.Chosen = true
		case "0":
		default:
			return t, rw.errAt("chosen", "want 0 or 1")
		}
		return t, nil
	})
}

// ChoiceCount says how often a tuned model chose one grid point over the
// outer folds of a (dataset, pipeline) cell.
type ChoiceCount struct {
	Dataset, Pipeline, Model string
	Params                   string
	Count, Of                int
}

// choiceText writes the choices of one cell: "C=1 gamma=0.1 7/10,
// C=10 gamma=0.1 3/10".
func choiceText(cs []ChoiceCount) string {
	out := ""
	for i, c := range cs {
		if i > 0 {
			out += ", "
		}
		out += fmt.Sprintf("%s %d/%d", c.Params, c.Count, c.Of)
	}
	return out
}

// choiceGroups groups choices by (dataset, pipeline, model), in order.
func choiceGroups(cs []ChoiceCount) [][]ChoiceCount {
	var out [][]ChoiceCount
	for i, c := range cs {
		if i == 0 || c.Dataset != cs[i-1].Dataset || c.Pipeline != cs[i-1].Pipeline || c.Model != cs[i-1].Model {
			out = append(out, nil)
		}
		out[len(out)-1] = append(out[len(out)-1], c)
	}
	return out
}
