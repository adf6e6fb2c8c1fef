package results

import (
	"fmt"
	"slices"
	"strings"
)

// TableLayout says how the tables of summary.tex sit in the document.
type TableLayout uint8

const (
	// LayoutPage: a one-column document. Tables are table floats; a
	// table longer than a page is a longtable. Width 345 pt, height
	// 550 pt (article, 10 pt, letter paper).
	LayoutPage TableLayout = iota
	// LayoutColumn: one column of a two-column document. Tables are table
	// floats; a table longer than a page is split into several floats
	// (longtable does not work in two-column mode). Width 229.5 pt,
	// height 550 pt (article, 10 pt, twocolumn).
	LayoutColumn
	// LayoutWide: across both columns of a two-column document. Tables
	// are table* floats, split like LayoutColumn. Width 469 pt, height
	// 550 pt (article, 10 pt, twocolumn).
	LayoutWide
	// LayoutLandscape: a one-column document with the tables on rotated
	// pages (the landscape environment of pdflscape): table floats and
	// longtable as LayoutPage. Width 550 pt (the text height), height
	// 345 pt.
	LayoutLandscape
)

var layoutNames = []string{"page", "column", "wide", "landscape"}

func (l TableLayout) String() string {
	if int(l) < len(layoutNames) {
		return layoutNames[l]
	}
	return fmt.Sprintf("TableLayout(%d)", l)
}

// ParseTableLayout parses "page", "column", "wide" (table*) or
// "landscape".
func ParseTableLayout(s string) (TableLayout, error) {
	if i := slices.Index(layoutNames, s); i >= 0 {
		return TableLayout(i), nil
	}
	if s == "table*" {
		return LayoutWide, nil
	}
	return 0, fmt.Errorf("results: table layout %q: want one of %s", s, strings.Join(layoutNames, ", "))
}

// defaults returns the width and height available to one table, in pt,
// for the standard article class at 10 pt on letter paper (the values
// LaTeX prints for \textwidth, \columnwidth and \textheight there).
func (l TableLayout) defaults() (width, height float64) {
	switch l {
	case LayoutColumn:
		return 229.5, 550
	case LayoutWide:
		return 469, 550
	case LayoutLandscape:
		return 550, 345
	}
	return 345, 550
}

// floats reports whether long tables are split into several floats
// instead of a longtable.
func (l TableLayout) floats() bool { return l == LayoutColumn || l == LayoutWide }

// SplitRule says when the summary is written as several tables.
type SplitRule uint8

const (
	// SplitAuto: one table per metric when the summary with every metric
	// would not fit the width without wrapping names; tables with one
	// column per dataset (the modes table) are split into groups of
	// datasets that fit.
	SplitAuto SplitRule = iota
	// SplitNone: never split by metric or dataset (names wrap; a table
	// that still does not fit gets a warning). Long tables still run over
	// pages.
	SplitNone
	// SplitMetric: one summary table per metric.
	SplitMetric
	// SplitDataset: one summary table per dataset (and per metric when
	// that does not fit).
	SplitDataset
)

var splitNames = []string{"auto", "none", "metric", "dataset"}

func (s SplitRule) String() string {
	if int(s) < len(splitNames) {
		return splitNames[s]
	}
	return fmt.Sprintf("SplitRule(%d)", s)
}

// ParseSplitRule parses "auto", "none", "metric" or "dataset".
func ParseSplitRule(s string) (SplitRule, error) {
	if i := slices.Index(splitNames, s); i >= 0 {
		return SplitRule(i), nil
	}
	return 0, fmt.Errorf("results: split rule %q: want one of %s", s, strings.Join(splitNames, ", "))
}

// ReportTable names one kind of table of the report (a bit set).
type ReportTable uint8

const (
	TableSummary  ReportTable = 1 << iota // mean and interval of each metric
	TableModes                            // the interference classifier across modes, one column per dataset
	TableTests                            // paired tests against the reference
	TableRanks                            // average ranks and the Friedman test across datasets
	TableWilcoxon                         // Wilcoxon signed-ranks tests of the interference classifier against each baseline
)

var tableNames = []string{"summary", "modes", "tests", "ranks", "wilcoxon"}

// ParseReportTables parses table names ("summary", "modes", "tests",
// "ranks", "wilcoxon") into a set.
func ParseReportTables(names []string) (ReportTable, error) {
	var t ReportTable
	for _, n := range names {
		i := slices.Index(tableNames, n)
		if i < 0 {
			return 0, fmt.Errorf("results: table %q: want one of %s", n, strings.Join(tableNames, ", "))
		}
		t |= 1 << i
	}
	return t, nil
}

// TableText is what the author sets for one kind of table.
type TableText struct {
	// Caption, plain text (escaped), opens the caption in place of the
	// generated opening ("Run demo (...)"); the description of the marks
	// and the protocol follow it.
	Caption string
	// Label is the \label key; "" for the default (Report.Label, or
	// Report.Label with a suffix: -modes, -tests, -ranks, -wilcoxon). It
	// is reduced to the safe alphabet of TeXLabelKey. Tables split into
	// several get "-<metric>", "-<dataset>" or "-2", "-3" ... appended.
	Label string
}

