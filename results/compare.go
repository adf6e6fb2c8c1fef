package results

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strings"
)

// CellChange is the change of one metric of one (dataset, pipeline,
// model) cell between a baseline run and a new run.
type CellChange struct {
	Dataset, Pipeline, Model string
	Metric                   string
	Base, New                float64 // the two means
	// Delta is New − Base; Lo and Hi its confidence interval at 1 − Alpha
	// (NaN when the method gives none).
	Delta, Lo, Hi float64
	// Method names how the change was tested: "paired-t" (corrected
	// resampled t on paired fold scores), "welch-t" (unpaired, corrected
	// standard errors, Welch–Satterthwaite df), "mcnemar" (paired
	// predictions), "two-proportion" (unpaired pooled accuracy), or
	// "none".
	Method    string
	Statistic float64
	DF        float64 // fractional for Welch; 0 where none
	P         float64 // NaN when untested
	// PAdj is P after the multiple-test correction over the gated family;
	// NaN for metrics that do not gate.
	PAdj float64
	// Gated is true for the metrics that may flag a regression.
	Gated bool
	// Regression: Gated, Delta < −Tolerance and PAdj ≤ Alpha.
	Regression bool
	Note       string
}

// RunComparison is the result of comparing a new run with a baseline.
type RunComparison struct {
	BaseDir, NewDir string
	Alpha           float64
	Tolerance       float64
	Correction      string   // "holm" or "none"
	Gated           []string // metrics that may flag a regression
	Pairing         string   // how the runs were judged to share their splits
	Cells           []CellChange
	OnlyBase        []string // cells (dataset/pipeline/model) missing from the new run
	OnlyNew         []string // cells new in the new run
	Regressions     int      // number of regressing (cell, metric) entries
	Warnings        []string
}

func fmtDelta(v float64) string {
	if math.IsNaN(v) {
		return "–"
	}
	return fmtSigned(v)
}

// WriteCompareMarkdown writes a comparison as a Markdown table (readable
// as text), regressions first flagged with "REGRESSION", followed by the
// cells present in one run only and the verdict.
func WriteCompareMarkdown(w io.Writer, c *RunComparison) error {
	var b strings.Builder
	fmt.Fprintf(&b, "# fringe compare\n\nBaseline: %s  \nNew: %s\n\n", MDEscape(c.BaseDir), MDEscape(c.NewDir))
	corr := "no correction"
	if c.Correction == "holm" {
		corr = "Holm's correction over the gated tests"
	}
	fmt.Fprintf(&b, "A regression is a gated metric (%s) whose new mean is lower by more than %s and whose drop is significant at α = %s after %s. %s\n\n",
		strings.Join(c.Gated, ", "), fmtAlpha(c.Tolerance), fmtAlpha(c.Alpha), corr, MDEscape(c.Pairing))
	b.WriteString("| Dataset | Pipeline | Model | Metric | Baseline | New | Δ | interval | method | p | p adj. | status |\n")
	b.WriteString("|---|---|---|---|---:|---:|---:|---:|---|---:|---:|---|\n")
	for _, x := range c.Cells {
		status := "ok"
		switch {
		case x.Regression:
			status = "**REGRESSION**"
		case !x.Gated:
			status = "not gated"
		}
		fmt.Fprintf(&b, "| %s | %s | %s | %s | %s | %s | %s | %s | %s | %s | %s | %s |\n",
			MDEscape(x.Dataset), MDEscape(x.Pipeline), MDEscape(x.Model), MDEscape(x.Metric),
			fmt3(x.Base), fmt3(x.New), fmtDelta(x.Delta), fmtInterval(x.Lo, x.Hi), x.Method, fmtP(x.P), fmtP(x.PAdj), status)
	}
	if len(c.OnlyBase) > 0 {
		b.WriteString("\nOnly in the baseline (not compared): " + MDEscape(strings.Join(c.OnlyBase, ", ")) + "\n")
	}
	if len(c.OnlyNew) > 0 {
		b.WriteString("\nOnly in the new run (not compared): " + MDEscape(strings.Join(c.OnlyNew, ", ")) + "\n")
	}
	if len(c.Warnings) > 0 {
		b.WriteString("\nWarnings:\n\n")
		for _, wn := range c.Warnings {
			b.WriteString("- " + MDEscape(wn) + "\n")
		}
	}
	if c.Regressions > 0 {
		fmt.Fprintf(&b, "\nVerdict: %d regression(s).\n", c.Regressions)
	} else {
		b.WriteString("\nVerdict: no regression.\n")
	}
	_, err := io.WriteString(w, b.String())
	return err
}

