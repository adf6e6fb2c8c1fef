package results

import (
	"bytes"
	"encoding/csv"
	"math"
	"strconv"
	"strings"
	"testing"
)

// writePredictionsCSV is predictions.csv written record by record with
// encoding/csv: the form WritePredictions must reproduce byte for byte.
func writePredictionsCSV(b *bytes.Buffer, rows []Prediction) {
	cw := csv.NewWriter(b)
	head := []string{"dataset", "pipeline", "model", "repeat", "fold", "row", "label", "predicted", "correct", "p_acc", "shots", "probs", "unused", "exact_predicted"}
	raw := false
	for _, r := range rows {
		raw = raw || r.RawPredicted != ""
	}
	if raw {
		head = append(head, "raw_predicted", "raw_p_acc", "raw_probs")
	}
	cw.Write(head)
	fmtProbs := func(ps []float64) string {
		out := make([]string, len(ps))
		for i, v := range ps {
			out[i] = Fmt(v)
			if math.IsNaN(v) {
				out[i] = "nan"
			}
		}
		return strings.Join(out, ";")
	}
	for _, r := range rows {
		correct := "0"
		if r.Label == r.Predicted {
			correct = "1"
		}
		shots := ""
		if r.Shots > 0 {
			shots = strconv.Itoa(r.Shots)
		}
		e := EscapeCSVCell
		rec := []string{e(r.Dataset), e(r.Pipeline), e(r.Model), strconv.Itoa(r.Repeat), strconv.Itoa(r.Fold),
			strconv.Itoa(r.Row), e(r.Label), e(r.Predicted), correct, Fmt(r.PAcc), shots, fmtProbs(r.Probs), Fmt(r.Unused), e(r.Exact)}
		if raw {
			rec = append(rec, e(r.RawPredicted), Fmt(r.RawPAcc), fmtProbs(r.RawProbs))
		}
		cw.Write(rec)
	}
	cw.Flush()
}

// TestWritePredictionsCSV checks WritePredictions against encoding/csv on
// names that need quoting (separators, quotes, line breaks, a leading
// space, the `\.` field), formula-like names, non-ASCII names, and values
// of every kind (NaN, -0, tiny negatives, shots, probabilities with NaN),
// over more rows than one internal flush holds; once without and once
// with the raw (unmitigated) columns of a device run.
func TestWritePredictionsCSV(t *testing.T) {
	for _, withRaw := range []bool{false, true} {
		t.Run(map[bool]string{false: "plain", true: "raw"}[withRaw], func(t *testing.T) { checkWritePredictionsCSV(t, withRaw) })
	}
}

func checkWritePredictionsCSV(t *testing.T, withRaw bool) {
	names := []string{"iris", "a,b", `say "hi"`, "two\nlines", "cr\rlf", " lead", `\.`, "=SUM(A1)", "+1", "-1", "'=x", "Zürich 東京", "tab\there", ""}
	nan := math.NaN()
	var rows []Prediction
	for i := range 3000 {
		n := func(k int) string { return names[(i+k)%len(names)] }
		r := Prediction{Dataset: n(0), Pipeline: n(1), Model: n(2), Repeat: i % 7, Fold: i % 10, Row: i * 3,
			Label: n(3), Predicted: n(3 + i%2), PAcc: []float64{nan, 0.5, math.Copysign(0, -1), -1e-9, 1}[i%5],
			Shots: []int{0, 0, 512}[i%3], Unused: []float64{nan, 0, 0.25}[i%3], Exact: n(5)}
		if i%4 != 0 {
			r.Probs = []float64{0.25, nan, 0.75 - float64(i)*1e-7, -0.0}[:1+i%4]
		}
		if withRaw && i%3 != 0 {
			// Rows of other models in the same run carry no raw values.
			r.RawPredicted = n(4)
			r.RawPAcc = []float64{nan, 0.125, -1e-9}[i%3]
			r.RawProbs = []float64{nan, 0.5, 0.5}[:i%3+1]
		}
		rows = append(rows, r)
	}
	var got, want bytes.Buffer
	if err := WritePredictions(&got, rows); err != nil {
		t.Fatal(err)
	}
	writePredictionsCSV(&want, rows)
	if !bytes.Equal(got.Bytes(), want.Bytes()) {
		g, w := got.String(), want.String()
		i := 0
		for i < len(g) && i < len(w) && g[i] == w[i] {
			i++
		}
		t.Fatalf("WritePredictions differs from encoding/csv at byte %d: got %q, want %q", i, g[max(0, i-40):min(len(g), i+40)], w[max(0, i-40):min(len(w), i+40)])
	}
}

// BenchmarkWritePredictions writes the predictions of a run the size of
// the speed grid (36,000 rows) with WritePredictions and, as the reference
// in the same run, with encoding/csv record by record.
func BenchmarkWritePredictions(b *testing.B) {
	var rows []Prediction
	for i := range 36000 {
		rows = append(rows, Prediction{Dataset: []string{"iris", "wine", "breast-cancer"}[i%3], Pipeline: "std+l2",
			Model: []string{"interference", "knn-k5", "svm-rbf-C1", "logreg-C1"}[i/9000], Repeat: i % 10, Fold: i % 7, Row: i % 569,
			Label: "malignant", Predicted: []string{"malignant", "benign"}[i%5/4], PAcc: math.NaN(), Unused: math.NaN()})
	}
	for _, c := range []struct {
		name string
		fn   func(*bytes.Buffer)
	}{
		{"fringe", func(buf *bytes.Buffer) { WritePredictions(buf, rows) }},
		{"encoding-csv", func(buf *bytes.Buffer) { writePredictionsCSV(buf, rows) }},
	} {
		b.Run("impl="+c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				var buf bytes.Buffer
				c.fn(&buf)
			}
			b.ReportMetric(b.Elapsed().Seconds()*1e9/float64(b.N*len(rows)), "ns/row")
		})
	}
}