// ReportOptions choose what the tables of summary.tex and summary.md
// show and how summary.tex lays them out. The zero value shows every
// model, pipeline, dataset and metric of the run in run order, by name,
// in tables that fit a page of the standard article class (LayoutPage).
type ReportOptions struct {
	// Models, Pipelines and Datasets select the rows and columns and
	// their order; nil means all, in the run's order. Marks (best, not
	// significantly worse) still compare with every model of the run, and
	// the caption says so when models are left out.
	Models, Pipelines, Datasets []string
	// Metrics selects the metrics (names of MetricNames) and their order;
	// nil means all.
	Metrics []string
	// ModelLabels are display labels of models ("QC, 512 shots") used in
	// summary.tex and summary.md; the CSV files keep the model names.
	// Labels must be distinct and non-empty.
	ModelLabels map[string]string
	// Caption and label keys of each kind of table.
	Summary, Modes, Tests, Ranks, Wilcoxon TableText
	// Omit lists the tables left out of summary.tex and summary.md.
	Omit ReportTable
	// Layout: see TableLayout.
	Layout TableLayout
	// Width and Height are the room of one table in pt (\columnwidth or
	// \textwidth, and \textheight; on landscape pages the text height and
	// width); 0 takes the layout's value for the standard article class.
	Width, Height float64
	// LongTable is the number of body rows above which a table runs over
	// pages (a longtable, or several floats of at most LongTable rows with
	// LayoutColumn and LayoutWide); 0 means as many rows as fit Height. A
	// table taller than Height always runs over pages.
	LongTable int
	// Split: see SplitRule.
	Split SplitRule
	// TestMetrics are the metrics whose paired tests get a table; nil
	// means the first of Metrics.
	TestMetrics []string
	// Digits is the number of decimals of means and intervals; 0 means 3.
	Digits int
}

// Check validates the options against the models, pipelines and datasets
// of a run, for a check before the run starts. Errors name the option.
func (o ReportOptions) Check(models, pipelines, datasets []string) error {
	for _, c := range []struct {
		key       string
		got, have []string
	}{{"models", o.Models, models}, {"pipelines", o.Pipelines, pipelines}, {"datasets", o.Datasets, datasets},
		{"metrics", o.Metrics, MetricNames}, {"test metrics", o.TestMetrics, MetricNames}} {
		seen := map[string]bool{}
		for _, n := range c.got {
			if !slices.Contains(c.have, n) {
				return fmt.Errorf("results: report %s: %q is not one of %s", c.key, n, strings.Join(c.have, ", "))
			}
			if seen[n] {
				return fmt.Errorf("results: report %s: %q appears twice", c.key, n)
			}
			seen[n] = true
		}
		if c.got != nil && len(c.got) == 0 {
			return fmt.Errorf("results: report %s: empty list (leave it out to show all)", c.key)
		}
	}
	if o.Metrics != nil {
		for _, m := range o.TestMetrics {
			if !slices.Contains(o.Metrics, m) {
				return fmt.Errorf("results: report test metrics: %q is not among the report's metrics", m)
			}
		}
	}
	labels := map[string]string{}
	keys := make([]string, 0, len(o.ModelLabels))
	for m := range o.ModelLabels {
		keys = append(keys, m)
	}
	slices.Sort(keys)
	for _, m := range keys {
		l := o.ModelLabels[m]
		if !slices.Contains(models, m) {
			return fmt.Errorf("results: report label of model %q: no such model (models: %s)", m, strings.Join(models, ", "))
		}
		if strings.TrimSpace(l) == "" {
			return fmt.Errorf("results: report label of model %q: empty", m)
		}
		if other, ok := labels[l]; ok {
			return fmt.Errorf("results: report label %q: given to models %q and %q", l, other, m)
		}
		labels[l] = m
	}
	// A label may not be another model's name either: the tables would be
	// ambiguous.
	for _, m := range models {
		if owner, ok := labels[m]; ok && owner != m {
			if _, relabelled := o.ModelLabels[m]; !relabelled {
				return fmt.Errorf("results: report label %q of model %q is the name of another model", m, owner)
			}
		}
	}
	if o.Layout > LayoutLandscape {
		return fmt.Errorf("results: report layout %d: unknown", o.Layout)
	}
	if o.Split > SplitDataset {
		return fmt.Errorf("results: report split %d: unknown", o.Split)
	}
	if !(o.Width >= 0) || !(o.Height >= 0) || (o.Width > 0 && o.Width < 100) || (o.Height > 0 && o.Height < 100) {
		return fmt.Errorf("results: report width %v pt, height %v pt: want 0 (the layout's default) or at least 100 pt", o.Width, o.Height)
	}
	if o.LongTable < 0 {
		return fmt.Errorf("results: report longtable threshold %d: want 0 (a page) or more rows", o.LongTable)
	}
	if o.Digits < 0 || o.Digits > 6 {
		return fmt.Errorf("results: report digits %d: want 0 (3) to 6", o.Digits)
	}
	return nil
}

// size returns the room of one table in pt.
func (o ReportOptions) size() (width, height float64) {
	width, height = o.Layout.defaults()
	if o.Width > 0 {
		width = o.Width
	}
	if o.Height > 0 {
		height = o.Height
	}
	return width, height
}

func (o ReportOptions) digits() int {
	if o.Digits == 0 {
		return 3
	}
	return o.Digits
}
