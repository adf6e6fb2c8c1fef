package report

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"fringe/bench/input"
	"fringe/bench/stats"
	"fringe/results"
)

// ScoreTable holds one score per (dataset, model), read from a long CSV
// for `fringe rank`. Scores[i][j] is the score of Models[j] on
// Datasets[i]; both lists are in first-seen order.
type ScoreTable struct {
	Datasets, Models []string
	Scores           [][]float64
}

// ReadScores reads a long CSV with the columns dataset, model and score
// (higher is better) in any order; other columns are ignored, lines
// starting with '#' are comments. Every dataset must score every model
// exactly once, and there must be at least two of each. Errors are input
// errors naming the file, line and column at fault.
func ReadScores(r io.Reader, file string) (*ScoreTable, error) {
	bad := func(line int, key string, format string, args ...any) error {
		return &input.Error{File: file, Line: line, Key: key, Err: fmt.Errorf(format, args...)}
	}
	cr := csv.NewReader(r)
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	head, err := cr.Read()
	if err == io.EOF {
		return nil, bad(0, "", "empty file: want a header with the columns dataset, model, score")
	}
	if err != nil {
		return nil, input.CSV(file, err)
	}
	headLine, _ := cr.FieldPos(0)
	col := map[string]int{}
	for i, h := range head {
		h = strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))
		if _, dup := col[h]; dup && (h == "dataset" || h == "model" || h == "score") {
			return nil, bad(headLine, "", "column %q appears twice", h)
		}
		col[h] = i
	}
	for _, c := range []string{"dataset", "model", "score"} {
		if _, ok := col[c]; !ok {
			return nil, bad(headLine, "", "missing column %q (want a header with dataset, model, score; got %s)", c, strings.Join(head, ","))
		}
	}
	t := &ScoreTable{}
	dIdx, mIdx := map[string]int{}, map[string]int{}
	type entry struct {
		d, m int
		v    float64
		line int
	}
	var entries []entry
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, input.CSV(file, err)
		}
		line, _ := cr.FieldPos(0)
		if len(rec) != len(head) {
			return nil, bad(line, "", "%d fields, the header has %d", len(rec), len(head))
		}
		ds := results.UnescapeCSVCell(strings.TrimSpace(rec[col["dataset"]]))
		model := results.UnescapeCSVCell(strings.TrimSpace(rec[col["model"]]))
		if ds == "" {
			return nil, bad(line, "dataset", "empty dataset name")
		}
		if model == "" {
			return nil, bad(line, "model", "empty model name")
		}
		raw := strings.TrimSpace(rec[col["score"]])
		v, err := strconv.ParseFloat(raw, 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, bad(line, "score", "want a finite number, got %q", raw)
		}
		d, ok := dIdx[ds]
		if !ok {
			d = len(t.Datasets)
			dIdx[ds] = d
			t.Datasets = append(t.Datasets, ds)
		}
		m, ok := mIdx[model]
		if !ok {
			m = len(t.Models)
			mIdx[model] = m
			t.Models = append(t.Models, model)
		}
		entries = append(entries, entry{d, m, v, line})
	}
	if len(t.Datasets) < 2 || len(t.Models) < 2 {
		return nil, bad(0, "", "%d datasets and %d models: ranking needs at least two of each", len(t.Datasets), len(t.Models))
	}
	t.Scores = make([][]float64, len(t.Datasets))
	lines := make([][]int, len(t.Datasets))
	for i := range t.Scores {
		t.Scores[i] = make([]float64, len(t.Models))
		lines[i] = make([]int, len(t.Models))
	}
	for _, e := range entries {
		if l := lines[e.d][e.m]; l != 0 {
			return nil, bad(e.line, "", "second score for dataset %q, model %q (first on line %d)", t.Datasets[e.d], t.Models[e.m], l)
		}
		lines[e.d][e.m] = e.line
		t.Scores[e.d][e.m] = e.v
	}
	for i := range lines {
		for j, l := range lines[i] {
			if l == 0 {
				return nil, bad(0, "", "dataset %q has no score for model %q: every dataset must score every model", t.Datasets[i], t.Models[j])
			}
		}
	}
	return t, nil
}

// Rank ranks the models of a score table across its datasets: average
// ranks (1 = highest score; ties within stats.TieTolerance share their
// average rank), the Friedman test with the Iman–Davenport correction and
// the Nemenyi critical difference at alpha (Demšar, JMLR 7:1, 2006).
func Rank(t *ScoreTable, alpha float64) (results.RankTable, error) {
	fr, err := stats.Friedman(t.Scores, alpha)
	if err != nil {
		return results.RankTable{}, fmt.Errorf("report: rank: %w", err)
	}
	return results.RankTable{
		Metric: "score", Models: t.Models, Datasets: t.Datasets,
		AvgRanks: fr.AvgRanks, ChiSq: fr.ChiSq, ChiSqP: fr.PChiSq, DF: fr.DF,
		ChiSqTieCorrected: fr.ChiSqTieCorrected, ChiSqTieCorrectedP: fr.PChiSqTieCorrected,
		F: fr.ImanDavenportF, DF1: fr.DF1, DF2: fr.DF2, P: fr.P, Alpha: fr.Alpha, Reject: fr.Reject,
		CD: fr.CD, Warnings: fr.Warnings,
	}, nil
}
