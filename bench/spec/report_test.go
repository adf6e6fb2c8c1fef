package spec_test

import (
	"errors"
	"os"
	"reflect"
	"strings"
	"testing"

	"fringe/bench/input"
	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
	"fringe/bench/spec"
	"fringe/results"
)

// reportBase is a spec of two datasets (one renamed with `as`), two
// pipelines and four models, one tuned, three labelled; %s is replaced by
// the [report] table under test.
const reportBase = `name = "rep"
seed = 1
datasets = ["iris"]
pipelines = ["std+l2", "l2"]

[[dataset]]
name = "wine"
as = "wine-all"

[[model]]
kind = "interference"
balance = true
label = "QC, exact"

[[model]]
kind = "svm"
kernel = "linear"
C = [0.1, 1]
label = "SVM, tuned C"

[[model]]
kind = "knn"
label = "5-NN"

[[model]]
kind = "centroid"
%s`

// demoCanonicalSHA is spec.CanonicalSHA of bench/spec/demo.toml. It was
// recorded at commit 5a3453c, before [report] existed, and re-recorded
// once when the canonical form began to write renamed keys in their new
// spellings (gamma = "inverse-variance"); [report] did not change it.
const demoCanonicalSHA = "2bc8922c21dca8d1ee5c1d2b411342420f04c2f8b96258a06af9ce9289dfcef0"

func reportSpec(t *testing.T, table string) *spec.Spec {
	t.Helper()
	return benchtest.Spec(t, "rep.toml", strings.Replace(reportBase, "%s", table, 1))
}

// TestReportKeys reads every key of [report] and checks the options.
func TestReportKeys(t *testing.T) {
	s := reportSpec(t, `
[report]
models = ["knn-k5", "svm-linear-tuned-C", "interference-balanced"]
pipelines = ["l2"]
datasets = ["wine-all", "iris"]
metrics = ["balanced_accuracy", "accuracy"]
test_metrics = ["accuracy"]
layout = "column"
split = "metric"
omit = ["ranks", "wilcoxon"]
max_rows = 12
digits = 2
width_pt = 240.5
height_pt = 600

[report.summary]
caption = "Scores"
label = "tab:scores"

[report.modes]
caption = "By mode"
label = "tab:modes"

[report.tests]
label = "tab:tests"

[report.ranks]
caption = "Ranks"

[report.wilcoxon]
caption = "Pairs"
label = "tab:pairs"
`)
	got := s.ReportOptions()
	want := results.ReportOptions{
		Models:      []string{"knn-k5", "svm-linear-tuned-C", "interference-balanced"},
		Pipelines:   []string{"l2"},
		Datasets:    []string{"wine-all", "iris"},
		Metrics:     []string{"balanced_accuracy", "accuracy"},
		TestMetrics: []string{"accuracy"},
		ModelLabels: map[string]string{"interference-balanced": "QC, exact", "svm-linear-tuned-C": "SVM, tuned C", "knn-k5": "5-NN"},
		Summary:     results.TableText{Caption: "Scores", Label: "tab:scores"},
		Modes:       results.TableText{Caption: "By mode", Label: "tab:modes"},
		Tests:       results.TableText{Label: "tab:tests"},
		Ranks:       results.TableText{Caption: "Ranks"},
		Wilcoxon:    results.TableText{Caption: "Pairs", Label: "tab:pairs"},
		Omit:        results.TableRanks | results.TableWilcoxon,
		Layout:      results.LayoutColumn,
		Width:       240.5, Height: 600,
		LongTable: 12,
		Split:     results.SplitMetric,
		Digits:    2,
	}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("report options\n got %+v\nwant %+v", got, want)
	}
	// The [report] table itself holds no labels: they live on the models.
	if s.Report.ModelLabels != nil {
		t.Errorf("Spec.Report.ModelLabels = %v, want nil", s.Report.ModelLabels)
	}
	// A tuned model keeps its label; its grid points do not carry one.
	tuned := s.Models[1]
	if tuned.Grid == nil || tuned.Label != "SVM, tuned C" || tuned.Name != "svm-linear-tuned-C" {
		t.Errorf("tuned model: name %q label %q grid %v", tuned.Name, tuned.Label, tuned.Grid != nil)
	}
	if err := got.Check([]string{"interference-balanced", "svm-linear-tuned-C", "knn-k5", "centroid"}, s.Pipelines, []string{"iris", "wine-all"}); err != nil {
		t.Errorf("options the spec accepted fail results' own check: %v", err)
	}
	// Every layout and split rule by its spec name; the inline form of a
	// table's caption and label.
	for name, l := range map[string]results.TableLayout{"page": results.LayoutPage, "column": results.LayoutColumn, "wide": results.LayoutWide, "landscape": results.LayoutLandscape} {
		if o := reportSpec(t, "[report]\nlayout = \""+name+"\"\n").ReportOptions(); o.Layout != l {
			t.Errorf("layout %q: got %v", name, o.Layout)
		}
	}
	for name, r := range map[string]results.SplitRule{"auto": results.SplitAuto, "none": results.SplitNone, "metric": results.SplitMetric, "dataset": results.SplitDataset} {
		if o := reportSpec(t, "[report]\nsplit = \""+name+"\"\n").ReportOptions(); o.Split != r {
			t.Errorf("split %q: got %v", name, o.Split)
		}
	}
	o := reportSpec(t, "[report]\nsummary = { caption = \"Inline\", label = \"tab:in\" }\nwidth_pt = 300\n").ReportOptions()
	if o.Summary != (results.TableText{Caption: "Inline", Label: "tab:in"}) || o.Width != 300 {
		t.Errorf("inline table: %+v", o)
	}
}