func fmt3(v float64) string {
	if math.IsNaN(v) {
		return "–"
	}
	return fmt.Sprintf("%.3f", v)
}

// finiteJSON maps values JSON cannot hold: ±Inf to ±MaxFloat64. NaN
// stays NaN; callers turn it into null with jsonNumber.
func finiteJSON(v float64) float64 {
	switch {
	case math.IsInf(v, 1):
		return math.MaxFloat64
	case math.IsInf(v, -1):
		return -math.MaxFloat64
	}
	return v
}

// jsonNumber is a float64 written as null when NaN and clamped when
// infinite.
type jsonNumber float64

func (n jsonNumber) MarshalJSON() ([]byte, error) {
	v := float64(n)
	if math.IsNaN(v) {
		return []byte("null"), nil
	}
	return json.Marshal(finiteJSON(v))
}

type cellJSON struct {
	Dataset    string     `json:"dataset"`
	Pipeline   string     `json:"pipeline"`
	Model      string     `json:"model"`
	Metric     string     `json:"metric"`
	Base       jsonNumber `json:"base"`
	New        jsonNumber `json:"new"`
	Delta      jsonNumber `json:"delta"`
	Lo         jsonNumber `json:"delta_lo"`
	Hi         jsonNumber `json:"delta_hi"`
	Method     string     `json:"method"`
	Statistic  jsonNumber `json:"statistic"`
	DF         jsonNumber `json:"df"`
	P          jsonNumber `json:"p_value"`
	PAdj       jsonNumber `json:"p_adjusted"`
	Gated      bool       `json:"gated"`
	Regression bool       `json:"regression"`
	Note       string     `json:"note,omitempty"`
}

type compareJSON struct {
	Baseline    string     `json:"baseline"`
	New         string     `json:"new"`
	Alpha       float64    `json:"alpha"`
	Tolerance   float64    `json:"tolerance"`
	Correction  string     `json:"correction"`
	Gated       []string   `json:"gated_metrics"`
	Pairing     string     `json:"pairing"`
	Regressions int        `json:"regressions"`
	Regressed   bool       `json:"regressed"`
	Compared    int        `json:"cells_compared"`
	OnlyBase    []string   `json:"only_in_baseline"`
	OnlyNew     []string   `json:"only_in_new"`
	Warnings    []string   `json:"warnings"`
	Cells       []cellJSON `json:"cells"`
}

// WriteCompareJSON writes the comparison as one JSON object: the settings,
// "regressions" (count) and "regressed" (bool), and every cell and metric
// with its change, interval, test, p-values and status. NaN is null.
func WriteCompareJSON(w io.Writer, c *RunComparison) error {
	j := compareJSON{
		Baseline: c.BaseDir, New: c.NewDir, Alpha: c.Alpha, Tolerance: c.Tolerance, Correction: c.Correction,
		Gated: c.Gated, Pairing: c.Pairing, Regressions: c.Regressions, Regressed: c.Regressions > 0,
		OnlyBase: nonNil(c.OnlyBase), OnlyNew: nonNil(c.OnlyNew), Warnings: nonNil(c.Warnings), Cells: []cellJSON{},
	}
	seen := map[string]bool{}
	for _, x := range c.Cells {
		k := x.Dataset + "\x00" + x.Pipeline + "\x00" + x.Model
		if !seen[k] {
			seen[k] = true
			j.Compared++
		}
		j.Cells = append(j.Cells, cellJSON{
			Dataset: x.Dataset, Pipeline: x.Pipeline, Model: x.Model, Metric: x.Metric,
			Base: jsonNumber(x.Base), New: jsonNumber(x.New), Delta: jsonNumber(x.Delta),
			Lo: jsonNumber(x.Lo), Hi: jsonNumber(x.Hi), Method: x.Method, Statistic: jsonNumber(x.Statistic),
			DF: jsonNumber(x.DF), P: jsonNumber(x.P), PAdj: jsonNumber(x.PAdj), Gated: x.Gated, Regression: x.Regression, Note: x.Note,
		})
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(j)
}

func nonNil(s []string) []string {
	if s == nil {
		return []string{}
	}
	return s
}
