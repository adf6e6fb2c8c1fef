package results

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// FloatDigits is the number of decimals written for metrics and
// probabilities in CSV files.
const FloatDigits = 6

// Prediction is one row of predictions.csv.
type Prediction struct {
	Dataset, Pipeline, Model string
	Repeat, Fold             int
	Row                      int // 0-based index of the instance in the dataset as loaded
	Label, Predicted         string
	PAcc                     float64   // post-selection probability; NaN when the model has none
	Shots                    int       // accepted shots behind PAcc and Probs; 0 with exact probabilities or no such model
	Probs                    []float64 // P(k | acc) in the dataset's class order; nil when the model has none
	// Unused is the share of the accepted probability (or shots) on class
	// register values that name no class (noise can reach them): Probs
	// are not renormalised, so sum(Probs) + Unused = 1. NaN when the
	// model reports none.
	Unused float64
	Exact  string // the exact-mode decision of an interference model run another way; "" otherwise
	// RawPredicted, RawPAcc and RawProbs are the decision before readout
	// mitigation of a model that mitigates (the fields above are then the
	// mitigated decision's); "", NaN and nil otherwise. Their columns
	// (raw_predicted, raw_p_acc, raw_probs) are written only when some
	// row has one.
	RawPredicted string
	RawPAcc      float64
	RawProbs     []float64
}

// Fold is one row of folds.csv.
type Fold struct {
	Dataset, Pipeline, Model string
	Repeat, Fold             int
	NTrain, NTest            int
	Scores                   Scores
	MeanPAcc                 float64 // NaN when the model has none
	MeanShots                float64 // mean accepted shots per prediction; NaN without finite shots
	ExactDisagreement        float64 // share of decisions that differ from exact mode; NaN unless the model runs in another mode
	// Chosen is the grid point a tuned model chose on this fold's
	// training part ("C=1 gamma=0.1"); "" for an untuned model. The
	// column is written only when some row has one.
	Chosen string
	// Mitigated marks a model with readout mitigation, and
	// MitigationChanged counts the test instances whose mitigated
	// decision differs from the raw one. The column mitigation_changed is
	// written only when some row is mitigated (empty for the others).
	Mitigated         bool
	MitigationChanged int
}

// MetricSummary is a metric's mean, standard deviation and confidence
// interval over the folds of a cell.
type MetricSummary struct {
	Mean, Std, Lo, Hi float64
}

// Summary is one row of summary.csv: a (dataset, pipeline, model) cell.
type Summary struct {
	Dataset, Pipeline, Model string
	Folds                    int // number of (repeat, fold) scores behind the cell
	Interval                 string
	Metrics                  []MetricSummary // in the order of MetricNames
	MeanPAcc                 float64         // NaN when the model has none
}

// Timing is one row of timings.csv.
type Timing struct {
	Dataset, Pipeline, Model string
	Repeat, Fold             int
	Seconds                  float64
}

// Fmt formats a float with FloatDigits decimals; NaN is written as "".
func Fmt(v float64) string {
	if math.IsNaN(v) {
		return ""
	}
	if v == 0 {
		v = 0 // no "-0.000000"
	}
	s := strconv.FormatFloat(v, 'f', FloatDigits, 64)
	if s == negZero {
		s = s[1:]
	}
	return s
}

// negZero is how a tiny negative value prints with FloatDigits decimals.
var negZero = "-0." + strings.Repeat("0", FloatDigits)

// WritePredictions writes predictions.csv. The file is what encoding/csv
// writes for these records (fields quoted only where csv.Writer quotes
// them); it is formed directly, since it is the largest file of a run
// (one row per test instance of every task): every distinct name is
// escaped and quoted once, numbers are appended without temporary
// strings.
func WritePredictions(w io.Writer, rows []Prediction) error {
	var names csvNames
	if b, ok := w.(*bytes.Buffer); ok {
		b.Grow(64 * len(rows)) // a typical row takes 40 to 80 bytes
	}
	raw := false
	for _, r := range rows {
		raw = raw || r.RawPredicted != ""
	}
	buf := make([]byte, 0, 64<<10)
	buf = append(buf, "dataset,pipeline,model,repeat,fold,row,label,predicted,correct,p_acc,shots,probs,unused,exact_predicted"...)
	if raw {
		buf = append(buf, ",raw_predicted,raw_p_acc,raw_probs"...)
	}
	buf = append(buf, '\n')
	for _, r := range rows {
		buf = append(buf, names.get(r.Dataset)...)
		buf = append(buf, ',')
		buf = append(buf, names.get(r.Pipeline)...)
		buf = append(buf, ',')
		buf = append(buf, names.get(r.Model)...)
		buf = append(buf, ',')
		buf = strconv.AppendInt(buf, int64(r.Repeat), 10)
		buf = append(buf, ',')
		buf = strconv.AppendInt(buf, int64(r.Fold), 10)
		buf = append(buf, ',')
		buf = strconv.AppendInt(buf, int64(r.Row), 10)
		buf = append(buf, ',')
		buf = append(buf, names.get(r.Label)...)
		buf = append(buf, ',')
		buf = append(buf, names.get(r.Predicted)...)
		if r.Label == r.Predicted {
			buf = append(buf, ",1,"...)
		} else {
			buf = append(buf, ",0,"...)
		}
		buf = appendFmt(buf, r.PAcc)
		buf = append(buf, ',')
		if r.Shots > 0 {
			buf = strconv.AppendInt(buf, int64(r.Shots), 10)
		}
		buf = append(buf, ',')
		buf = appendProbs(buf, r.Probs)
		buf = append(buf, ',')
		buf = appendFmt(buf, r.Unused)
		buf = append(buf, ',')
		buf = append(buf, names.get(r.Exact)...)
		if raw {
			buf = append(buf, ',')
			buf = append(buf, names.get(r.RawPredicted)...)
			buf = append(buf, ',')
			buf = appendFmt(buf, r.RawPAcc)
			buf = append(buf, ',')
			buf = appendProbs(buf, r.RawProbs)
		}
		buf = append(buf, '\n')
		if len(buf) >= 60<<10 {
			if _, err := w.Write(buf); err != nil {
				return err
			}
			buf = buf[:0]
		}
	}
	_, err := w.Write(buf)
	return err
}

