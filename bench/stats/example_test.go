package stats_test

import (
	"fmt"

	"fringe/bench/stats"
)

// Accuracy of one model over 3 repeats of 5-fold cross-validation on a
// data set of 100 instances (80 train, 20 test per fold). Invented numbers.
func ExampleCorrectedInterval() {
	scores := []float64{
		0.85, 0.90, 0.80, 0.95, 0.85,
		0.90, 0.85, 0.85, 0.90, 0.80,
		0.95, 0.85, 0.80, 0.90, 0.85,
	}
	c, _ := stats.CorrectedInterval(scores, 80, 20, 0.05)
	n, _ := stats.NaiveInterval(scores, 0.05)
	fmt.Printf("mean %.4f\n", c.Mean)
	fmt.Printf("corrected [%.4f, %.4f]\n", c.Lo, c.Hi)
	fmt.Printf("naive     [%.4f, %.4f]\n", n.Lo, n.Hi)
	// Output:
	// mean 0.8667
	// corrected [0.8078, 0.9256]
	// naive     [0.8396, 0.8937]
}

// Three models scored on six data sets (higher is better). Invented
// numbers.
func ExampleFriedman() {
	scores := [][]float64{
		// interference, knn, svm
		{0.91, 0.93, 0.95},
		{0.72, 0.70, 0.78},
		{0.88, 0.86, 0.90},
		{0.64, 0.69, 0.71},
		{0.97, 0.95, 0.97},
		{0.81, 0.83, 0.86},
	}
	r, _ := stats.Friedman(scores, 0.05)
	fmt.Printf("average ranks %.3f\n", r.AvgRanks)
	fmt.Printf("chi2 %.3f (Demšar's form), %.3f (tie-corrected)\n", r.ChiSq, r.ChiSqTieCorrected)
	fmt.Printf("F %.3f  p %.4f  CD %.3f\n", r.ImanDavenportF, r.P, r.CD)
	for _, w := range r.Warnings {
		fmt.Println("warning:", w)
	}
	// Output:
	// average ranks [2.417 2.500 1.083]
	// chi2 7.583 (Demšar's form), 7.913 (tie-corrected)
	// F 9.681  p 0.0046  CD 1.353
	// warning: ties within 1 data sets (indices 4): average ranks used; the decision uses the tie-corrected Friedman statistic (Demšar's uncorrected form is given beside it)
	// warning: few data sets (N = 6 ≤ 10): the chi-square and F approximations are rough
}

// Ten folds of 178 instances: eight folds test 18 instances, two test 17,
// so the mean sizes are 160.2 and 17.8 (ratio exactly 1/9). Invented
// scores.
func ExampleCorrectedIntervalSizes() {
	nTest := []int{18, 18, 18, 18, 18, 18, 18, 18, 17, 17}
	nTrain := make([]int, len(nTest))
	for i, n := range nTest {
		nTrain[i] = 178 - n
	}
	sizes, _ := stats.MeanSizes(nTrain, nTest)
	scores := []float64{0.944, 0.889, 1, 0.944, 0.889, 0.944, 1, 0.944, 0.941, 1}
	iv, _ := stats.CorrectedIntervalSizes(scores, sizes, 0.05)
	fmt.Printf("sizes %.1f / %.1f\n", sizes.Train, sizes.Test)
	fmt.Printf("mean %.4f [%.4f, %.4f]\n", iv.Mean, iv.Lo, iv.Hi)
	// Output:
	// sizes 160.2 / 17.8
	// mean 0.9495 [0.9068, 0.9922]
}
