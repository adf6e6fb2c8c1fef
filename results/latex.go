package results

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

var metricHeadsTeX = []string{"Accuracy", "Balanced accuracy", "Macro $F_1$"}

// metricHead returns the header cell of metric j, spanning the mean and
// the interval; it may stack on two lines ("Balanced" over "accuracy").
func metricHead(j int) tcell {
	words := [][]string{{"Accuracy"}, {"Balanced", "accuracy"}, {"Macro"}}[j]
	c := tcell{tex: metricHeadsTeX[j], span: 2, align: 'c'}
	for _, w := range words {
		c.pieces = append(c.pieces, texTextWidth(w))
		c.pieceTeX = append(c.pieceTeX, w)
	}
	if j == 2 {
		c.pieces = append(c.pieces, mathW["F_1"])
		c.pieceTeX = append(c.pieceTeX, "$F_1$")
	}
	c.w = sum(c.pieces) + float64(len(c.pieces)-1)*texWidthASCII[0]*texPt
	return c
}

var metricWordsMD = []string{"accuracy", "balanced accuracy", "macro F1"}

// sentence returns s ending with a full stop (or its own final punctuation).
func sentence(s string) string {
	s = strings.TrimSpace(s)
	if s == "" || strings.ContainsAny(s[len(s)-1:], ".!?") {
		return s
	}
	return s + "."
}

// upperFirst capitalises the first letter of s when it is a lower-case
// ASCII letter: a generated caption fragment that follows an author's
// caption (a sentence of its own) instead of "Run NAME: ".
func upperFirst(s string) string {
	if s != "" && s[0] >= 'a' && s[0] <= 'z' {
		return string(s[0]-'a'+'A') + s[1:]
	}
	return s
}

// authorOpening returns the start of a caption of a table other than the
// summary: the author's text and a space, or "Run NAME: "; the generated
// text that follows is capitalised after the author's sentence.
func (p Protocol) authorOpening(author, rest string) string {
	if author != "" {
		return TeXEscape(sentence(author)) + " " + upperFirst(rest)
	}
	return TeXEscape(fmt.Sprintf("Run %s: ", p.Run)) + rest
}

// opening returns the start of a caption: the author's text, or "Run
// NAME (cross-validation; seed N)" and a colon; esc escapes plain text.
func (p Protocol) opening(esc func(string) string, author string) string {
	if author != "" {
		return esc(sentence(author)) + " "
	}
	return esc(fmt.Sprintf("Run %s (%s; seed %d): ", p.Run, p.CV, p.Seed))
}

// marksCaption describes the cells: the interval, bold and the mark of
// "not significantly worse"; alpha is "α = 0.05" in the target format.
func (p Protocol) marksCaption(esc func(string) string, alpha, notWorse string, capital bool) string {
	var b strings.Builder
	mean := "mean with "
	if capital {
		mean = "Mean with "
	}
	b.WriteString(esc(fmt.Sprintf("%s%s confidence interval (%s). ", mean, percent(p.Level), p.Interval)))
	marked := "within each dataset and metric"
	if p.Pooled {
		marked = "within each dataset; accuracy only"
	}
	b.WriteString(esc("Bold: best mean per dataset; "))
	b.WriteString(notWorse)
	b.WriteString(esc(fmt.Sprintf(": not significantly worse than the best (%s, %s correction %s, ", p.Test, p.Correction, marked)))
	b.WriteString(alpha + ").")
	return b.String()
}

// mainCaption returns the caption of the summary table.
func (p Protocol) mainCaption(esc func(string) string, alpha, notWorse, author string) string {
	return p.opening(esc, author) + p.marksCaption(esc, alpha, notWorse, author != "")
}

const daggerTeX = `$^{\dagger}$`

// TeXReport is summary.tex as WriteReportTeX writes it, with what it
// learned on the way.
type TeXReport struct {
	// Text is the content of summary.tex: tables to \input into a
	// document (no preamble); Packages lists what it needs.
	Text string
	// Packages are the LaTeX packages the text needs, in load order.
	Packages []string
	// Warnings: names written with transliterations or code points,
	// tables wider than the room of the layout. Each starts with
	// "summary.tex: ".
	Warnings []string
	// Tables describes every table written, in order.
	Tables []TeXTableInfo
}

// texPackages are the packages summary.tex may need; all are in
// texlive-latex-base (array, dcolumn, longtable) or
// texlive-latex-recommended (booktabs, pdflscape).
var texPackages = []string{"array", "booktabs", "dcolumn", "longtable"}

// floatsPerFlush is the number of floats after which summary.tex writes
// \clearpage before the next table, well below LaTeX's limit of 18
// floats waiting for a page.
const floatsPerFlush = 10

