package results

import (
	"bytes"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite golden files in testdata")

// fakeReport builds a report of every (dataset, pipeline, model) cell with
// invented scores (test input, not results): means drawn from a seeded
// generator, intervals of half-width 0.01–0.11 clipped to [0, 1], marks
// derived from the means (best per dataset and metric; "not worse" within
// 0.05 of it), comparisons with the reference on every metric, a rank
// table per pipeline and Wilcoxon pairs of each interference model with
// each baseline.
func fakeReport(run string, datasets, pipelines []string, variants []Variant, reference string, seed uint64) *Report {
	rng := rand.New(rand.NewPCG(seed, 7))
	nan := math.NaN()
	r := &Report{
		Protocol: Protocol{Run: run, Seed: seed, CV: "stratified 10-fold cross-validation, 3 repeats",
			Interval: "corrected resampled t interval, Nadeau & Bengio 2003", Level: 0.95,
			Test: "corrected resampled t-test, Nadeau & Bengio 2003", Alpha: 0.05, Correction: "Holm"},
		Label: "tab:" + run, Variants: variants, Reference: reference,
	}
	for _, d := range datasets {
		start := len(r.Summary)
		for _, p := range pipelines {
			for _, v := range variants {
				s := Summary{Dataset: d, Pipeline: p, Model: v.Model, Folds: 30, Interval: "corrected-t", MeanPAcc: nan}
				if v.Interference {
					s.MeanPAcc = 0.4 + 0.2*rng.Float64()
				}
				for range MetricNames {
					m := 0.3 + 0.7*rng.Float64()
					h := 0.01 + 0.1*rng.Float64()
					s.Metrics = append(s.Metrics, MetricSummary{Mean: m, Std: 2 * h, Lo: math.Max(0, m-h), Hi: math.Min(1, m+h)})
				}
				r.Summary = append(r.Summary, s)
			}
		}
		for j := range MetricNames {
			best := -1.0
			for _, s := range r.Summary[start:] {
				best = math.Max(best, s.Metrics[j].Mean)
			}
			for i := start; i < len(r.Summary); i++ {
				if len(r.Marks) <= i {
					r.Marks = append(r.Marks, make([]Mark, len(MetricNames)))
				}
				switch m := r.Summary[i].Metrics[j].Mean; {
				case m == best:
					r.Marks[i][j] = MarkBest
				case m > best-0.05:
					r.Marks[i][j] = MarkNotWorse
				}
			}
		}
	}
	for _, s := range r.Summary {
		if s.Model == reference {
			continue
		}
		for _, metric := range MetricNames {
			d := 0.2*rng.Float64() - 0.1
			p := rng.Float64()
			c := Comparison{Dataset: s.Dataset, Pipeline: s.Pipeline, Model: s.Model, RefPipeline: s.Pipeline, RefModel: reference,
				Metric: metric, Test: "corrected-t", Diff: d, Lo: d - 0.05, Hi: d + 0.05, Statistic: 20 * d, DF: 29,
				P: p, PAdj: math.Min(1, 3*p), Alpha: 0.05}
			c.Reject = c.PAdj <= 0.05
			r.Comparisons = append(r.Comparisons, c)
		}
	}
	var models []string
	for _, v := range variants {
		models = append(models, v.Model)
	}
	for _, p := range pipelines {
		ranks := make([]float64, len(models))
		for i := range ranks {
			ranks[i] = 1 + float64(len(models)-1)*rng.Float64()
		}
		chi := 30 * rng.Float64()
		r.Ranks = append(r.Ranks, RankTable{Pipeline: p, Metric: "accuracy", Models: models, Datasets: datasets, AvgRanks: ranks,
			ChiSq: chi, ChiSqP: rng.Float64(), ChiSqTieCorrected: chi * 1.05, ChiSqTieCorrectedP: rng.Float64(), DF: len(models) - 1,
			F: 3 * rng.Float64(), DF1: len(models) - 1, DF2: (len(models) - 1) * (len(datasets) - 1), P: 0.2 * rng.Float64(),
			Alpha: 0.05, CD: 2.5})
		r.Ranks[len(r.Ranks)-1].Reject = r.Ranks[len(r.Ranks)-1].P <= 0.05
		for _, a := range variants {
			if !a.Interference {
				continue
			}
			for _, b := range variants {
				if b.Interference {
					continue
				}
				n := len(datasets)
				rp := float64(n*(n+1)/2) * rng.Float64()
				rp = math.Round(2*rp) / 2
				pv := rng.Float64()
				r.Pairs = append(r.Pairs, PairAcross{Pipeline: p, A: a.Model, B: b.Model, Metric: "accuracy", N: n,
					RPlus: rp, RMinus: float64(n*(n+1)/2) - rp, Statistic: math.Min(rp, float64(n*(n+1)/2)-rp),
					P: pv, PAdj: math.Min(1, 2*pv), Alpha: 0.05, Reject: 2*pv <= 0.05})
			}
		}
	}
	return r
}

func qVariant(name, mode string, shots int, noise string, strength float64) Variant {
	return Variant{Model: name, Kind: "interference", Interference: true, Family: "interference", Mode: mode, Shots: shots, Noise: noise, Strength: strength}
}

func baseline(name, kind string) Variant {
	return Variant{Model: name, Kind: kind, Family: name, Strength: math.NaN()}
}

// demoSizedReport has the shape of `fringe demo`: 5 datasets, 3
// pipelines, 14 models with the demo's generated names (210 cells).
func demoSizedReport() *Report {
	nan := math.NaN()
	vs := []Variant{
		qVariant("interference", "exact", 0, "", nan),
		qVariant("interference-balanced", "exact", 0, "", nan),
		qVariant("interference-shots32-balanced", "shots", 32, "", nan),
		qVariant("interference-shots128-balanced", "shots", 128, "", nan),
		qVariant("interference-shots512-balanced", "shots", 512, "", nan),
		qVariant("interference-shots2048-balanced", "shots", 2048, "", nan),
		qVariant("interference-noisy-gdep0.1-shots512-balanced", "noisy", 512, "global_depolarizing", 0.1),
		qVariant("interference-noisy-gdep0.3-shots512-balanced", "noisy", 512, "global_depolarizing", 0.3),
		baseline("svm-interference-C1", "svm"), baseline("svm-linear-C1", "svm"), baseline("svm-rbf-C1", "svm"),
		baseline("knn-k5", "knn"), baseline("logreg-C1", "logreg"), baseline("centroid", "centroid"),
	}
	return fakeReport("demo", []string{"iris", "wine", "breast-cancer", "synth-cullet", "synth-bearings"},
		[]string{"std+l2", "l2", "std+lift"}, vs, "knn-k5", 20261201)
}

// longNamesReport has six models with long generated names, 11 datasets
// and 3 pipelines.
func longNamesReport() *Report {
	vs := []Variant{
		qVariant("interference-noisy-ro0.02_0.03-gdep0.05-shots1024-k8-balanced", "noisy", 1024, "readout+global_depolarizing", 0.05),
		qVariant("interference-noisy-ro0.02_0.03-gdep0.01-shots1024-k8-balanced", "noisy", 1024, "readout+global_depolarizing", 0.01),
		qVariant("interference-shots512-k8-balanced", "shots", 512, "", math.NaN()),
		baseline("svm-rbf-C1-gamma-scale-tol0.001", "svm"),
		baseline("logreg-C1-lbfgs-maxiter1000", "logreg"),
		baseline("knn-k5-weights-distance-euclidean", "knn"),
	}
	ds := []string{"iris", "wine", "breast-cancer", "synth-cullet", "synth-bearings", "penguins", "glass",
		"ionosphere", "sonar", "vehicle-silhouettes", "banknote-authentication"}
	return fakeReport("six-models", ds, []string{"std+l2", "minmax+l2", "std+lift"}, vs, "knn-k5-weights-distance-euclidean", 6)
}

func mustTeX(t *testing.T, r *Report) *TeXReport {
	t.Helper()
	tex, err := ReportTeX(r)
	if err != nil {
		t.Fatal(err)
	}
	return tex
}

func TestReportTeXFitsThePage(t *testing.T) {
	// The room of one table in the standard article class at 10 pt, letter
	// paper, as pdflatex reports it: \textwidth 345 pt and \textheight
	// 550 pt (one column); \columnwidth 229.5 pt and \textwidth 469 pt
	// (twocolumn); on landscape pages 550 pt across.
	for _, c := range []struct {
		name string
		r    func() *Report
	}{{"demo-sized", demoSizedReport}, {"six long names", longNamesReport}} {
		for _, layout := range []TableLayout{LayoutPage, LayoutColumn, LayoutWide, LayoutLandscape} {
			r := c.r()
			r.Options.Layout = layout
			tex := mustTeX(t, r)
			room, _ := layout.defaults()
			for _, w := range tex.Warnings {
				if strings.Contains(w, "wider than") {
					t.Errorf("%s, %s: %s", c.name, layout, w)
				}
			}
			long := 0
			for _, tb := range tex.Tables {
				if tb.Width > room+1e-9 || tb.Room != room {
					t.Errorf("%s, %s: table %s is %.1f pt wide for %.1f pt (room %.1f)", c.name, layout, tb.Label, tb.Width, room, tb.Room)
				}
				if tb.LongTable && layout.floats() {
					t.Errorf("%s, %s: table %s is a longtable in a two-column layout", c.name, layout, tb.Label)
				}
				if tb.LongTable || tb.Parts > 1 {
					long++
				}
				// More rows than a page holds (550 pt at 11 pt a row is 50
				// rows; less with the caption) never go into one float.
				if !tb.LongTable && tb.Parts == 1 && tb.Rows > 50 {
					t.Errorf("%s, %s: table %s has %d rows in one float", c.name, layout, tb.Label, tb.Rows)
				}
			}
			// 210 or 198 summary rows cannot sit on one page.
			if long == 0 {
				t.Errorf("%s, %s: no table runs over pages", c.name, layout)
			}
		}
	}
}

func TestReportTeXSplitsByMetricAndDatasetGroup(t *testing.T) {
	tex := mustTeX(t, demoSizedReport())
	var labels []string
	for _, tb := range tex.Tables {
		labels = append(labels, tb.Label)
	}
	// The 44-character model names leave room for one metric per table.
	for _, want := range []string{"tab:demo-accuracy", "tab:demo-balanced-accuracy", "tab:demo-macro-f1", "tab:demo-modes", "tab:demo-tests", "tab:demo-ranks", "tab:demo-wilcoxon"} {
		if !slices.Contains(labels, want) {
			t.Errorf("tables %q lack %s", labels, want)
		}
	}
	// The modes table (one column per dataset) is split into dataset groups.
	if !slices.Contains(labels, "tab:demo-modes-2") {
		t.Errorf("modes table not split into dataset groups: %q", labels)
	}
	// With short labels every metric fits one table.
	r := demoSizedReport()
	r.Options.ModelLabels = shortLabels(r)
	tex = mustTeX(t, r)
	if tex.Tables[0].Label != "tab:demo" || tex.Tables[0].Wraps {
		t.Errorf("with short labels the summary should be one unwrapped table, got %+v", tex.Tables[0])
	}
}

// shortLabels gives every model of r a short display label.
func shortLabels(r *Report) map[string]string {
	m := map[string]string{}
	for i, v := range r.Variants {
		switch {
		case v.Interference && v.Shots > 0 && v.Noise != "":
			m[v.Model] = fmt.Sprintf("QC, noise %g", v.Strength)
		case v.Interference && v.Shots > 0:
			m[v.Model] = fmt.Sprintf("QC, %d shots", v.Shots)
		case v.Interference:
			m[v.Model] = fmt.Sprintf("QC %d", i+1)
		default:
			m[v.Model] = strings.ToUpper(v.Kind) + " " + strconv.Itoa(i+1)
		}
	}
	return m
}

func TestReportOptionsSelectOrderAndLabel(t *testing.T) {
	r := longNamesReport()
	long := "interference-noisy-ro0.02_0.03-gdep0.05-shots1024-k8-balanced"
	r.Options = ReportOptions{
		Models:      []string{"knn-k5-weights-distance-euclidean", long},
		Datasets:    []string{"wine", "iris"},
		Pipelines:   []string{"std+l2"},
		Metrics:     []string{"macro_f1"},
		ModelLabels: map[string]string{long: "QC, 1024 shots", "knn-k5-weights-distance-euclidean": "k-NN"},
		Summary:     TableText{Caption: "Main results", Label: "tab:main%1"},
	}
	tex := mustTeX(t, r)
	s := tex.Text
	for _, want := range []string{`\label{tab:main-1}`, `\caption{Main results. Mean with 95\%`, "QC, 1024 shots", "k-NN", "Macro $F_1$",
		"Marks compare with all 6 models and 3 pipelines of the run; 2 models and 1 pipeline are shown."} {
		if !strings.Contains(s, want) {
			t.Errorf("summary.tex lacks %q", want)
		}
	}
	for _, absent := range []string{long, "penguins", "minmax+l2", "Balanced accuracy"} {
		if strings.Contains(s, absent) {
			t.Errorf("summary.tex shows %q, which the options leave out", absent)
		}
	}
	// Order: wine before iris, k-NN before QC.
	main := s[:strings.Index(s, `\end{table}`)]
	if !(strings.Index(main, `\emph{wine}`) < strings.Index(main, `\emph{iris}`) && strings.Index(main, "k-NN") < strings.Index(main, "QC, 1024")) {
		t.Errorf("selection order not kept:\n%s", main)
	}
	var md bytes.Buffer
	if err := WriteReportMarkdown(&md, r); err != nil {
		t.Fatal(err)
	}
	m := md.String()
	if strings.Contains(m, long) || !strings.Contains(m, "| wine | std+l2 | k-NN |") || strings.Contains(m, "penguins") {
		t.Errorf("summary.md ignores the selection or labels:\n%s", m)
	}
	if strings.Index(m, "| wine | std+l2 | k-NN |") > strings.Index(m, "| iris | std+l2 | k-NN |") {
		t.Errorf("summary.md order differs from the selection")
	}

	// Bad options are errors naming the option.
	for _, o := range []ReportOptions{
		{Models: []string{"nope"}},
		{Metrics: []string{"recall"}},
		{ModelLabels: map[string]string{long: "x", "svm-rbf-C1-gamma-scale-tol0.001": "x"}},
		{ModelLabels: map[string]string{long: "logreg-C1-lbfgs-maxiter1000"}},
		{Datasets: []string{}},
		{Width: 50},
	} {
		r.Options = o
		if _, err := ReportTeX(r); err == nil || !strings.HasPrefix(err.Error(), "results: report") {
			t.Errorf("options %+v: error %v", o, err)
		}
	}
}

func TestTeXLabelKey(t *testing.T) {
	// The safe alphabet: ASCII letters, digits, ':', '-', '.'.
	for in, want := range map[string]string{
		"tab:r%1": "tab:r-1", "tab:a#b}c~d": "tab:a-b-c-d", "tab:x y_z": "tab:x-y-z", "tab:αβ": "tab:--", "": "tab", "tab:ok-1.2": "tab:ok-1.2",
	} {
		if got := TeXLabelKey(in); got != want {
			t.Errorf("TeXLabelKey(%q) = %q, want %q", in, got, want)
		}
	}
	r := synthReport()
	r.Label = "tab:r%1#}~"
	s := mustTeX(t, r).Text
	for _, l := range regexp.MustCompile(`\\(label|ref)\{([^}]*)\}`).FindAllStringSubmatch(s, -1) {
		if strings.ContainsAny(l[2], "%#}~{ \\_") {
			t.Errorf("unsafe label key %q", l[2])
		}
	}
}

func TestTeXText(t *testing.T) {
	for _, c := range []struct {
		in, want string
		warn     string
	}{
		{"svm & co_1 100% #2 $x {y} ~^\\", `svm \& co\_1 100\% \#2 \$x \{y\} \textasciitilde{}\textasciicircum{}\textbackslash{}`, ""},
		{"a<b>c|d\"e", `a\textless{}b\textgreater{}c\textbar{}d\texttt{"}e`, ""},
		{"Zürich-Ångström-őz", `Z\"{u}rich-\r{A}ngstr\"{o}m-\H{o}z`, ""},
		{"naïve", `na\"{\i}ve`, ""},
		{"e\u0301", `\'{e}`, ""},
		{"Straße, Łódź", `Stra\ss{}e, \L{}\'{o}d\'{z}`, ""},
		{"α-β Γ Ω ά", `\ensuremath{\alpha}-\ensuremath{\beta} \ensuremath{\Gamma} \ensuremath{\Omega} \ensuremath{\acute{\alpha}}`, ""},
		{"Α Β", "A B", ""},
		{"± ×", `\ensuremath{\pm} \ensuremath{\times}`, ""},
		{"Wąsy", `Wasy`, "transliterated"},
		{"猫犬", `\texttt{U+732B}\texttt{U+72AC}`, "U+732B U+72AC"},
		{"a\tb\x01", "a b", "control"},
	} {
		got, warn := TeXText(c.in)
		if got != c.want {
			t.Errorf("TeXText(%q) = %q, want %q", c.in, got, c.want)
		}
		if c.warn == "" && len(warn) > 0 || c.warn != "" && (len(warn) == 0 || !strings.Contains(strings.Join(warn, " "), c.warn)) {
			t.Errorf("TeXText(%q) warnings %q, want one containing %q", c.in, warn, c.warn)
		}
		for _, r := range got {
			if r > 0x7e || (r < 0x20 && r != '\n') {
				t.Errorf("TeXText(%q) = %q is not printable ASCII", c.in, got)
				break
			}
		}
	}
}

// unicodeReport has a Greek and a CJK dataset name, a Greek model label
// and names with every LaTeX special character.
func unicodeReport() *Report {
	r := synthReport()
	for i := range r.Summary {
		switch r.Summary[i].Dataset {
		case "iris_2":
			r.Summary[i].Dataset = "κύκλος-αβγ"
		case "wine":
			r.Summary[i].Dataset = "葡萄酒"
		}
	}
	for i := range r.Comparisons {
		r.Comparisons[i].Dataset = "κύκλος-αβγ"
	}
	r.Ranks[0].Datasets = []string{"κύκλος-αβγ", "葡萄酒"}
	r.Options.ModelLabels = map[string]string{"q": "Δ-κ classifier %#&_{}~^\\", "knn": "k-NN (Zürich)"}
	r.Label = "tab:r%1"
	r.Protocol.Run = "r%1 #2 {x}"
	return r
}

func TestReportTeXUnicodeNames(t *testing.T) {
	tex := mustTeX(t, unicodeReport())
	for _, want := range []string{`\ensuremath{\kappa}`, `\texttt{U+8461}`, `\ensuremath{\Delta}-\ensuremath{\kappa} classifier \%\#\&\_\{\}`, `Z\"{u}rich`, `Run r\%1 \#2 \{x\}`} {
		if !strings.Contains(tex.Text, want) {
			t.Errorf("summary.tex lacks %q", want)
		}
	}
	warned := strings.Join(tex.Warnings, "\n")
	if !strings.Contains(warned, "U+8461 U+8404 U+9152") || !strings.HasPrefix(tex.Warnings[0], "summary.tex: ") {
		t.Errorf("warnings %q should name the CJK code points", tex.Warnings)
	}
	for _, r := range tex.Text {
		if r > 0x7e {
			t.Fatalf("summary.tex holds the non-ASCII character %q", r)
		}
	}
}

// goldenTeX compares got with testdata/name, or rewrites it with -update.
func goldenTeX(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test ./results -run Golden -update to create it)", err)
	}
	if string(want) != got {
		t.Errorf("%s differs from the golden file (go test ./results -run Golden -update rewrites it; review the diff)", path)
	}
}