// TestReportDefaults: a spec without [report] and without labels has the
// zero options, which is what every run used before [report] existed, so
// its tables are byte for byte the same; the demo spec is one of them.
func TestReportDefaults(t *testing.T) {
	demo, err := spec.Demo()
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range []*spec.Spec{demo, benchtest.Spec(t, "plain.toml", "name = \"x\"\nseed = 1\ndatasets = [\"iris\"]\n[[model]]\nkind = \"knn\"\n")} {
		if o := s.ReportOptions(); !reflect.DeepEqual(o, results.ReportOptions{}) {
			t.Errorf("%s: report options %+v, want the zero value", s.File, o)
		}
	}
	// Labels alone fill ModelLabels and nothing else.
	s := benchtest.Spec(t, "l.toml", "name = \"x\"\nseed = 1\ndatasets = [\"iris\"]\n[[model]]\nkind = \"knn\"\nlabel = \"k-NN\"\n[[model]]\nkind = \"centroid\"\n")
	if o := s.ReportOptions(); !reflect.DeepEqual(o, results.ReportOptions{ModelLabels: map[string]string{"knn-k5": "k-NN"}}) {
		t.Errorf("labels only: %+v", o)
	}
}

// TestReportCanonical: [report] and labels are part of the canonical
// spec (run identity and fingerprints cover them); the canonical form of
// a spec without them is what it was before they existed.
func TestReportCanonical(t *testing.T) {
	plain := "name = \"x\"\nseed = 1\ndatasets = [\"iris\"]\n[[model]]\nkind = \"knn\"\n"
	a := spec.CanonicalSHA([]byte(plain))
	for _, changed := range []string{
		plain + "label = \"k-NN\"\n",
		plain + "[report]\ndigits = 2\n",
		plain + "[report]\ndigits = 3\n",
		plain + "[report.summary]\ncaption = \"x\"\n",
	} {
		if spec.CanonicalSHA([]byte(changed)) == a {
			t.Errorf("canonical digest ignores %q", changed[len(plain):])
		}
	}
	// The demo spec's canonical digest (see demoCanonicalSHA).
	src, err := os.ReadFile("demo.toml")
	if err != nil {
		t.Fatal(err)
	}
	if got, want := spec.CanonicalSHA(src), demoCanonicalSHA; got != want {
		t.Errorf("demo canonical digest %s, want %s", got, want)
	}
}

