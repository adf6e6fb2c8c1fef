package results

import (
	"bytes"
	"encoding/csv"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

func TestCSVCellRule(t *testing.T) {
	// The rule of the OWASP "CSV Injection" guidance (prefix an apostrophe
	// to cells starting with = + - @ tab CR), with plain decimal numbers
	// exempt; cases derived by hand from the rule in csvcell.go.
	for _, c := range []struct{ in, out string }{
		{"iris", "iris"},
		{"=HYPERLINK(1+1)", "'=HYPERLINK(1+1)"},
		{"+cmd", "'+cmd"},
		{"-sum(A1)", "'-sum(A1)"},
		{"@SUM(A1)", "'@SUM(A1)"},
		{"\tx", "'\tx"},
		{"\rx", "'\rx"},
		{"-1", "-1"},
		{"+1", "+1"},
		{"-0.5", "-0.5"},
		{"12", "12"},
		{"-1.", "'-1."},
		{"-.5", "'-.5"},
		{"-1e3", "'-1e3"},
		{"- 1", "'- 1"},
		{"-", "'-"},
		{"'=x", "''=x"},
		{"''=x", "'''=x"},
		{"'abc", "'abc"},
		{"'-1", "'-1"},
		{"'", "'"},
		{"", ""},
		{"a=b", "a=b"},
	} {
		if got := EscapeCSVCell(c.in); got != c.out {
			t.Errorf("EscapeCSVCell(%q) = %q, want %q", c.in, got, c.out)
		}
		if got := UnescapeCSVCell(c.out); got != c.in {
			t.Errorf("UnescapeCSVCell(%q) = %q, want %q", c.out, got, c.in)
		}
	}
}

// randomName draws a string that often starts with a formula trigger or
// apostrophes, from an alphabet of triggers, digits, letters, quotes,
// separators and a few non-ASCII runes.
func randomName(rng *rand.Rand) string {
	alphabet := []string{"=", "+", "-", "@", "\t", "\r", "'", "\"", ",", ";", "\n", " ", ".", "0", "1", "9", "a", "Z", "(", ")", "α", "中", "é"}
	n := 1 + rng.IntN(8)
	var b strings.Builder
	for range n {
		b.WriteString(alphabet[rng.IntN(len(alphabet))])
	}
	return b.String()
}

func TestCSVCellRoundTripProperty(t *testing.T) {
	rng := rand.New(rand.NewPCG(15, 2026))
	for range 20000 {
		s := randomName(rng)
		e := EscapeCSVCell(s)
		if got := UnescapeCSVCell(e); got != s {
			t.Fatalf("round trip of %q: escaped %q, read back %q", s, e, got)
		}
		// What a spreadsheet sees is never a formula.
		if e != "" && csvTrigger(e[0]) && !plainDecimal(e) {
			t.Fatalf("escaped %q of %q still starts with a trigger", e, s)
		}
	}
}

// hostile are names that a spreadsheet would run, or that look like the
// writer's escaping, or class labels that must stay numbers.
var hostile = []string{"=HYPERLINK(1+1)", "+SUM(1)", "-2+3", "@cmd", "\tx", "'=x", "-1", "+1", "'", "plain"}

// checkCSVCells parses a CSV file and checks every cell of the named
// columns: no formula trigger at the start (unless a plain number), and
// UnescapeCSVCell gives back want[row][column].
func checkCSVCells(t *testing.T, file string, data []byte, want []map[string]string) {
	t.Helper()
	recs, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
	if err != nil {
		t.Fatalf("%s: %v", file, err)
	}
	if len(recs) != len(want)+1 {
		t.Fatalf("%s: %d records, want %d", file, len(recs), len(want)+1)
	}
	col := map[string]int{}
	for i, h := range recs[0] {
		col[h] = i
	}
	for i, w := range want {
		for name, v := range w {
			j, ok := col[name]
			if !ok {
				t.Fatalf("%s: no column %q", file, name)
			}
			cell := recs[i+1][j]
			if FormulaLike(cell) {
				t.Errorf("%s row %d column %s: %q would run as a formula", file, i+1, name, cell)
			}
			if got := UnescapeCSVCell(cell); got != v {
				t.Errorf("%s row %d column %s: %q reads back as %q, want %q", file, i+1, name, cell, got, v)
			}
		}
		// No cell at all may start a formula.
		for j, cell := range recs[i+1] {
			if FormulaLike(cell) {
				t.Errorf("%s row %d column %s: %q would run as a formula", file, i+1, recs[0][j], cell)
			}
		}
	}
}

func TestEveryCSVWriterNeutralises(t *testing.T) {
	nan := math.NaN()
	var preds []Prediction
	var folds []Fold
	var sums []Summary
	var times []Timing
	var comps []Comparison
	var wantP, wantF, wantS, wantT, wantC, wantA, wantR []map[string]string
	a := &Assessment{}
	for i, h := range hostile {
		g := hostile[(i+3)%len(hostile)]
		preds = append(preds, Prediction{Dataset: h, Pipeline: g, Model: h, Row: i, Label: h, Predicted: g, PAcc: nan, Exact: g})
		wantP = append(wantP, map[string]string{"dataset": h, "pipeline": g, "model": h, "label": h, "predicted": g, "exact_predicted": g})
		folds = append(folds, Fold{Dataset: h, Pipeline: g, Model: g, NTrain: 9, NTest: 1, Scores: Scores{1, 1, 1}, MeanPAcc: nan, MeanShots: nan, ExactDisagreement: nan})
		wantF = append(wantF, map[string]string{"dataset": h, "pipeline": g, "model": g})
		sums = append(sums, Summary{Dataset: h, Pipeline: h, Model: g, Folds: 1, Interval: g,
			Metrics: []MetricSummary{{0.5, 0, 0, 1}, {0.5, 0, 0, 1}, {0.5, 0, 0, 1}}, MeanPAcc: nan})
		wantS = append(wantS, map[string]string{"dataset": h, "pipeline": h, "model": g, "interval": g})
		times = append(times, Timing{Dataset: g, Pipeline: h, Model: h, Seconds: 1})
		wantT = append(wantT, map[string]string{"dataset": g, "pipeline": h, "model": h})
		comps = append(comps, Comparison{Dataset: h, Pipeline: g, Model: h, RefPipeline: g, RefModel: h, Metric: g, Test: h,
			Diff: 0, Lo: nan, Hi: nan, Statistic: 0, P: 1, PAdj: 1, Alpha: 0.05})
		wantC = append(wantC, map[string]string{"dataset": h, "pipeline": g, "model": h, "ref_pipeline": g, "ref_model": h, "metric": g, "test": h})
		a.Rows = append(a.Rows, AssessRow{Dataset: h, Pipeline: g, Weights: h, Baseline: g, Before: h, Lift: g, Verdict: h,
			Gap: nan, GapLo: nan, GapHi: nan, GapP: nan})
		wantA = append(wantA, map[string]string{"dataset": h, "pipeline": g, "weights": h, "baseline": g, "before": h, "lift": g, "verdict": h})
		a.Resources = append(a.Resources, AssessResource{Dataset: g, Pipeline: h, Train: 10})
		wantR = append(wantR, map[string]string{"dataset": g, "pipeline": h})
	}
	for _, c := range []struct {
		file  string
		write func(*bytes.Buffer) error
		want  []map[string]string
	}{
		{"predictions.csv", func(b *bytes.Buffer) error { return WritePredictions(b, preds) }, wantP},
		{"folds.csv", func(b *bytes.Buffer) error { return WriteFolds(b, folds) }, wantF},
		{"summary.csv", func(b *bytes.Buffer) error { return WriteSummary(b, sums) }, wantS},
		{"timings.csv", func(b *bytes.Buffer) error { return WriteTimings(b, times) }, wantT},
		{"comparisons.csv", func(b *bytes.Buffer) error { return WriteComparisons(b, comps) }, wantC},
		{"assess.csv", func(b *bytes.Buffer) error { return WriteAssessCSV(b, a) }, wantA},
		{"assess-resources.csv", func(b *bytes.Buffer) error { return WriteAssessResourcesCSV(b, a) }, wantR},
	} {
		var b bytes.Buffer
		if err := c.write(&b); err != nil {
			t.Fatalf("%s: %v", c.file, err)
		}
		checkCSVCells(t, c.file, b.Bytes(), c.want)
	}
}

func TestCSVReadersUndoNeutralisation(t *testing.T) {
	// Random names through every writer that has a reader: the records
	// read back carry the names as written.
	rng := rand.New(rand.NewPCG(7, 15))
	nan := math.NaN()
	for trial := range 200 {
		name := func() string {
			for {
				s := randomName(rng)
				// encoding/csv turns "\r\n" inside a quoted field into "\n";
				// that is the CSV format, not the neutralisation.
				if !strings.Contains(s, "\r\n") {
					return s
				}
			}
		}
		ds, pipe, model, label, pred := name(), name(), name(), name(), name()
		var b bytes.Buffer
		if err := WritePredictions(&b, []Prediction{{Dataset: ds, Pipeline: pipe, Model: model, Label: label, Predicted: pred, PAcc: nan}}); err != nil {
			t.Fatal(err)
		}
		ps, err := ReadPredictions(&b, "predictions.csv")
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		if p := ps[0]; p.Dataset != ds || p.Pipeline != pipe || p.Model != model || p.Label != label || p.Predicted != pred {
			t.Fatalf("trial %d: read %q %q %q %q %q, wrote %q %q %q %q %q", trial, p.Dataset, p.Pipeline, p.Model, p.Label, p.Predicted, ds, pipe, model, label, pred)
		}
		b.Reset()
		if err := WriteFolds(&b, []Fold{{Dataset: ds, Pipeline: pipe, Model: model, NTrain: 1, NTest: 1, Scores: Scores{1, 1, 1}, MeanPAcc: nan}}); err != nil {
			t.Fatal(err)
		}
		fs, err := ReadFolds(&b, "folds.csv")
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		if f := fs[0]; f.Dataset != ds || f.Pipeline != pipe || f.Model != model {
			t.Fatalf("trial %d: fold read %q %q %q", trial, f.Dataset, f.Pipeline, f.Model)
		}
		b.Reset()
		if err := WriteSummary(&b, []Summary{{Dataset: ds, Pipeline: pipe, Model: model, Folds: 1, Interval: label,
			Metrics: []MetricSummary{{1, 0, 1, 1}, {1, 0, 1, 1}, {1, 0, 1, 1}}, MeanPAcc: nan}}); err != nil {
			t.Fatal(err)
		}
		ss, err := ReadSummary(&b, "summary.csv")
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		if s := ss[0]; s.Dataset != ds || s.Pipeline != pipe || s.Model != model || s.Interval != label {
			t.Fatalf("trial %d: summary read %q %q %q %q", trial, s.Dataset, s.Pipeline, s.Model, s.Interval)
		}
	}
}