// ReportTeX lays out summary.tex for r under r.Options: the summary table
// (mean and confidence interval of each metric, best per dataset in bold,
// cells not significantly worse than the best marked †, the protocol in
// the caption), when the run has the interference classifier a table of
// its modes beside the baselines with one column per dataset, the paired
// tests against the reference, the average ranks with the Friedman test,
// and the Wilcoxon tests across datasets — each its own table, split and
// laid out to fit (see ReportOptions and texlayout.go). It returns an
// error when the options name what the report lacks.
func ReportTeX(r *Report) (*TeXReport, error) {
	v, err := newView(r)
	if err != nil {
		return nil, err
	}
	out := &TeXReport{}
	var body strings.Builder
	var warn []string
	var tables []*ttable
	if v.shows(TableSummary) {
		sum := v.summaryTables(&warn)
		if len(sum) > 0 {
			v.summaryRef = sum[0].key
		}
		tables = append(tables, sum...)
	}
	if v.shows(TableModes) && r.HasInterference() {
		tables = append(tables, v.modeTables(&warn)...)
	}
	if v.shows(TableTests) && len(r.Comparisons) > 0 {
		tables = append(tables, v.testTables(&warn)...)
	}
	if v.shows(TableRanks) && len(v.ranks()) > 0 {
		tables = append(tables, v.rankTables(&warn)...)
	}
	if v.shows(TableWilcoxon) && len(v.pairs()) > 0 {
		tables = append(tables, v.wilcoxonTables(&warn)...)
	}
	pk := texPackages
	if v.opt.Layout == LayoutLandscape {
		pk = append(pk[:len(pk):len(pk)], "pdflscape")
	}
	out.Packages = pk
	fmt.Fprintf(&body, "%% Generated by fringe. Needs \\usepackage{%s}.\n", strings.Join(pk, ","))
	fmt.Fprintf(&body, "%% Layout %s: tables fitted to %s pt; see summary-standalone.tex.\n", v.opt.Layout, ptString(first(v.opt.size())))
	if v.opt.Layout == LayoutLandscape {
		body.WriteString("\\begin{landscape}\n")
	}
	floats := 0
	for i, t := range tables {
		if i > 0 {
			body.WriteString("\n")
		}
		if floats >= floatsPerFlush {
			// LaTeX holds at most 18 floats that wait for a page; a long
			// summary.tex must not pile up more.
			body.WriteString("\\clearpage\n\n")
			floats = 0
		}
		info := t.emit(&body, v.opt, &warn)
		if !info.LongTable {
			floats += info.Parts
		} else {
			floats = 0 // a longtable is text: it lets the floats before it out
		}
		out.Tables = append(out.Tables, info)
	}
	if v.opt.Layout == LayoutLandscape {
		body.WriteString("\\end{landscape}\n")
	}
	if groups := choiceGroups(v.choices()); len(groups) > 0 {
		// One line per tuned model and cell: what it chose and how often.
		body.WriteString("\n\\paragraph{Tuned models.} The grid point each tuned model chose by inner cross-validation, and on how many outer folds.\n\\begin{itemize}\n")
		for _, g := range groups {
			c := g[0]
			parts := []string{v.label(c.Model), c.Dataset, c.Pipeline, choiceText(g)}
			for i, p := range parts {
				txt, ws := TeXText(p)
				parts[i] = txt
				warn = append(warn, ws...)
			}
			fmt.Fprintf(&body, "\\item %s, %s, %s: %s\n", parts[0], parts[1], parts[2], parts[3])
		}
		body.WriteString("\\end{itemize}\n")
	}
	out.Text = body.String()
	seen := map[string]bool{}
	for _, w := range warn {
		if !seen[w] {
			seen[w] = true
			out.Warnings = append(out.Warnings, "summary.tex: "+w)
		}
	}
	return out, nil
}

func first(a, _ float64) float64 { return a }

// WriteReportTeX writes summary.tex (ReportTeX(r).Text).
func WriteReportTeX(w io.Writer, r *Report) error {
	t, err := ReportTeX(r)
	if err != nil {
		return err
	}
	_, err = io.WriteString(w, t.Text)
	return err
}

// StandaloneName is the file name of the standalone wrapper of
// summary.tex in a run directory.
const StandaloneName = "summary-standalone.tex"

// StandaloneTeX returns summary-standalone.tex: a document of the
// standard article class (two-column for the column and wide layouts;
// text width and height set by geometry when r.Options gives its own)
// that loads the packages summary.tex needs and \input's it from input
// (normally "summary.tex", beside it). It compiles with pdflatex from a
// plain TeX Live with texlive-latex-recommended.
func StandaloneTeX(r *Report, input string) string {
	o := r.Options
	var b strings.Builder
	b.WriteString("% Generated by fringe: compiles summary.tex on its own (pdflatex summary-standalone.tex).\n")
	class := "\\documentclass{article}\n"
	if o.Layout.floats() {
		class = "\\documentclass[twocolumn]{article}\n"
	}
	b.WriteString(class)
	if o.Width > 0 || o.Height > 0 {
		w, h := o.size()
		tw, th := w, h
		switch o.Layout {
		case LayoutColumn:
			tw = 2*w + 10 // \columnsep 10 pt
		case LayoutLandscape:
			tw, th = h, w
		}
		fmt.Fprintf(&b, "\\usepackage[textwidth=%spt,textheight=%spt,paperwidth=%spt,paperheight=%spt]{geometry}\n",
			ptString(tw), ptString(th), ptString(tw+144), ptString(th+144))
	}
	pk := texPackages
	if o.Layout == LayoutLandscape {
		pk = append(pk[:len(pk):len(pk)], "pdflscape")
	}
	fmt.Fprintf(&b, "\\usepackage{%s}\n", strings.Join(pk, ","))
	b.WriteString("\\begin{document}\n")
	fmt.Fprintf(&b, "\\input{%s}\n", input)
	b.WriteString("\\end{document}\n")
	return b.String()
}

