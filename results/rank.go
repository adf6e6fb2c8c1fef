package results

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"
)

// WriteRankText writes a rank table for a terminal: the models by average
// rank, Friedman's chi-square (Demšar's form and tie-corrected), the
// Iman–Davenport F (from the tie-corrected chi-square) with its p-value and
// decision, the Nemenyi critical difference, the groups of models not
// significantly different, and the warnings.
func WriteRankText(w io.Writer, t RankTable) error {
	var b strings.Builder
	fmt.Fprintf(&b, "%d models ranked on %d datasets (rank 1 = highest %s; ties share the average rank)\n\n", len(t.Models), len(t.Datasets), t.Metric)
	tw := tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "rank\tmodel\taverage rank")
	for i, j := range rankOrder(t.AvgRanks) {
		fmt.Fprintf(tw, "%d\t%s\t%.3f\n", i+1, t.Models[j], t.AvgRanks[j])
	}
	tw.Flush()
	fmt.Fprintf(&b, "\nFriedman chi-square     %.3f  (Demšar's form, no tie correction; df %d, %s)\n", t.ChiSq, t.DF, pIs(t.ChiSqP))
	fmt.Fprintf(&b, "  tie-corrected         %s  (df %d, %s; the F below uses it)\n", fmtStat(t.ChiSqTieCorrected), t.DF, pIs(t.ChiSqTieCorrectedP))
	verdict := "the models do not all perform alike"
	if !t.Reject {
		verdict = "no evidence that the models differ"
	}
	fmt.Fprintf(&b, "Iman-Davenport F        %s  (df %d, %d, %s): %s at alpha = %s\n", fmtStat(t.F), t.DF1, t.DF2, pIs(t.P), verdict, fmtAlpha(t.Alpha))
	fmt.Fprintf(&b, "Nemenyi critical difference  %.3f  (alpha = %s, %d models, %d datasets)\n", t.CD, fmtAlpha(t.Alpha), len(t.Models), len(t.Datasets))
	if gs := t.Groups(); len(gs) > 0 {
		b.WriteString("Not significantly different (average ranks within one critical difference):\n")
		for _, g := range gs {
			names := make([]string, len(g))
			for i, j := range g {
				names[i] = t.Models[j]
			}
			b.WriteString("  " + strings.Join(names, ", ") + "\n")
		}
	} else {
		b.WriteString("Every pair of models differs by more than the critical difference.\n")
	}
	if len(t.Warnings) > 0 {
		b.WriteString("\nwarnings:\n")
		for _, wn := range t.Warnings {
			b.WriteString("  " + wn + "\n")
		}
		if strings.Contains(strings.Join(t.Warnings, " "), "indices") {
			b.WriteString("  (data set indices: ")
			for i, d := range t.Datasets {
				if i > 0 {
					b.WriteString(", ")
				}
				fmt.Fprintf(&b, "%d = %s", i, d)
			}
			b.WriteString(")\n")
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// RankJSON is the JSON form of a rank table printed by `fringe rank -json`.
type RankJSON struct {
	AvgRanks           map[string]float64 `json:"avg_ranks"`
	FriedmanChi2       float64            `json:"friedman_chi2"`
	FriedmanChi2Tied   *float64           `json:"friedman_chi2_tie_corrected"`
	PValueChi2Tied     *float64           `json:"p_value_chi2_tie_corrected"`
	ImanDavenportF     float64            `json:"iman_davenport_f"`
	PValue             float64            `json:"p_value"`
	CriticalDifference float64            `json:"critical_difference"`
	Alpha              float64            `json:"alpha"`
	Reject             bool               `json:"reject"`
	DFChi2             int                `json:"df_chi2"`
	PValueChi2         float64            `json:"p_value_chi2"`
	DF1                int                `json:"df1"`
	DF2                int                `json:"df2"`
	Datasets           []string           `json:"datasets"`
	Models             []string           `json:"models_by_rank"`
	Groups             [][]string         `json:"groups"`
	Warnings           []string           `json:"warnings"`
}

// NewRankJSON converts a rank table. An infinite F (every dataset ranks
// the models alike) is written as the largest float64, since JSON has no
// infinity.
func NewRankJSON(t RankTable) RankJSON {
	j := RankJSON{
		AvgRanks: map[string]float64{}, FriedmanChi2: t.ChiSq, ImanDavenportF: finiteJSON(t.F), PValue: t.P,
		CriticalDifference: t.CD, Alpha: t.Alpha, Reject: t.Reject, DFChi2: t.DF, PValueChi2: t.ChiSqP,
		DF1: t.DF1, DF2: t.DF2, Datasets: t.Datasets, Groups: [][]string{}, Warnings: t.Warnings,
	}
	if j.Warnings == nil {
		j.Warnings = []string{}
	}
	// NaN (every dataset ties all models) is null.
	if !math.IsNaN(t.ChiSqTieCorrected) {
		x, p := t.ChiSqTieCorrected, t.ChiSqTieCorrectedP
		j.FriedmanChi2Tied, j.PValueChi2Tied = &x, &p
	}
	for i, m := range t.Models {
		j.AvgRanks[m] = t.AvgRanks[i]
	}
	for _, i := range rankOrder(t.AvgRanks) {
		j.Models = append(j.Models, t.Models[i])
	}
	for _, g := range t.Groups() {
		names := make([]string, len(g))
		for i, k := range g {
			names[i] = t.Models[k]
		}
		j.Groups = append(j.Groups, names)
	}
	return j
}

// WriteRankJSON writes NewRankJSON(t) as indented JSON.
func WriteRankJSON(w io.Writer, t RankTable) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(NewRankJSON(t))
}
