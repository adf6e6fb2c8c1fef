package results

import (
	"cmp"
	"fmt"
	"slices"
)

// reportView is a report seen through its options: the selected datasets,
// pipelines, models and metrics in their order, and display labels.
type reportView struct {
	r         *Report
	opt       ReportOptions
	datasets  []string
	pipelines []string
	models    []string // in display order
	metrics   []int    // indices into MetricNames
	tests     []int    // metrics whose paired tests get a table
	rows      []int    // indices into r.Summary, in display order
	// omitted is the number of the run's models that are not shown,
	// omittedPipes that of its pipelines.
	omitted, omittedPipes int
	// explicitModels: the author gave the model order.
	explicitModels bool
	// summaryRef is the label of the first summary table, once written.
	summaryRef string
}

// runModels returns the models of the run in run order: the variants'
// order, then any model of the summary without a variant.
func (r *Report) runModels() []string {
	var out []string
	seen := map[string]bool{}
	for _, v := range r.Variants {
		if !seen[v.Model] {
			seen[v.Model] = true
			out = append(out, v.Model)
		}
	}
	for _, s := range r.Summary {
		if !seen[s.Model] {
			seen[s.Model] = true
			out = append(out, s.Model)
		}
	}
	return out
}

// newView applies r.Options to r. It returns an error when the options
// name models, pipelines, datasets or metrics the report lacks.
func newView(r *Report) (*reportView, error) {
	if len(r.Marks) != len(r.Summary) {
		return nil, fmt.Errorf("results: report has %d mark rows for %d summary rows", len(r.Marks), len(r.Summary))
	}
	for i, s := range r.Summary {
		if len(s.Metrics) != len(MetricNames) || len(r.Marks[i]) != len(MetricNames) {
			return nil, fmt.Errorf("results: summary row %s/%s/%s has %d metrics and %d marks, want %d", s.Dataset, s.Pipeline, s.Model, len(s.Metrics), len(r.Marks[i]), len(MetricNames))
		}
	}
	o := r.Options
	runModels := r.runModels()
	allDS, allPipes := datasetsInOrder(r.Summary), pipelinesInOrder(r.Summary)
	if err := o.Check(runModels, allPipes, allDS); err != nil {
		return nil, err
	}
	v := &reportView{r: r, opt: o, explicitModels: o.Models != nil}
	v.datasets = orAll(o.Datasets, allDS)
	v.pipelines = orAll(o.Pipelines, allPipes)
	v.models = orAll(o.Models, runModels)
	v.omitted = len(runModels) - len(v.models)
	v.omittedPipes = len(allPipes) - len(v.pipelines)
	names := orAll(o.Metrics, MetricNames)
	for _, n := range names {
		v.metrics = append(v.metrics, slices.Index(MetricNames, n))
	}
	if o.TestMetrics != nil {
		for _, n := range o.TestMetrics {
			v.tests = append(v.tests, slices.Index(MetricNames, n))
		}
	} else {
		v.tests = v.metrics[:1]
	}
	pos := func(list []string, s string) int { return slices.Index(list, s) }
	for i, s := range r.Summary {
		if pos(v.datasets, s.Dataset) >= 0 && pos(v.pipelines, s.Pipeline) >= 0 && pos(v.models, s.Model) >= 0 {
			v.rows = append(v.rows, i)
		}
	}
	slices.SortStableFunc(v.rows, func(a, b int) int {
		x, y := r.Summary[a], r.Summary[b]
		return cmp.Or(
			cmp.Compare(pos(v.datasets, x.Dataset), pos(v.datasets, y.Dataset)),
			cmp.Compare(pos(v.pipelines, x.Pipeline), pos(v.pipelines, y.Pipeline)),
			cmp.Compare(pos(v.models, x.Model), pos(v.models, y.Model)),
		)
	})
	return v, nil
}

// orAll returns the selection, or all when there is none.
func orAll(sel, all []string) []string {
	if sel == nil {
		return all
	}
	return sel
}

