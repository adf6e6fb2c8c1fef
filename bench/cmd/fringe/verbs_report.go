package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"

	"fringe/bench/input"
	"fringe/bench/report"
	"fringe/results"
)

// runRank is `fringe rank SCORES.csv`: average ranks, Friedman /
// Iman–Davenport and the Nemenyi critical difference of the models of a
// long score CSV.
func runRank(ctx context.Context, c *command, args []string, stdout, stderr io.Writer) error {
	fl := newFlags(c, stdout)
	alpha := fl.Float64("alpha", 0.05, "significance level of the Friedman test and the Nemenyi critical difference (Demšar tabulates 0.05 and 0.10; any value in (0, 0.5) is computed)")
	asJSON := fl.Bool("json", false, "print one JSON object: avg_ranks (model -> rank), friedman_chi2, iman_davenport_f, p_value, critical_difference, and more")
	plotPath := fl.String("plot", "", "also draw the critical-difference diagram into this file (.svg, .pdf or .png)")
	pos, err := parse(fl, args, stderr)
	if err != nil {
		return helpOK(err)
	}
	if len(pos) != 1 {
		return usagef("rank takes exactly one CSV file with the columns dataset, model, score (see 'fringe rank -h')")
	}
	if !(*alpha > 0 && *alpha < 0.5) {
		return usagef("-alpha must lie in (0, 0.5), got %v", *alpha)
	}
	format := ""
	if *plotPath != "" {
		format = strings.TrimPrefix(strings.ToLower(filepath.Ext(*plotPath)), ".")
		if format != "svg" && format != "pdf" && format != "png" {
			return usagef("-plot %s: the file name must end in .svg, .pdf or .png", *plotPath)
		}
	}
	path := pos[0]
	f, err := os.Open(path)
	if err != nil {
		var pe *fs.PathError
		if errors.As(err, &pe) {
			err = pe.Err
		}
		return &input.Error{File: path, Err: fmt.Errorf("cannot read the scores: %w", err)}
	}
	t, err := report.ReadScores(f, path)
	f.Close()
	if err != nil {
		return err
	}
	rt, err := report.Rank(t, *alpha)
	if err != nil {
		return err
	}
	if *asJSON {
		err = results.WriteRankJSON(stdout, rt)
	} else {
		err = results.WriteRankText(stdout, rt)
	}
	if err != nil {
		return err
	}
	if *plotPath != "" {
		p, h, err := results.CDDiagram(rt, fmt.Sprintf("Average ranks over %d datasets", len(rt.Datasets)))
		if err != nil {
			return err
		}
		fig := results.Figure{Name: *plotPath, Plot: p, Width: results.CDWidth, Height: h}
		data, err := fig.Render(format)
		if err != nil {
			return err
		}
		if err := os.WriteFile(*plotPath, data, 0o644); err != nil {
			return fmt.Errorf("write %s: %w", *plotPath, err)
		}
	}
	return nil
}

// errRegressed reports regressions found by compare (exit status 1).
type errRegressed struct{ n int }

func (e *errRegressed) Error() string {
	return fmt.Sprintf("compare: %d regression(s): a gated metric dropped significantly by more than the tolerance", e.n)
}

// runCompare is `fringe compare BASELINE_DIR NEW_DIR`.
func runCompare(ctx context.Context, c *command, args []string, stdout, stderr io.Writer) error {
	fl := newFlags(c, stdout)
	alpha := fl.Float64("alpha", 0.05, "significance level of the tests, in (0, 0.5)")
	tol := fl.Float64("tol", 0, "tolerance: drops of at most this much (in metric units, e.g. 0.01 = one accuracy point) never count as regressions")
	metrics := fl.String("metric", "accuracy", "comma-separated metrics that can flag a regression ("+strings.Join(results.MetricNames, ", ")+"); all are reported")
	models := fl.String("models", "", "comma-separated model names whose cells can flag a regression (default: every model)")
	correction := fl.String("correction", "holm", "multiple-test correction over the gated tests: holm or none")
	asJSON := fl.Bool("json", false, "print the JSON summary instead of the table")
	jsonFile := fl.String("json-file", "", "also write the JSON summary into this file")
	pos, err := parse(fl, args, stderr)
	if err != nil {
		return helpOK(err)
	}
	if len(pos) != 2 {
		return usagef("compare takes two run directories: BASELINE_DIR NEW_DIR (see 'fringe compare -h')")
	}
	if *correction != "holm" && *correction != "none" {
		return usagef("-correction must be holm or none, got %q", *correction)
	}
	opt := report.CompareOptions{Alpha: *alpha, Tolerance: *tol, NoCorrection: *correction == "none"}
	if !(*alpha > 0 && *alpha < 0.5) {
		return usagef("-alpha must lie in (0, 0.5), got %v", *alpha)
	}
	if !(*tol >= 0) {
		return usagef("-tol must be ≥ 0, got %v", *tol)
	}
	for _, m := range strings.Split(*metrics, ",") {
		if m = strings.TrimSpace(m); m != "" {
			opt.Metrics = append(opt.Metrics, m)
		}
	}
	for _, m := range strings.Split(*models, ",") {
		if m = strings.TrimSpace(m); m != "" {
			opt.Models = append(opt.Models, m)
		}
	}
	var runs [2]*results.Run
	for i, dir := range pos {
		r, err := results.ReadRun(dir)
		if err != nil {
			return &input.Error{Err: err}
		}
		runs[i] = r
	}
	rc, err := report.Compare(runs[0], runs[1], opt)
	if err != nil {
		return err
	}
	if *asJSON {
		err = results.WriteCompareJSON(stdout, rc)
	} else {
		err = results.WriteCompareMarkdown(stdout, rc)
	}
	if err != nil {
		return err
	}
	if *jsonFile != "" {
		f, err := os.Create(*jsonFile)
		if err != nil {
			return fmt.Errorf("write JSON summary: %w", err)
		}
		err = results.WriteCompareJSON(f, rc)
		if cerr := f.Close(); err == nil {
			err = cerr
		}
		if err != nil {
			return fmt.Errorf("write JSON summary %s: %w", *jsonFile, err)
		}
	}
	if rc.Regressions > 0 {
		return &errRegressed{rc.Regressions}
	}
	return nil
}