// TestReportErrors: every bad value of [report] and of a model's label is
// a located input error naming its key.
func TestReportErrors(t *testing.T) {
	// reportBase has 26 lines before %s; the [report] header of a case is
	// line 27 and its first key line 28.
	const first = 28
	for _, c := range []struct {
		table, key string
		line       int
		say        string
	}{
		{"[report]\ncolour = \"red\"", "report.colour", first, "unknown key"},
		{"[report]\nmodels = \"knn-k5\"", "report.models", first, "list"},
		{"[report]\nmodels = []", "report.models", first, "empty list"},
		{"[report]\nmodels = [\"knn-k5\", 3]", "report.models", first, "value 2"},
		{"[report]\nmodels = [\"knn-k5\", \"\"]", "report.models", first, "empty name"},
		{"[report]\nmodels = [\"knn-k5\", \"knn-k5\"]", "report.models", first, "twice"},
		{"[report]\nmodels = [\"forest\"]", "report.models", first, `"forest" is not a model`},
		{"[report]\nmodels = [\"5-NN\"]", "report.models", first, `label of model "knn-k5"`},
		{"[report]\npipelines = [\"std\"]", "report.pipelines", first, "not a pipeline"},
		{"[report]\ndatasets = [\"wine\"]", "report.datasets", first, "wine-all"},
		{"[report]\nmetrics = [\"f1\"]", "report.metrics", first, "macro_f1"},
		{"[report]\ntest_metrics = [\"auc\"]", "report.test_metrics", first, "not a metric"},
		{"[report]\nmetrics = [\"accuracy\"]\ntest_metrics = [\"macro_f1\"]", "report.test_metrics", first + 1, "not among report.metrics"},
		{"[report]\nlayout = \"twocolumn\"", "report.layout", first, "wide"},
		{"[report]\nlayout = 2", "report.layout", first, "string"},
		{"[report]\nsplit = \"model\"", "report.split", first, "dataset"},
		{"[report]\nomit = [\"figures\"]", "report.omit", first, "wilcoxon"},
		{"[report]\nomit = [\"ranks\", \"ranks\"]", "report.omit", first, "twice"},
		{"[report]\nomit = [\"summary\", \"modes\", \"tests\", \"ranks\", \"wilcoxon\"]", "report.omit", first, "every table"},
		{"[report]\nmax_rows = 0", "report.max_rows", first, "out of range"},
		{"[report]\nmax_rows = 1e3", "report.max_rows", first, "integer"},
		{"[report]\ndigits = 0", "report.digits", first, "1 to 6"},
		{"[report]\ndigits = 7", "report.digits", first, "1 to 6"},
		{"[report]\ndigits = \"3\"", "report.digits", first, "integer"},
		{"[report]\nwidth_pt = 50", "report.width_pt", first, "100 to 3000"},
		{"[report]\nheight_pt = 5000.5", "report.height_pt", first, "100 to 3000"},
		{"[report]\nwidth_pt = nan", "report.width_pt", first, "out of range"},
		{"[report]\nwidth_pt = \"wide\"", "report.width_pt", first, "number"},
		{"[report]\nsummary = \"Scores\"", "report.summary", first, "want a table"},
		{"[report.summary]\nbold = true", "report.summary.bold", first, "caption, label"},
		{"[report.summary]\ncaption = \"\"", "report.summary.caption", first, "plain text"},
		{"[report.modes]\ncaption = 3", "report.modes.caption", first, "plain text"},
		{"[report.tests]\nlabel = \"tab:my tests\"", "report.tests.label", first, `"tab:my-tests"`},
		{"[report.ranks]\nlabel = \"\"", "report.ranks.label", first, "label key"},
		{"[report.summary]\nlabel = \"tab:a\"\n[report.wilcoxon]\nlabel = \"tab:a\"", "report.wilcoxon.label", first + 2, "summary table"},
		{"[report]\nmodels = [\"knn-k5\"]\n[report.summary]\ncaption = \"x\"\nlabel = \"tab:x\"\ncolour = 1", "report.summary.colour", first + 4, "unknown key"},
	} {
		_, err := spec.Parse("rep.toml", []byte(strings.Replace(reportBase, "%s", c.table, 1)))
		checkLocated(t, c.table, err, c.key, c.line, c.say)
	}
	// Labels on models (the model tables are lines 10-25 of reportBase).
	model := "name = \"x\"\nseed = 1\ndatasets = [\"iris\"]\n[[model]]\nkind = \"knn\"\n%s\n[[model]]\nkind = \"centroid\"\n%s\n"
	for _, c := range []struct {
		a, b, key string
		line      int
		say       string
	}{
		{"label = 5", "", "model[1].label", 6, "want a string"},
		{"label = \"  \"", "", "model[1].label", 6, "empty label"},
		{"label = [\"a\", \"b\"]", "", "model[1].label", 6, "want a string"},
		{"label = \"base\"", "label = \"base\"", "model[2].label", 9, "also the label of model[1]"},
		{"label = \"centroid\"", "", "model[1].label", 6, "name of model[2]"},
	} {
		src := strings.Replace(strings.Replace(model, "%s", c.a, 1), "%s", c.b, 1)
		_, err := spec.Parse("m.toml", []byte(src))
		checkLocated(t, c.a+" / "+c.b, err, c.key, c.line, c.say)
	}
	// A label may be the model's own name (nothing changes).
	benchtest.Spec(t, "own.toml", strings.Replace(strings.Replace(model, "%s", "label = \"knn-k5\"", 1), "%s", "", 1))
}

func checkLocated(t *testing.T, what string, err error, key string, line int, say string) {
	t.Helper()
	var ie *input.Error
	if !errors.As(err, &ie) || !errors.Is(err, input.ErrBad) {
		t.Errorf("%q: error %v, want an input.Error", what, err)
		return
	}
	if ie.Key != key || ie.Line != line || ie.File == "" || !strings.Contains(err.Error(), say) {
		t.Errorf("%q: key %q line %d: %v; want key %q line %d and %q", what, ie.Key, ie.Line, err, key, line, say)
	}
	if strings.Contains(err.Error(), "\n") {
		t.Errorf("%q: message on several lines: %q", what, err)
	}
}

// TestReportCheckAtPlan: plan.New refuses report options that name what
// the spec lacks, for specs changed or built in code after Parse.
func TestReportCheckAtPlan(t *testing.T) {
	s := benchtest.Spec(t, "p.toml", "name = \"x\"\nseed = 1\ndatasets = [\"iris\"]\n[cv]\nfolds = 3\n[[model]]\nkind = \"knn\"\n")
	s.Report.Datasets = []string{"wine"}
	_, err := plan.New(s)
	var ie *input.Error
	if !errors.As(err, &ie) || ie.Key != "report.datasets" || !strings.Contains(err.Error(), `"wine"`) {
		t.Errorf("plan.New with report.datasets = [wine] on an iris run: %v", err)
	}
	s.Report.Datasets = nil
	s.Models[0].Label = "centroid-like"
	s.Report.Digits = 9
	if _, err := plan.New(s); !errors.As(err, &ie) || ie.Key != "report" || !strings.Contains(err.Error(), "digits") {
		t.Errorf("plan.New with digits 9 set in code: %v", err)
	}
}