// label returns the display label of a model.
func (v *reportView) label(model string) string {
	if l, ok := v.opt.ModelLabels[model]; ok {
		return l
	}
	return model
}

func (v *reportView) hasModel(m string) bool    { return slices.Contains(v.models, m) }
func (v *reportView) hasDataset(d string) bool  { return slices.Contains(v.datasets, d) }
func (v *reportView) hasPipeline(p string) bool { return slices.Contains(v.pipelines, p) }
func (v *reportView) shows(t ReportTable) bool  { return v.opt.Omit&t == 0 }

// variants returns the selected variants in display order: the author's
// model order when given, else SortVariants (interference modes first).
// Models without a variant count as baselines.
func (v *reportView) variants() []Variant {
	var vs []Variant
	for _, m := range v.models {
		x, ok := v.r.variant(m)
		if !ok {
			x = Variant{Model: m, Kind: m, Family: m}
		}
		vs = append(vs, x)
	}
	if v.explicitModels {
		return vs
	}
	return SortVariants(vs)
}

// modeTable is the per-dataset view of the interference classifier across
// modes beside the baselines for the selected datasets.
func (v *reportView) modeTable(datasets []string) modeTable {
	mt := modeTable{datasets: datasets}
	idx := map[[3]string]int{}
	for _, i := range v.rows {
		s := v.r.Summary[i]
		idx[[3]string{s.Dataset, s.Pipeline, s.Model}] = i
	}
	vs := v.variants()
	for _, p := range v.pipelines {
		g := modeGroup{pipeline: p}
		for _, x := range vs {
			row := modeRow{v: x}
			any := false
			for _, d := range datasets {
				i, ok := idx[[3]string{d, p, x.Model}]
				if !ok {
					i = -1
				} else {
					any = true
				}
				row.cells = append(row.cells, i)
			}
			if any {
				g.rows = append(g.rows, row)
			}
		}
		if len(g.rows) > 0 {
			mt.groups = append(mt.groups, g)
		}
	}
	return mt
}

// comparisons returns the selected comparisons on one metric, in display
// order (dataset, pipeline, model).
func (v *reportView) comparisons(metric string) []Comparison {
	var out []Comparison
	for _, c := range v.r.Comparisons {
		if c.Metric == metric && v.hasDataset(c.Dataset) && v.hasPipeline(c.Pipeline) && v.hasModel(c.Model) {
			out = append(out, c)
		}
	}
	pos := func(list []string, s string) int { return slices.Index(list, s) }
	slices.SortStableFunc(out, func(a, b Comparison) int {
		return cmp.Or(
			cmp.Compare(pos(v.datasets, a.Dataset), pos(v.datasets, b.Dataset)),
			cmp.Compare(pos(v.pipelines, a.Pipeline), pos(v.pipelines, b.Pipeline)),
			cmp.Compare(pos(v.models, a.Model), pos(v.models, b.Model)),
		)
	})
	return out
}

// ranks returns the rank tables of the selected pipelines (every model
// and dataset of a table stays: the test was computed on them).
func (v *reportView) ranks() []RankTable {
	var out []RankTable
	for _, t := range v.r.Ranks {
		if t.Pipeline == "" || v.hasPipeline(t.Pipeline) {
			out = append(out, t)
		}
	}
	return out
}

// pairs returns the selected Wilcoxon pairs.
func (v *reportView) pairs() []PairAcross {
	var out []PairAcross
	for _, p := range v.r.Pairs {
		if (p.Pipeline == "" || v.hasPipeline(p.Pipeline)) && v.hasModel(p.A) && v.hasModel(p.B) {
			out = append(out, p)
		}
	}
	return out
}

// choices returns the tuned models' choices of the selected cells, in
// the report's order.
func (v *reportView) choices() []ChoiceCount {
	var out []ChoiceCount
	for _, c := range v.r.Choices {
		if v.hasDataset(c.Dataset) && v.hasPipeline(c.Pipeline) && v.hasModel(c.Model) {
			out = append(out, c)
		}
	}
	return out
}