// goldenConfigs are the two configurations kept as golden files: the
// demo-sized report with the default options, and the six long names with
// labels, a selection, author captions and the wide (table*) layout.
func goldenConfigs() map[string]*Report {
	demo := demoSizedReport()
	six := longNamesReport()
	six.Options = ReportOptions{
		Layout:      LayoutWide,
		ModelLabels: shortLabels(six),
		Metrics:     []string{"accuracy", "macro_f1"},
		TestMetrics: []string{"accuracy", "macro_f1"},
		Summary:     TableText{Caption: "Six models on eleven datasets", Label: "tab:six"},
		Ranks:       TableText{Label: "tab:six-ranks"},
	}
	return map[string]*Report{"summary-demo.tex": demo, "summary-six-wide.tex": six}
}

func TestReportTeXGolden(t *testing.T) {
	for name, r := range goldenConfigs() {
		goldenTeX(t, name, mustTeX(t, r).Text)
		goldenTeX(t, strings.TrimSuffix(name, ".tex")+"-standalone.tex", StandaloneTeX(r, strings.TrimPrefix(name, "")))
	}
}

// latexLogProblems parses a pdflatex log as scripts/check-latex.sh does:
// every "Overfull \hbox (Xpt too wide)" with X > 1 and every "Float too
// large".
func latexLogProblems(log string) []string {
	var bad []string
	over := regexp.MustCompile(`Overfull \\hbox \(([0-9.]+)pt too wide\)`)
	for _, line := range strings.Split(log, "\n") {
		if m := over.FindStringSubmatch(line); m != nil {
			if v, _ := strconv.ParseFloat(m[1], 64); v > 1 {
				bad = append(bad, line)
			}
		}
		if strings.Contains(line, "Float too large") {
			bad = append(bad, line)
		}
	}
	return bad
}

