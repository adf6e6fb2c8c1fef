package spec

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"fringe/bench/input"
	"fringe/results"
)

// The [report] table chooses what the tables of summary.tex and
// summary.md show and how summary.tex lays them out (results.ReportOptions).
// Every key is optional; a spec without [report] gets the tables it got
// before the table existed, byte for byte:
//
//	[report]
//	models = ["interference-balanced", "svm-linear-C1"] # model names, in table order
//	pipelines = ["std+l2"]                    # and their order
//	datasets = ["iris", "wine"]               # display names, in column/group order
//	metrics = ["accuracy", "balanced_accuracy"] # accuracy, balanced_accuracy, macro_f1
//	test_metrics = ["accuracy"]               # metrics whose paired tests get a table
//	layout = "wide"                           # page | column | wide | landscape
//	split = "auto"                            # auto | none | metric | dataset
//	omit = ["wilcoxon"]                       # summary, modes, tests, ranks, wilcoxon
//	max_rows = 40                             # body rows before a table runs over pages
//	digits = 3                                # decimals of means and intervals, 1 to 6
//	width_pt = 469                            # room of one table, pt (100 to 3000)
//	height_pt = 650
//
//	[report.summary]                          # also modes, tests, ranks, wilcoxon
//	caption = "Accuracy of the interference classifier and its baselines."
//	label = "tab:ws-summary"
//
// A model's display label is the `label` key of its [[model]] table.

// reportKeys are the keys of [report], in the order the error lists them.
var reportKeys = []string{"models", "pipelines", "datasets", "metrics", "test_metrics", "layout", "split", "omit",
	"max_rows", "digits", "width_pt", "height_pt", "summary", "modes", "tests", "ranks", "wilcoxon"}

// reportTables are the sub-tables of [report], one per kind of table (the
// names `omit` takes), in the order of results.ReportTable's bits.
var reportTables = []string{"summary", "modes", "tests", "ranks", "wilcoxon"}

// Limits of the page-size keys, in pt: below 100 pt no table of fringe's
// fits; 3000 pt is above the long side of an A0 sheet (2384 pt).
const (
	minReportPt = 100
	maxReportPt = 3000
)

// reportParser reads the [report] table; bad builds a located error.
type reportParser struct {
	file  string
	lines keyLines
}

func (r reportParser) bad(key, format string, args ...any) error {
	return &input.Error{File: r.file, Line: r.lines.findNested(key), Key: key, Err: fmt.Errorf(format, args...)}
}

