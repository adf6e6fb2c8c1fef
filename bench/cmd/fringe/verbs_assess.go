package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"time"

	"fringe/bench/assess"
	"fringe/bench/spec"
	"fringe/results"
)

// runAssess is `fringe assess`: the suitability report of datasets and
// pipelines for the interference classifier.
func runAssess(ctx context.Context, c *command, args []string, stdout, stderr io.Writer) error {
	fs := newFlags(c, stdout)
	dsFlag := fs.String("datasets", "", "comma-separated embedded dataset names or CSV paths (default: every embedded dataset, or the spec's); dataset names may also be given as arguments: fringe assess wine iris")
	fs.StringVar(dsFlag, "dataset", "", "same as -datasets")
	pipesFlag := fs.String("pipelines", "", "comma-separated pipelines (default: "+strings.Join(assess.DefaultPipelines, ",")+", or the spec's)")
	subsetsFlag := fs.String("subsets", joinInts(assess.DefaultSubsets), "comma-separated train_subset sizes for the register and gate table")
	out := fs.String("out", "", "output directory (default fringe-out/assess, or fringe-out/<spec name>-assess)")
	seed := fs.Uint64("seed", 1, "seed of the splits (the spec's seed when a spec is given and -seed is not)")
	folds := fs.Int("folds", 10, "folds of the stratified cross-validation (capped per dataset at its smallest class)")
	repeats := fs.Int("repeats", 3, "repeats of the cross-validation")
	weights := fs.String("weights", "balanced", "index weights of the assessed form: balanced (1/(C*M_k)) or uniform (as published)")
	ratio := fs.Float64("ratio", 10, "p2/p1: two-qubit over single-qubit error rate in the noise budget")
	workers := fs.Int("workers", runtime.NumCPU(), "concurrent tasks")
	devName, devInstances := assessDeviceFlags(fs)
	quiet := fs.Bool("quiet", false, "print nothing but errors")
	margin := fs.Float64("margin", assess.DefaultMargin, "equivalence margin of the verdict: the gap is called on par with the best baseline only when its whole interval lies within ±margin (a practical-equivalence band, the two one-sided tests of Schuirmann 1987); a gap whose interval holds 0 but leaves the band is not significantly different, which is not the same")
	pos, err := parse(fs, args, stderr)
	if err != nil {
		return helpOK(err)
	}
	// Arguments: at most one spec (a name ending in .toml), or dataset
	// names and CSV paths.
	var specs, names []string
	for _, a := range pos {
		if strings.HasSuffix(strings.ToLower(a), ".toml") {
			specs = append(specs, a)
		} else {
			names = append(names, a)
		}
	}
	if len(specs) > 1 {
		return usagef("assess takes at most one spec file, got %q (see 'fringe assess -h')", specs)
	}
	if len(names) > 0 && *dsFlag != "" {
		return usagef("assess: datasets given both as arguments (%s) and with -datasets %s; give them one way", strings.Join(names, " "), *dsFlag)
	}
	if len(names) > 0 {
		*dsFlag = strings.Join(names, ",")
	}
	pos = specs
	if !(*margin > 0 && *margin < 1) {
		return usagef("-margin must lie in (0, 1) (accuracy units, e.g. 0.01 = one point), got %v", *margin)
	}
	if *workers < 1 {
		return usagef("-workers must be at least 1, got %d", *workers)
	}
	opt := assess.Options{Folds: *folds, Repeats: *repeats, Ratio: *ratio, Workers: *workers, Seed: *seed, Margin: *margin}
	switch *weights {
	case "balanced":
	case "uniform":
		opt.Uniform = true
	default:
		return usagef("-weights must be balanced or uniform, got %q", *weights)
	}
	if *folds < 2 {
		return usagef("-folds must be at least 2, got %d", *folds)
	}
	if *repeats < 1 {
		return usagef("-repeats must be at least 1, got %d", *repeats)
	}
	if !(*ratio >= 1) {
		return usagef("-ratio must be at least 1, got %v", *ratio)
	}
	if opt.Subsets, err = parseInts(*subsetsFlag); err != nil {
		return usagef("-subsets: %v", err)
	}
	if err := setAssessDevice(fs, &opt, *devName, *devInstances); err != nil {
		return err
	}
	dir := filepath.Join("fringe-out", "assess")
	if len(pos) == 1 {
		s, err := loadSpec(pos[0], stderr)
		if err != nil {
			return err
		}
		printWarnings(s, stderr)
		opt.Datasets, opt.Pipelines = s.Datasets, s.Pipelines
		opt.File, opt.Dir = s.File, s.Dir
		seedSet := false
		fs.Visit(func(f *flag.Flag) { seedSet = seedSet || f.Name == "seed" })
		if !seedSet {
			opt.Seed = s.Seed
		}
		dir = filepath.Join("fringe-out", s.Name+"-assess")
	}
	if *dsFlag != "" {
		opt.Datasets = nil
		for _, n := range splitList(*dsFlag) {
			if n == "" {
				return usagef("-datasets: empty name in %q", *dsFlag)
			}
			if strings.HasSuffix(strings.ToLower(n), ".toml") {
				return usagef("-datasets %s: a spec file is an argument, not a dataset: fringe assess %s", n, n)
			}
			opt.Datasets = append(opt.Datasets, spec.Dataset{Name: n})
		}
	}
	if *pipesFlag != "" {
		opt.Pipelines = splitList(*pipesFlag)
	}
	if *out != "" {
		dir = *out
	}
	start := time.Now()
	a, err := assess.Run(ctx, opt)
	if err != nil {
		if ctx.Err() != nil {
			return fmt.Errorf("interrupted; nothing was written")
		}
		return err
	}
	if err := assess.Write(dir, a); err != nil {
		return err
	}
	if !*quiet {
		fmt.Fprintln(stdout, results.AssessCriteria)
		fmt.Fprintln(stdout)
		fmt.Fprint(stdout, results.AssessRankingMarkdown(a))
		fmt.Fprintf(stdout, "\n%d rows in %.1f s; report: %s\n", len(a.Rows), time.Since(start).Seconds(), filepath.Join(dir, "assess.md"))
	}
	return nil
}

func joinInts(v []int) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.Itoa(x)
	}
	return strings.Join(s, ",")
}

// parseInts reads a comma-separated list of positive integers ("" is
// none).
func parseInts(s string) ([]int, error) {
	out := []int{}
	for _, f := range splitList(s) {
		v, err := strconv.Atoi(f)
		if err != nil || v < 1 {
			return nil, fmt.Errorf("%q is not a positive integer", f)
		}
		out = append(out, v)
	}
	return out, nil
}