// compileTeX writes summary.tex and the standalone wrapper into a fresh
// directory and runs pdflatex until the longtable widths settle (at most
// four runs); it returns the last log.
func compileTeX(t *testing.T, pdflatex string, r *Report) string {
	t.Helper()
	dir := t.TempDir()
	tex := mustTeX(t, r)
	if err := os.WriteFile(filepath.Join(dir, "summary.tex"), []byte(tex.Text), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "summary-standalone.tex"), []byte(StandaloneTeX(r, "summary.tex")), 0o644); err != nil {
		t.Fatal(err)
	}
	var log []byte
	for range 4 {
		cmd := exec.Command(pdflatex, "-interaction=nonstopmode", "-halt-on-error", "summary-standalone.tex")
		cmd.Dir = dir
		out, err := cmd.CombinedOutput()
		log, _ = os.ReadFile(filepath.Join(dir, "summary-standalone.log"))
		if err != nil {
			t.Fatalf("pdflatex failed: %v\n%s", err, tail(string(out), 40))
		}
		if !bytes.Contains(log, []byte("Rerun LaTeX")) && !bytes.Contains(log, []byte("Table widths have changed")) {
			break
		}
	}
	return string(log)
}

func tail(s string, n int) string {
	lines := strings.Split(s, "\n")
	return strings.Join(lines[max(0, len(lines)-n):], "\n")
}

