package results

import (
	"encoding/csv"
	"io"
	"math"
	"strconv"
)

// fmtStatCSV formats a test statistic for CSV: FloatDigits decimals, "inf"
// and "-inf" for infinite values (a zero-variance t), "" for NaN.
func fmtStatCSV(v float64) string {
	switch {
	case math.IsInf(v, 1):
		return "inf"
	case math.IsInf(v, -1):
		return "-inf"
	}
	return Fmt(v)
}

// WriteComparisons writes comparisons.csv: one row per paired comparison
// of a cell with its reference on one metric — the difference of means
// (model − reference) and its interval, the test, its statistic, degrees
// of freedom, p-value, Holm-adjusted p-value, alpha and verdict (better,
// worse, n.s.). Warnings are not written here (they are in summary.md and
// the manifest).
func WriteComparisons(w io.Writer, rows []Comparison) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"dataset", "pipeline", "model", "ref_pipeline", "ref_model", "metric", "test",
		"diff", "diff_lo", "diff_hi", "statistic", "df", "p", "p_adj", "alpha", "verdict"})
	for _, c := range rows {
		df := ""
		if c.DF > 0 {
			df = strconv.Itoa(c.DF)
		}
		cw.Write(append(csvTexts(c.Dataset, c.Pipeline, c.Model, c.RefPipeline, c.RefModel, c.Metric, c.Test),
			Fmt(c.Diff), Fmt(c.Lo), Fmt(c.Hi), fmtStatCSV(c.Statistic), df, Fmt(c.P), Fmt(c.PAdj),
			strconv.FormatFloat(c.Alpha, 'f', -1, 64), c.Verdict()))
	}
	cw.Flush()
	return cw.Error()
}