// alphaTeX is "$\alpha = 0.05$".
func (p Protocol) alphaTeX() string { return fmt.Sprintf("$\\alpha = %s$", fmtAlpha(p.Alpha)) }

// selectionNote says that marks compare with models and pipelines not
// shown (the best cell of a dataset may be one of them).
func (v *reportView) selectionNote() string {
	plural := func(n int, w string) string {
		if n == 1 {
			return fmt.Sprintf("%d %s", n, w)
		}
		return fmt.Sprintf("%d %ss", n, w)
	}
	nm, np := len(v.r.runModels()), len(pipelinesInOrder(v.r.Summary))
	switch {
	case v.omitted > 0 && v.omittedPipes > 0:
		return fmt.Sprintf(" Marks compare with all %s and %s of the run; %s and %s are shown.",
			plural(nm, "model"), plural(np, "pipeline"), plural(len(v.models), "model"), plural(len(v.pipelines), "pipeline"))
	case v.omitted > 0:
		return fmt.Sprintf(" Marks compare with all %d models of the run; %d are shown.", nm, len(v.models))
	case v.omittedPipes > 0:
		return fmt.Sprintf(" Marks compare with all %d pipelines of the run; %d are shown.", np, len(v.pipelines))
	}
	return ""
}

// key returns the label key of a kind of table.
func (v *reportView) key(t TableText, suffix string) string {
	if t.Label != "" {
		return TeXLabelKey(t.Label)
	}
	base := v.r.Label
	if base == "" {
		base = "tab:" + v.r.Protocol.Run
	}
	return TeXLabelKey(base + suffix)
}

// spreadTeX formats what follows a mean: "\pm h" or "^{+a}_{-b}", and its
// width in pt; "" when there is no interval.
func spreadTeX(m MetricSummary, digits int) (string, float64) {
	_, plus, minus, sym, ok := spreadParts(m, digits)
	switch {
	case !ok:
		return "", 0
	case sym:
		return "\\pm " + plus, 2*ptMedMu + emBinary*texPt + mathNumberWidth(plus, false)
	}
	return "{}^{+" + plus + "}_{-" + minus + "}", max(scriptNumberWidth("+"+plus), scriptNumberWidth("-"+minus)) + ptScriptSpace
}

// metricCells returns the mean and spread cells of one metric.
func metricCells(m MetricSummary, mark Mark, digits int, dagger bool) (tcell, tcell) {
	if math.IsNaN(m.Mean) {
		return texNumText("--", 0.513885*texPt), tcell{}
	}
	mean := texNumber(fmt.Sprintf("%.*f", digits, m.Mean), mark == MarkBest)
	sp, w := spreadTeX(m, digits)
	if dagger {
		slot := emDagger6*texScriptPt + ptScriptSpace
		if mark == MarkNotWorse {
			sp = "{}^{\\dagger}" + sp
		} else {
			sp = "\\hphantom{{}^{\\dagger}}" + sp
		}
		w += slot
	}
	return mean, tcell{tex: sp, w: w}
}

// anyMark reports whether some selected row has MarkNotWorse on metric j.
func (v *reportView) anyMark(rows []int, j int) bool {
	for _, i := range rows {
		if v.r.Marks[i][j] == MarkNotWorse {
			return true
		}
	}
	return false
}

// summaryTable builds one summary table of the given rows and metrics.
func (v *reportView) summaryTable(rows []int, metrics []int, key, caption string, warn *[]string) *ttable {
	digits := v.opt.digits()
	t := &ttable{key: key, caption: caption, captionEm: texTextWidth(stripTeX(caption)) / texPt}
	t.cols = []tcol{{kind: colText, wrap: true}, {kind: colText, wrap: true}}
	head := []tcell{texTextCell("Pipeline", warn), texTextCell("Model", warn)}
	var rules []string
	for k, j := range metrics {
		t.cols = append(t.cols, tcol{kind: colNum}, tcol{kind: colSpread, joinPrev: true})
		head = append(head, metricHead(j))
		c := 2 + 2*k + 1 // 1-based first column of the pair
		rules = append(rules, fmt.Sprintf("\\cmidrule(lr){%d-%d}", c, c+1))
	}
	t.head = [][]tcell{head}
	if len(metrics) > 1 {
		t.headRules = []string{strings.Join(rules, "")}
	}
	daggers := make([]bool, len(metrics))
	for k, j := range metrics {
		daggers[k] = v.anyMark(rows, j)
	}
	prevDS, prevPipe := "", ""
	unit := -1
	for _, i := range rows {
		s := v.r.Summary[i]
		if s.Dataset != prevDS {
			unit++
			g := texTextCell(s.Dataset, warn)
			rule := ""
			if prevDS != "" {
				rule = "\\midrule"
			}
			t.rows = append(t.rows, trow{group: "\\emph{" + g.tex + "}", groupW: g.w, rule: rule, unit: unit})
			prevPipe = ""
		}
		pipe := tcell{}
		if s.Pipeline != prevPipe {
			pipe = texTextCell(s.Pipeline, warn)
		}
		prevDS, prevPipe = s.Dataset, s.Pipeline
		cells := []tcell{pipe, texTextCell(v.label(s.Model), warn)}
		for k, j := range metrics {
			m, sp := metricCells(s.Metrics[j], v.r.Marks[i][j], digits, daggers[k])
			cells = append(cells, m, sp)
		}
		t.rows = append(t.rows, trow{cells: cells, unit: unit})
	}
	return t
}

