package baselines

import "fmt"

// Memory estimates of k-NN and logistic regression, for a planner that
// refuses a run before it starts (see SVM.MemoryBytes for the SVM). Like
// that one they count the model's own allocations, not the caller's
// matrices, and double the sum: the Go runtime with its default GOGC = 100
// lets the heap grow to twice the memory still in use before it collects.
// Both models are linear in the rows; neither holds a distance or kernel
// matrix.

// MemoryBytes returns an estimate of the peak memory, in bytes, of Fit on
// nTrain rows of d features followed by Predict (or PredictProba) on any
// number of test rows: the copy of the training rows (8·nTrain·d), the
// labels and squared norms (16 per row; 8 more for the norms under Cosine),
// the scratch of one Predict call (the estimated distances to every
// training row, 8 per row), and, when the k-d tree may be built (KNNAuto
// or KNNTree), the tree: a second copy of the rows in tree order
// (8·nTrain·d, twice under Cosine), the permutation (8 per row) and at most
// 4n/32 + 2 nodes with two boxes of d values each; doubled (see above).
// Predict's output (one int per test row) is the caller's. It returns an
// error wrapping ErrParam for negative sizes.
func (m *KNN) MemoryBytes(nTrain, d int) (int64, error) {
	if nTrain < 0 || d < 0 {
		return 0, fmt.Errorf("baselines: knn: memory estimate for %d rows, %d features: %w", nTrain, d, ErrParam)
	}
	n, dd := int64(nTrain), int64(d)
	perRow := int64(16 + 8) // labels, squared norms, one Predict's estimates
	if m.Metric == Cosine {
		perRow += 8
	}
	b := 8*n*dd + perRow*n
	if m.Method != KNNBrute && nTrain >= kdMinRows && d <= kdMaxDim || m.Method == KNNTree {
		copies := int64(1)
		if m.Metric == Cosine {
			copies = 2
		}
		nodes := 4*n/kdLeafSize + 2
		b += copies*8*n*dd + 8*n + nodes*(16+2*8*dd)
	}
	return 2 * b, nil
}

// MemoryBytes returns an estimate of the peak memory, in bytes, of Fit on
// nTrain rows of d features in nClass classes: for three or more classes
// the softmax probabilities, residuals and the scratch of the
// Hessian-vector products (three nClass × nTrain matrices, 24·nClass bytes
// per row), for two classes the same with one column (24 bytes per row),
// plus the labels (8 per row) and the parameter vectors of L-BFGS (its
// history of 15 pairs and the Newton steps' vectors, about 50 vectors of
// nClass·(d+1) values); doubled (see above). The training matrix is read
// in place. It returns an error wrapping ErrParam for negative sizes.
func (m *LogReg) MemoryBytes(nTrain, d, nClass int) (int64, error) {
	if nTrain < 0 || d < 0 || nClass < 0 {
		return 0, fmt.Errorf("baselines: logreg: memory estimate for %d rows, %d features, %d classes: %w", nTrain, d, nClass, ErrParam)
	}
	n, k := int64(nTrain), int64(max(nClass, 1))
	cols := k
	if nClass <= 2 {
		cols = 1
	}
	b := 24*cols*n + 8*n + 50*8*k*int64(d+1)
	return 2 * b, nil
}
