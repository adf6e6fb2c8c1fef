package results

// Scores are the per-fold metrics.
type Scores struct {
	Accuracy         float64
	BalancedAccuracy float64
	MacroF1          float64
}

// MetricNames lists the metrics in output order; Value returns them by name.
var MetricNames = []string{"accuracy", "balanced_accuracy", "macro_f1"}

// Values returns the metrics in the order of MetricNames.
func (s Scores) Values() []float64 {
	return []float64{s.Accuracy, s.BalancedAccuracy, s.MacroF1}
}

// Score computes the metrics of predicted against true class indices in
// [0, nClass). It panics if the slices differ in length or are empty, or a
// class index is out of range: those are broken invariants of the caller.
func Score(truth, pred []int, nClass int) Scores {
	if len(truth) != len(pred) || len(truth) == 0 {
		panic("results: Score needs equal, non-empty slices")
	}
	conf := make([]int, nClass*nClass) // conf[t*nClass+p]
	correct := 0
	for i, t := range truth {
		p := pred[i]
		if t < 0 || t >= nClass || p < 0 || p >= nClass {
			panic("results: class index out of range")
		}
		conf[t*nClass+p]++
		if t == p {
			correct++
		}
	}
	var s Scores
	s.Accuracy = float64(correct) / float64(len(truth))
	var recallSum float64
	var nTrue int
	var f1Sum float64
	var nLabels int
	for k := 0; k < nClass; k++ {
		var tp, rowSum, colSum int
		tp = conf[k*nClass+k]
		for j := 0; j < nClass; j++ {
			rowSum += conf[k*nClass+j]
			colSum += conf[j*nClass+k]
		}
		if rowSum > 0 {
			recallSum += float64(tp) / float64(rowSum)
			nTrue++
		}
		if rowSum > 0 || colSum > 0 {
			nLabels++
			if tp > 0 {
				f1Sum += 2 * float64(tp) / float64(rowSum+colSum)
			}
		}
	}
	s.BalancedAccuracy = recallSum / float64(nTrue)
	s.MacroF1 = f1Sum / float64(nLabels)
	return s
}