// stripTeX removes TeX markup roughly, for estimating caption lengths.
func stripTeX(s string) string {
	r := strings.NewReplacer("\\emph{", "", "\\ref{", "", "$", "", "{", "", "}", "", "\\", "", "~", " ")
	return r.Replace(s)
}

func (v *reportView) summaryCaption(metricsNote string) string {
	p := v.r.Protocol
	c := p.mainCaption(TeXEscape, p.alphaTeX(), daggerTeX, v.opt.Summary.Caption)
	return c + metricsNote + v.selectionNote()
}

// summaryTables builds the summary, split as the options and the room
// require.
func (v *reportView) summaryTables(warn *[]string) []*ttable {
	width, _ := v.opt.size()
	key := v.key(v.opt.Summary, "")
	groups := [][]int{v.rows}
	var dsKeys []string
	if v.opt.Split == SplitDataset {
		groups = nil
		for _, d := range v.datasets {
			var g []int
			for _, i := range v.rows {
				if v.r.Summary[i].Dataset == d {
					g = append(g, i)
				}
			}
			if len(g) > 0 {
				groups = append(groups, g)
				dsKeys = append(dsKeys, d)
			}
		}
	}
	var out []*ttable
	for gi, rows := range groups {
		gkey := key
		note := ""
		if dsKeys != nil {
			gkey = TeXLabelKey(key + "-" + dsKeys[gi])
			note = " Dataset " + TeXEscape(dsKeys[gi]) + "."
		}
		perMetric := v.opt.Split == SplitMetric
		if !perMetric && len(v.metrics) > 1 && v.opt.Split != SplitNone {
			probe := v.summaryTable(rows, v.metrics, gkey, v.summaryCaption(note), new([]string))
			l := probe.fit(width, 0)
			perMetric = !l.fits || l.wraps
		}
		if !perMetric || len(v.metrics) == 1 {
			out = append(out, v.summaryTable(rows, v.metrics, gkey, v.summaryCaption(note), warn))
			continue
		}
		firstKey := ""
		for _, j := range v.metrics {
			mkey := TeXLabelKey(gkey + "-" + MetricNames[j])
			var caption string
			if firstKey == "" {
				caption = v.summaryCaption(note + " " + metricHeadsTeX[j] + "; the other metrics follow in their own tables.")
				firstKey = mkey
			} else {
				caption = fmt.Sprintf("%s; run %s, as in Table~\\ref{%s}.%s", metricHeadsTeX[j], TeXEscape(v.r.Protocol.Run), firstKey, note)
			}
			out = append(out, v.summaryTable(rows, []int{j}, mkey, caption, warn))
		}
	}
	return out
}

// modeTables builds the table of the interference classifier across modes
// beside the baselines (one metric, one column per dataset), in groups of
// datasets that fit.
func (v *reportView) modeTables(warn *[]string) []*ttable {
	width, _ := v.opt.size()
	j := v.metrics[0]
	key := v.key(v.opt.Modes, "-modes")
	build := func(datasets []string, key, caption string, w *[]string) *ttable {
		return v.modeTable1(datasets, j, key, caption, w)
	}
	caption := func(part string) string {
		ref := "the summary table"
		if v.summaryRef != "" {
			ref = "Table~\\ref{" + v.summaryRef + "}"
		}
		p := v.r.Protocol
		var b strings.Builder
		b.WriteString(p.authorOpening(v.opt.Modes.Caption, TeXEscape(fmt.Sprintf("%s of the interference classifier in each mode beside the classical baselines, one column per dataset; mean with %s confidence interval; bold and ",
			metricWordsMD[j], percent(p.Level)))))
		b.WriteString(daggerTeX + " as in " + ref + ".")
		b.WriteString(part)
		return b.String()
	}
	n := len(v.datasets)
	if v.opt.Split != SplitNone {
		for g := n; g >= 1; g-- {
			groups := chunk(v.datasets, g)
			ok := true
			for _, ds := range groups {
				l := build(ds, key, caption(""), new([]string)).fit(width, 72)
				if !l.fits {
					ok = false
					break
				}
			}
			if ok || g == 1 {
				if len(groups) == 1 {
					return []*ttable{build(groups[0], key, caption(""), warn)}
				}
				var out []*ttable
				for gi, ds := range groups {
					names := make([]string, len(ds))
					for i, d := range ds {
						names[i] = TeXEscape(d)
					}
					part := fmt.Sprintf(" Datasets %s (part %d of %d).", strings.Join(names, ", "), gi+1, len(groups))
					k := key
					if gi > 0 {
						k = key + "-" + strconv.Itoa(gi+1)
					}
					out = append(out, build(ds, k, caption(part), warn))
				}
				return out
			}
		}
	}
	return []*ttable{build(v.datasets, key, caption(""), warn)}
}