// TestReportTeXCompilesClean compiles summary-standalone.tex with pdflatex
// for the demo-sized report, the six long names in every layout and the
// Greek and CJK names, and fails on an overfull box over 1 pt or a float
// too large for its page. Skipped without pdflatex and under -short.
func TestReportTeXCompilesClean(t *testing.T) {
	if testing.Short() {
		t.Skip("pdflatex runs take seconds")
	}
	pdflatex, err := exec.LookPath("pdflatex")
	if err != nil {
		t.Skip("pdflatex not installed")
	}
	cases := map[string]*Report{"synth": synthReport(), "unicode": unicodeReport()}
	for name, r := range goldenConfigs() {
		cases[name] = r
	}
	for _, layout := range []TableLayout{LayoutPage, LayoutColumn, LayoutLandscape} {
		r := longNamesReport()
		r.Options.Layout = layout
		cases["six-"+layout.String()] = r
	}
	names := make([]string, 0, len(cases))
	for n := range cases {
		names = append(names, n)
	}
	slices.Sort(names)
	for _, name := range names {
		t.Run(name, func(t *testing.T) {
			log := compileTeX(t, pdflatex, cases[name])
			if bad := latexLogProblems(log); len(bad) > 0 {
				t.Errorf("pdflatex log:\n%s", strings.Join(bad, "\n"))
			}
		})
	}
}