// parseReport reads the [report] table (nil: the defaults) into report
// options without model labels (ReportOptions adds them). Membership of
// the names it lists is checked by checkReport.
func parseReport(raw map[string]any, file string, lines keyLines) (results.ReportOptions, error) {
	rp := reportParser{file: file, lines: lines}
	var o results.ReportOptions
	if raw == nil {
		return o, nil
	}
	keys := make([]string, 0, len(raw))
	for k := range raw {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	for _, k := range keys {
		if !slices.Contains(reportKeys, k) {
			return o, rp.bad("report."+k, "unknown key (allowed in [report]: %s)", strings.Join(reportKeys, ", "))
		}
	}
	var err error
	lists := []struct {
		key string
		dst *[]string
	}{{"models", &o.Models}, {"pipelines", &o.Pipelines}, {"datasets", &o.Datasets}, {"metrics", &o.Metrics}, {"test_metrics", &o.TestMetrics}}
	for _, l := range lists {
		if *l.dst, err = rp.names(raw, l.key); err != nil {
			return o, err
		}
	}
	if s, ok, err := rp.str(raw, "layout"); err != nil {
		return o, err
	} else if ok {
		if o.Layout, err = results.ParseTableLayout(s); err != nil {
			return o, rp.bad("report.layout", "unknown layout %q (want page: one-column document; column: one column of a two-column document; wide: table* across both columns; landscape: rotated pages)", s)
		}
	}
	if s, ok, err := rp.str(raw, "split"); err != nil {
		return o, err
	} else if ok {
		if o.Split, err = results.ParseSplitRule(s); err != nil {
			return o, rp.bad("report.split", "unknown split rule %q (want auto: split only what does not fit; none: never split; metric: one summary table per metric; dataset: one per dataset)", s)
		}
	}
	omit, err := rp.names(raw, "omit")
	if err != nil {
		return o, err
	}
	for _, n := range omit {
		t, err := results.ParseReportTables([]string{n})
		if err != nil {
			return o, rp.bad("report.omit", "unknown table %q (want %s)", n, strings.Join(reportTables, ", "))
		}
		o.Omit |= t
	}
	if len(omit) == len(reportTables) {
		return o, rp.bad("report.omit", "every table is omitted: summary.tex and summary.md would hold no table")
	}
	if n, ok, err := rp.integer(raw, "max_rows", 1, 100000); err != nil {
		return o, err
	} else if ok {
		o.LongTable = n
	}
	if n, ok, err := rp.integer(raw, "digits", 1, 6); err != nil {
		return o, err
	} else if ok {
		o.Digits = n
	}
	if o.Width, err = rp.points(raw, "width_pt"); err != nil {
		return o, err
	}
	if o.Height, err = rp.points(raw, "height_pt"); err != nil {
		return o, err
	}
	texts := []*results.TableText{&o.Summary, &o.Modes, &o.Tests, &o.Ranks, &o.Wilcoxon}
	labelOf := map[string]string{}
	for i, name := range reportTables {
		if *texts[i], err = rp.tableText(raw, name); err != nil {
			return o, err
		}
		if l := texts[i].Label; l != "" {
			if other, dup := labelOf[l]; dup {
				return o, rp.bad("report."+name+".label", "label %q is also the label of the %s table (\\label keys must be distinct)", l, other)
			}
			labelOf[l] = name
		}
	}
	return o, nil
}

// ReportOptions returns the options of the run's tables: the [report]
// table (Spec.Report) with the models' labels (modelkit.Spec.Label) as
// ModelLabels. A spec without [report] and labels gives the zero value.
func (s *Spec) ReportOptions() results.ReportOptions {
	o := s.Report
	o.ModelLabels = nil
	for _, m := range s.Models {
		if m.Label != "" {
			if o.ModelLabels == nil {
				o.ModelLabels = map[string]string{}
			}
			o.ModelLabels[m.Name] = m.Label
		}
	}
	return o
}

// names reads a list of distinct, non-empty strings; nil when the key is
// absent.
func (r reportParser) names(raw map[string]any, key string) ([]string, error) {
	v, ok := raw[key]
	if !ok {
		return nil, nil
	}
	k := "report." + key
	arr, ok := v.([]any)
	if !ok {
		return nil, r.bad(k, "want a list of names, got %v", v)
	}
	if len(arr) == 0 {
		return nil, r.bad(k, "an empty list (leave the key out for all, in the run's order)")
	}
	out := make([]string, 0, len(arr))
	for i, x := range arr {
		s, ok := x.(string)
		if !ok {
			return nil, r.bad(k, "value %d: want a name (a string), got %v", i+1, x)
		}
		if s == "" {
			return nil, r.bad(k, "value %d: an empty name", i+1)
		}
		if slices.Contains(out, s) {
			return nil, r.bad(k, "%q appears twice", s)
		}
		out = append(out, s)
	}
	return out, nil
}

func (r reportParser) str(raw map[string]any, key string) (string, bool, error) {
	v, ok := raw[key]
	if !ok {
		return "", false, nil
	}
	s, isStr := v.(string)
	if !isStr {
		return "", false, r.bad("report."+key, "want a string, got %v", v)
	}
	return s, true, nil
}

func (r reportParser) integer(raw map[string]any, key string, lo, hi int) (int, bool, error) {
	v, ok := raw[key]
	if !ok {
		return 0, false, nil
	}
	n, isInt := v.(int64)
	if !isInt {
		return 0, false, r.bad("report."+key, "want an integer from %d to %d, got %v", lo, hi, v)
	}
	if n < int64(lo) || n > int64(hi) {
		return 0, false, r.bad("report."+key, "%d is out of range (want %d to %d)", n, lo, hi)
	}
	return int(n), true, nil
}

// points reads a length in pt (0 when absent: the layout's default).
func (r reportParser) points(raw map[string]any, key string) (float64, error) {
	v, ok := raw[key]
	if !ok {
		return 0, nil
	}
	var x float64
	switch n := v.(type) {
	case int64:
		x = float64(n)
	case float64:
		x = n
	default:
		return 0, r.bad("report."+key, "want a length in pt (a number), got %v", v)
	}
	if math.IsNaN(x) || x < minReportPt || x > maxReportPt {
		return 0, r.bad("report."+key, "%v pt is out of range (want %d to %d pt; leave the key out for the layout's own size)", v, minReportPt, maxReportPt)
	}
	return x, nil
}

// tableText reads [report.<name>]: caption and label.
func (r reportParser) tableText(raw map[string]any, name string) (results.TableText, error) {
	var t results.TableText
	v, ok := raw[name]
	if !ok {
		return t, nil
	}
	k := "report." + name
	m, ok := v.(map[string]any)
	if !ok {
		return t, r.bad(k, "want a table ([%s] with caption and label), got %v", k, v)
	}
	keys := make([]string, 0, len(m))
	for key := range m {
		keys = append(keys, key)
	}
	sort.Strings(keys)
	for _, key := range keys {
		if key != "caption" && key != "label" {
			return t, r.bad(k+"."+key, "unknown key (allowed in [%s]: caption, label)", k)
		}
	}
	if c, ok := m["caption"]; ok {
		s, isStr := c.(string)
		if !isStr || strings.TrimSpace(s) == "" {
			return t, r.bad(k+".caption", "want the caption's opening as plain text, got %v", c)
		}
		t.Caption = s
	}
	if l, ok := m["label"]; ok {
		s, isStr := l.(string)
		if !isStr || s == "" {
			return t, r.bad(k+".label", "want a \\label key such as \"tab:%s\", got %v", name, l)
		}
		if safe := results.TeXLabelKey(s); safe != s {
			return t, r.bad(k+".label", "label %q: a \\label key here holds letters, digits, ':', '-' and '.' only (it would be written %q)", s, safe)
		}
		t.Label = s
	}
	return t, nil
}

// CheckReport checks the report options (Spec.Report) against the spec's
// models (their names after generation), pipelines and datasets (display
// names) and the models' labels: every name a [report] list gives must be
// one of the run's, and labels must be distinct and no other model's
// name. Errors are located *input.Error values naming the key
// ("report.models", "model[2].label"). Parse calls it; plan.New calls it
// again for specs built in code.
func (s *Spec) CheckReport() error {
	return s.checkReport(reportParser{file: s.File, lines: newKeyLines(s.Source)})
}

func (s *Spec) checkReport(rp reportParser) error {
	o := s.ReportOptions()
	models := make([]string, len(s.Models))
	for i, m := range s.Models {
		models[i] = m.Name
	}
	ds := make([]string, len(s.Datasets))
	for i, d := range s.Datasets {
		ds[i] = d.Display()
	}
	for _, c := range []struct {
		key, what string
		got, have []string
	}{
		{"models", "a model of the spec", o.Models, models},
		{"pipelines", "a pipeline of the spec", o.Pipelines, s.Pipelines},
		{"datasets", "a dataset of the spec", o.Datasets, ds},
		{"metrics", "a metric", o.Metrics, results.MetricNames},
		{"test_metrics", "a metric", o.TestMetrics, results.MetricNames},
	} {
		for _, n := range c.got {
			if slices.Contains(c.have, n) {
				continue
			}
			hint := ""
			switch c.key {
			case "models":
				for _, m := range s.Models {
					if m.Label == n {
						hint = fmt.Sprintf("; it is the label of model %q, and report.models takes model names", m.Name)
					}
				}
			case "datasets":
				for _, d := range s.Datasets {
					if d.As != "" && d.Name == n {
						hint = fmt.Sprintf("; dataset %q is shown as %q (its `as`)", d.Name, d.As)
					}
				}
			}
			return rp.bad("report."+c.key, "%q is not %s (want one of %s)%s", n, c.what, strings.Join(c.have, ", "), hint)
		}
	}
	if o.Metrics != nil {
		for _, m := range o.TestMetrics {
			if !slices.Contains(o.Metrics, m) {
				return rp.bad("report.test_metrics", "%q is not among report.metrics (%s)", m, strings.Join(o.Metrics, ", "))
			}
		}
	}
	// Labels: distinct, and none the name of another model.
	owner := map[string]int{}
	for i, m := range s.Models {
		if m.Label == "" {
			continue
		}
		key := fmt.Sprintf("model[%d].label", i+1)
		if j, dup := owner[m.Label]; dup {
			return rp.bad(key, "label %q is also the label of model[%d]; labels tell models apart in the tables", m.Label, j+1)
		}
		owner[m.Label] = i
		for j, other := range s.Models {
			if j != i && other.Name == m.Label {
				return rp.bad(key, "label %q is the name of model[%d]; the tables would be ambiguous", m.Label, j+1)
			}
		}
	}
	if err := o.Check(models, s.Pipelines, ds); err != nil {
		// Every condition of Check is one of the above but the ranges of
		// numbers, which parseReport enforces: only options set in code
		// get here.
		return &input.Error{File: s.File, Key: "report", Err: err}
	}
	return nil
}

// findNested returns the line of a key path in a nested table such as
// "report.summary.caption" ([report.summary] caption = ...), or, for
// other paths and when that fails, what find returns (the key of an
// inline table, "report.summary", or the table's header).
func (kl keyLines) findNested(path string) int {
	if strings.Count(path, ".") >= 2 && !strings.Contains(path, "[") {
		i := strings.LastIndex(path, ".")
		table, key := path[:i], path[i+1:]
		cur, header := "", 0
		for n, l := range kl.lines {
			t := strings.TrimSpace(strings.SplitN(l, "#", 2)[0])
			if strings.HasPrefix(t, "[") {
				cur = strings.TrimSpace(strings.Trim(t, "[] \t"))
				if cur == table && header == 0 && !strings.HasPrefix(t, "[[") {
					header = n + 1
				}
				continue
			}
			eq := strings.Index(t, "=")
			if eq < 0 || cur != table {
				continue
			}
			if strings.Trim(strings.TrimSpace(t[:eq]), `"`) == key {
				return n + 1
			}
		}
		if header > 0 {
			return header
		}
		path = table
	}
	return kl.find(path)
}