// chunk splits list into ceil(len/g) nearly equal consecutive groups.
func chunk(list []string, g int) [][]string {
	k := (len(list) + g - 1) / g
	var out [][]string
	start := 0
	for i := range k {
		size := len(list) / k
		if i < len(list)%k {
			size++
		}
		out = append(out, list[start:start+size])
		start += size
	}
	return out
}

func (v *reportView) modeTable1(datasets []string, j int, key, caption string, warn *[]string) *ttable {
	digits := v.opt.digits()
	mt := v.modeTable(datasets)
	t := &ttable{key: key, caption: caption, captionEm: texTextWidth(stripTeX(caption)) / texPt}
	t.cols = []tcol{{kind: colText, wrap: true}, {kind: colText, wrap: true}, {kind: colText, wrap: true}}
	head := []tcell{texTextCell("Pipeline", warn), texTextCell("Model", warn), texTextCell("Run as", warn)}
	var rules []string
	for k, d := range datasets {
		t.cols = append(t.cols, tcol{kind: colNum}, tcol{kind: colSpread, joinPrev: true})
		h := texTextCell(d, warn)
		h.span, h.align = 2, 'c'
		head = append(head, h)
		c := 3 + 2*k + 1
		rules = append(rules, fmt.Sprintf("\\cmidrule(lr){%d-%d}", c, c+1))
	}
	t.head = [][]tcell{head}
	if len(datasets) > 1 {
		t.headRules = []string{strings.Join(rules, "")}
	}
	daggers := make([]bool, len(datasets))
	for _, g := range mt.groups {
		for _, row := range g.rows {
			for k, ci := range row.cells {
				if ci >= 0 && v.r.Marks[ci][j] == MarkNotWorse {
					daggers[k] = true
				}
			}
		}
	}
	ncols := len(t.cols)
	for gi, g := range mt.groups {
		prevQ := true
		for ri, row := range g.rows {
			rule := ""
			switch {
			case ri == 0 && gi > 0:
				rule = "\\midrule"
			case ri > 0 && prevQ && !row.v.Interference:
				rule = fmt.Sprintf("\\cmidrule(l){2-%d}", ncols)
			}
			prevQ = row.v.Interference
			pipe := tcell{}
			if ri == 0 {
				pipe = texTextCell(g.pipeline, warn)
			}
			how := row.v.Describe()
			if !row.v.Interference {
				how = "baseline"
			}
			cells := []tcell{pipe, texTextCell(v.label(row.v.Model), warn), texTextCell(how, warn)}
			for k, ci := range row.cells {
				if ci < 0 {
					cells = append(cells, texNumText("--", 0.513885*texPt), tcell{})
					continue
				}
				m, sp := metricCells(v.r.Summary[ci].Metrics[j], v.r.Marks[ci][j], digits, daggers[k])
				cells = append(cells, m, sp)
			}
			t.rows = append(t.rows, trow{cells: cells, rule: rule, unit: gi})
		}
	}
	return t
}

// fmtPTeX formats a p-value for a number column: four decimals, "<0.0001"
// below.
func fmtPTeX(p float64) string {
	switch {
	case math.IsNaN(p):
		return ""
	case p < 1e-4:
		return "<0.0001"
	}
	return fmt.Sprintf("%.4f", p)
}

// statCell formats a test statistic.
func statCell(v float64) tcell {
	switch {
	case math.IsNaN(v):
		return texNumText("--", 0.513885*texPt)
	case math.IsInf(v, 1):
		return texNumText("$\\infty$", emInfty*texPt)
	case math.IsInf(v, -1):
		return texNumText("$-\\infty$", (emInfty+emBinary)*texPt)
	}
	return texNumber(fmt.Sprintf("%.3f", v), false)
}

func signedCell(v float64) tcell {
	if math.IsNaN(v) {
		return texNumText("--", 0.513885*texPt)
	}
	return texNumber(fmtSigned(v), false)
}

func pCell(p float64, bold bool) tcell {
	if math.IsNaN(p) {
		return texNumText("--", 0.513885*texPt)
	}
	return texNumber(fmtPTeX(p), bold)
}

// testTables builds one table of paired tests per test metric. A table
// that does not fit drops the statistic, then the interval of the
// difference (both stay in comparisons.csv and summary.md).
func (v *reportView) testTables(warn *[]string) []*ttable {
	width, _ := v.opt.size()
	var out []*ttable
	base := v.key(v.opt.Tests, "-tests")
	firstKey := ""
	for _, j := range v.tests {
		cs := v.comparisons(MetricNames[j])
		if len(cs) == 0 {
			continue
		}
		key := base
		if len(v.tests) > 1 {
			key = TeXLabelKey(base + "-" + MetricNames[j])
		}
		var t *ttable
		for level := 0; level <= 2; level++ {
			w := warn
			if level < 2 {
				w = new([]string)
			}
			t = v.testTable1(cs, j, key, firstKey, level, w)
			if level < 2 && t.fit(width, 0).fits {
				*warn = append(*warn, *w...)
				break
			}
		}
		if firstKey == "" {
			firstKey = key
		}
		out = append(out, t)
	}
	return out
}