// TestTeXWidthsAgainstPdflatex compares the width estimates with the
// boxes pdflatex builds at \small in a 10 pt article (skipped without
// pdflatex and under -short). The estimate ignores kerns and ligatures,
// which narrow words: it may exceed the true width by a few percent and
// may fall short by at most 1% (a kern that widens).
func TestTeXWidthsAgainstPdflatex(t *testing.T) {
	if testing.Short() {
		t.Skip("runs pdflatex")
	}
	pdflatex, err := exec.LookPath("pdflatex")
	if err != nil {
		t.Skip("pdflatex not installed")
	}
	texts := []string{"interference-noisy-gdep0.3-shots512-balanced", "svm-rbf-C1", "Balanced accuracy", "std+lift",
		"global_depolarizing 0.1, 512 shots", "Zürich Łódź", "κύκλος", "葡萄酒", "WAVE {x} 100% #2"}
	nums := []struct {
		s    string
		bold bool
	}{{"0.973", false}, {"0.973", true}, {"-0.050", false}, {"12.345", false}}
	var doc strings.Builder
	doc.WriteString("\\documentclass{article}\n\\begin{document}\n\\small\n\\newcommand\\w[1]{\\setbox0\\hbox{#1}\\typeout{WIDTH \\the\\wd0}}\n")
	var want []float64
	for _, s := range texts {
		doc.WriteString("\\w{" + TeXEscape(s) + "}\n")
		want = append(want, texTextWidth(s))
	}
	for _, n := range nums {
		doc.WriteString("\\w{$" + numTeX(n.s, n.bold) + "$}\n")
		want = append(want, mathNumberWidth(n.s, n.bold))
	}
	spreads := []MetricSummary{{Mean: 0.5, Lo: 0.415, Hi: 0.585}, {Mean: 0.973, Lo: 0.941, Hi: 1}}
	for _, m := range spreads {
		sp, w := spreadTeX(m, 3)
		doc.WriteString("\\w{${}" + sp + "$}\n")
		want = append(want, w)
	}
	doc.WriteString("\\end{document}\n")
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "w.tex"), []byte(doc.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(pdflatex, "-interaction=nonstopmode", "-halt-on-error", "w.tex")
	cmd.Dir = dir
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("pdflatex: %v\n%s", err, out)
	}
	got := regexp.MustCompile(`WIDTH ([0-9.]+)pt`).FindAllStringSubmatch(string(out), -1)
	if len(got) != len(want) {
		t.Fatalf("%d widths from pdflatex, want %d", len(got), len(want))
	}
	labels := append(append([]string(nil), texts...), "0.973", "bold 0.973", "-0.050", "12.345", "± 0.085", "^{+0.027}_{-0.032}")
	for i, m := range got {
		tw, _ := strconv.ParseFloat(m[1], 64)
		if want[i] < 0.99*tw || want[i] > 1.08*tw+0.5 {
			t.Errorf("%s: estimated %.2f pt, pdflatex %.2f pt", labels[i], want[i], tw)
		}
	}
}

