package results

import (
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
	// training part ("C=1 gamma=scale"); "" for an untuned model. The
	// column is written only when some row has one.
	Chosen string
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

// WritePredictions writes predictions.csv.
func WritePredictions(w io.Writer, rows []Prediction) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"dataset", "pipeline", "model", "repeat", "fold", "row", "label", "predicted", "correct", "p_acc", "shots", "probs", "unused", "exact_predicted"})
	// Names repeat from row to row (a task's rows share dataset, pipeline
	// and model; labels are class names): each is escaped once.
	var esc cellCache
	rec := make([]string, 14)
	var probs []string
	var joined strings.Builder
	for _, r := range rows {
		correct := "0"
		if r.Label == r.Predicted {
			correct = "1"
		}
		shots := ""
		if r.Shots > 0 {
			shots = strconv.Itoa(r.Shots)
		}
		ps := ""
		if len(r.Probs) > 0 {
			probs = probs[:0]
			for _, v := range r.Probs {
				if math.IsNaN(v) {
					probs = append(probs, "nan")
				} else {
					probs = append(probs, Fmt(v))
				}
			}
			joined.Reset()
			for i, p := range probs {
				if i > 0 {
					joined.WriteByte(';')
				}
				joined.WriteString(p)
			}
			ps = joined.String()
		}
		rec[0], rec[1], rec[2] = esc.get(r.Dataset), esc.get(r.Pipeline), esc.get(r.Model)
		rec[3], rec[4], rec[5] = strconv.Itoa(r.Repeat), strconv.Itoa(r.Fold), strconv.Itoa(r.Row)
		rec[6], rec[7], rec[8] = esc.get(r.Label), esc.get(r.Predicted), correct
		rec[9], rec[10], rec[11], rec[12], rec[13] = Fmt(r.PAcc), shots, ps, Fmt(r.Unused), esc.get(r.Exact)
		cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// cellCache remembers EscapeCSVCell of the texts it was asked for.
type cellCache map[string]string

func (c *cellCache) get(s string) string {
	if s == "" {
		return ""
	}
	if *c == nil {
		*c = map[string]string{}
	}
	if e, ok := (*c)[s]; ok {
		return e
	}
	e := EscapeCSVCell(s)
	(*c)[s] = e
	return e
}

// WriteFolds writes folds.csv.
func WriteFolds(w io.Writer, rows []Fold) error {
	cw := csv.NewWriter(w)
	head := []string{"dataset", "pipeline", "model", "repeat", "fold", "n_train", "n_test"}
	head = append(head, MetricNames...)
	head = append(head, "mean_p_acc", "mean_shots", "exact_disagreement")
	tuned := false
	for _, r := range rows {
		tuned = tuned || r.Chosen != ""
	}
	if tuned {
		head = append(head, "chosen")
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