// testTable1 builds the paired-test table of metric j; level 1 leaves out
// the statistic, level 2 the interval too. first is the label of the
// first test table ("" for this one), whose caption the others refer to.
func (v *reportView) testTable1(cs []Comparison, j int, key, first string, level int, warn *[]string) *ttable {
	sameRef, sameTest := true, true
	for _, c := range cs {
		if c.RefModel != cs[0].RefModel || c.RefPipeline != c.Pipeline {
			sameRef = false
		}
		if c.Test != cs[0].Test {
			sameTest = false
		}
	}
	p := v.r.Protocol
	var cap strings.Builder
	if first != "" {
		fmt.Fprintf(&cap, "%s; paired tests as in Table~\\ref{%s}.", metricHeadsTeX[j], first)
	} else {
		what := metricWordsMD[j]
		against := "its reference"
		if sameRef {
			against = v.label(cs[0].RefModel) + " on the same pipeline"
		}
		cap.WriteString(p.authorOpening(v.opt.Tests.Caption, TeXEscape(fmt.Sprintf("paired tests of each model against %s, on %s. ", against, what))))
		cap.WriteString("$\\Delta$" + TeXEscape(": the model's mean minus the reference's"))
		if level < 2 {
			cap.WriteString(TeXEscape(", with its interval"))
		}
		if level < 1 {
			if sameTest {
				cap.WriteString(TeXEscape(fmt.Sprintf("; statistic of the %s", testWords(cs[0].Test))))
			} else {
				cap.WriteString(TeXEscape("; statistic of the test named in each row"))
			}
		}
		cap.WriteString(TeXEscape(fmt.Sprintf("; p-values adjusted by %s within each dataset and metric, bold where significant at ", p.Correction)))
		cap.WriteString(p.alphaTeX() + ".")
		omitted := "Raw p-values, degrees of freedom and verdicts"
		switch level {
		case 1:
			omitted = "Statistics, raw p-values, degrees of freedom and verdicts"
		case 2:
			omitted = "Intervals, statistics, raw p-values, degrees of freedom and verdicts"
		}
		cap.WriteString(TeXEscape(" " + omitted + " are in comparisons.csv and summary.md."))
	}
	caption := cap.String()
	t := &ttable{key: key, caption: caption, captionEm: texTextWidth(stripTeX(caption)) / texPt}
	t.cols = []tcol{{kind: colText, wrap: true}, {kind: colText, wrap: true}}
	head := []tcell{texTextCell("Pipeline", warn), texTextCell("Model", warn)}
	if !sameRef {
		t.cols = append(t.cols, tcol{kind: colText, wrap: true})
		head = append(head, texTextCell("Reference", warn))
	}
	if !sameTest {
		t.cols = append(t.cols, tcol{kind: colText, wrap: true})
		head = append(head, texTextCell("Test", warn))
	}
	nt := len(t.cols)
	t.cols = append(t.cols, tcol{kind: colNum})
	head = append(head, headCell("", `\Delta`))
	if level < 2 {
		t.cols = append(t.cols, tcol{kind: colNum}, tcol{kind: colNum})
		iv := texTextCell(percent(p.Level)+" interval", warn)
		iv.tex, iv.span, iv.align = TeXEscape(percent(p.Level)+" interval"), 2, 'c'
		head = append(head, iv)
		t.headRules = []string{fmt.Sprintf("\\cmidrule(lr){%d-%d}", nt+2, nt+3)}
	}
	if level < 1 {
		t.cols = append(t.cols, tcol{kind: colNum})
		head = append(head, headCell("Statistic"))
	}
	t.cols = append(t.cols, tcol{kind: colNum})
	head = append(head, headCell("", "p", " adj."))
	t.head = [][]tcell{head}
	prevDS, prevPipe := "", ""
	unit := -1
	for _, c := range cs {
		if c.Dataset != prevDS {
			unit++
			g := texTextCell(c.Dataset, warn)
			rule := ""
			if prevDS != "" {
				rule = "\\midrule"
			}
			t.rows = append(t.rows, trow{group: "\\emph{" + g.tex + "}", groupW: g.w, rule: rule, unit: unit})
			prevPipe = ""
		}
		pipe := tcell{}
		if c.Pipeline != prevPipe {
			pipe = texTextCell(c.Pipeline, warn)
		}
		prevDS, prevPipe = c.Dataset, c.Pipeline
		cells := []tcell{pipe, texTextCell(v.label(c.Model), warn)}
		if !sameRef {
			cells = append(cells, texTextCell(c.RefPipeline+" / "+v.label(c.RefModel), warn))
		}
		if !sameTest {
			cells = append(cells, texTextCell(testWords(c.Test), warn))
		}
		cells = append(cells, signedCell(c.Diff))
		if level < 2 {
			cells = append(cells, signedCell(c.Lo), signedCell(c.Hi))
		}
		if level < 1 {
			cells = append(cells, statCell(c.Statistic))
		}
		cells = append(cells, pCell(c.PAdj, c.Reject))
		t.rows = append(t.rows, trow{cells: cells, unit: unit})
	}
	return t
}