// TestCheckLatexScript runs scripts/check-latex.sh on the fixtures in
// testdata/latex (a clean table, one 2 pt too wide, one 0.5 pt too wide,
// a float taller than the page) and on a standalone summary, and checks
// that it passes and fails them as latexLogProblems judges the same logs.
// Skipped without bash or pdflatex and under -short.
func TestCheckLatexScript(t *testing.T) {
	if testing.Short() {
		t.Skip("runs pdflatex")
	}
	bash, err := exec.LookPath("bash")
	if err != nil {
		t.Skip("bash not installed")
	}
	if _, err := exec.LookPath("pdflatex"); err != nil {
		t.Skip("pdflatex not installed")
	}
	dir := t.TempDir()
	r := synthReport()
	if err := os.WriteFile(filepath.Join(dir, "summary.tex"), []byte(mustTeX(t, r).Text), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "summary-standalone.tex"), []byte(StandaloneTeX(r, "summary.tex")), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		file string
		ok   bool
		say  string
	}{
		{filepath.Join("testdata", "latex", "clean.tex"), true, "no overfull box over 1 pt"},
		{filepath.Join("testdata", "latex", "slightly-overfull.tex"), true, "no overfull box over 1 pt"},
		{filepath.Join("testdata", "latex", "overfull.tex"), false, `Overfull \hbox (2.0`},
		{filepath.Join("testdata", "latex", "float-too-large.tex"), false, "Float too large for page by 50.0pt"},
		{filepath.Join(dir, "summary-standalone.tex"), true, "no float too large"},
	} {
		out, err := exec.Command(bash, filepath.Join("..", "scripts", "check-latex.sh"), c.file).CombinedOutput()
		if (err == nil) != c.ok || !strings.Contains(string(out), c.say) {
			t.Errorf("check-latex.sh %s: err %v, output:\n%s", c.file, err, out)
		}
	}
	// The Go parser agrees with the script on the same kind of log lines.
	log := "Overfull \\hbox (2.00002pt too wide) in paragraph at lines 4--7\nOverfull \\hbox (0.5pt too wide) in paragraph\nLaTeX Warning: Float too large for page by 50.0pt on input line 5.\n"
	if got := latexLogProblems(log); len(got) != 2 {
		t.Errorf("latexLogProblems = %q, want the 2 pt box and the float", got)
	}
}