// appendProbs appends class probabilities joined by ';', NaN as "nan".
func appendProbs(dst []byte, probs []float64) []byte {
	for i, v := range probs {
		if i > 0 {
			dst = append(dst, ';')
		}
		if math.IsNaN(v) {
			dst = append(dst, "nan"...)
		} else {
			dst = appendFmt(dst, v)
		}
	}
	return dst
}

// appendFmt appends Fmt(v).
func appendFmt(dst []byte, v float64) []byte {
	if math.IsNaN(v) {
		return dst
	}
	if v == 0 {
		v = 0 // no "-0.000000"
	}
	start := len(dst)
	dst = strconv.AppendFloat(dst, v, 'f', FloatDigits, 64)
	if string(dst[start:]) == negZero {
		dst = append(dst[:start], dst[start+1:]...)
	}
	return dst
}

// csvNames remembers the CSV field of each text it was asked for: the text
// escaped (EscapeCSVCell) and quoted as encoding/csv quotes a field. The
// last texts asked for are compared first (consecutive rows mostly repeat
// them).
type csvNames struct {
	fields    map[string]string
	last      [4]string
	lastField [4]string
	next      int
}

func (c *csvNames) get(s string) string {
	if s == "" {
		return ""
	}
	for i, l := range c.last {
		if l == s {
			return c.lastField[i]
		}
	}
	f := c.field(s)
	c.last[c.next], c.lastField[c.next] = s, f
	c.next = (c.next + 1) % len(c.last)
	return f
}

func (c *csvNames) field(s string) string {
	if c.fields == nil {
		c.fields = map[string]string{}
	}
	if f, ok := c.fields[s]; ok {
		return f
	}
	var b strings.Builder
	cw := csv.NewWriter(&b)
	cw.Write([]string{EscapeCSVCell(s), ""}) // two fields: one empty field alone is written differently
	cw.Flush()
	f := strings.TrimSuffix(b.String(), ",\n")
	c.fields[s] = f
	return f
}

// WriteFolds writes folds.csv.
func WriteFolds(w io.Writer, rows []Fold) error {
	cw := csv.NewWriter(w)
	head := []string{"dataset", "pipeline", "model", "repeat", "fold", "n_train", "n_test"}
	head = append(head, MetricNames...)
	head = append(head, "mean_p_acc", "mean_shots", "exact_disagreement")
	tuned, mitigated := false, false
	for _, r := range rows {
		tuned = tuned || r.Chosen != ""
		mitigated = mitigated || r.Mitigated
	}
	if tuned {
		head = append(head, "chosen")
	}
	if mitigated {
		head = append(head, "mitigation_changed")
	}
	cw.Write(head)
	for _, r := range rows {
		rec := append(csvTexts(r.Dataset, r.Pipeline, r.Model), strconv.Itoa(r.Repeat), strconv.Itoa(r.Fold),
			strconv.Itoa(r.NTrain), strconv.Itoa(r.NTest))
		for _, v := range r.Scores.Values() {
			rec = append(rec, Fmt(v))
		}
		rec = append(rec, Fmt(r.MeanPAcc), Fmt(r.MeanShots), Fmt(r.ExactDisagreement))
		if tuned {
			rec = append(rec, EscapeCSVCell(r.Chosen))
		}
		if mitigated {
			changed := ""
			if r.Mitigated {
				changed = strconv.Itoa(r.MitigationChanged)
			}
			rec = append(rec, changed)
		}
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// WriteSummary writes summary.csv.
func WriteSummary(w io.Writer, rows []Summary) error {
	cw := csv.NewWriter(w)
	head := []string{"dataset", "pipeline", "model", "n_scores", "interval"}
	for _, m := range MetricNames {
		head = append(head, m+"_mean", m+"_std", m+"_lo", m+"_hi")
	}
	head = append(head, "mean_p_acc")
	cw.Write(head)
	for _, r := range rows {
		rec := csvTexts(r.Dataset, r.Pipeline, r.Model, strconv.Itoa(r.Folds), r.Interval)
		if len(r.Metrics) != len(MetricNames) {
			return fmt.Errorf("results: summary row %s/%s/%s has %d metrics, want %d", r.Dataset, r.Pipeline, r.Model, len(r.Metrics), len(MetricNames))
		}
		for _, m := range r.Metrics {
			rec = append(rec, Fmt(m.Mean), Fmt(m.Std), Fmt(m.Lo), Fmt(m.Hi))
		}
		rec = append(rec, Fmt(r.MeanPAcc))
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// WriteTimings writes timings.csv (wall-clock seconds per task; varies
// between runs by nature).
func WriteTimings(w io.Writer, rows []Timing) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"dataset", "pipeline", "model", "repeat", "fold", "seconds"})
	for _, r := range rows {
		cw.Write(append(csvTexts(r.Dataset, r.Pipeline, r.Model), strconv.Itoa(r.Repeat), strconv.Itoa(r.Fold),
			strconv.FormatFloat(r.Seconds, 'f', 6, 64)))
	}
	cw.Flush()
	return cw.Error()
}