// testWords names a paired test in words.
func testWords(test string) string {
	switch test {
	case "corrected-t":
		return "corrected resampled t-test"
	case "5x2cv":
		return "5x2cv paired t-test"
	case "mcnemar":
		return "McNemar test"
	}
	return test
}

// rankTables builds one table per metric of rank tables: one column per
// pipeline with the average ranks, then the Friedman statistics.
func (v *reportView) rankTables(warn *[]string) []*ttable {
	all := v.ranks()
	var metrics []string
	for _, t := range all {
		if !containsStr(metrics, t.Metric) {
			metrics = append(metrics, t.Metric)
		}
	}
	width, _ := v.opt.size()
	var out []*ttable
	base := v.key(v.opt.Ranks, "-ranks")
	for mi, metric := range metrics {
		var ts []RankTable
		for _, t := range all {
			if t.Metric == metric {
				ts = append(ts, t)
			}
		}
		key := base
		if len(metrics) > 1 {
			key = TeXLabelKey(base + "-" + metric)
		}
		build := func(ts []RankTable, key string, w *[]string) *ttable { return v.rankTable1(ts, key, w) }
		// Pipelines as columns: groups of pipelines that fit.
		var groups [][]RankTable
		for g := len(ts); g >= 1; g-- {
			groups = nil
			for i := 0; i < len(ts); i += g {
				groups = append(groups, ts[i:min(i+g, len(ts))])
			}
			fits := true
			for _, grp := range groups {
				if l := build(grp, key, new([]string)).fit(width, 72); !l.fits {
					fits = false
				}
			}
			if fits {
				break
			}
		}
		for gi, grp := range groups {
			k := key
			if gi > 0 {
				k = key + "-" + strconv.Itoa(gi+1)
			}
			t := build(grp, k, warn)
			if mi > 0 || gi > 0 {
				t.caption = fmt.Sprintf("Average ranks as in Table~\\ref{%s}, continued.", base)
				if len(metrics) > 1 {
					t.caption = fmt.Sprintf("Average ranks on %s as in Table~\\ref{%s}.", TeXEscape(strings.ReplaceAll(metric, "_", " ")), TeXLabelKey(base+"-"+metrics[0]))
				}
				t.captionEm = texTextWidth(stripTeX(t.caption)) / texPt
			}
			out = append(out, t)
		}
	}
	return out
}