func TestReportTeXLongTableAndOmit(t *testing.T) {
	r := synthReport()
	r.Options.LongTable = 5
	tex := mustTeX(t, r)
	if !tex.Tables[0].LongTable || !strings.Contains(tex.Text, `\begin{longtable}`) || !strings.Contains(tex.Text, `\caption[]{(continued)}`) {
		t.Errorf("10 summary rows over a threshold of 5 should be a longtable: %+v", tex.Tables[0])
	}
	r.Options.Layout = LayoutColumn
	tex = mustTeX(t, r)
	if tex.Tables[0].LongTable || tex.Tables[0].Parts < 2 || strings.Contains(tex.Text, `\begin{longtable}`) {
		t.Errorf("two-column layout: want the summary split into floats, got %+v", tex.Tables[0])
	}
	if !strings.Contains(tex.Text, `continued (part 2 of`) || !strings.Contains(tex.Text, `\emph{iris\_2} (continued)`) {
		t.Errorf("continuation parts lack their captions or group headers:\n%s", tex.Text)
	}
	omit, err := ParseReportTables([]string{"modes", "tests", "ranks", "wilcoxon"})
	if err != nil {
		t.Fatal(err)
	}
	r.Options = ReportOptions{Omit: omit}
	tex = mustTeX(t, r)
	if len(tex.Tables) != 1 || strings.Contains(tex.Text, "modes") {
		t.Errorf("omitted tables written: %+v", tex.Tables)
	}
	if _, err := ParseReportTables([]string{"everything"}); err == nil {
		t.Error("unknown table name accepted")
	}
	for _, s := range []string{"page", "column", "wide", "table*", "landscape"} {
		if _, err := ParseTableLayout(s); err != nil {
			t.Errorf("layout %q: %v", s, err)
		}
	}
	if _, err := ParseSplitRule("sometimes"); err == nil {
		t.Error("unknown split rule accepted")
	}
}
