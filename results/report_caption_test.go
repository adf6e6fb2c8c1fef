package results

import (
	"bytes"
	"strings"
	"testing"
)

// TestAuthorCaptions: an author's caption is a sentence of its own, and
// the generated description that follows it starts with a capital; with
// no caption the description follows "Run NAME: " in lower case.
func TestAuthorCaptions(t *testing.T) {
	r := synthReport()
	r.Pairs = []PairAcross{{Pipeline: "std+l2", A: "q", B: "knn", Metric: "accuracy", N: 2, RPlus: 1, RMinus: 2, Statistic: 1, P: 1, PAdj: 1, Alpha: 0.05}}
	plain := mustTeX(t, r).Text
	for _, want := range []string{
		`\caption{Run synth\_1: accuracy of the interference classifier in each mode`,
		`\caption{Run synth\_1: paired tests of each model against knn on the same pipeline`,
		`\caption{Run synth\_1: average ranks across datasets`,
		`\caption{Run synth\_1: Wilcoxon signed-ranks tests`,
	} {
		if !strings.Contains(plain, want) {
			t.Errorf("summary.tex without captions lacks %q", want)
		}
	}
	r.Options = ReportOptions{
		Modes:    TableText{Caption: "By mode"},
		Tests:    TableText{Caption: "Tests!"},
		Ranks:    TableText{Caption: "Ranks"},
		Wilcoxon: TableText{Caption: "Pairs of models"},
	}
	own := mustTeX(t, r).Text
	for _, want := range []string{
		`\caption{By mode. Accuracy of the interference classifier in each mode`,
		`\caption{Tests! Paired tests of each model against knn on the same pipeline`,
		`\caption{Ranks. Average ranks across datasets`,
		`\caption{Pairs of models. Wilcoxon signed-ranks tests`,
	} {
		if !strings.Contains(own, want) {
			t.Errorf("summary.tex with captions lacks %q", want)
		}
	}
}

// TestTunedChoicesLabelled: the list of tuned models' choices shows the
// labels and only the cells the options select.
func TestTunedChoicesLabelled(t *testing.T) {
	r := synthReport()
	r.Choices = []ChoiceCount{
		{Dataset: "iris_2", Pipeline: "std+l2", Model: "knn", Params: "k=5", Count: 7, Of: 10},
		{Dataset: "iris_2", Pipeline: "std+l2", Model: "knn", Params: "k=9", Count: 3, Of: 10},
		{Dataset: "wine", Pipeline: "std+l2", Model: "knn", Params: "k=1", Count: 10, Of: 10},
	}
	r.Options = ReportOptions{Datasets: []string{"wine"}, ModelLabels: map[string]string{"knn": "k-NN (tuned)"}}
	tex := mustTeX(t, r).Text
	var md bytes.Buffer
	if err := WriteReportMarkdown(&md, r); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(tex, `\item k-NN (tuned), wine, std+l2: k=1`) || strings.Contains(tex, "k=9") {
		t.Errorf("summary.tex's tuned models:\n%s", tex[strings.Index(tex, `\paragraph{Tuned models.}`):])
	}
	if !strings.Contains(md.String(), "- k-NN (tuned), wine, std+l2: k=1") || strings.Contains(md.String(), "k=9") {
		t.Errorf("summary.md's tuned models:\n%s", md.String())
	}
}