func containsStr(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

func (v *reportView) rankTable1(ts []RankTable, key string, warn *[]string) *ttable {
	p := v.r.Protocol
	var cap strings.Builder
	cap.WriteString(p.authorOpening(v.opt.Ranks.Caption, TeXEscape(fmt.Sprintf("average ranks across datasets on the mean %s of each cell (1 = best; ties share the average rank), the Friedman test in Demšar's form and tie-corrected, the Iman–Davenport F from the tie-corrected statistic (the decision, at ",
		strings.ReplaceAll(ts[0].Metric, "_", " ")))))
	cap.WriteString(p.alphaTeX() + TeXEscape(") with its degrees of freedom k − 1 and (k − 1)(N − 1), and the Nemenyi critical difference (Demšar, JMLR 7:1, 2006)."))
	caption := cap.String()
	t := &ttable{key: key, caption: caption, captionEm: texTextWidth(stripTeX(caption)) / texPt}
	t.cols = []tcol{{kind: colText, wrap: true}}
	head := []tcell{texTextCell("Model", warn)}
	for _, rt := range ts {
		t.cols = append(t.cols, tcol{kind: colNum})
		h := texTextCell(rt.Pipeline, warn)
		if rt.Pipeline == "" {
			h = texTextCell("Average rank", warn)
		}
		head = append(head, h)
	}
	t.head = [][]tcell{head}
	// Models: the union in order of the first table's ranks, then others.
	var models []string
	for _, rt := range ts {
		for _, j := range rankOrder(rt.AvgRanks) {
			if !containsStr(models, rt.Models[j]) {
				models = append(models, rt.Models[j])
			}
		}
	}
	for _, m := range models {
		cells := []tcell{texTextCell(v.label(m), warn)}
		for _, rt := range ts {
			c := texNumText("--", 0.513885*texPt)
			for j, x := range rt.Models {
				if x == m {
					c = texNumber(fmt.Sprintf("%.3f", rt.AvgRanks[j]), false)
				}
			}
			cells = append(cells, c)
		}
		t.rows = append(t.rows, trow{cells: cells})
	}
	stat := func(name tcell, f func(RankTable) tcell) trow {
		cells := []tcell{name}
		for _, rt := range ts {
			cells = append(cells, f(rt))
		}
		return trow{cells: cells}
	}
	intCell := func(n int) tcell { return texNumber(strconv.Itoa(n), false) }
	rows := []trow{
		stat(headCell("Models ", "k", ", datasets ", "N"), func(rt RankTable) tcell {
			s := fmt.Sprintf("%d, %d", len(rt.Models), len(rt.Datasets))
			return texNumText(s, texTextWidth(s))
		}),
		stat(headCell("Friedman ", `\chi^2`, " (Demšar)"), func(rt RankTable) tcell { return statCell(rt.ChiSq) }),
		stat(headCell("Friedman ", `\chi^2`, " (tie-corrected)"), func(rt RankTable) tcell { return statCell(rt.ChiSqTieCorrected) }),
		stat(headCell("Iman–Davenport ", "F"), func(rt RankTable) tcell { return statCell(rt.F) }),
		stat(headCell("", "p", " of ", "F"), func(rt RankTable) tcell { return pCell(rt.P, rt.Reject) }),
		stat(headCell("Nemenyi CD"), func(rt RankTable) tcell { return texNumber(fmt.Sprintf("%.3f", rt.CD), false) }),
	}
	_ = intCell
	rows[0].rule = "\\midrule"
	t.rows = append(t.rows, rows...)
	return t
}

// wilcoxonTables builds the table of Wilcoxon signed-ranks tests. A
// table that does not fit drops the raw p-value, then the rank sums (both
// stay in summary.md).
func (v *reportView) wilcoxonTables(warn *[]string) []*ttable {
	width, _ := v.opt.size()
	var t *ttable
	for level := 0; level <= 2; level++ {
		w := warn
		if level < 2 {
			w = new([]string)
		}
		t = v.wilcoxonTable1(level, w)
		if level < 2 && t.fit(width, 0).fits {
			*warn = append(*warn, *w...)
			break
		}
	}
	return []*ttable{t}
}

func (v *reportView) wilcoxonTable1(level int, warn *[]string) *ttable {
	ps := v.pairs()
	p := v.r.Protocol
	key := v.key(v.opt.Wilcoxon, "-wilcoxon")
	var cap strings.Builder
	cap.WriteString(p.authorOpening(v.opt.Wilcoxon.Caption, TeXEscape(fmt.Sprintf("Wilcoxon signed-ranks tests of the interference classifier against each baseline across datasets, on mean %s (Demšar, JMLR 7:1, 2006); N differences ranked", strings.ReplaceAll(ps[0].Metric, "_", " ")))))
	if level < 2 {
		cap.WriteString(TeXEscape(", R+ and R− the rank sums where the first model is better and worse"))
	}
	cap.WriteString(TeXEscape(fmt.Sprintf("; p-values adjusted by %s within each pipeline and interference model, bold where significant at ", p.Correction)))
	cap.WriteString(p.alphaTeX() + ".")
	switch level {
	case 1:
		cap.WriteString(TeXEscape(" Raw p-values are in summary.md."))
	case 2:
		cap.WriteString(TeXEscape(" Rank sums and raw p-values are in summary.md."))
	}
	caption := cap.String()
	t := &ttable{key: key, caption: caption, captionEm: texTextWidth(stripTeX(caption)) / texPt}
	t.cols = []tcol{{kind: colText, wrap: true}, {kind: colText, wrap: true}, {kind: colText, wrap: true}, {kind: colNum}}
	head := []tcell{texTextCell("Pipeline", warn), texTextCell("Model", warn), texTextCell("Baseline", warn), headCell("", "N")}
	if level < 2 {
		t.cols = append(t.cols, tcol{kind: colNum}, tcol{kind: colNum})
		head = append(head, headCell("", "R^+"), headCell("", "R^-"))
	}
	if level < 1 {
		t.cols = append(t.cols, tcol{kind: colNum})
		head = append(head, headCell("", "p"))
	}
	t.cols = append(t.cols, tcol{kind: colNum})
	head = append(head, headCell("", "p", " adj."))
	t.head = [][]tcell{head}
	prev := ""
	for i, pr := range ps {
		pipe := tcell{}
		rule := ""
		if pr.Pipeline != prev {
			pipe = texTextCell(pr.Pipeline, warn)
			if i > 0 {
				rule = "\\midrule"
			}
		}
		prev = pr.Pipeline
		cells := []tcell{pipe, texTextCell(v.label(pr.A), warn), texTextCell(v.label(pr.B), warn), texNumber(strconv.Itoa(pr.N), false)}
		if level < 2 {
			cells = append(cells, texNumber(fmt.Sprintf("%.1f", pr.RPlus), false), texNumber(fmt.Sprintf("%.1f", pr.RMinus), false))
		}
		if level < 1 {
			cells = append(cells, pCell(pr.P, false))
		}
		cells = append(cells, pCell(pr.PAdj, pr.Reject))
		t.rows = append(t.rows, trow{rule: rule, cells: cells})
	}
	return t
}

// texCell formats one metric as inline math (assess.tex).
func texCell(m MetricSummary, mark Mark, digits int) string {
	if math.IsNaN(m.Mean) {
		return "--"
	}
	mean := fmt.Sprintf("%.*f", digits, m.Mean)
	switch mark {
	case MarkBest:
		mean = "\\mathbf{" + mean + "}"
	case MarkNotWorse:
		mean = mean + "{}^{\\dagger}"
	}
	sp, _ := spreadTeX(m, digits)
	return "$" + mean + sp + "$"
}
