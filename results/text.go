package results

import (
	"fmt"
	"io"
	"math"
	"strings"
	"text/tabwriter"
)

// WriteSummaryText writes a plain-text table of the summary for a terminal:
// one row per cell with accuracy (mean and interval), balanced accuracy and
// macro F1 means, and the mean post-selection probability where reported.
func WriteSummaryText(w io.Writer, rows []Summary) error {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "dataset\tpipeline\tmodel\taccuracy\t95% interval\tbal. acc.\tmacro F1\tmean p_acc")
	for _, r := range rows {
		acc := r.Metrics[0]
		iv := "-"
		if !math.IsNaN(acc.Lo) {
			iv = fmt.Sprintf("[%.3f, %.3f]", acc.Lo, acc.Hi)
		}
		pacc := "-"
		if !math.IsNaN(r.MeanPAcc) {
			pacc = fmt.Sprintf("%.3f", r.MeanPAcc)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n", r.Dataset, r.Pipeline, r.Model,
			f3(acc.Mean), iv, f3(r.Metrics[1].Mean), f3(r.Metrics[2].Mean), pacc)
	}
	return tw.Flush()
}

func f3(v float64) string {
	if math.IsNaN(v) {
		return "-"
	}
	return strings.TrimSpace(fmt.Sprintf("%.3f", v))
}
